// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"
	"slices"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/budget"
)

// Defaults of [ProbeSettings].
//
// DefaultGradTol was 1e-8 until 2026-12: fits to 1e-5 predict every
// held-out point as fits to 1e-11 do (TestProbeGradTol; over 26 000
// held-out predictions of the overlap fixtures, the digits model's six
// stages and Gaussian samples, 4 fold seeds each, none differed, where
// 1e-4 changed 21), and take 0.47 times the L-BFGS iterations of 1e-8
// (the digits fixture: 300 against 681), so it is the default.
const (
	DefaultFolds    = 5
	DefaultC        = 1.0
	DefaultMaxIter  = 1000
	DefaultGradTol  = 1e-5
	defaultFoldSeed = 1
)

// ProbeSettings control [Probe]. The zero value means the defaults.
type ProbeSettings struct {
	// Folds is the number of cross-validation folds k ≥ 2; 0 means
	// DefaultFolds.
	Folds int
	// Seed selects the fold assignment (see [Folds]); 0 means 1.
	Seed uint64
	// C is the inverse regularisation strength: the fit minimises
	//	½‖W‖² + C Σ_i [log Σ_c exp(z_ic) − z_i,y_i],  z_i = W x̃_i + b
	// over the training fold (the intercept b is not penalised), as
	// scikit-learn's LogisticRegression(C, multi_class="multinomial")
	// does; 0 means DefaultC.
	C float64
	// MaxIter caps the L-BFGS iterations per fold; 0 means DefaultMaxIter.
	MaxIter int
	// GradTol stops a fit when the largest gradient component is below
	// GradTol·(1 + C·n_train); 0 means DefaultGradTol.
	GradTol float64
}

func (set *ProbeSettings) resolved() ProbeSettings {
	if set == nil {
		return ProbeSettings{}.resolvedValue()
	}
	return set.resolvedValue()
}

// resolvedValue returns the settings with defaults filled in.
func (r ProbeSettings) resolvedValue() ProbeSettings {
	if r.Folds == 0 {
		r.Folds = DefaultFolds
	}
	if r.Seed == 0 {
		r.Seed = defaultFoldSeed
	}
	if r.C == 0 {
		r.C = DefaultC
	}
	if r.MaxIter == 0 {
		r.MaxIter = DefaultMaxIter
	}
	if r.GradTol == 0 {
		r.GradTol = DefaultGradTol
	}
	return r
}

// ProbeResult is the cross-validated accuracy of a linear probe.
type ProbeResult struct {
	// Accuracy is the fraction of points whose held-out prediction equals
	// their label, over all folds.
	Accuracy float64
	// FoldAccuracy[f] is the accuracy on the points of fold f.
	FoldAccuracy []float64
	// Fold[i] is the fold of point i (the assignment of [Folds]).
	Fold []int
	// Iterations[f] is the number of L-BFGS iterations of fold f's fit,
	// and Converged reports whether every fit met its stopping rule
	// before MaxIter.
	Iterations []int
	Converged  bool
	// Settings are the settings actually used.
	Settings ProbeSettings
}

// splitmix64 is the SplitMix64 mixing function (Steele, Lea and Flood,
// OOPSLA 2014).
func splitmix64(x uint64) uint64 {
	x += 0x9E3779B97F4A7C15
	z := x
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9
	z = (z ^ (z >> 27)) * 0x94D049BB133111EB
	return z ^ (z >> 31)
}

