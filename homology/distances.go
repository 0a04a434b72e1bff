// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Distances is a symmetric dissimilarity on the points 0..Len()−1 with
// zero diagonal. +Inf means "never connected".
type Distances interface {
	// Len returns the number of points.
	Len() int
	// Dist returns the distance between points i and j.
	Dist(i, j int) float64
}

var (
	_ Distances = (*LowerTriangular)(nil)
	_ Distances = (*Sparse)(nil)
)

// LowerTriangular stores a distance matrix compactly: the entries below
// the diagonal, row by row, so d(i,j) for i > j is Data[i(i−1)/2 + j].
// This index is also the combinatorial-number-system index of the edge {i,j}.
type LowerTriangular struct {
	N    int
	Data []float64
}

// NewLowerTriangular returns the distances of n points from the
// compressed lower triangle data (length n(n−1)/2). It checks every
// entry: NaN and negative values are errors naming the row and column.
// data is used without copying.
func NewLowerTriangular(n int, data []float64) (*LowerTriangular, error) {
	if n < 0 || int64(len(data)) != int64(n)*int64(n-1)/2 {
		return nil, fmt.Errorf("%w: %d lower-triangular entries for %d points, want %d", ErrDistances, len(data), n, int64(n)*int64(n-1)/2)
	}
	t := &LowerTriangular{N: n, Data: data}
	for i := 1; i < n; i++ {
		row := data[i*(i-1)/2 : i*(i-1)/2+i]
		for j, d := range row {
			if math.IsNaN(d) || d < 0 {
				return nil, fmt.Errorf("%w: entry (row %d, column %d) is %v", ErrDistances, i+1, j+1, d)
			}
		}
	}
	return t, nil
}

// NewFullDistances returns the distances given as a full square matrix
// (rows of equal length n, zero diagonal, symmetric within a relative
// 1e-9). The entries below the diagonal are kept.
func NewFullDistances(m [][]float64) (*LowerTriangular, error) {
	n := len(m)
	data := make([]float64, n*(n-1)/2)
	for i, row := range m {
		if len(row) != n {
			return nil, fmt.Errorf("%w: row %d has %d entries, want %d", ErrDistances, i+1, len(row), n)
		}
	}
	for i := 0; i < n; i++ {
		if m[i][i] != 0 {
			return nil, fmt.Errorf("%w: diagonal entry (%d,%d) is %v, want 0", ErrDistances, i, i, m[i][i])
		}
		for j := 0; j < i; j++ {
			a, b := m[i][j], m[j][i]
			if math.IsNaN(a) || a < 0 {
				return nil, fmt.Errorf("%w: entry (row %d, column %d) is %v", ErrDistances, i+1, j+1, a)
			}
			if a != b && !(math.Abs(a-b) <= 1e-9*math.Max(math.Abs(a), math.Abs(b))) {
				return nil, fmt.Errorf("%w: not symmetric: (%d,%d) is %v but (%d,%d) is %v", ErrDistances, i, j, a, j, i, b)
			}
			data[i*(i-1)/2+j] = a
		}
	}
	return &LowerTriangular{N: n, Data: data}, nil
}

// NewMatrixDistances is NewFullDistances for a gonum matrix.
func NewMatrixDistances(m mat.Matrix) (*LowerTriangular, error) {
	r, c := m.Dims()
	if r != c {
		return nil, fmt.Errorf("%w: distance matrix is %d×%d, not square", ErrDistances, r, c)
	}
	rows := make([][]float64, r)
	for i := range rows {
		rows[i] = make([]float64, c)
		for j := range rows[i] {
			rows[i][j] = m.At(i, j)
		}
	}
	return NewFullDistances(rows)
}

// Len returns the number of points.
func (t *LowerTriangular) Len() int { return t.N }

// Dist returns the distance between i and j (0 when i == j).
func (t *LowerTriangular) Dist(i, j int) float64 {
	if i == j {
		return 0
	}
	if i < j {
		i, j = j, i
	}
	return t.Data[i*(i-1)/2+j]
}

// Edge is one entry of a sparse distance list.
type Edge struct {
	I, J int
	D    float64
}

// Sparse is a distance given by an edge list: pairs not listed are at
// distance +Inf, so they never enter the complex.
type Sparse struct {
	N     int
	Edges []Edge
}

// NewSparse checks an edge list on n points: indices in range, no loops,
// no repeated pair, distances not NaN or negative.
func NewSparse(n int, edges []Edge) (*Sparse, error) {
	if n < 0 {
		return nil, fmt.Errorf("%w: negative number of points %d", ErrDistances, n)
	}
	seen := make(map[[2]int]int, len(edges))
	for k, e := range edges {
		if e.I < 0 || e.I >= n || e.J < 0 || e.J >= n {
			return nil, fmt.Errorf("%w: edge %d (%d,%d) has an index outside 0..%d", ErrDistances, k, e.I, e.J, n-1)
		}
		if e.I == e.J {
			return nil, fmt.Errorf("%w: edge %d is a loop at %d", ErrDistances, k, e.I)
		}
		if math.IsNaN(e.D) || e.D < 0 {
			return nil, fmt.Errorf("%w: edge %d (%d,%d) has length %v", ErrDistances, k, e.I, e.J, e.D)
		}
		key := [2]int{min(e.I, e.J), max(e.I, e.J)}
		if prev, dup := seen[key]; dup {
			return nil, fmt.Errorf("%w: edges %d and %d both join %d and %d", ErrDistances, prev, k, key[0], key[1])
		}
		seen[key] = k
	}
	return &Sparse{N: n, Edges: edges}, nil
}

// Len returns the number of points.
func (s *Sparse) Len() int { return s.N }

// Dist returns the listed distance of i and j, 0 for i == j, else +Inf.
// It scans the edge list; it is meant for inspection, not hot loops.
func (s *Sparse) Dist(i, j int) float64 {
	if i == j {
		return 0
	}
	for _, e := range s.Edges {
		if (e.I == i && e.J == j) || (e.I == j && e.J == i) {
			return e.D
		}
	}
	return math.Inf(1)
}
