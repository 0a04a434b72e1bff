// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestHeapCompact checks that compacting a working column keeps its
// content: the sum mod p of its entries per simplex, computed here
// directly with a map, popped in filtration order.
func TestHeapCompact(t *testing.T) {
	for _, tc := range []struct {
		name    string
		p       int64
		n       int // entries pushed
		simplex int // distinct simplices drawn from
		worth   bool
	}{
		{"Z2/many-duplicates", 2, 20000, 500, true},
		{"Z3/many-duplicates", 3, 20000, 500, true},
		{"Z251/some-duplicates", 251, 5000, 2000, true},
		{"Z2/distinct", 2, 5000, 1 << 40, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(1, 2))
			h := entryHeap{p: tc.p}
			sum := map[int64]int64{}
			diam := func(i int64) float64 { return float64(i%97) / 8 }
			for range tc.n {
				i := rng.Int64N(int64(tc.simplex))
				c := 1 + rng.Int64N(tc.p-1)
				h.push(mkEntry(diam(i), i, c))
				sum[i] = (sum[i] + c) % tc.p
			}
			if got := h.worthCompacting(); got != tc.worth {
				t.Errorf("worthCompacting = %v, want %v", got, tc.worth)
			}
			var want []entry
			for i, c := range sum {
				if c != 0 {
					want = append(want, mkEntry(diam(i), i, c))
				}
			}
			slices.SortFunc(want, func(x, y entry) int {
				if before(&x, &y) {
					return -1
				}
				if before(&y, &x) {
					return 1
				}
				return 0
			})
			h.compact(tc.p)
			if len(h.a) != len(want) {
				t.Fatalf("%d entries after compaction, want %d", len(h.a), len(want))
			}
			// The compacted heap must still be a heap: pushing and popping
			// keep the order.
			h.push(mkEntry(-0.0, 1<<40, 1))
			if x := h.pop(); x.idx() != 1<<40 {
				t.Fatalf("first pop %v, want the pushed earliest entry", x)
			}
			for k, w := range want {
				x := h.pop()
				if x != w {
					t.Fatalf("pop %d = (%g, %d, %d), want (%g, %d, %d)", k,
						x.diam(), x.idx(), x.coef(), w.diam(), w.idx(), w.coef())
				}
			}
		})
	}
}
