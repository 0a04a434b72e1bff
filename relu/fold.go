// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package relu

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// FoldSettings control [Fold]. A nil *FoldSettings means defaults.
type FoldSettings struct {
	// Tol is the absolute tolerance of the check that the output is
	// max(pre, 0): entries further off are counted in FoldReport.Mismatch.
	// Zero means exact comparison.
	Tol float64
	// Activation is the piecewise-linear activation of the stage; nil
	// means ReLU, max(x, 0) (breakpoint 0, flat below it).
	Activation *Piecewise
}

// Piecewise describes a row-wise piecewise-linear activation for [Fold]:
// an affine function of x on each piece (−∞, Breaks[0]],
// (Breaks[0], Breaks[1]], …, (Breaks[k−1], ∞). ReLU is Breaks {0} with
// Flat {true, false}; ReLU6, Hardtanh and Hardsigmoid clamp at two
// levels (two breakpoints, flat outside them); a leaky ReLU or PReLU has
// Breaks {0} and no flat piece.
type Piecewise struct {
	// Breaks are the breakpoints, finite and strictly increasing.
	Breaks []float64
	// Flat[p] reports whether the activation is constant on piece p; it
	// has len(Breaks)+1 entries.
	Flat []bool
	// Func is the activation of x on unit j, for the check counted in
	// FoldReport.Mismatch; nil skips the check.
	Func func(j int, x float64) float64
}

// reluPieces is ReLU as a Piecewise.
var reluPieces = Piecewise{Breaks: []float64{0}, Flat: []bool{true, false}, Func: func(_ int, x float64) float64 { return max(x, 0) }}

// FoldReport describes a stage of a piecewise-linear activation (ReLU
// unless FoldSettings.Activation says otherwise) on a sample. A
// coordinate of a point is zeroed when its pre-activation lies in a flat
// piece (for ReLU, ≤ 0) and active otherwise; the activation pattern of
// a point is the vector of the pieces its coordinates lie in (for ReLU,
// of its active coordinates).
type FoldReport struct {
	N, Width int

	// Zeroed[i] is the number of zeroed coordinates of point i.
	Zeroed []int
	// Untouched points have every coordinate active (ReLU is the identity
	// on them); Face points have some but not all zeroed (they land on a
	// proper face of the positive orthant); Origin points have all zeroed.
	Untouched, Face, Origin int
	// The same as fractions of N.
	UntouchedFrac, FaceFrac, OriginFrac float64

	// Dead lists units zeroed on every point; AlwaysActive lists units
	// in the same non-flat piece on every point (the activation is
	// affine for them on this sample).
	Dead, AlwaysActive []int

	// Patterns is the number of distinct activation patterns; Entropy is
	// the entropy of their histogram in bits, −Σ p log₂ p.
	Patterns int
	Entropy  float64
	// SharedPatterns counts patterns held by points of two or more
	// classes, SharedPoints the points in them. Both are 0 without labels.
	SharedPatterns, SharedPoints int
	Labeled                      bool

	// Mismatch counts entries where the output differs from the
	// activation of pre (max(pre, 0) for ReLU) by more than Settings.Tol;
	// non-zero means post is not that activation of pre (for example a
	// leaky ReLU stage checked as ReLU). It is 0 when
	// Settings.Activation has no Func.
	Mismatch int

	Settings FoldSettings
}

// Fold describes the ReLU stage (or the piecewise-linear stage of
// set.Activation) that maps pre-activations pre (n×d) to post (n×d).
// labels may be nil; otherwise it holds n class indices. It returns an
// error on mismatched shapes, empty matrices, non-finite entries, labels
// of the wrong length, or an invalid Activation.
func Fold(pre, post mat.Matrix, labels []int, set *FoldSettings) (*FoldReport, error) {
	var s FoldSettings
	if set != nil {
		s = *set
	}
	if !(s.Tol >= 0) || math.IsInf(s.Tol, 0) {
		return nil, fmt.Errorf("relu: fold tolerance %v is not a finite number ≥ 0", s.Tol)
	}
	act := &reluPieces
	if s.Activation != nil {
		act = s.Activation
		if len(act.Flat) != len(act.Breaks)+1 || len(act.Breaks) > 255 {
			return nil, fmt.Errorf("relu: activation has %d breakpoints and %d pieces, want one more piece than breakpoints (at most 256)", len(act.Breaks), len(act.Flat))
		}
		for k, b := range act.Breaks {
			if math.IsNaN(b) || math.IsInf(b, 0) || k > 0 && !(b > act.Breaks[k-1]) {
				return nil, fmt.Errorf("relu: activation breakpoints %v are not finite and strictly increasing", act.Breaks)
			}
		}
	}
	n, d, dout, err := checkPair(pre, post)
	if err != nil {
		return nil, err
	}
	if d != dout {
		return nil, fmt.Errorf("relu: ReLU input has %d columns but output has %d", d, dout)
	}
	if err := checkLabels(labels, n); err != nil {
		return nil, err
	}
	r := &FoldReport{N: n, Width: d, Zeroed: make([]int, n), Labeled: labels != nil, Settings: s}
	activeCount := make([]int, d)
	// firstPiece[j] is the piece of unit j on point 0, and samePiece[j]
	// whether every point so far has it there.
	firstPiece := make([]byte, d)
	samePiece := make([]bool, d)
	type group struct {
		count int
		class int // first class seen, −1 once two classes are seen
	}
	groups := map[string]*group{}
	key := make([]byte, d)
	for i := 0; i < n; i++ {
		z := 0
		for j := 0; j < d; j++ {
			p := pre.At(i, j)
			var piece byte
			for _, b := range act.Breaks {
				if p > b {
					piece++
				}
			}
			key[j] = piece
			if act.Flat[piece] {
				z++
			} else {
				activeCount[j]++
			}
			if i == 0 {
				firstPiece[j], samePiece[j] = piece, true
			} else if piece != firstPiece[j] {
				samePiece[j] = false
			}
			if act.Func != nil && math.Abs(post.At(i, j)-act.Func(j, p)) > s.Tol {
				r.Mismatch++
			}
		}
		r.Zeroed[i] = z
		switch z {
		case 0:
			r.Untouched++
		case d:
			r.Origin++
		default:
			r.Face++
		}
		c := 0
		if labels != nil {
			c = labels[i]
		}
		g, ok := groups[string(key)]
		if !ok {
			groups[string(key)] = &group{1, c}
			continue
		}
		g.count++
		if g.class != c {
			g.class = -1
		}
	}
	for j, c := range activeCount {
		switch {
		case c == 0:
			r.Dead = append(r.Dead, j)
		case c == n && samePiece[j]:
			r.AlwaysActive = append(r.AlwaysActive, j)
		}
	}
	r.UntouchedFrac = float64(r.Untouched) / float64(n)
	r.FaceFrac = float64(r.Face) / float64(n)
	r.OriginFrac = float64(r.Origin) / float64(n)
	r.Patterns = len(groups)
	// Sum the entropy in a fixed order so the result does not depend on
	// map iteration.
	counts := make([]int, 0, len(groups))
	for _, g := range groups {
		counts = append(counts, g.count)
		if g.class == -1 {
			r.SharedPatterns++
			r.SharedPoints += g.count
		}
	}
	sort.Ints(counts)
	for _, c := range counts {
		p := float64(c) / float64(n)
		r.Entropy -= p * math.Log2(p)
	}
	return r, nil
}
