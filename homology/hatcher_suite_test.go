// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology_test

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/homology"
	"crease.dev/crease/internal/spaces"
)

// suiteTally counts how the default reading fares on a set of cases.
type suiteTally struct {
	total, right, confident, confidentWrong int
}

// TestHatcherSuite reads random samples of spaces with textbook Betti
// numbers (Hatcher, Algebraic Topology, 2002; each space names its
// result in internal/spaces) at the default settings of Read, at H0–H2,
// and checks that no reading marked confident is wrong, and that the
// share read right at 150 points or more is at least the target of
// 95 % (measured 98.1 %; 97.4 % to 100 % on eight draws of the suite,
// see the README's table). Spaces marked Apart count only towards the
// confident wrong readings.
func TestHatcherSuite(t *testing.T) {
	sizes := []int{60, 150, 400}
	if !testing.Short() {
		sizes = append(sizes, 1000)
	}
	var small, large, apart suiteTally
	for _, c := range spaces.Suite(sizes) {
		rd, err := homology.Read(context.Background(), c.Points(), &homology.ReadSettings{MaxDim: 2, Field: c.Field})
		if err != nil {
			t.Fatalf("%s: %v", c.Name(), err)
		}
		tl := &large
		switch {
		case c.Space.Apart != "":
			tl = &apart
		case c.N < 150:
			tl = &small
		}
		tl.total++
		truth := c.Truth(2)
		right, sure, cw := true, true, false
		for d, b := range rd.Betti {
			if b != truth[d] {
				right = false
				cw = cw || rd.Confident[d]
			}
			sure = sure && rd.Confident[d]
		}
		if right {
			tl.right++
			if sure {
				tl.confident++
			}
		}
		if cw {
			tl.confidentWrong++
			t.Logf("%s: confident wrong reading %v (truth %v), confident %v", c.Name(), rd.Betti, truth, rd.Confident)
		}
	}
	t.Logf("n ≥ 150: %d of %d right (%.1f %%), %d right and confident, %d confident wrong", large.right, large.total, 100*float64(large.right)/float64(large.total), large.confident, large.confidentWrong)
	t.Logf("n = 60: %d of %d right, %d confident wrong", small.right, small.total, small.confidentWrong)
	t.Logf("reported apart: %d of %d right, %d confident wrong", apart.right, apart.total, apart.confidentWrong)
	// Measured (2026-12-04): 98.1 % right at n ≥ 150 (97.1 % without the
	// 1000-point samples) and no confident wrong reading among 224
	// (before the whitened reading of RuleRatio, the stretched torus at
	// 1000 points read β₂ = 2 and RP² over Z/3 read β₂ = 1, confidently;
	// before the resolution test, 94.9 %).
	const floor = 0.95 // the target
	if frac := float64(large.right) / float64(large.total); frac < floor {
		t.Errorf("n ≥ 150: %.1f %% right, below the target of %.0f %%", 100*frac, 100*floor)
	}
	if n := large.confidentWrong + small.confidentWrong + apart.confidentWrong; n > 0 {
		t.Errorf("%d confident wrong readings: a reading the sample cannot decide must be undetermined", n)
	}
}

// TestReadDisjointUnion checks that a sample made of pieces at very
// different scales, far apart, reads as their disjoint union: Betti
// numbers add (Hatcher, Proposition 2.6).
func TestReadDisjointUnion(t *testing.T) {
	all := spaces.All()
	byName := map[string]spaces.Space{}
	for _, s := range all {
		byName[s.Name] = s
	}
	parts := []struct {
		name   string
		scale  float64
		offset float64
	}{
		{"circle", 1, 0},
		{"two-circles", 0.05, 100},
		{"blobs", 20, 400},
	}
	e := spaces.Embedding{D: 8, Cond: 1}
	var rows [][]float64
	want := make([]int, 2)
	for i, p := range parts {
		sp := byName[p.name]
		x := sp.Sample(300, 0.02, e, uint64(77+i))
		n, d := x.Dims()
		for r := range n {
			row := make([]float64, d)
			for j := range d {
				row[j] = p.scale*x.At(r, j) + p.offset
			}
			rows = append(rows, row)
		}
		for k, b := range sp.Truth(2, 1) {
			want[k] += b
		}
	}
	m := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		m.SetRow(i, r)
	}
	rd, err := homology.Read(context.Background(), m, nil)
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(rd.Betti) != fmt.Sprint(want) {
		t.Errorf("disjoint union reads %v (confident %v), want %v; evidence %+v", rd.Betti, rd.Confident, want, rd.Evidence)
	}
}

// TestReadAnisotropyGuard checks the cases the whitened reading was
// built for. A torus of revolution (Hatcher, 2002, Example 2.36: β = 1,
// 2, 1) stretched by a linear map of condition number 10 has two
// significant H2 bars in its Rips filtration (a stretched circle is an
// ellipse, and Rips complexes of ellipses are homotopy equivalent to a
// 2-sphere at some scales: Adamaszek, Adams and Reddy, "On
// Vietoris–Rips complexes of ellipses", J. Topol. Anal. 11, 2019). A
// sphere (Hatcher, 2002, Corollary 2.14: β = 1, 0, 1) so stretched is a
// flat ellipsoid whose void fills at the scale of its shortest axis,
// before the 1-cycles of the noise have died, so that nothing above H0
// reads in the cloud's own coordinates. Read in each component's
// principal coordinates each has one void, the count the reading must
// give; since the two readings disagree, it must not be confident.
func TestReadAnisotropyGuard(t *testing.T) {
	for _, test := range []struct {
		space string
		n     int
	}{
		{space: "torus-revolution", n: 1000},
		{space: "sphere", n: 150},
	} {
		var found bool
		for _, c := range spaces.Suite([]int{test.n}) {
			if c.Space.Name != test.space || c.Embed.Cond != 10 || c.Embed.D != 8 {
				continue
			}
			found = true
			rd, err := homology.Read(context.Background(), c.Points(), &homology.ReadSettings{MaxDim: 2})
			if err != nil {
				t.Fatal(err)
			}
			ev := rd.Evidence[2]
			if rd.Betti[2] != 1 || !ev.Whitened {
				t.Errorf("%s: β₂ = %d (whitened %v), want 1 from the whitened reading; evidence %+v", c.Name(), rd.Betti[2], ev.Whitened, ev)
			}
			if rd.Confident[2] || !strings.Contains(ev.Why, "anisotropy") {
				t.Errorf("%s: β₂ confident %v for %q, want undetermined for anisotropy", c.Name(), rd.Confident[2], ev.Why)
			}
			if want := c.Truth(1)[1]; rd.Betti[1] != want {
				t.Errorf("%s: β₁ = %d, want %d", c.Name(), rd.Betti[1], want)
			}
			break
		}
		if !found {
			t.Errorf("no stretched %s of %d points in the suite", test.space, test.n)
		}
	}
}