// Folds returns a stratified assignment of the labeled points to k folds,
// fold[i] in 0..k−1, fixed by seed. Within each class the members are
// ordered by the key splitmix64(splitmix64(seed) XOR i) (then by index);
// the classes are concatenated in index order, and the p-th point of that
// list goes to fold p mod k. Every class is thus spread as evenly as
// possible and fold sizes differ by at most one. The fixture generator
// testdata/gen/overlap_fixtures.py ports this function; keep them in
// sync.
func Folds(labels []int, k int, seed uint64) ([]int, error) {
	if len(labels) == 0 {
		return nil, errorf("folds", -1, -1, "no labels")
	}
	if k < 2 || k > len(labels) {
		return nil, errorf("folds", -1, -1, "%d folds for %d points; need 2..%d", k, len(labels), len(labels))
	}
	for i, c := range labels {
		if c < 0 {
			return nil, errorf("folds", i, -1, "label %d is negative", c)
		}
	}
	s := splitmix64(seed)
	order := make([]int, len(labels))
	for i := range order {
		order[i] = i
	}
	key := func(i int) uint64 { return splitmix64(s ^ uint64(i)) }
	slices.SortFunc(order, func(a, b int) int {
		switch {
		case labels[a] != labels[b]:
			return labels[a] - labels[b]
		case key(a) < key(b):
			return -1
		case key(a) > key(b):
			return 1
		}
		return a - b
	})
	fold := make([]int, len(labels))
	for p, i := range order {
		fold[i] = p % k
	}
	return fold, nil
}

// Probe returns the k-fold cross-validated accuracy of a multinomial
// logistic-regression probe on the labeled sample x.
//
// Folds come from [Folds]. In each fold the features are standardised
// with the training points' mean and population standard deviation (a
// column whose deviation is below 10·ε·max(1, |mean|) is only centred),
// the model is fitted from zero weights by L-BFGS (gonum's optimize
// package; see lbfgs) on the objective documented at [ProbeSettings.C],
// and a held-out point is
// predicted as the class of largest score (the smallest index on ties).
// Only the fold assignment depends on the seed; the fit is deterministic.
// The folds are fitted at once on up to the context's worker budget of
// goroutines (internal/budget; GOMAXPROCS without one); the result does
// not depend on how many.
func Probe(ctx context.Context, x mat.Matrix, labels []int, set *ProbeSettings) (*ProbeResult, error) {
	s, err := newSample("probe", x, labels, true)
	if err != nil {
		return nil, err
	}
	return probe(ctx, s, set)
}

func probe(ctx context.Context, s *sample, set *ProbeSettings) (*ProbeResult, error) {
	r := set.resolved()
	if r.Folds < 2 || r.Folds > s.n {
		return nil, errorf("probe", -1, -1, "%d folds for %d rows; need 2..%d", r.Folds, s.n, s.n)
	}
	if !(r.C > 0) || math.IsInf(r.C, 0) {
		return nil, errorf("probe", -1, -1, "C = %v is not a positive number", r.C)
	}
	if r.MaxIter < 1 || !(r.GradTol > 0) {
		return nil, errorf("probe", -1, -1, "MaxIter %d and GradTol %v must be positive", r.MaxIter, r.GradTol)
	}
	fold, err := Folds(s.labels, r.Folds, r.Seed)
	if err != nil {
		return nil, err
	}
	res := &ProbeResult{
		FoldAccuracy: make([]float64, r.Folds),
		Fold:         fold,
		Iterations:   make([]int, r.Folds),
		Converged:    true,
		Settings:     r,
	}
	// One fold per goroutine at a time; a fit starts no goroutines of
	// its own, so the budget is not exceeded.
	right := make([]int, r.Folds)
	converged := make([]bool, r.Folds)
	errs := make([]error, r.Folds)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(budget.Workers(ctx), r.Folds) {
		wg.Go(func() {
			for {
				f := int(next.Add(1) - 1)
				if f >= r.Folds {
					return
				}
				if errs[f] = ctx.Err(); errs[f] != nil {
					return
				}
				var train, test []int
				for i, g := range fold {
					if g == f {
						test = append(test, i)
					} else {
						train = append(train, i)
					}
				}
				m, err := fitLogistic(ctx, s, train, r)
				if err != nil {
					errs[f] = err
					return
				}
				res.Iterations[f] = m.iter
				for _, i := range test {
					if m.predict(s.row(i)) == s.labels[i] {
						right[f]++
					}
				}
				res.FoldAccuracy[f] = float64(right[f]) / float64(len(test))
				converged[f] = m.converged
			}
		})
	}
	wg.Wait()
	var correct int
	for f := range r.Folds {
		if errs[f] != nil {
			return nil, errs[f]
		}
		res.Converged = res.Converged && converged[f]
		correct += right[f]
	}
	res.Accuracy = float64(correct) / float64(s.n)
	return res, nil
}

