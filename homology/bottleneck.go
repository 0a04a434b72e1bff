// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"cmp"
	"math"
	"slices"
)

// Bottleneck returns the bottleneck distance between two barcodes of
// the same dimension: the smallest ε such that the bars can be matched,
// each bar either to a bar of the other barcode with both ends within ε
// (L∞) or to the diagonal at cost half its length. Bars of zero length
// are ignored. Bars with Death = +Inf can only match each other (cost
// |Δ Birth|): if a and b have different numbers of them the distance is
// +Inf. The computation is exact: a binary search over the candidate
// values with a Hopcroft–Karp perfect matching test.
func Bottleneck(a, b []Bar) float64 {
	var fa, fb []Bar
	var ia, ib []float64
	for _, x := range a {
		switch {
		case isInf(x.Death):
			ia = append(ia, x.Birth)
		case x.Death > x.Birth:
			fa = append(fa, x)
		}
	}
	for _, x := range b {
		switch {
		case isInf(x.Death):
			ib = append(ib, x.Birth)
		case x.Death > x.Birth:
			fb = append(fb, x)
		}
	}
	if len(ia) != len(ib) {
		return math.Inf(1)
	}
	// Essential bars: on a line, matching in sorted order is optimal.
	slices.Sort(ia)
	slices.Sort(ib)
	dist := 0.0
	for i := range ia {
		dist = math.Max(dist, math.Abs(ia[i]-ib[i]))
	}
	return math.Max(dist, finiteBottleneck(fa, fb))
}

func linf(x, y Bar) float64 {
	return math.Max(math.Abs(x.Birth-y.Birth), math.Abs(x.Death-y.Death))
}

func half(x Bar) float64 { return (x.Death - x.Birth) / 2 }

// finiteBottleneck returns the bottleneck distance between barcodes of
// finite bars of positive length.
//
// A matching of cost at most ε exists exactly when the bipartite graph
// G_ε on A and B, with an edge where two bars lie within ε of each other
// (L∞), has a matching that covers every bar longer than 2ε of either
// side: the bars it leaves go to the diagonal, and the diagonal copies
// of the matched bars pair with each other at no cost. By the
// Mendelsohn–Dulmage theorem such a matching exists exactly when one
// matching covers the long bars of A and another the long bars of B, so
// each side is tested on its own, with only its long bars on the left
// (few, near the answer, in barcodes of noisy samples). The distance is
// one of the values the test compares with ε, so the smallest feasible ε
// is found exactly by bisecting the float64 bit patterns between 0 and
// the cost of sending every bar to the diagonal, without listing the
// |A|·|B| candidate values.
func finiteBottleneck(a, b []Bar) float64 {
	if len(a) == 0 && len(b) == 0 {
		return 0
	}
	hi := 0.0
	for _, x := range a {
		hi = max(hi, half(x))
	}
	for _, y := range b {
		hi = max(hi, half(y))
	}
	c := newCoverer(a, b)
	if c.feasible(0) {
		return 0
	}
	// Non-negative float64 values are ordered as their bit patterns.
	lo, up := math.Float64bits(0), math.Float64bits(hi) // infeasible, feasible
	for up-lo > 1 {
		mid := lo + (up-lo)/2
		if c.feasible(math.Float64frombits(mid)) {
			up = mid
		} else {
			lo = mid
		}
	}
	return math.Float64frombits(up)
}

// coverer tests the feasibility of a bottleneck matching at a given ε.
type coverer struct {
	a, b []Bar // sorted by birth
	m    matcher
}

func newCoverer(a, b []Bar) *coverer {
	byBirth := func(x, y Bar) int { return cmp.Compare(x.Birth, y.Birth) }
	c := &coverer{a: slices.Clone(a), b: slices.Clone(b)}
	slices.SortFunc(c.a, byBirth)
	slices.SortFunc(c.b, byBirth)
	return c
}

// feasible reports whether the bars can be matched at cost at most eps.
func (c *coverer) feasible(eps float64) bool {
	return c.m.covers(c.a, c.b, eps) && c.m.covers(c.b, c.a, eps)
}

