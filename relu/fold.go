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
}

// FoldReport describes a ReLU stage on a sample. A coordinate of a point
// is zeroed when its pre-activation is ≤ 0 and active when it is > 0; the
// activation pattern of a point is its vector of active coordinates.
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
	// active on every point (ReLU is linear for them on this sample).
	Dead, AlwaysActive []int

	// Patterns is the number of distinct activation patterns; Entropy is
	// the entropy of their histogram in bits, −Σ p log₂ p.
	Patterns int
	Entropy  float64
	// SharedPatterns counts patterns held by points of two or more
	// classes, SharedPoints the points in them. Both are 0 without labels.
	SharedPatterns, SharedPoints int
	Labeled                      bool

	// Mismatch counts entries where the output differs from max(pre, 0)
	// by more than Settings.Tol; non-zero means post is not the ReLU of
	// pre (for example a leaky ReLU stage).
	Mismatch int

	Settings FoldSettings
}

// Fold describes the ReLU stage that maps pre-activations pre (n×d) to
// post (n×d). labels may be nil; otherwise it holds n class indices. It
// returns an error on mismatched shapes, empty matrices, non-finite
// entries, or labels of the wrong length.
func Fold(pre, post mat.Matrix, labels []int, set *FoldSettings) (*FoldReport, error) {
	var s FoldSettings
	if set != nil {
		s = *set
	}
	if !(s.Tol >= 0) || math.IsInf(s.Tol, 0) {
		return nil, fmt.Errorf("relu: fold tolerance %v is not a finite number ≥ 0", s.Tol)
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
	type group struct {
		count int
		class int // first class seen, −1 once two classes are seen
	}
	groups := map[string]*group{}
	key := make([]byte, (d+7)/8)
	for i := 0; i < n; i++ {
		clear(key)
		z := 0
		for j := 0; j < d; j++ {
			p := pre.At(i, j)
			if p > 0 {
				activeCount[j]++
				key[j/8] |= 1 << (j % 8)
			} else {
				z++
			}
			if math.Abs(post.At(i, j)-max(p, 0)) > s.Tol {
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
		switch c {
		case 0:
			r.Dead = append(r.Dead, j)
		case n:
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
