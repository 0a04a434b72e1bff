// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package knn

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"sync"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/homology"
)

// bruteKNN is the reference: all distances by the direct formula, sorted by
// (distance, index), self excluded.
func bruteKNN(x *mat.Dense, k int) ([][]int, [][]float64) {
	n, _ := x.Dims()
	idx := make([][]int, n)
	dst := make([][]float64, n)
	for i := 0; i < n; i++ {
		type e struct {
			d float64
			j int
		}
		var all []e
		for j := 0; j < n; j++ {
			if j == i {
				continue
			}
			var s float64
			for c := 0; c < x.RawMatrix().Cols; c++ {
				t := x.At(i, c) - x.At(j, c)
				s += t * t
			}
			all = append(all, e{math.Sqrt(s), j})
		}
		sort.Slice(all, func(a, b int) bool {
			if all[a].d != all[b].d {
				return all[a].d < all[b].d
			}
			return all[a].j < all[b].j
		})
		for q := 0; q < k; q++ {
			idx[i] = append(idx[i], all[q].j)
			dst[i] = append(dst[i], all[q].d)
		}
	}
	return idx, dst
}

func randCloud(rnd *rand.Rand, n, d int, offset float64, grid bool) *mat.Dense {
	x := mat.NewDense(n, d, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < d; j++ {
			v := rnd.NormFloat64()
			if grid {
				v = float64(rnd.IntN(3))
			}
			x.Set(i, j, v+offset)
		}
	}
	return x
}

func TestSearchAgainstBruteForce(t *testing.T) {
	t.Parallel()
	for _, test := range []struct {
		name   string
		n, d   int
		k      int
		offset float64
		grid   bool
		reason string
	}{
		{"small", 7, 2, 3, 0, false, "fewer points than one block"},
		{"allbutone", 9, 3, 8, 0, false, "k = n−1 lists every other point"},
		{"blocks", 1500, 5, 10, 0, false, "several row and column blocks"},
		{"offset", 600, 4, 5, 1e6, false, "large common offset stresses cancellation in ‖x‖²+‖y‖²−2x·y"},
		{"grid", 700, 3, 12, 0, true, "integer grid: many exact ties and duplicates, tie-break by index"},
		{"line", 300, 1, 2, 0, true, "one dimension with duplicates"},
	} {
		t.Run(test.name, func(t *testing.T) {
			t.Parallel()
			rnd := rand.New(rand.NewPCG(1, uint64(test.n)))
			x := randCloud(rnd, test.n, test.d, test.offset, test.grid)
			g, err := Search(context.Background(), x, test.k)
			if err != nil {
				t.Fatal(err)
			}
			wi, wd := bruteKNN(x, test.k)
			for i := range wi {
				for q := range wi[i] {
					if g.Index[i][q] != wi[i][q] || g.Dist[i][q] != wd[i][q] {
						t.Fatalf("%s: row %d rank %d: got (%d, %v), want (%d, %v)", test.reason, i, q, g.Index[i][q], g.Dist[i][q], wi[i][q], wd[i][q])
					}
				}
			}
		})
	}
}

func TestSearchErrors(t *testing.T) {
	t.Parallel()
	nan := mat.NewDense(3, 2, []float64{0, 1, 2, math.NaN(), 4, 5})
	ok := mat.NewDense(3, 2, []float64{0, 1, 2, 3, 4, 5})
	for _, test := range []struct {
		name string
		x    mat.Matrix
		k    int
		want string
	}{
		{"nil", nil, 1, "knn: nil matrix"},
		{"nan", nan, 1, "knn: row 2, column 2: non-finite value NaN"},
		{"inf", mat.NewDense(1, 1, []float64{math.Inf(-1)}), 1, "knn: row 1, column 1: non-finite value -Inf"},
		// 1e155 squared overflows float64 (largest ≈ 1.8e308, IEEE 754).
		{"huge", mat.NewDense(3, 1, []float64{0, 1e155, 2e155}), 1, "knn: row 2, column 1: value 1e+155 is above 1e+150, where squared distances overflow"},
		{"k0", ok, 0, "knn: k = 0 out of range 1..2 for 3 points"},
		{"kn", ok, 3, "knn: k = 3 out of range 1..2 for 3 points"},
		{"single", mat.NewDense(1, 2, nil), 1, "knn: k = 1 out of range 1..0 for 1 points"},
	} {
		_, err := Search(context.Background(), test.x, test.k)
		var e *Error
		if !errors.As(err, &e) || err.Error() != test.want {
			t.Errorf("%s: got %v, want %q", test.name, err, test.want)
		}
	}
}

func TestCancel(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	x := randCloud(rand.New(rand.NewPCG(1, 2)), 500, 3, 0, false)
	if _, err := Search(ctx, x, 3); !errors.Is(err, context.Canceled) {
		t.Errorf("Search: got %v, want context.Canceled", err)
	}
	if err := Pairs(ctx, x, 1, func([]Pair) error { return nil }); !errors.Is(err, context.Canceled) {
		t.Errorf("Pairs: got %v, want context.Canceled", err)
	}
}

