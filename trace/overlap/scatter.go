// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// classMeans returns the global mean and the mean of every class (nil for
// an absent class).
func (s *sample) classMeans() ([]float64, [][]float64) {
	mu := make([]float64, s.d)
	means := make([][]float64, s.classes)
	for c, k := range s.count {
		if k > 0 {
			means[c] = make([]float64, s.d)
		}
	}
	for i := 0; i < s.n; i++ {
		m := means[s.labels[i]]
		for j, v := range s.row(i) {
			m[j] += v
			mu[j] += v
		}
	}
	for j := range mu {
		mu[j] /= float64(s.n)
	}
	for c, m := range means {
		for j := range m {
			m[j] /= float64(s.count[c])
		}
	}
	return mu, means
}

// FisherResult is Fisher's class-separation ratio.
type FisherResult struct {
	// Between is tr(S_B) = Σ_c n_c‖μ_c − μ‖², Within is
	// tr(S_W) = Σ_i ‖x_i − μ_{c(i)}‖², and Ratio = Between/Within
	// (+Inf when Within is 0).
	Between, Within, Ratio float64
}

// Fisher returns the ratio tr(S_B)/tr(S_W) of the between-class and
// within-class scatter matrices of the labeled sample x (Duda, Hart and
// Stork, Pattern Classification, 2nd ed., §3.8).
func Fisher(x mat.Matrix, labels []int) (*FisherResult, error) {
	s, err := newSample("fisher", x, labels, true)
	if err != nil {
		return nil, err
	}
	return fisher(s), nil
}

func fisher(s *sample) *FisherResult {
	mu, means := s.classMeans()
	res := &FisherResult{}
	for c, m := range means {
		if m == nil {
			continue
		}
		var t float64
		for j, v := range m {
			t += (v - mu[j]) * (v - mu[j])
		}
		res.Between += float64(s.count[c]) * t
	}
	for i := 0; i < s.n; i++ {
		m := means[s.labels[i]]
		for j, v := range s.row(i) {
			res.Within += (v - m[j]) * (v - m[j])
		}
	}
	res.Ratio = res.Between / res.Within
	return res
}

// NC1Result is the within-class variability collapse measure.
type NC1Result struct {
	// Value is tr(Σ_W Σ_B⁺)/C with C the number of classes present,
	//	Σ_W = (1/n) Σ_i (x_i − μ_{c(i)})(x_i − μ_{c(i)})ᵀ
	//	Σ_B = (1/C) Σ_c (μ_c − μ_G)(μ_c − μ_G)ᵀ
	// and μ_G the mean of all points.
	Value float64
	// Rank is the number of eigenvalues of Σ_B kept in the
	// pseudo-inverse: those above Tol.
	Rank int
	// Tol is the cut-off d·λ_max·ε (d the width, λ_max the largest
	// eigenvalue of Σ_B, ε = 2⁻⁵² the float64 machine epsilon), the
	// tolerance numpy's matrix_rank uses.
	Tol float64
}

// NC1 returns the within-class variability collapse measure
// tr(Σ_W Σ_B⁺)/C of Papyan, Han and Donoho (Prevalence of neural collapse
// during the terminal phase of deep learning training, PNAS 117, 2020).
// It tends to 0 as the points of every class collapse onto their mean.
//
// Σ_B has rank at most C−1, so the pseudo-inverse is computed from the
// thin SVD of the C×d matrix of centred class means; the cost is
// O(n·d·C + d·C²). If the class means all coincide (Σ_B = 0) Value is
// +Inf.
func NC1(x mat.Matrix, labels []int) (*NC1Result, error) {
	s, err := newSample("nc1", x, labels, true)
	if err != nil {
		return nil, err
	}
	return nc1(s)
}

func nc1(s *sample) (*NC1Result, error) {
	mu, means := s.classMeans()
	C := float64(s.present)
	m := mat.NewDense(s.present, s.d, nil)
	r := 0
	for _, mc := range means {
		if mc == nil {
			continue
		}
		for j, v := range mc {
			m.Set(r, j, (v-mu[j])/math.Sqrt(C))
		}
		r++
	}
	// Σ_B = MᵀM, so its non-zero eigenvalues are the squared singular
	// values of M and its eigenvectors the right singular vectors.
	var svd mat.SVD
	if !svd.Factorize(m, mat.SVDThinV) {
		return nil, errorf("nc1", -1, -1, "singular value decomposition of the class means failed")
	}
	sv := svd.Values(nil)
	var v mat.Dense
	svd.VTo(&v)
	res := &NC1Result{}
	lmax := 0.0
	if len(sv) > 0 {
		lmax = sv[0] * sv[0]
	}
	res.Tol = float64(s.d) * lmax * 0x1p-52
	if lmax == 0 {
		res.Value = math.Inf(1)
		return res, nil
	}
	var keep []int
	for k, x := range sv {
		if x*x > res.Tol {
			keep = append(keep, k)
		}
	}
	res.Rank = len(keep)
	// tr(Σ_W Σ_B⁺) = Σ_k v_kᵀ Σ_W v_k / λ_k, v_kᵀ Σ_W v_k = (1/n) Σ_i ((x_i−μ_c)·v_k)².
	vk := make([][]float64, len(keep))
	for a, k := range keep {
		vk[a] = mat.Col(nil, k, &v)
	}
	proj := make([]float64, len(keep))
	resid := make([]float64, s.d)
	for i := 0; i < s.n; i++ {
		mc := means[s.labels[i]]
		for j, x := range s.row(i) {
			resid[j] = x - mc[j]
		}
		for a, col := range vk {
			t := dot(resid, col)
			proj[a] += t * t
		}
	}
	var tr float64
	for a, k := range keep {
		tr += proj[a] / float64(s.n) / (sv[k] * sv[k])
	}
	res.Value = tr / C
	return res, nil
}

func dot(a, b []float64) float64 {
	var t float64
	for i, v := range a {
		t += v * b[i]
	}
	return t
}
