// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"fmt"
	"math"
	"testing"
)

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
// on every point of a sample with our L-BFGS and with gonum's
// optimize.LBFGS, and reports the objective each reaches and the
// training accuracy, so that speed is compared at equal accuracy.
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
		}{{"ours", ownLBFGS}, {"gonum", lbfgs}} {
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
