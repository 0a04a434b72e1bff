// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"
	"slices"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/optimize"
)

// lbfgsMemory is the number of correction pairs kept by lbfgs.
const lbfgsMemory = 10

// Stopping rules of lbfgs besides the gradient threshold: f has stopped
// changing (relative change at most funcRelTol for funcIters
// iterations), and optimize's own gradient floor.
const (
	funcRelTol = 1e-15
	funcIters  = 10
	gradFloor  = 1e-12 // optimize's default LBFGS.GradStopThreshold
)

// lbfgs minimises a smooth function from x (overwritten with the result)
// with gonum's L-BFGS: the directions of optimize.LBFGS (lbfgsMemory
// correction pairs) along which optimize.LinesearchMethod runs the
// optimize.Bisection line search, the method and line search that
// optimize.Minimize uses for an optimize.LBFGS with no Linesearcher set.
// eval returns f(x) and writes ∇f(x) into grad; it is called once per
// point. It stops when the largest gradient component is below gtol
// (converged), when f stops changing in relative terms by more than
// funcRelTol for funcIters iterations (converged), after maxIter major
// iterations, the starting point included (not converged), when the line
// search can make no more progress at float64 precision (not converged),
// or when ctx is done (its error). x then holds the last major iterate.
// It returns the major iterations done, the starting point included.
//
// The loop below takes the place of optimize.Minimize, and asks for the
// same evaluations in the same order, so the iterates are those of
// Minimize with these settings, to the last bit
// (TestLBFGSMatchesMinimize). Minimize runs its method, a distributor,
// its evaluator and its convergence checks on four goroutines linked by
// channels, several hand-overs per evaluation: on the digits model's
// 10-wide stage (2 cores, 2026-12-03) the thread wake-ups alone took 13 %
// of the probe's time. BenchmarkSolvers compares "gonum" (this function)
// with "minimize" (the same through Minimize) and "ours" (the
// hand-written L-BFGS the probe used before): equal objectives and
// training accuracy, and times within the benchmark's noise of each
// other on the shapes it sweeps, so the probe stays on gonum's method.
func lbfgs(ctx context.Context, eval func(grad, x []float64) float64, x []float64, gtol float64, maxIter int) (int, bool, error) {
	n := len(x)
	loc := &optimize.Location{X: slices.Clone(x), Gradient: make([]float64, n)}
	at := make([]float64, n) // the point loc.F and loc.Gradient belong to
	have := false
	evaluate := func() {
		if have && slices.Equal(loc.X, at) {
			return
		}
		loc.F = eval(loc.Gradient, loc.X)
		copy(at, loc.X)
		have = true
	}
	conv := &optimize.FunctionConverge{Relative: funcRelTol, Iterations: funcIters}
	conv.Init(n)
	iter := 0
	// major records a major iterate and reports whether the fit ends
	// there, and whether it has converged.
	major := func() (done, ok bool) {
		iter++
		copy(x, loc.X)
		norm := floats.Norm(loc.Gradient, math.Inf(1))
		switch {
		case norm < gtol:
			return true, true
		case conv.Converged(loc) != optimize.NotTerminated:
			return true, true
		case iter >= maxIter:
			return true, false
		case norm < gradFloor:
			return true, true
		}
		return false, false
	}
	evaluate()
	if math.IsNaN(loc.F) || math.IsInf(loc.F, 1) || !finite(loc.Gradient) {
		return 0, false, nil
	}
	if done, ok := major(); done {
		return iter, ok, ctx.Err()
	}
	ls := &optimize.LinesearchMethod{
		NextDirectioner: &optimize.LBFGS{Store: lbfgsMemory},
		Linesearcher:    &optimize.Bisection{},
	}
	const evaluation = optimize.FuncEvaluation | optimize.GradEvaluation
	op, err := ls.Init(loc)
	for {
		if err != nil {
			// optimize.ErrNoProgress and line search failures: the
			// last major iterate stands, unconverged.
			return iter, false, ctx.Err()
		}
		if err := ctx.Err(); err != nil {
			return 0, false, err
		}
		switch {
		case op == optimize.MajorIteration:
			if done, ok := major(); done {
				return iter, ok, nil
			}
		case op != optimize.NoOperation && op&^evaluation == 0:
			evaluate()
		default:
			panic("overlap: line search asked for operation " + op.String())
		}
		op, err = ls.Iterate(loc)
	}
}

// finite reports whether every element of v is finite.
func finite(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// minimizer is the solver fitLogistic uses; BenchmarkSolvers swaps in
// the others it compares.
var minimizer = lbfgs
