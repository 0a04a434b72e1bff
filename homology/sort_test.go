// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"cmp"
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

func TestParallelSort(t *testing.T) {
	// Compared with the standard library's sort on a large random input
	// with many ties.
	rng := rand.New(rand.NewPCG(1, 1))
	for _, n := range []int{10, sortChunk + 7, 5*sortChunk + 123} {
		s := make([]simplex, n)
		for i := range s {
			s[i] = simplex{float64(rng.IntN(100)), int64(rng.IntN(1 << 30))}
		}
		want := slices.Clone(s)
		slices.SortFunc(want, filtrationOrder)
		if err := parallelSort(context.Background(), s, filtrationOrder); err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(s, want) {
			t.Errorf("n=%d: not sorted like slices.SortFunc", n)
		}
	}
}

func TestSortFiltration(t *testing.T) {
	// Compared with the standard library's comparison sort on inputs with
	// many ties, zeros of both signs and +Inf, in both orders, from
	// random order and from decreasing index order (the order in which
	// the engine lists the edges of a distance matrix).
	rng := rand.New(rand.NewPCG(2, 3))
	for _, n := range []int{10, bucketMin + 5, 300000} {
		for _, reverse := range []bool{false, true} {
			for _, byIndex := range []bool{false, true} {
				s := make([]simplex, n)
				for i := range s {
					var d float64
					switch rng.IntN(20) {
					case 0:
						d = math.Copysign(0, -1)
					case 1:
						d = math.Inf(1)
					case 2, 3, 4:
						d = float64(rng.IntN(50))
					default:
						d = rng.Float64() * 1e3
					}
					s[i] = simplex{d, int64(rng.IntN(1 << 40))}
				}
				if byIndex {
					slices.SortFunc(s, func(a, b simplex) int { return cmp.Compare(b.i, a.i) })
				}
				order := filtrationOrder
				if reverse {
					order = reverseOrder
				}
				want := slices.Clone(s)
				slices.SortStableFunc(want, order)
				if err := sortFiltration(context.Background(), s, reverse); err != nil {
					t.Fatal(err)
				}
				for i := range s {
					if order(s[i], want[i]) != 0 || s[i].i != want[i].i {
						t.Errorf("n=%d reverse=%v byIndex=%v: element %d is %v, want %v", n, reverse, byIndex, i, s[i], want[i])
						break
					}
				}
			}
		}
	}
}

func TestSortFiltrationEdgeCases(t *testing.T) {
	// Lengths all equal, spread over a subnormal range (the bucket scale
	// overflows), or spread over the whole float range.
	rng := rand.New(rand.NewPCG(9, 9))
	cases := map[string]func() float64{
		"equal":     func() float64 { return 1.5 },
		"subnormal": func() float64 { return float64(rng.IntN(3)) * 5e-324 },
		"huge":      func() float64 { return math.Ldexp(rng.Float64(), rng.IntN(2000)-1000) },
	}
	for name, gen := range cases {
		s := make([]simplex, 3*bucketMin)
		for i := range s {
			s[i] = simplex{gen(), int64(rng.IntN(1000))}
		}
		want := slices.Clone(s)
		slices.SortStableFunc(want, filtrationOrder)
		if err := sortFiltration(context.Background(), s, false); err != nil {
			t.Fatal(err)
		}
		for i := range s {
			if filtrationOrder(s[i], want[i]) != 0 {
				t.Errorf("%s: element %d is %v, want %v", name, i, s[i], want[i])
				break
			}
		}
	}
}

func BenchmarkSortFiltration(b *testing.B) {
	rng := rand.New(rand.NewPCG(4, 5))
	src := make([]simplex, 1<<20)
	for i := range src {
		src[i] = simplex{rng.Float64(), int64(len(src) - i)}
	}
	s := make([]simplex, len(src))
	b.Run("buckets", func(b *testing.B) {
		for b.Loop() {
			copy(s, src)
			if err := sortFiltration(context.Background(), s, false); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("merge", func(b *testing.B) {
		for b.Loop() {
			copy(s, src)
			if err := parallelSort(context.Background(), s, filtrationOrder); err != nil {
				b.Fatal(err)
			}
		}
	})
}
