// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"fmt"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/optimize"
)

// minimizeLBFGS is the probe's solver as it was before lbfgs drove
// optimize's method itself: the same method, line search and stopping
// rules through optimize.Minimize. TestLBFGSMatchesMinimize checks that
// both give the same iterates; BenchmarkSolvers compares their times.
func minimizeLBFGS(ctx context.Context, eval func(grad, x []float64) float64, x []float64, gtol float64, maxIter int) (int, bool, error) {
	n := len(x)
	// optimize asks for f and ∇f separately, usually at the same
	// point: evaluate both once per point.
	last := make([]float64, n)
	lastG := make([]float64, n)
	var lastF float64
	have := false
	at := func(p []float64) {
		if have && slices.Equal(p, last) {
			return
		}
		copy(last, p)
		lastF = eval(lastG, p)
		have = true
	}
	prob := optimize.Problem{
		Func: func(p []float64) float64 { at(p); return lastF },
		Grad: func(g, p []float64) { at(p); copy(g, lastG) },
	}
	set := &optimize.Settings{
		GradientThreshold: gtol,
		MajorIterations:   maxIter,
		Converger:         &optimize.FunctionConverge{Relative: funcRelTol, Iterations: funcIters},
		Recorder:          ctxRecorder{ctx},
	}
	res, err := optimize.Minimize(prob, x, set, &optimize.LBFGS{Store: lbfgsMemory})
	if cerr := ctx.Err(); cerr != nil {
		return 0, false, cerr
	}
	if res == nil {
		return 0, false, err
	}
	copy(x, res.X)
	ok := res.Status == optimize.GradientThreshold || res.Status == optimize.FunctionConvergence
	return res.MajorIterations, ok, nil
}

// ctxRecorder stops a minimisation once its context is done.
type ctxRecorder struct{ ctx context.Context }

func (r ctxRecorder) Init() error { return r.ctx.Err() }

func (r ctxRecorder) Record(*optimize.Location, optimize.Operation, *optimize.Stats) error {
	return r.ctx.Err()
}

// ownLBFGS is the hand-written solver the probe used before it moved
// to gonum's optimize package; BenchmarkSolvers keeps it as the
// reference the move was measured against.
// ownLBFGS minimises a smooth function from x (overwritten with the result)
// by limited-memory BFGS with the two-loop recursion and a backtracking
// line search on the Armijo condition (Nocedal and Wright, Numerical
// Optimization, 2nd ed., Algorithms 7.4 and 3.1). eval returns f(x) and
// writes ∇f(x) into grad when grad is not nil. It stops when the largest
// gradient component is at most gtol (converged), when f stops changing
// in relative terms by more than 1e-15 for 10 iterations (converged), or
// after maxIter iterations (not converged). It returns the iterations
// done.
func ownLBFGS(ctx context.Context, eval func(grad, x []float64) float64, x []float64, gtol float64, maxIter int) (int, bool, error) {
	n := len(x)
	g := make([]float64, n)
	f := eval(g, x)
	s := make([][]float64, 0, lbfgsMemory)
	y := make([][]float64, 0, lbfgsMemory)
	rho := make([]float64, 0, lbfgsMemory)
	dir := make([]float64, n)
	xn := make([]float64, n)
	gn := make([]float64, n)
	alpha := make([]float64, lbfgsMemory)
	stall := 0
	for it := 0; it < maxIter; it++ {
		if err := ctx.Err(); err != nil {
			return it, false, err
		}
		if infNorm(g) <= gtol {
			return it, true, nil
		}
		// Two-loop recursion: dir = −H g.
		copy(dir, g)
		for i := len(s) - 1; i >= 0; i-- {
			alpha[i] = rho[i] * dot(s[i], dir)
			axpy(-alpha[i], y[i], dir)
		}
		gamma := 1.0
		if m := len(s); m > 0 {
			gamma = dot(s[m-1], y[m-1]) / dot(y[m-1], y[m-1])
		} else {
			gamma = 1 / math.Max(1, math.Sqrt(dot(g, g)))
		}
		for i := range dir {
			dir[i] *= gamma
		}
		for i := range s {
			b := rho[i] * dot(y[i], dir)
			axpy(alpha[i]-b, s[i], dir)
		}
		for i := range dir {
			dir[i] = -dir[i]
		}
		slope := dot(g, dir)
		if !(slope < 0) { // not a descent direction: restart
			s, y, rho = s[:0], y[:0], rho[:0]
			for i := range dir {
				dir[i] = -g[i] * gamma
			}
			slope = dot(g, dir)
		}
		step := 1.0
		var fn float64
		for ls := 0; ; ls++ {
			for i := range xn {
				xn[i] = x[i] + step*dir[i]
			}
			fn = eval(gn, xn)
			if fn <= f+1e-4*step*slope {
				break
			}
			if ls == 60 {
				return it, false, nil // no decrease possible at float64 precision
			}
			step *= 0.5
		}
		sv := make([]float64, n)
		yv := make([]float64, n)
		for i := range sv {
			sv[i] = xn[i] - x[i]
			yv[i] = gn[i] - g[i]
		}
		if sy := dot(sv, yv); sy > 1e-300 {
			if len(s) == lbfgsMemory {
				s, y, rho = s[1:], y[1:], rho[1:]
			}
			s, y, rho = append(s, sv), append(y, yv), append(rho, 1/sy)
		}
		if math.Abs(f-fn) <= 1e-15*math.Max(1, math.Abs(f)) {
			stall++
		} else {
			stall = 0
		}
		copy(x, xn)
		copy(g, gn)
		f = fn
		if stall >= 10 {
			return it + 1, true, nil
		}
	}
	return maxIter, infNorm(g) <= gtol, nil
}