func TestPairsAgainstBruteForce(t *testing.T) {
	t.Parallel()
	for _, test := range []struct {
		name   string
		n, d   int
		r      float64
		offset float64
		grid   bool
	}{
		{"zero-radius-duplicates", 400, 2, 0, 0, true},
		{"grid-unit", 1300, 3, 1, 0, true},
		{"grid-offset", 500, 3, 1, 1e7, true},
		{"gauss", 1200, 4, 1.5, 0, false},
		{"gauss-offset", 800, 4, 1, -3e6, false},
		{"everything", 300, 2, 100, 0, false},
	} {
		t.Run(test.name, func(t *testing.T) {
			t.Parallel()
			x := randCloud(rand.New(rand.NewPCG(3, uint64(test.n))), test.n, test.d, test.offset, test.grid)
			var mu sync.Mutex
			got := map[[2]int]float64{}
			err := Pairs(context.Background(), x, test.r, func(b []Pair) error {
				mu.Lock()
				defer mu.Unlock()
				for _, p := range b {
					k := [2]int{p.I, p.J}
					if _, dup := got[k]; dup || p.I >= p.J {
						return fmt.Errorf("pair %v reported twice or out of order", p)
					}
					got[k] = p.D
				}
				return nil
			})
			if err != nil {
				t.Fatal(err)
			}
			c, _ := NewCloud(x)
			want := 0
			for i := 0; i < test.n; i++ {
				for j := i + 1; j < test.n; j++ {
					d := c.Dist(i, j)
					if d <= test.r {
						want++
						if gd, ok := got[[2]int{i, j}]; !ok || gd != d {
							t.Fatalf("pair (%d,%d) at %v: got %v, %v", i, j, d, gd, ok)
						}
					}
				}
			}
			if len(got) != want {
				t.Errorf("got %d pairs, want %d", len(got), want)
			}
		})
	}
}

func TestProgress(t *testing.T) {
	t.Parallel()
	c, err := NewCloud(randCloud(rand.New(rand.NewPCG(1, 5)), 1000, 2, 0, false))
	if err != nil {
		t.Fatal(err)
	}
	// One call per block of rowBlock rows, counting up to the number of
	// blocks.
	blocks := (1000 + rowBlock - 1) / rowBlock
	var calls []int
	p := c.WithProgress(func(done, total int) {
		if total != blocks {
			t.Errorf("total %d, want %d", total, blocks)
		}
		calls = append(calls, done)
	})
	if _, err := p.Search(context.Background(), 2); err != nil {
		t.Fatal(err)
	}
	want := make([]int, blocks)
	for i := range want {
		want[i] = i + 1
	}
	if fmt.Sprint(calls) != fmt.Sprint(want) {
		t.Errorf("progress calls %v, want %v", calls, want)
	}
	calls = nil
	if err := p.Pairs(context.Background(), 0.1, func([]Pair) error { return nil }); err != nil || len(calls) != blocks {
		t.Errorf("pairs: %d progress calls, want %d, %v", len(calls), blocks, err)
	}
}

func TestPairsVisitError(t *testing.T) {
	t.Parallel()
	x := randCloud(rand.New(rand.NewPCG(1, 9)), 50, 2, 0, false)
	stop := errors.New("stop")
	if err := Pairs(context.Background(), x, 10, func([]Pair) error { return stop }); !errors.Is(err, stop) {
		t.Errorf("got %v, want the visitor's error", err)
	}
	if err := Pairs(context.Background(), x, -1, nil); err == nil || err.Error() != "knn: radius -1 is not a finite non-negative number" {
		t.Errorf("negative radius: got %v", err)
	}
}

