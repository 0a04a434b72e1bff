// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"cmp"
	"math"
	"slices"
)

// bruteRips is the slow reference: it lists every simplex of dimension
// ≤ maxDim+1 with diameter ≤ thr, orders them by (diameter, dimension),
// and reduces the boundary matrix over Z/p column by column (the
// standard algorithm of Edelsbrunner, Letscher and Zomorodian, 2002).
// dist must be a full symmetric matrix.
func bruteRips(dist [][]float64, maxDim int, thr float64, p int) [][]Bar {
	n := len(dist)
	type smp struct {
		v []int
		d float64
	}
	var all []smp
	var rec func(v []int, start int)
	rec = func(v []int, start int) {
		if len(v) > 0 {
			d := 0.0
			for a := range v {
				for b := a + 1; b < len(v); b++ {
					d = math.Max(d, dist[v[a]][v[b]])
				}
			}
			if d > thr || math.IsInf(d, 1) {
				return
			}
			all = append(all, smp{slices.Clone(v), d})
		}
		if len(v) == maxDim+2 {
			return
		}
		for u := start; u < n; u++ {
			rec(append(v, u), u+1)
		}
	}
	rec(nil, 0)
	slices.SortStableFunc(all, func(a, b smp) int {
		if c := cmp.Compare(a.d, b.d); c != 0 {
			return c
		}
		return cmp.Compare(len(a.v), len(b.v))
	})
	pos := map[string]int{}
	key := func(v []int) string {
		b := make([]byte, 0, 4*len(v))
		for _, x := range v {
			b = append(b, byte(x), byte(x>>8), 0, ',')
		}
		return string(b)
	}
	for i, s := range all {
		pos[key(s.v)] = i
	}
	// Columns as sparse maps row -> coefficient.
	cols := make([]map[int]int, len(all))
	for i, s := range all {
		cols[i] = map[int]int{}
		if len(s.v) == 1 {
			continue
		}
		for r := range s.v {
			f := slices.Delete(slices.Clone(s.v), r, r+1)
			c := 1
			if r%2 == 1 {
				c = p - 1
			}
			cols[i][pos[key(f)]] = c
		}
	}
	low := func(c map[int]int) int {
		l := -1
		for r, v := range c {
			if v != 0 && r > l {
				l = r
			}
		}
		return l
	}
	inv := func(a int) int {
		r := 1
		for x := p - 2; x > 0; x-- {
			r = r * a % p
		}
		return r
	}
	owner := map[int]int{}
	paired := make([]bool, len(all))
	bars := make([][]Bar, maxDim+1)
	for j := range cols {
		for {
			l := low(cols[j])
			if l < 0 {
				break
			}
			o, ok := owner[l]
			if !ok {
				owner[l] = j
				paired[l], paired[j] = true, true
				dim := len(all[l].v) - 1
				if dim <= maxDim && all[j].d > all[l].d {
					bars[dim] = append(bars[dim], Bar{all[l].d, all[j].d})
				}
				break
			}
			f := (p - cols[j][l]*inv(cols[o][l])%p) % p
			for r, v := range cols[o] {
				cols[j][r] = (cols[j][r] + f*v) % p
				if cols[j][r] == 0 {
					delete(cols[j], r)
				}
			}
		}
	}
	for i, s := range all {
		dim := len(s.v) - 1
		if !paired[i] && dim <= maxDim {
			bars[dim] = append(bars[dim], Bar{s.d, math.Inf(1)})
		}
	}
	for d := range bars {
		SortBars(bars[d])
	}
	return bars
}
