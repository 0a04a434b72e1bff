// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
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

func finiteBottleneck(a, b []Bar) float64 {
	if len(a) == 0 && len(b) == 0 {
		return 0
	}
	cand := []float64{0}
	for _, x := range a {
		cand = append(cand, half(x))
		for _, y := range b {
			cand = append(cand, linf(x, y))
		}
	}
	for _, y := range b {
		cand = append(cand, half(y))
	}
	slices.Sort(cand)
	cand = slices.Compact(cand)
	m := &matcher{a: a, b: b}
	lo, hi := 0, len(cand)-1 // cand[hi] always admits a matching
	for lo < hi {
		mid := (lo + hi) / 2
		if m.perfect(cand[mid]) {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return cand[lo]
}

// matcher tests for a perfect matching in the bipartite graph whose left
// side is A ∪ diag(B) and right side B ∪ diag(A), with the edges of
// cost ≤ eps (diagonal to diagonal costs 0), by Hopcroft–Karp.
type matcher struct {
	a, b   []Bar
	eps    float64
	matchL []int
	matchR []int
	dist   []int
}

// neighbours calls f on the right vertices joined to left vertex u until f
// returns true.
func (m *matcher) neighbours(u int, f func(v int) bool) bool {
	na, nb := len(m.a), len(m.b)
	if u < na {
		x := m.a[u]
		for j, y := range m.b {
			if linf(x, y) <= m.eps && f(j) {
				return true
			}
		}
		return half(x) <= m.eps && f(nb+u)
	}
	j := u - na
	if half(m.b[j]) <= m.eps && f(j) {
		return true
	}
	for i := 0; i < na; i++ {
		if f(nb + i) {
			return true
		}
	}
	return false
}

func (m *matcher) perfect(eps float64) bool {
	m.eps = eps
	n := len(m.a) + len(m.b)
	m.matchL = make([]int, n)
	m.matchR = make([]int, n)
	m.dist = make([]int, n)
	for i := range m.matchL {
		m.matchL[i], m.matchR[i] = -1, -1
	}
	matched := 0
	for m.bfs() {
		for u := 0; u < n; u++ {
			if m.matchL[u] < 0 && m.dfs(u) {
				matched++
			}
		}
	}
	return matched == n
}

func (m *matcher) bfs() bool {
	const inf = math.MaxInt
	queue := make([]int, 0, len(m.matchL))
	for u := range m.matchL {
		if m.matchL[u] < 0 {
			m.dist[u] = 0
			queue = append(queue, u)
		} else {
			m.dist[u] = inf
		}
	}
	found := false
	for q := 0; q < len(queue); q++ {
		u := queue[q]
		m.neighbours(u, func(v int) bool {
			w := m.matchR[v]
			if w < 0 {
				found = true
			} else if m.dist[w] == inf {
				m.dist[w] = m.dist[u] + 1
				queue = append(queue, w)
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