// logistic is a fitted multinomial logistic-regression model on
// standardised features.
type logistic struct {
	k, d      int
	class     []int // label of each model class (those in the training fold)
	mean, sd  []float64
	w         []float64 // k×d row-major, then k intercepts
	iter      int
	converged bool
}

func (m *logistic) predict(x []float64) int {
	best, arg := math.Inf(-1), 0
	for c := 0; c < m.k; c++ {
		z := m.w[m.k*m.d+c]
		wc := m.w[c*m.d : (c+1)*m.d]
		for j, v := range x {
			z += wc[j] * (v - m.mean[j]) / m.sd[j]
		}
		if z > best {
			best, arg = z, c
		}
	}
	return m.class[arg]
}

func fitLogistic(ctx context.Context, s *sample, train []int, r ProbeSettings) (*logistic, error) {
	// Only the classes present in the training fold are modelled, as
	// scikit-learn does; an absent class would drive its intercept to −∞.
	index := make([]int, s.classes)
	for c := range index {
		index[c] = -1
	}
	var class []int
	for _, i := range train {
		if c := s.labels[i]; index[c] < 0 {
			index[c] = 0
			class = append(class, c)
		}
	}
	slices.Sort(class)
	for a, c := range class {
		index[c] = a
	}
	n, d, k := len(train), s.d, len(class)
	m := &logistic{k: k, d: d, class: class, mean: make([]float64, d), sd: make([]float64, d)}
	for _, i := range train {
		for j, v := range s.row(i) {
			m.mean[j] += v
		}
	}
	for j := range m.mean {
		m.mean[j] /= float64(n)
	}
	for _, i := range train {
		for j, v := range s.row(i) {
			m.sd[j] += (v - m.mean[j]) * (v - m.mean[j])
		}
	}
	for j := range m.sd {
		m.sd[j] = math.Sqrt(m.sd[j] / float64(n))
		if m.sd[j] < 10*0x1p-52*math.Max(1, math.Abs(m.mean[j])) {
			m.sd[j] = 1
		}
	}
	// A column that standardises to zero on every training row (a dead
	// unit, a blank pixel) adds nothing to any logit, and its weights,
	// whose gradient is then the weight itself, stay at their starting
	// value 0 through every L-BFGS step: fitting without it is the same
	// fit, at the cost of the columns that remain.
	var cols []int
	for j := 0; j < d; j++ {
		for _, i := range train {
			if s.row(i)[j] != m.mean[j] {
				cols = append(cols, j)
				break
			}
		}
	}
	dk := len(cols)
	xs := make([]float64, n*dk)
	y := make([]int, n)
	for a, i := range train {
		row := s.row(i)
		for q, j := range cols {
			xs[a*dk+q] = (row[j] - m.mean[j]) / m.sd[j]
		}
		y[a] = index[s.labels[i]]
	}
	obj := newSoftmaxLoss(xs, y, n, dk, k, r.C)
	theta := make([]float64, k*(dk+1))
	iter, converged, err := minimizer(ctx, obj.eval, theta, r.GradTol*(1+r.C*float64(n)), r.MaxIter)
	if err != nil {
		return nil, err
	}
	m.w = make([]float64, k*(d+1))
	for c := 0; c < k; c++ {
		for q, j := range cols {
			m.w[c*d+j] = theta[c*dk+q]
		}
		m.w[k*d+c] = theta[k*dk+c]
	}
	m.iter = iter
	m.converged = converged
	return m, nil
}

