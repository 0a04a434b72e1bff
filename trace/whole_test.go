// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"fmt"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/spaces"
	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

// TestWholeSampleDisjointUnion traces, at the default settings, a
// sample whose classes are samples of textbook spaces (internal/spaces,
// truth from Hatcher, Algebraic Topology, 2002) of 400 points each in
// R⁸, at different sizes and far apart, through an identity stage. Each
// class must read its space's Betti numbers and the whole sample their
// sum (Hatcher, Proposition 2.6: the homology of a disjoint union is
// the direct sum), at the input and after the identity.
func TestWholeSampleDisjointUnion(t *testing.T) {
	if testing.Short() {
		t.Skip("traces 2400 points")
	}
	byName := map[string]spaces.Space{}
	for _, s := range spaces.All() {
		byName[s.Name] = s
	}
	parts := []struct {
		name  string
		scale float64
	}{
		{"circle", 1}, {"two-circles", 0.2}, {"annulus", 3}, {"disc", 0.5}, {"blobs", 0.1}, {"uneven-circle", 2},
	}
	const per, dim = 400, 8
	x := mat.NewDense(len(parts)*per, dim, nil)
	labels := make([]string, len(parts)*per)
	want := make([]int, 2)
	for c, p := range parts {
		sp := byName[p.name]
		pts := sp.Sample(per, 0.025, spaces.Embedding{D: dim, Cond: 1}, uint64(500+c))
		for i := range per {
			row := x.RawRowView(c*per + i)
			for j, v := range pts.RawRowView(i) {
				row[j] = p.scale * v
			}
			row[0] += 40 * float64(c) // far apart
			labels[c*per+i] = p.name
		}
		for d, b := range sp.Truth(2, 1) {
			want[d] += b
		}
	}
	s, err := trace.NewSample(x, labels)
	if err != nil {
		t.Fatal(err)
	}
	id := mat.NewDense(dim, dim, nil)
	for i := range dim {
		id.Set(i, i, 1)
	}
	stages := []onnxload.Stage{{Kind: onnxload.Affine, In: dim, Out: dim, Nodes: []string{"id"}, W: id, B: make([]float64, dim)}}
	tr, err := trace.Run(context.Background(), stages, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Stages) != 2 {
		t.Fatalf("%d stages, want 2", len(tr.Stages))
	}
	for _, st := range tr.Stages {
		t.Logf("stage %d: whole %v over %d points", st.Index, st.Whole.BettiString(), st.Whole.Count)
		if got := st.Whole.Betti; !slices.Equal(got, want) {
			t.Errorf("stage %d: whole sample reads %v (confident %v), want the disjoint union's %v; evidence %v", st.Index, got, st.Whole.BettiConfident, want, fmt.Sprint(st.Whole.Evidence))
		}
		for _, p := range parts {
			g := st.Group(p.name)
			if truth := byName[p.name].Truth(2, 1); !slices.Equal(g.Betti, truth) {
				t.Errorf("stage %d: class %s reads %v, want %v", st.Index, p.name, g.Betti, truth)
			}
		}
	}
}
