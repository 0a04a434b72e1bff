// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"
)

// lbfgsMemory is the number of correction pairs kept by lbfgs.
const lbfgsMemory = 10

// lbfgs minimises a smooth function from x (overwritten with the result)
// by limited-memory BFGS with the two-loop recursion and a backtracking
// line search on the Armijo condition (Nocedal and Wright, Numerical
// Optimization, 2nd ed., Algorithms 7.4 and 3.1). eval returns f(x) and
// writes ∇f(x) into grad when grad is not nil. It stops when the largest
// gradient component is at most gtol (converged), when f stops changing
// in relative terms by more than 1e-15 for 10 iterations (converged), or
// after maxIter iterations (not converged). It returns the iterations
// done.
func lbfgs(ctx context.Context, eval func(grad, x []float64) float64, x []float64, gtol float64, maxIter int) (int, bool, error) {
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

func dot(a, b []float64) float64 {
	var t float64
	for i, v := range a {
		t += v * b[i]
	}
	return t
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

// minimizer is the solver fitLogistic uses; BenchmarkSolvers swaps in
// gonum's optimize.LBFGS to compare the two. Measured 2026-12-03 on 2
// cores, both reach the same objective to 12 significant digits, and
// neither is faster throughout: ours takes 0.91× gonum's time at 500
// points in R¹⁶, 0.98× at 2000 in R⁶⁴ and 1.05× at 5000 in R⁶⁴. Ours is
// kept because it stops on the context and because gonum's optimize
// package brings its CMA-ES dependencies (stat/distmv and
// golang.org/x/tools) into every build of package trace.
var minimizer = lbfgs