// softmaxLoss is the objective of [ProbeSettings.C] on n standardised
// training rows, with the scratch space its evaluations reuse: no
// evaluation allocates.
//
// The logits and the gradient are matrix–vector products with the whole
// training matrix, one per class (gonum's BLAS Dgemv, whose kernels work
// on blocks of rows; Dgemm would run its small products on goroutines of
// its own, outside the run's worker budget, and through
// single-dot-product kernels). Logits are stored class-major, so each
// class's scores are contiguous for the products and the soft-max loops.
type softmaxLoss struct {
	n, d, k int
	C       float64
	x       blas64.General // n×d standardised rows
	y       []int          // model class of each row
	z       []float64      // k×n logits, then k×n soft-max residuals P−Y
	mx, sum []float64      // per row: largest logit, Σ_c exp(z_c − mx)
}

func newSoftmaxLoss(xs []float64, y []int, n, d, k int, C float64) *softmaxLoss {
	return &softmaxLoss{
		n: n, d: d, k: k, C: C,
		x:   blas64.General{Rows: n, Cols: d, Stride: d, Data: xs},
		y:   y,
		z:   make([]float64, k*n),
		mx:  make([]float64, n),
		sum: make([]float64, n),
	}
}

// eval returns the objective at theta (k×d weights, row-major, then k
// intercepts) and, if grad is not nil, writes its gradient
//
//	∇_W = W + C (P−Y)ᵀ X,  ∇_b = C Σ_i (P−Y)_i,
//
// where P holds the soft-max probabilities exp(z − max z)/Σ exp(z − max z).
func (o *softmaxLoss) eval(grad, theta []float64) float64 {
	n, d, k := o.n, o.d, o.k
	w, b := theta[:k*d], theta[k*d:k*d+k]
	mx, sum := o.mx[:n], o.sum[:n]
	for a := range mx {
		mx[a] = math.Inf(-1)
	}
	for c := 0; c < k; c++ {
		zc := o.z[c*n : (c+1)*n]
		if d > 0 {
			blas64.Gemv(blas.NoTrans, 1, o.x, blas64.Vector{N: d, Inc: 1, Data: w[c*d : (c+1)*d]}, 0, blas64.Vector{N: n, Inc: 1, Data: zc})
		} else { // every column constant: the intercepts alone
			clear(zc)
		}
		bc := b[c]
		for a, v := range zc {
			v += bc
			zc[a] = v
			if v > mx[a] {
				mx[a] = v
			}
		}
	}
	// The loss Σ_i log Σ_c exp(z_ic) − z_i,y_i, with the logits of the
	// labels taken before the scores are overwritten.
	var loss float64
	for a, c := range o.y {
		loss -= o.z[c*n+a]
	}
	for a := range sum {
		sum[a] = 0
	}
	for c := 0; c < k; c++ {
		zc := o.z[c*n : (c+1)*n]
		for a, v := range zc {
			e := math.Exp(v - mx[a])
			zc[a] = e
			sum[a] += e
		}
	}
	for a, s := range sum {
		loss += mx[a] + math.Log(s)
	}
	var reg float64
	for _, v := range w {
		reg += v * v
	}
	f := 0.5*reg + o.C*loss
	if grad == nil {
		return f
	}
	for a, s := range sum {
		sum[a] = 1 / s
	}
	for c := 0; c < k; c++ {
		zc := o.z[c*n : (c+1)*n]
		for a := range zc {
			zc[a] *= sum[a]
		}
	}
	for a, c := range o.y {
		o.z[c*n+a]-- // P−Y
	}
	copy(grad[:k*d], w)
	gb := grad[k*d : k*d+k]
	for c := 0; c < k; c++ {
		zc := o.z[c*n : (c+1)*n]
		var t float64
		for _, v := range zc {
			t += v
		}
		gb[c] = o.C * t
		if d == 0 {
			continue
		}
		blas64.Gemv(blas.Trans, o.C, o.x, blas64.Vector{N: n, Inc: 1, Data: zc}, 1, blas64.Vector{N: d, Inc: 1, Data: grad[c*d : (c+1)*d]})
	}
	return f
}