func axpy(a float64, x, y []float64) {
	for i, v := range x {
		y[i] += a * v
	}
}

func infNorm(a []float64) float64 {
	var m float64
	for _, v := range a {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

// BenchmarkSolvers fits the linear probe's regularised logistic model
// on every point of a sample with our hand-written L-BFGS ("ours"), with
// gonum's optimize.LBFGS through optimize.Minimize ("minimize") and
// with the same method driven by lbfgs ("gonum", the probe's solver),
// at the default settings, and reports the objective each reaches and
// the training accuracy, so that speed is compared at equal accuracy.
//
//	go test ./trace/overlap -run - -bench Solvers
func BenchmarkSolvers(b *testing.B) {
	for _, sz := range []struct{ n, d, c int }{{500, 16, 4}, {2000, 64, 10}, {5000, 64, 10}} {
		x, labels := benchSample(sz.n, sz.d, sz.c)
		s, err := newSample("bench", x, labels, true)
		if err != nil {
			b.Fatal(err)
		}
		r := (&ProbeSettings{}).resolved()
		train := make([]int, s.n)
		for i := range train {
			train[i] = i
		}
		// objective fits on every point and returns the objective
		// ½‖W‖² + C Σ cross-entropy (what both solvers minimise) and the
		// training accuracy.
		objective := func() (float64, float64) {
			m, err := fitLogistic(context.Background(), s, train, r)
			if err != nil {
				b.Fatal(err)
			}
			var f float64
			for _, v := range m.w[:m.k*m.d] {
				f += 0.5 * v * v
			}
			right := 0
			z := make([]float64, m.k)
			for i := range s.n {
				mx, arg := math.Inf(-1), 0
				for c := range m.k {
					z[c] = m.w[m.k*m.d+c]
					for j, v := range s.row(i) {
						z[c] += m.w[c*m.d+j] * (v - m.mean[j]) / m.sd[j]
					}
					if z[c] > mx {
						mx, arg = z[c], c
					}
				}
				if m.class[arg] == s.labels[i] {
					right++
				}
				var sum float64
				for _, v := range z {
					sum += math.Exp(v - mx)
				}
				// Every class is present, so model class = label.
				f += r.C * (mx + math.Log(sum) - z[s.labels[i]])
			}
			return f, float64(right) / float64(s.n)
		}
		for _, sv := range []struct {
			name string
			f    func(context.Context, func(grad, x []float64) float64, []float64, float64, int) (int, bool, error)
		}{{"ours", ownLBFGS}, {"minimize", minimizeLBFGS}, {"gonum", lbfgs}} {
			b.Run(fmt.Sprintf("n=%d/d=%d/C=%d/%s", sz.n, sz.d, sz.c, sv.name), func(b *testing.B) {
				minimizer = sv.f
				defer func() { minimizer = lbfgs }()
				var f, acc float64
				for b.Loop() {
					f, acc = objective()
				}
				b.ReportMetric(f, "objective")
				b.Logf("objective %.12g", f)
				b.ReportMetric(acc, "train-acc")
			})
		}
	}
}

// TestLBFGSMatchesMinimize checks that lbfgs, which drives optimize's
// L-BFGS and line search itself, takes the iterates optimize.Minimize
// takes with the same method and stopping rules: the same iteration
// count, the same verdict and the same weights to the last bit, on the
// probe's objective (one fold of the digits fixture) and on a badly
// scaled quadratic.
func TestLBFGSMatchesMinimize(t *testing.T) {
	f := loadFixture(t, "digits")
	s, err := newSample("test", f.matrix(), f.Labels, true)
	if err != nil {
		t.Fatal(err)
	}
	var train []int
	for i, g := range f.Folds {
		if g != 0 {
			train = append(train, i)
		}
	}
	quad := func(g, x []float64) float64 {
		var v float64
		for i, xi := range x {
			w := math.Pow(10, float64(i%7))
			v += w * (xi - 1) * (xi - 1)
			g[i] = 2 * w * (xi - 1)
		}
		return v
	}
	type solver = func(context.Context, func(grad, x []float64) float64, []float64, float64, int) (int, bool, error)
	// onQuad fits the quadratic from 0 with the given stopping rules.
	onQuad := func(gtol float64, maxIter int) func(solver) ([]float64, int, bool) {
		return func(m solver) ([]float64, int, bool) {
			x := make([]float64, 40)
			it, ok, err := m(context.Background(), quad, x, gtol, maxIter)
			if err != nil {
				t.Fatal(err)
			}
			return x, it, ok
		}
	}
	r := (&ProbeSettings{}).resolved()
	for _, test := range []struct {
		name string
		fit  func(solver) ([]float64, int, bool)
	}{
		{"probe objective", func(m solver) ([]float64, int, bool) {
			minimizer = m
			defer func() { minimizer = lbfgs }()
			l, err := fitLogistic(context.Background(), s, train, r)
			if err != nil {
				t.Fatal(err)
			}
			return l.w, l.iter, l.converged
		}},
		{"quadratic, iteration limit", onQuad(1e-300, 25)},
		{"quadratic, to convergence", onQuad(1e-9, 1000)},
	} {
		t.Run(test.name, func(t *testing.T) {
			wantX, wantIt, wantOK := test.fit(minimizeLBFGS)
			gotX, gotIt, gotOK := test.fit(lbfgs)
			if gotIt != wantIt || gotOK != wantOK || !slices.Equal(gotX, wantX) {
				t.Errorf("lbfgs: %d iterations, converged %v; Minimize: %d, %v; same result %v",
					gotIt, gotOK, wantIt, wantOK, slices.Equal(gotX, wantX))
			}
		})
	}
}
