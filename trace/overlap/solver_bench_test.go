// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/optimize"
)

// gonumLBFGS has the signature of lbfgs and minimises with gonum's
// optimize.LBFGS (memory lbfgsMemory, its default More–Thuente line
// search), stopping at the same gradient bound.
func gonumLBFGS(ctx context.Context, eval func(grad, x []float64) float64, x []float64, gtol float64, maxIter int) (int, bool, error) {
	n := len(x)
	// optimize asks for f and ∇f separately, usually at the same
	// point: evaluate both once per point.
	last := make([]float64, n)
	lastG := make([]float64, n)
	var lastF float64
	have := false
	at := func(p []float64) {
		if have && equal(p, last) {
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
		Converger:         &optimize.FunctionConverge{Absolute: 0, Relative: 1e-15, Iterations: 10},
	}
	res, err := optimize.Minimize(prob, x, set, &optimize.LBFGS{Store: lbfgsMemory})
	if res == nil {
		return 0, false, err
	}
	copy(x, res.X)
	if err := ctx.Err(); err != nil {
		return res.MajorIterations, false, err
	}
	ok := res.Status == optimize.GradientThreshold || res.Status == optimize.FunctionConvergence
	return res.MajorIterations, ok, nil
}

func equal(a, b []float64) bool {
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// BenchmarkSolvers fits the linear probe's regularised logistic model
// with our L-BFGS and with gonum's optimize.LBFGS on the same folds and
// reports the objective each reaches (relative to ours) and the
// cross-validated accuracy, so that speed is compared at equal
// accuracy.
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
				row := s.row(i)
				if m.predict(row) == s.labels[i] {
					right++
				}
				mx := math.Inf(-1)
				for c := range m.k {
					z[c] = m.w[m.k*m.d+c]
					for j, v := range row {
						z[c] += m.w[c*m.d+j] * (v - m.mean[j]) / m.sd[j]
					}
					mx = math.Max(mx, z[c])
				}
				var sum float64
				for _, v := range z {
					sum += math.Exp(v - mx)
				}
				f += r.C * (mx + math.Log(sum) - z[s.labels[i]])
			}
			return f, float64(right) / float64(s.n)
		}
		for _, sv := range []struct {
			name string
			f    func(context.Context, func(grad, x []float64) float64, []float64, float64, int) (int, bool, error)
		}{{"ours", lbfgs}, {"gonum", gonumLBFGS}} {
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