func BenchmarkSearch(b *testing.B) {
	for _, n := range []int{300, 1000, 5000, 20000} {
		b.Run(fmt.Sprintf("n=%d/d=64/k=10", n), func(b *testing.B) {
			x := randCloud(rand.New(rand.NewPCG(1, 1)), n, 64, 0, false)
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Search(context.Background(), x, 10); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkGram compares Gram, one Dgemv per row, with the Dgemm it
// replaced, on blocks of the sizes Search, Pairs and the overlap
// measures use (rowBlock rows against a trace's class or stage, or a
// full column block). Dgemm runs on goroutines of its own, so its time
// per operation is wall time on all cores; Gram runs on one.
func BenchmarkGram(b *testing.B) {
	for _, sz := range []struct{ m, n, d int }{{128, 300, 64}, {128, 300, 16}, {128, 300, 3}, {128, 1024, 64}, {128, 1024, 512}} {
		rng := rand.New(rand.NewPCG(1, 2))
		a := blas64.General{Rows: sz.m, Cols: sz.d, Stride: sz.d, Data: make([]float64, sz.m*sz.d)}
		c := blas64.General{Rows: sz.n, Cols: sz.d, Stride: sz.d, Data: make([]float64, sz.n*sz.d)}
		for i := range a.Data {
			a.Data[i] = rng.NormFloat64()
		}
		for i := range c.Data {
			c.Data[i] = rng.NormFloat64()
		}
		dst := blas64.General{Rows: sz.m, Cols: sz.n, Stride: sz.n, Data: make([]float64, sz.m*sz.n)}
		name := fmt.Sprintf("%dx%dx%d", sz.m, sz.n, sz.d)
		b.Run(name+"/Gram", func(b *testing.B) {
			for b.Loop() {
				Gram(dst, a, c)
			}
		})
		b.Run(name+"/Dgemm", func(b *testing.B) {
			for b.Loop() {
				blas64.Gemm(blas.NoTrans, blas.Trans, 1, a, c, 0, dst)
			}
		})
	}
}

// TestGram checks Gram against the direct dot products, on a block with
// strides wider than its columns.
func TestGram(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	const m, n, d = 7, 9, 5
	a := blas64.General{Rows: m, Cols: d, Stride: d + 2, Data: make([]float64, m*(d+2))}
	c := blas64.General{Rows: n, Cols: d, Stride: d + 1, Data: make([]float64, n*(d+1))}
	for i := range a.Data {
		a.Data[i] = rng.NormFloat64()
	}
	for i := range c.Data {
		c.Data[i] = rng.NormFloat64()
	}
	dst := blas64.General{Rows: m, Cols: n, Stride: n + 3, Data: make([]float64, m*(n+3))}
	Gram(dst, a, c)
	for i := range m {
		for j := range n {
			var want float64
			for k := range d {
				want += a.Data[i*a.Stride+k] * c.Data[j*c.Stride+k]
			}
			if got := dst.Data[i*dst.Stride+j]; math.Abs(got-want) > 1e-12*(1+math.Abs(want)) {
				t.Errorf("(%d,%d) = %v, want %v", i, j, got, want)
			}
		}
	}
}

// TestMaxCoordinateAgrees keeps the two bounds on coordinates one value:
// a cloud homology accepts must be one the neighbour search accepts.
func TestMaxCoordinateAgrees(t *testing.T) {
	if MaxCoordinate != homology.MaxCoordinate {
		t.Errorf("knn.MaxCoordinate %g, homology.MaxCoordinate %g", MaxCoordinate, homology.MaxCoordinate)
	}
}

// TestSearchTies checks the search when every point ties: a cloud of
// 3000 copies of one point (a stage that sends a sample to the origin)
// makes the pairwise search hold too many candidates, and the search
// falls back to one block of rows at a time; the neighbours of i are the
// k smallest other indices, at distance 0. It also checks that both
// searches agree on random clouds.
func TestSearchTies(t *testing.T) {
	const n, k = 3000, 3
	x := mat.NewDense(n, 4, nil)
	for i := range n {
		x.SetRow(i, []float64{1, 2, 3, 4})
	}
	c, err := NewCloud(x)
	if err != nil {
		t.Fatal(err)
	}
	g := &Graph{K: k, Index: make([][]int, n), Dist: make([][]float64, n)}
	for i := range n {
		g.Index[i], g.Dist[i] = make([]int, k), make([]float64, k)
	}
	if err := c.searchPairs(context.Background(), k, g); err != errTies {
		t.Fatalf("pairwise search of tied points: err = %v, want errTies", err)
	}
	got, err := c.Search(context.Background(), k)
	if err != nil {
		t.Fatal(err)
	}
	for _, i := range []int{0, 1, 2, 1500, n - 1} {
		var want []int
		for j := 0; len(want) < k; j++ {
			if j != i {
				want = append(want, j)
			}
		}
		if !slices.Equal(got.Index[i], want) || slices.Max(got.Dist[i]) != 0 {
			t.Errorf("row %d: %v at %v, want %v at 0", i, got.Index[i], got.Dist[i], want)
		}
	}
	for seed := range uint64(5) {
		x := randCloud(rand.New(rand.NewPCG(seed, 2)), 700, 8, 0, seed%2 == 1)
		c, err := NewCloud(x)
		if err != nil {
			t.Fatal(err)
		}
		a := &Graph{K: 5, Index: make([][]int, 700), Dist: make([][]float64, 700)}
		b := &Graph{K: 5, Index: make([][]int, 700), Dist: make([][]float64, 700)}
		for i := range 700 {
			a.Index[i], a.Dist[i] = make([]int, 5), make([]float64, 5)
			b.Index[i], b.Dist[i] = make([]int, 5), make([]float64, 5)
		}
		if err := c.searchPairs(context.Background(), 5, a); err != nil {
			t.Fatal(err)
		}
		if err := c.searchRows(context.Background(), 5, b); err != nil {
			t.Fatal(err)
		}
		for i := range 700 {
			if !slices.Equal(a.Index[i], b.Index[i]) || !slices.Equal(a.Dist[i], b.Dist[i]) {
				t.Fatalf("seed %d row %d: pairwise %v %v, by rows %v %v", seed, i, a.Index[i], a.Dist[i], b.Index[i], b.Dist[i])
			}
		}
	}
}
