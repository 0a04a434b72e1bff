// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"math/rand/v2"
	"testing"
)

// TestRadixColumn drives a radixColumn the way the reduction does —
// pushes, a pivot, entries that cancel the pivot, more pushes above it —
// and also pushes entries below the last pivot and simplices that
// repeat with every coefficient, checking every pivot against a direct
// model: the least simplex whose coefficients sum to a nonzero value
// mod p, with that sum.
func TestRadixColumn(t *testing.T) {
	for _, tc := range []struct {
		name     string
		p        int64
		maxIndex int64
		ranks    int
	}{
		{"Z2", 2, 5000, 40},
		{"Z3/wide-index", 3, 1 << 40, 1 << 12},
		{"Z251/many-ranks", 251, 1 << 20, 1 << 20},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f, ok := newKeyHeap(tc.p, tc.maxIndex, tc.ranks)
			if !ok {
				t.Fatal("entries do not fit in a word")
			}
			c := newRadixColumn(f)
			rng := rand.New(rand.NewPCG(5, 6))
			for round := range 12 {
				c.reset()
				sum := map[uint64]int64{} // simplex key → coefficient sum
				push := func(r uint32, i, k int64) {
					x := f.key(r, i, k)
					c.push(x)
					s := f.simplexKey(x)
					sum[s] = (sum[s] + k) % tc.p
				}
				// A simplex's rank is a function of it, as in the engine.
				simplex := func() (uint32, int64) {
					i := rng.Int64N(min(tc.maxIndex, 800))
					if rng.IntN(2) == 0 {
						i = tc.maxIndex - 1 - i
					}
					return uint32(i*7919) % uint32(tc.ranks), i
				}
				for range 100 + rng.IntN(1000) {
					r, i := simplex()
					push(r, i, 1+rng.Int64N(tc.p-1))
				}
				for step := 0; ; step++ {
					var want uint64
					found := false
					for s, k := range sum {
						if k != 0 && (!found || s < want>>f.cb) {
							want, found = s<<f.cb|uint64(k), true
						}
					}
					got, ok := c.pivot()
					if ok != found || got != want {
						t.Fatalf("round %d step %d: pivot %#x %v, want %#x %v", round, step, got, ok, want, found)
					}
					if !ok {
						break
					}
					// Cancel the pivot, in one or two entries.
					r, i, k := f.rank(got), f.idx(got), f.coef(got)
					if k > 1 && rng.IntN(2) == 0 {
						push(r, i, tc.p-1)
						k--
					}
					push(r, i, tc.p-k)
					// Entries above it, as from an added coboundary, and now
					// and then a pair below it that cancels.
					for range rng.IntN(50) {
						r2, i2 := simplex()
						if x := f.key(r2, i2, 1); x > got {
							push(r2, i2, 1+rng.Int64N(tc.p-1))
						}
					}
					if rng.IntN(4) == 0 {
						r2, i2 := simplex()
						k2 := 1 + rng.Int64N(tc.p-1)
						push(r2, i2, k2)
						push(r2, i2, tc.p-k2)
					}
				}
				if c.size() == 0 && round > 0 {
					t.Errorf("round %d: no capacity kept", round)
				}
			}
		})
	}
}

func BenchmarkRadixColumn(b *testing.B) {
	// A column the size of those of the torus at threshold 3.0: 1000
	// additions of 1000 entries above the current pivot, each cancelling
	// it, from a random start.
	f, _ := newKeyHeap(2, 1<<40, 1<<20)
	for _, impl := range []string{"radix", "heap"} {
		b.Run(impl, func(b *testing.B) {
			rng := rand.New(rand.NewPCG(1, 2))
			c := newRadixColumn(f)
			h := f
			for b.Loop() {
				c.reset()
				h.reset()
				push := func(x uint64) {
					if impl == "radix" {
						c.push(x)
					} else {
						h.push(x)
					}
				}
				pivot := func() (uint64, bool) {
					if impl == "radix" {
						return c.pivot()
					}
					return h.pivot()
				}
				for range 1000 {
					push(f.key(uint32(rng.IntN(1<<20)), rng.Int64N(1<<40), 1))
				}
				for range 1000 {
					x, ok := pivot()
					if !ok {
						break
					}
					push(x)
					for range 1000 {
						if y := f.key(uint32(rng.IntN(1<<20)), rng.Int64N(1<<40), 1); y > x {
							push(y)
						}
					}
				}
			}
		})
	}
}
