// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package relu

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync/atomic"
	"testing"
	"time"

	"gonum.org/v1/gonum/mat"
)

// TestFoldHandWorked checks the basic property of max(x, 0) applied
// coordinatewise (common practice): a point of the open positive orthant
// is left unchanged, a point of the closed negative orthant goes to the
// origin, and any other point is projected onto the face spanned by its
// positive coordinates. The outputs are written by hand.
func TestFoldHandWorked(t *testing.T) {
	t.Parallel()
	for _, test := range []struct {
		name      string
		pre, post []float64
		zeroed    int
		class     string // "untouched", "face" or "origin"
	}{
		{"positive", []float64{1, 2, 3}, []float64{1, 2, 3}, 0, "untouched"},
		{"tiny-positive", []float64{1e-300, 5, 0.5}, []float64{1e-300, 5, 0.5}, 0, "untouched"},
		{"negative", []float64{-1, -2, -3}, []float64{0, 0, 0}, 3, "origin"},
		{"zero", []float64{0, 0, 0}, []float64{0, 0, 0}, 3, "origin"},
		{"mixed", []float64{1, -2, 3}, []float64{1, 0, 3}, 1, "face"},
		{"boundary", []float64{0, 4, -1}, []float64{0, 4, 0}, 2, "face"},
	} {
		r, err := Fold(mat.NewDense(1, 3, test.pre), mat.NewDense(1, 3, test.post), nil, nil)
		if err != nil {
			t.Fatal(err)
		}
		got := map[bool]string{r.Untouched == 1: "untouched", r.Face == 1: "face", r.Origin == 1: "origin"}[true]
		if r.Zeroed[0] != test.zeroed || got != test.class || r.Mismatch != 0 {
			t.Errorf("%s: zeroed %d, %s, mismatch %d; want %d, %s, 0", test.name, r.Zeroed[0], got, r.Mismatch, test.zeroed, test.class)
		}
		if r.Untouched+r.Face+r.Origin != 1 {
			t.Errorf("%s: classes overlap: %+v", test.name, r)
		}
	}
	// An output that is not the ReLU of its input is flagged.
	r, err := Fold(mat.NewDense(1, 3, []float64{1, -2, 3}), mat.NewDense(1, 3, []float64{1, -2, 3}), nil, nil)
	if err != nil || r.Mismatch != 1 {
		t.Errorf("identity output: mismatch %d, err %v; want 1, nil", r.Mismatch, err)
	}
}

