// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"
	"slices"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// Defaults of [ProbeSettings].
const (
	DefaultFolds    = 5
	DefaultC        = 1.0
	DefaultMaxIter  = 1000
	DefaultGradTol  = 1e-8
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
	var correct int
	for f := 0; f < r.Folds; f++ {
		if err := ctx.Err(); err != nil {
			return nil, err
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
			return nil, err
		}
		res.Iterations[f] = m.iter
		res.Converged = res.Converged && m.converged
		var ok int
		for _, i := range test {
			if m.predict(s.row(i)) == s.labels[i] {
				ok++
			}
		}
		correct += ok
		res.FoldAccuracy[f] = float64(ok) / float64(len(test))
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
	xs := make([]float64, n*d)
	y := make([]int, n)
	for a, i := range train {
		for j, v := range s.row(i) {
			xs[a*d+j] = (v - m.mean[j]) / m.sd[j]
		}
		y[a] = index[s.labels[i]]
	}
	X := blas64.General{Rows: n, Cols: d, Stride: d, Data: xs}
	z := make([]float64, n*k)
	Z := blas64.General{Rows: n, Cols: k, Stride: k, Data: z}
	C := r.C

	// eval returns the objective and, if grad is not nil, writes its
	// gradient.
	eval := func(grad, theta []float64) float64 {
		W := blas64.General{Rows: k, Cols: d, Stride: d, Data: theta[:k*d]}
		b := theta[k*d:]
		blas64.Gemm(blas.NoTrans, blas.Trans, 1, X, W, 0, Z)
		var loss float64
		for a := 0; a < n; a++ {
			row := z[a*k : (a+1)*k]
			mx := math.Inf(-1)
			for c := range row {
				row[c] += b[c]
				mx = math.Max(mx, row[c])
			}
			var sum float64
			for _, v := range row {
				sum += math.Exp(v - mx)
			}
			lse := mx + math.Log(sum)
			loss += lse - row[y[a]]
			if grad != nil {
				for c := range row {
					row[c] = math.Exp(row[c] - lse) // softmax
				}
				row[y[a]]--
			}
		}
		var reg float64
		for _, v := range theta[:k*d] {
			reg += v * v
		}
		f := 0.5*reg + C*loss
		if grad != nil {
			// ∇_W = W + C (P−Y)ᵀ X, ∇_b = C Σ (P−Y).
			copy(grad[:k*d], theta[:k*d])
			G := blas64.General{Rows: k, Cols: d, Stride: d, Data: grad[:k*d]}
			blas64.Gemm(blas.Trans, blas.NoTrans, C, Z, X, 1, G)
			gb := grad[k*d:]
			for c := range gb {
				gb[c] = 0
			}
			for a := 0; a < n; a++ {
				for c, v := range z[a*k : (a+1)*k] {
					gb[c] += C * v
				}
			}
		}
		return f
	}
	theta := make([]float64, k*(d+1))
	iter, converged, err := minimizer(ctx, eval, theta, r.GradTol*(1+C*float64(n)), r.MaxIter)
	if err != nil {
		return nil, err
	}
	m.w = theta
	m.iter = iter
	m.converged = converged
	return m, nil
}
