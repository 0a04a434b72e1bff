// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

// TestKeyHeapOrder checks that packed entries pop in the order of
// before (diameter rank, then decreasing index), ties of both included,
// and that pivot sums the coefficients of a simplex mod p, against a
// direct map sum sorted here; also after compaction, which must leave
// a valid heap.
func TestKeyHeapOrder(t *testing.T) {
	for _, tc := range []struct {
		name     string
		p        int64
		maxIndex int64
		ranks    int
	}{
		{"Z2/small", 2, 1000, 7},
		{"Z3/wide-index", 3, 1 << 40, 1 << 12},
		{"Z251/many-ranks", 251, 1 << 20, 1 << 20},
	} {
		for _, compact := range []bool{false, true} {
			t.Run(fmt.Sprintf("%s/compact=%v", tc.name, compact), func(t *testing.T) {
				h, ok := newKeyHeap(tc.p, tc.maxIndex, tc.ranks)
				if !ok {
					t.Fatal("entries do not fit in a word")
				}
				rng := rand.New(rand.NewPCG(3, 4))
				type key struct {
					r uint32
					i int64
				}
				sum := map[key]int64{}
				for range 20000 {
					// Few simplices, so that many repeat, at both ends of the
					// index range; ranks tie often and reach the top rank. The
					// rank is a function of the simplex, as in the engine.
					i := rng.Int64N(min(tc.maxIndex/2, 1500))
					if rng.IntN(2) == 0 {
						i = tc.maxIndex - 1 - i
					}
					r := uint32(i % 50)
					if i%3 == 0 {
						r = uint32(tc.ranks-1) - r
					}
					c := 1 + rng.Int64N(tc.p-1)
					h.push(h.key(r, i, c))
					sum[key{r, i}] = (sum[key{r, i}] + c) % tc.p
				}
				if compact {
					h.compact()
					// Every simplex is left once: nothing more to compact.
					if worthCompacting(h.a, h.simplexKey) {
						t.Errorf("compacted heap of %d entries still worth compacting", len(h.a))
					}
				}
				var want []entry
				for k, c := range sum {
					if c != 0 {
						// The rank stands for the diameter: same order.
						want = append(want, mkEntry(float64(k.r), k.i, c))
					}
				}
				slices.SortFunc(want, func(x, y entry) int {
					if before(&x, &y) {
						return -1
					}
					return 1
				})
				for n, w := range want {
					x, ok := h.pivot()
					if !ok {
						t.Fatalf("heap empty after %d pivots, want %d", n, len(want))
					}
					h.pop()
					got := mkEntry(float64(h.rank(x)), h.idx(x), h.coef(x))
					if got != w {
						t.Fatalf("pivot %d = (%g, %d, %d), want (%g, %d, %d)", n,
							got.diam(), got.idx(), got.coef(), w.diam(), w.idx(), w.coef())
					}
				}
				if _, ok := h.pivot(); ok {
					t.Errorf("entries left after %d pivots", len(want))
				}
			})
		}
	}
}

// TestKeyHeapFit checks when packed entries are refused: rank, index
// and coefficient bits must fit in 64.
func TestKeyHeapFit(t *testing.T) {
	for _, tc := range []struct {
		p        int64
		maxIndex int64
		ranks    int
		want     bool
	}{
		{2, 1 << 40, 1<<23 - 1, false},  // 1+41+23 bits
		{2, 1<<40 - 1, 1<<23 - 1, true}, // 1+40+23
		{251, 1<<40 - 1, 1<<16 - 1, true},
		{251, 1<<40 - 1, 1 << 16, false}, // 8+40+17
	} {
		_, got := newKeyHeap(tc.p, tc.maxIndex, tc.ranks)
		if got != tc.want {
			t.Errorf("newKeyHeap(%d, %d, %d) fits = %v, want %v", tc.p, tc.maxIndex, tc.ranks, got, tc.want)
		}
	}
}

// TestWideEntries computes the GUDHI 3.7.1 fixture barcodes (see
// TestGUDHI) with packed working-column entries and with 16-byte
// entries: the two must be identical bit for bit, and the 16-byte path
// must match GUDHI. Not parallel: it switches packKeys.
func TestWideEntries(t *testing.T) {
	var fix gudhiFixture
	gudhiRead(t, "gudhi.json", &fix)
	defer func() { packKeys = true }()
	for _, c := range fix.Cases {
		x := gudhiLoadCloud(t, c.File)
		set := &Settings{MaxDim: c.MaxDim, Threshold: c.Threshold, Field: c.Field}
		var got [2]*Barcode
		for k, pack := range []bool{true, false} {
			packKeys = pack
			bc, err := Rips(context.Background(), x, set)
			if err != nil {
				t.Fatalf("%s: %v", c.Name, err)
			}
			got[k] = bc
		}
		if !reflect.DeepEqual(got[0].Bars, got[1].Bars) {
			t.Errorf("%s: packed and 16-byte entries give different barcodes", c.Name)
		}
		for d := range c.Bars {
			if msg := gudhiMatch(gudhiBars(c.Bars[d]), got[1].Bars[d]); msg != "" {
				t.Errorf("%s: H%d with 16-byte entries: %s", c.Name, d, msg)
			}
		}
		for _, bs := range got[0].Bars {
			for _, b := range bs {
				if math.IsNaN(b.Birth) || math.IsNaN(b.Death) {
					t.Errorf("%s: NaN bar %v", c.Name, b)
				}
			}
		}
	}
}