// matcher finds, by Hopcroft–Karp, whether the bipartite graph whose left
// side is the bars of one barcode longer than 2ε and whose right side is
// all bars of the other, joined where they lie within ε (L∞), has a
// matching covering the left side. Its slices are reused between tests.
type matcher struct {
	left   []Bar
	right  []Bar // sorted by birth
	eps    float64
	matchL []int
	matchR []int
	dist   []int
	queue  []int
}

// covers reports whether the bars of from longer than 2·eps can all be
// matched to distinct bars of to within eps; to is sorted by birth.
func (m *matcher) covers(from, to []Bar, eps float64) bool {
	m.left = m.left[:0]
	for _, x := range from {
		if half(x) > eps {
			m.left = append(m.left, x)
		}
	}
	if len(m.left) > len(to) {
		return false
	}
	m.right, m.eps = to, eps
	m.matchL = fill(m.matchL, len(m.left), -1)
	m.matchR = fill(m.matchR, len(to), -1)
	m.dist = fill(m.dist, len(m.left), 0)
	matched := 0
	// A greedy pass first: Hopcroft–Karp then only repairs.
	for u := range m.left {
		m.neighbours(u, func(v int) bool {
			if m.matchR[v] < 0 {
				m.matchL[u], m.matchR[v] = v, u
				matched++
				return true
			}
			return false
		})
		if m.matchL[u] < 0 && !m.anyNeighbour(u) {
			return false // a long bar with no partner
		}
	}
	for matched < len(m.left) && m.bfs() {
		for u := range m.left {
			if m.matchL[u] < 0 && m.dfs(u) {
				matched++
			}
		}
	}
	return matched == len(m.left)
}

// fill returns s resized to n with every element v.
func fill(s []int, n, v int) []int {
	if cap(s) < n {
		s = make([]int, n)
	}
	s = s[:n]
	for i := range s {
		s[i] = v
	}
	return s
}

// neighbours calls f on the right bars within eps of left bar u, in
// order of birth, until f returns true.
func (m *matcher) neighbours(u int, f func(v int) bool) bool {
	x := m.left[u]
	// The birth window is widened to 2ε so that rounding cannot hide a
	// partner; linf decides.
	lo := x.Birth - 2*m.eps
	hi := x.Birth + 2*m.eps
	j, _ := slices.BinarySearchFunc(m.right, lo, func(y Bar, t float64) int {
		if y.Birth < t {
			return -1
		}
		return 1
	})
	for ; j < len(m.right) && m.right[j].Birth <= hi; j++ {
		if linf(x, m.right[j]) <= m.eps && f(j) {
			return true
		}
	}
	return false
}

// anyNeighbour reports whether left bar u has a partner at all.
func (m *matcher) anyNeighbour(u int) bool {
	return m.neighbours(u, func(int) bool { return true })
}

func (m *matcher) bfs() bool {
	const inf = math.MaxInt
	m.queue = m.queue[:0]
	for u := range m.left {
		if m.matchL[u] < 0 {
			m.dist[u] = 0
			m.queue = append(m.queue, u)
		} else {
			m.dist[u] = inf
		}
	}
	found := false
	for q := 0; q < len(m.queue); q++ {
		u := m.queue[q]
		m.neighbours(u, func(v int) bool {
			w := m.matchR[v]
			if w < 0 {
				found = true
			} else if m.dist[w] == inf {
				m.dist[w] = m.dist[u] + 1
				m.queue = append(m.queue, w)
			}
			return false
		})
	}
	return found
}

func (m *matcher) dfs(u int) bool {
	ok := m.neighbours(u, func(v int) bool {
		w := m.matchR[v]
		if w < 0 || (m.dist[w] == m.dist[u]+1 && m.dfs(w)) {
			m.matchL[u], m.matchR[v] = v, u
			return true
		}
		return false
	})
	if !ok {
		m.dist[u] = math.MaxInt
	}
	return ok
}