// TestFoldSample checks counts on a small labelled sample worked by hand.
func TestFoldSample(t *testing.T) {
	t.Parallel()
	pre := mat.NewDense(5, 3, []float64{
		1, -1, 2, // pattern 101, class 0
		3, -2, 1, // pattern 101, class 1: shared
		-1, -1, 5, // pattern 001, class 0
		-4, -1, -2, // origin, class 1
		2, -3, 2, // pattern 101, class 0
	})
	post := mat.NewDense(5, 3, nil)
	post.Apply(func(_, _ int, v float64) float64 { return max(v, 0) }, pre)
	r, err := Fold(pre, post, []int{0, 1, 0, 1, 0}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Histogram 3,1,1 of 5: H = −(0.6 log₂ 0.6 + 2·0.2 log₂ 0.2).
	wantH := -(0.6*math.Log2(0.6) + 2*0.2*math.Log2(0.2))
	if !slices.Equal(r.Zeroed, []int{1, 1, 2, 3, 1}) || r.Untouched != 0 || r.Face != 4 || r.Origin != 1 ||
		!slices.Equal(r.Dead, []int{1}) || r.AlwaysActive != nil || r.Patterns != 3 ||
		math.Abs(r.Entropy-wantH) > 1e-15 || r.SharedPatterns != 1 || r.SharedPoints != 3 || r.FaceFrac != 0.8 {
		t.Errorf("got %+v", r)
	}
}

// TestAffineHandWorked uses rank–nullity (dim ker W = In − rank W; any
// linear algebra text, e.g. Strang, Introduction to Linear Algebra).
func TestAffineHandWorked(t *testing.T) {
	t.Parallel()
	rnd := rand.New(rand.NewPCG(4, 4))
	x := mat.NewDense(40, 3, nil)
	for i := 0; i < 40; i++ {
		for j := 0; j < 3; j++ {
			x.Set(i, j, rnd.NormFloat64())
		}
	}
	// Two points differing only along the kernel of the projection.
	x.SetRow(38, []float64{0.5, 0.25, 1})
	x.SetRow(39, []float64{0.5, 0.25, -2})
	for _, test := range []struct {
		name              string
		w                 *mat.Dense
		rank, kernel      int
		cond              float64
		rankOut           int
		forces, injective bool
		minIdentified     int
	}{
		{"projection-R3-R2", mat.NewDense(2, 3, []float64{1, 0, 0, 0, 1, 0}), 2, 1, 1, 2, true, false, 1},
		{"identity", mat.NewDense(3, 3, []float64{1, 0, 0, 0, 1, 0, 0, 0, 1}), 3, 0, 1, 3, false, true, 0},
		{"rank-one", mat.NewDense(2, 3, []float64{1, 1, 0, 2, 2, 0}), 1, 2, math.Inf(1), 1, true, false, 1},
		{"diag", mat.NewDense(3, 3, []float64{4, 0, 0, 0, 2, 0, 0, 0, 0.5}), 3, 0, 8, 3, false, true, 0},
	} {
		var out mat.Dense
		out.Mul(x, test.w.T())
		r, err := Affine(test.w, x, &out, nil)
		if err != nil {
			t.Fatal(err)
		}
		if r.Rank != test.rank || r.Kernel != test.kernel || math.Abs(r.Cond-test.cond) > 1e-12*test.cond && !math.IsInf(test.cond, 1) ||
			math.IsInf(test.cond, 1) != math.IsInf(r.Cond, 1) || r.RankIn != 3 || r.RankOut != test.rankOut ||
			r.ForcesIdentifications != test.forces || r.Injective != test.injective || r.Identified < test.minIdentified {
			t.Errorf("%s: got %+v", test.name, r)
		}
	}
}

// TestGlueHandWorked: two points of the negative orthant are distinct
// before a ReLU and both sent to the origin after it (see TestFoldHandWorked).
func TestGlueHandWorked(t *testing.T) {
	t.Parallel()
	pre := mat.NewDense(6, 2, []float64{
		-1, -1, // 0 ┐ glued at the origin, classes 0 and 1
		-3, -2, // 1 ┘
		1, 1, // 2
		2, 1, // 3
		1, 2, // 4
		2, 2, // 5
	})
	post := mat.NewDense(6, 2, nil)
	post.Apply(func(_, _ int, v float64) float64 { return max(v, 0) }, pre)
	r, err := Glue(context.Background(), pre, post, []int{0, 1, 0, 0, 1, 1}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Nearest-neighbour distances before: √5, √5, 1, 1, 1, 1 → median 1;
	// after: 0, 0, 1, 1, 1, 1 → median 1. Pair (0,1): √5 > 0.5 and 0 ≤ 0.5.
	want := GluePair{I: 0, J: 1, In: math.Sqrt(5), Out: 0, Cross: true}
	if r.ScaleIn != 1 || r.ScaleOut != 1 || r.Total != 1 || r.Cross != 1 || r.Within != 0 ||
		len(r.Examples) != 1 || r.Examples[0] != want || r.Settings.Tau != 0.5 {
		t.Errorf("got %+v", r)
	}
	// A pure rescaling glues nothing, whatever the factor.
	var scaled mat.Dense
	scaled.Scale(1e-3, pre)
	if r, err := Glue(context.Background(), pre, &scaled, nil, nil); err != nil || r.Total != 0 {
		t.Errorf("rescaling: got %+v, %v", r, err)
	}
}

func TestDistortHandWorked(t *testing.T) {
	t.Parallel()
	in := mat.NewDense(4, 1, []float64{0, 1, 3, 6})
	var out mat.Dense
	out.Scale(0.5, in)
	r, err := Distort(context.Background(), in, &out, &DistortSettings{K: 2})
	if err != nil {
		t.Fatal(err)
	}
	if r.Median != 0.5 || r.P10 != 0.5 || r.P90 != 0.5 || r.Pairs != 8 {
		t.Errorf("halving: got %+v", r)
	}
}

func TestBadInput(t *testing.T) {
	t.Parallel()
	a := mat.NewDense(3, 2, []float64{1, 2, 3, 4, 5, 6})
	b4 := mat.NewDense(4, 2, nil)
	nan := mat.NewDense(3, 2, []float64{1, 2, 3, math.NaN(), 5, 6})
	w := mat.NewDense(2, 2, []float64{1, 0, 0, 1})
	ctx := context.Background()
	for _, test := range []struct {
		name string
		err  error
		want string
	}{
		{"fold-rows", second(Fold(a, b4, nil, nil)), "relu: input has 3 rows but output has 4"},
		{"fold-labels", second(Fold(a, a, []int{0, 1}, nil)), "relu: 2 labels for 3 sample rows"},
		{"fold-neg-label", second(Fold(a, a, []int{0, -1, 0}, nil)), "relu: label of row 2 is -1, want a class index ≥ 0"},
		{"fold-nan", second(Fold(a, nan, nil, nil)), "relu: output: row 2, column 2: non-finite value NaN"},
		{"fold-empty", second(Fold(&mat.Dense{}, a, nil, nil)), "relu: input: empty matrix (0×0)"},
		{"fold-width", second(Fold(a, mat.NewDense(3, 1, nil), nil, nil)), "relu: ReLU input has 2 columns but output has 1"},
		{"affine-shape", second(Affine(mat.NewDense(3, 2, nil), a, a, nil)), "relu: weights are 3×2 but input has 2 columns and output 2"},
		{"affine-nan-w", second(Affine(mat.NewDense(1, 1, []float64{math.Inf(1)}), a, a, nil)), "relu: weights: row 1, column 1: non-finite value +Inf"},
		{"affine-nil", second(Affine(w, nil, a, nil)), "relu: input: nil matrix"},
		{"glue-rows", second(Glue(ctx, a, b4, nil, nil)), "relu: input has 3 rows but output has 4"},
		{"glue-labels", second(Glue(ctx, a, a, []int{1}, nil)), "relu: 1 labels for 3 sample rows"},
		{"glue-nan", second(Glue(ctx, nan, a, nil, nil)), "relu: input: row 2, column 2: non-finite value NaN"},
		{"glue-one", second(Glue(ctx, mat.NewDense(1, 2, nil), mat.NewDense(1, 2, nil), nil, nil)), "relu: gluing needs at least 2 points, got 1"},
		{"glue-tau", second(Glue(ctx, a, a, nil, &GlueSettings{Tau: -1})), "relu: gluing threshold -1 is not a positive number"},
		{"distort-k", second(Distort(ctx, a, a, &DistortSettings{K: 3})), "relu: distortion with K = 3 needs more than 3 points, got 3"},
		{"distort-rows", second(Distort(ctx, a, b4, nil)), "relu: input has 3 rows but output has 4"},
	} {
		if test.err == nil || test.err.Error() != test.want {
			t.Errorf("%s: got %v, want %q", test.name, test.err, test.want)
		}
	}
}

func second[T any](_ T, err error) error { return err }

func TestSingleClassAndCancel(t *testing.T) {
	t.Parallel()
	pre := mat.NewDense(3, 1, []float64{-1, -2, 5})
	post := mat.NewDense(3, 1, []float64{0, 0, 5})
	r, err := Glue(context.Background(), pre, post, []int{2, 2, 2}, nil)
	if err != nil || r.Total != 1 || r.Within != 1 || r.Cross != 0 {
		t.Errorf("one class: got %+v, %v", r, err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Glue(ctx, pre, post, nil, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("Glue: got %v, want context.Canceled", err)
	}
	if _, err := Distort(ctx, pre, post, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("Distort: got %v, want context.Canceled", err)
	}
}

// reluCloud returns n Gaussian points in R^d and their image under
// x ↦ max(Wx, 0) with W Gaussian scaled by 1/√d.
func reluCloud(n, d int) (*mat.Dense, *mat.Dense, []int) {
	rnd := rand.New(rand.NewPCG(1, 1))
	x := mat.NewDense(n, d, nil)
	w := mat.NewDense(d, d, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < d; j++ {
			x.Set(i, j, rnd.NormFloat64())
		}
	}
	for i := 0; i < d; i++ {
		for j := 0; j < d; j++ {
			w.Set(i, j, rnd.NormFloat64()/math.Sqrt(float64(d)))
		}
	}
	var y mat.Dense
	y.Mul(x, w.T())
	y.Apply(func(_, _ int, v float64) float64 { return max(v, 0) }, &y)
	labels := make([]int, n)
	for i := range labels {
		labels[i] = i % 10
	}
	return x, &y, labels
}

// peakHeap runs f while sampling runtime.MemStats.HeapInuse every 5 ms
// and returns the largest value seen above the level before the call,
// together with the bytes allocated during the call (TotalAlloc).
func peakHeap(f func()) (peak, total uint64) {
	runtime.GC()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	base, alloc0 := ms.HeapInuse, ms.TotalAlloc
	var (
		top  atomic.Uint64
		done = make(chan struct{})
		quit = make(chan struct{})
	)
	go func() {
		defer close(done)
		tick := time.NewTicker(5 * time.Millisecond)
		defer tick.Stop()
		var m runtime.MemStats
		for {
			select {
			case <-quit:
				return
			case <-tick.C:
				runtime.ReadMemStats(&m)
				if m.HeapInuse > top.Load() {
					top.Store(m.HeapInuse)
				}
			}
		}
	}()
	f()
	close(quit)
	<-done
	runtime.ReadMemStats(&ms)
	p := max(top.Load(), ms.HeapInuse)
	if p < base {
		p = base
	}
	return p - base, ms.TotalAlloc - alloc0
}

// BenchmarkGlue reports the peak heap in use during Glue above the level
// before the call (sampled every 5 ms) in MB; the acceptance bound for
// n = 20000 in R⁶⁴ is 500 MB.
func BenchmarkGlue(b *testing.B) {
	for _, n := range []int{2000, 20000} {
		b.Run(fmt.Sprintf("n=%d/d=64", n), func(b *testing.B) {
			x, y, labels := reluCloud(n, 64)
			var peak, total uint64
			var r *GlueReport
			for b.Loop() {
				var err error
				p, t := peakHeap(func() { r, err = Glue(context.Background(), x, y, labels, nil) })
				if err != nil {
					b.Fatal(err)
				}
				peak, total = max(peak, p), total+t
			}
			b.ReportMetric(float64(peak)/1e6, "peak-heap-MB")
			b.ReportMetric(float64(total)/1e6/float64(b.N), "alloc-MB/op")
			b.ReportMetric(float64(r.Total), "glued-pairs")
		})
	}
}

func BenchmarkDistort(b *testing.B) {
	x, y, _ := reluCloud(5000, 64)
	for b.Loop() {
		if _, err := Distort(context.Background(), x, y, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// TestGlueBruteForce compares Glue with a direct double loop over all
// pairs on a ReLU image that sends many points to the origin, so that
// several blocks of pairs are enumerated and the examples must be the
// first pairs in (I, J) order whatever the scheduling.
func TestGlueBruteForce(t *testing.T) {
	t.Parallel()
	x, y, labels := reluCloud(1500, 3)
	y.Apply(func(_, _ int, v float64) float64 { return max(v-0.5, 0) }, y)
	// Three passes of equal numbers of row blocks: calls count up by one
	// to a fixed total divisible by three.
	var last, calls, first int
	prog := func(done, total int) {
		calls++
		if calls == 1 {
			first = total
		}
		if done != calls || total != first || total%3 != 0 || done > total {
			t.Errorf("progress (%d, %d) at call %d", done, total, calls)
		}
		last = done
	}
	r, err := Glue(context.Background(), x, y, labels, &GlueSettings{Tau: 0.7, Examples: 25, Progress: prog})
	if err != nil {
		t.Fatal(err)
	}
	dist := func(m *mat.Dense, i, j int) float64 {
		var s float64
		for k := 0; k < m.RawMatrix().Cols; k++ {
			d := m.At(i, k) - m.At(j, k)
			s += d * d
		}
		return math.Sqrt(s)
	}
	var total, cross int
	var ex []GluePair
	for i := 0; i < 1500; i++ {
		for j := i + 1; j < 1500; j++ {
			din, dout := dist(x, i, j), dist(y, i, j)
			if din > 0.7*r.ScaleIn && dout <= 0.7*r.ScaleOut {
				total++
				c := labels[i] != labels[j]
				if c {
					cross++
				}
				if len(ex) < 25 {
					ex = append(ex, GluePair{i, j, din, dout, c})
				}
			}
		}
	}
	if last != first || first < 3 {
		t.Errorf("last progress %d of %d", last, first)
	}
	if total < 1000 || r.Total != total || r.Cross != cross || r.Within != total-cross || !slices.Equal(r.Examples, ex) {
		t.Errorf("got total %d cross %d examples %v; want %d %d %v", r.Total, r.Cross, r.Examples, total, cross, ex)
	}
}

// TestFoldPiecewise checks Fold on two-level clamps and an injective
// leaky ReLU, on samples worked by hand (each expected number is derived
// in the comments; no reference library is involved).
func TestFoldPiecewise(t *testing.T) {
	t.Parallel()
	relu6 := &Piecewise{Breaks: []float64{0, 6}, Flat: []bool{true, false, true},
		Func: func(_ int, x float64) float64 { return min(max(x, 0), 6) }}
	leaky := &Piecewise{Breaks: []float64{0}, Flat: []bool{false, false},
		Func: func(_ int, x float64) float64 { return max(x, 0.1*x) }}
	for _, test := range []struct {
		name   string
		act    *Piecewise
		pre    []float64 // rows of 2
		post   func(float64) float64
		labels []int
		want   FoldReport
		reason string
	}{
		{
			name: "relu6", act: relu6,
			// Pieces per unit (0 below 0, 1 in (0, 6], 2 above 6):
			// (1,2) class 0, (0,2) class 1, (1,1) class 0, (1,2) class 1.
			pre:    []float64{1, 7, -1, 8, 2, 3, 3, 9},
			post:   func(x float64) float64 { return min(max(x, 0), 6) },
			labels: []int{0, 1, 0, 1},
			want: FoldReport{
				// Flat pieces (0 and 2) per row: 1, 2, 0, 1.
				Zeroed: []int{1, 2, 0, 1}, Untouched: 1, Face: 2, Origin: 1,
				UntouchedFrac: 0.25, FaceFrac: 0.5, OriginFrac: 0.25,
				// Unit 0 is in (0, 6] on rows 0, 2, 3 but not 1; unit 1
				// is flat on rows 0, 1, 3 but not 2: neither is dead or
				// always in one linear piece.
				Dead: nil, AlwaysActive: nil,
				// Patterns (1,2)×2, (0,2), (1,1): histogram 2, 1, 1 of 4,
				// H = −(½ log₂ ½ + 2·¼ log₂ ¼) = ½ + 1 = 1.5 bits.
				Patterns: 3, Entropy: 1.5,
				// (1,2) holds rows 0 (class 0) and 3 (class 1).
				SharedPatterns: 1, SharedPoints: 2,
			},
			reason: "ReLU6 clamps at 0 and 6: row 1 lands on the corner (0, 6)",
		},
		{
			name: "leaky", act: leaky,
			// Pieces (1,0), (0,0), (1,0).
			pre:  []float64{1, -2, -1, -3, 2, -1},
			post: func(x float64) float64 { return max(x, 0.1*x) },
			want: FoldReport{
				// No flat piece: nothing is zeroed.
				Zeroed: []int{0, 0, 0}, Untouched: 3, UntouchedFrac: 1,
				// Unit 1 is below 0 on every row: the activation is
				// linear for it on this sample.
				AlwaysActive: []int{1},
				// Histogram 2, 1 of 3: H = −(⅔ log₂ ⅔ + ⅓ log₂ ⅓) = log₂ 3 − ⅔.
				Patterns: 2, Entropy: math.Log2(3) - 2.0/3,
			},
			reason: "a leaky ReLU is injective: no face or origin collapse",
		},
		{
			name: "leaky checked on relu output", act: leaky,
			pre:  []float64{1, -2, -1, -3, 2, -1},
			post: func(x float64) float64 { return max(x, 0) },
			want: FoldReport{
				Zeroed: []int{0, 0, 0}, Untouched: 3, UntouchedFrac: 1,
				AlwaysActive: []int{1}, Patterns: 2, Entropy: math.Log2(3) - 2.0/3,
				// The four negative entries −2, −1, −3, −1 differ.
				Mismatch: 4,
			},
			reason: "post is not the leaky ReLU of pre",
		},
	} {
		t.Run(test.name, func(t *testing.T) {
			n := len(test.pre) / 2
			pre := mat.NewDense(n, 2, test.pre)
			post := mat.NewDense(n, 2, nil)
			post.Apply(func(_, _ int, v float64) float64 { return test.post(v) }, pre)
			r, err := Fold(pre, post, test.labels, &FoldSettings{Activation: test.act})
			if err != nil {
				t.Fatal(err)
			}
			w := test.want
			if !slices.Equal(r.Zeroed, w.Zeroed) || r.Untouched != w.Untouched || r.Face != w.Face || r.Origin != w.Origin ||
				r.UntouchedFrac != w.UntouchedFrac || r.FaceFrac != w.FaceFrac || r.OriginFrac != w.OriginFrac ||
				!slices.Equal(r.Dead, w.Dead) || !slices.Equal(r.AlwaysActive, w.AlwaysActive) || r.Patterns != w.Patterns ||
				math.Abs(r.Entropy-w.Entropy) > 1e-15 || r.SharedPatterns != w.SharedPatterns || r.SharedPoints != w.SharedPoints ||
				r.Mismatch != w.Mismatch {
				t.Errorf("%s: got %+v", test.reason, r)
			}
		})
	}
	// Invalid activations are errors.
	a := mat.NewDense(1, 1, []float64{1})
	for _, bad := range []*Piecewise{
		{Breaks: []float64{0}, Flat: []bool{true}},
		{Breaks: []float64{1, 0}, Flat: []bool{true, false, true}},
		{Breaks: []float64{math.NaN()}, Flat: []bool{true, false}},
	} {
		if _, err := Fold(a, a, nil, &FoldSettings{Activation: bad}); err == nil {
			t.Errorf("Fold accepted activation %+v", bad)
		}
	}
}
