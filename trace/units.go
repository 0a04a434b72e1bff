// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/mat"
)

// How UnitMap.Source says the classes were matched to output units.
const (
	// UnitsFromLabels: every label is an integer naming its unit.
	UnitsFromLabels = "integer labels"
	// UnitsGiven: Settings.ClassOrder gave the order.
	UnitsGiven = "given order"
	// UnitsInferred: the assignment of classes to units that agrees
	// most with the model's own predictions.
	UnitsInferred = "inferred from the model's predictions"
)

// PoorAgreement is the share of rows, predicted by the model as their
// matched class's unit, below which the match deserves a warning (our
// choice: below it, a model scores worse than a coin on two classes).
const PoorAgreement = 0.5

// UnitMap records which output unit of the model each class is. The
// softmax measures (the Voronoi test) read class c at unit Units[c].
type UnitMap struct {
	// Units[c] is the output unit of class c; nil when the model's
	// output width differs from the number of classes.
	Units []int `json:"units"`
	// Source says how the match was made: UnitsFromLabels, UnitsGiven
	// or UnitsInferred; empty when there is none.
	Source string `json:"source"`
	// Agreement is the share of rows whose largest output is their
	// class's unit (the model's accuracy under the match).
	Agreement float64 `json:"agreement"`
	// Note says why there is no match, or warns of a poor one.
	Note string `json:"note,omitempty"`
}

// matchUnits matches the classes to the columns of the model's output
// out. order, if not empty, is the class names in unit order.
func matchUnits(classes []string, labels []int, out *mat.Dense, order []string) (*UnitMap, error) {
	_, w := out.Dims()
	k := len(classes)
	m := &UnitMap{}
	if w != k {
		if len(order) > 0 {
			return nil, fmt.Errorf("trace: a class order of %d names was given, but the model has %d outputs", len(order), w)
		}
		m.Note = fmt.Sprintf("the model has %d outputs and the sample %d classes: the softmax measures are left out", w, k)
		return m, nil
	}
	units := make([]int, k)
	pred := make([]int, len(labels)) // the model's predicted unit per row
	for i := range labels {
		pred[i] = argmax(out.RawRowView(i))
	}
	switch {
	case len(order) > 0:
		if len(order) != k {
			return nil, fmt.Errorf("trace: the class order names %d classes, the sample has %d", len(order), k)
		}
		at := map[string]int{}
		for u, name := range order {
			if _, dup := at[name]; dup {
				return nil, fmt.Errorf("trace: the class order names %q twice", name)
			}
			at[name] = u
		}
		for c, name := range classes {
			u, ok := at[name]
			if !ok {
				return nil, fmt.Errorf("trace: the class order does not name class %q", name)
			}
			units[c] = u
		}
		m.Source = UnitsGiven
	case integerUnits(classes, w, units):
		m.Source = UnitsFromLabels
	default:
		agree := make([][]float64, k)
		for c := range agree {
			agree[c] = make([]float64, w)
		}
		for i, l := range labels {
			agree[l][pred[i]]++
		}
		copy(units, maxAssignment(agree))
		m.Source = UnitsInferred
	}
	m.Units = units
	hit := 0
	for i, l := range labels {
		if pred[i] == units[l] {
			hit++
		}
	}
	if len(labels) > 0 {
		m.Agreement = float64(hit) / float64(len(labels))
	}
	if m.Agreement < PoorAgreement {
		m.Note = fmt.Sprintf("only %.0f %% of the rows are predicted as their class's unit: check the class order", 100*m.Agreement)
	}
	return m, nil
}

// integerUnits reports whether every class name is a distinct integer
// in 0..w−1, writing them into units.
func integerUnits(classes []string, w int, units []int) bool {
	seen := make([]bool, w)
	for c, name := range classes {
		v, err := strconv.Atoi(name)
		if err != nil || v < 0 || v >= w || seen[v] {
			return false
		}
		seen[v], units[c] = true, v
	}
	return true
}

func argmax(row []float64) int {
	best := 0
	for j, v := range row {
		if v > row[best] {
			best = j
		}
	}
	return best
}

// maxAssignment returns the assignment of rows to distinct columns of
// the square matrix a that maximises the sum of the chosen entries: the
// Hungarian method with potentials (H. W. Kuhn, "The Hungarian method
// for the assignment problem", Naval Research Logistics Quarterly 2,
// 1955), O(k³).
func maxAssignment(a [][]float64) []int {
	k := len(a)
	// Minimise −a. Arrays are 1-based; column 0 is the free slot.
	u := make([]float64, k+1)
	v := make([]float64, k+1)
	p := make([]int, k+1) // p[j]: row matched to column j
	way := make([]int, k+1)
	for i := 1; i <= k; i++ {
		p[0] = i
		j0 := 0
		minv := make([]float64, k+1)
		used := make([]bool, k+1)
		for j := range minv {
			minv[j] = math.Inf(1)
		}
		for {
			used[j0] = true
			i0, delta, j1 := p[j0], math.Inf(1), 0
			for j := 1; j <= k; j++ {
				if used[j] {
					continue
				}
				cur := -a[i0-1][j-1] - u[i0] - v[j]
				if cur < minv[j] {
					minv[j], way[j] = cur, j0
				}
				if minv[j] < delta {
					delta, j1 = minv[j], j
				}
			}
			for j := 0; j <= k; j++ {
				if used[j] {
					u[p[j]] += delta
					v[j] -= delta
				} else {
					minv[j] -= delta
				}
			}
			j0 = j1
			if p[j0] == 0 {
				break
			}
		}
		for j0 != 0 {
			j1 := way[j0]
			p[j0] = p[j1]
			j0 = j1
		}
	}
	out := make([]int, k)
	for j := 1; j <= k; j++ {
		out[p[j]-1] = j - 1
	}
	return out
}

// unitColumns returns the columns of out reordered so that column c is
// unit units[c].
func unitColumns(out *mat.Dense, units []int) *mat.Dense {
	n, w := out.Dims()
	r := mat.NewDense(n, w, nil)
	for i := range n {
		src, dst := out.RawRowView(i), r.RawRowView(i)
		for c, u := range units {
			dst[c] = src[u]
		}
	}
	return r
}
