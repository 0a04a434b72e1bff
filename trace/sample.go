// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/csvnum"
	"crease.dev/crease/internal/npy"
)

// Limits of ReadCSV: a longer stream, or a longer line (/dev/zero),
// is refused while it is read.
const (
	// MaxCSVBytes is the largest CSV input read (256 MiB).
	MaxCSVBytes = csvnum.MaxBytes
	// MaxCSVLine is the longest line read (16 MiB).
	MaxCSVLine = csvnum.MaxLine
	// MaxCSVCells bounds the feature cells of a CSV sample (2^26, 512 MiB
	// as float64).
	MaxCSVCells = csvnum.MaxCells
)

// MinClassPoints is the fewest points a class may have.
const MinClassPoints = 3

// Sample is a labeled point cloud: one row per point. Build one with
// NewSample, NewSampleInts, ReadCSV or ReadNPY. A Sample is not changed
// by this package and is safe for concurrent reads.
type Sample struct {
	// X holds the points, n × width.
	X *mat.Dense
	// Labels[i] is the class index of row i, 0..len(Classes)−1.
	Labels []int
	// Classes holds the class names.
	Classes []string
	// Rows[i] is the 0-based row number of row i in the source.
	Rows []int
	// Source names the origin (a file name), or is empty.
	Source string
	// SourceRows is the number of rows in the source before capping.
	SourceRows int
}

// NewSample returns a sample of the rows of x labeled by the strings
// labels. Classes are ordered numerically when every label is an
// integer, else lexically. It copies x. It returns an error if the
// lengths differ, x holds NaN or ±Inf, a class has fewer than
// MinClassPoints rows, or there are more than MaxClasses classes.
func NewSample(x mat.Matrix, labels []string) (*Sample, error) {
	n, d := x.Dims()
	if n != len(labels) {
		return nil, fmt.Errorf("trace: %d rows but %d labels", n, len(labels))
	}
	if n == 0 || d == 0 {
		return nil, errors.New("trace: empty sample")
	}
	for i := range n {
		for j := range d {
			if v := x.At(i, j); math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("trace: row %d, column %d: %v is not finite", i+1, j+1, v)
			}
		}
	}
	ids := make([]int32, n)
	index := map[string]int32{}
	var names []string
	for i, l := range labels {
		id, ok := index[l]
		if !ok {
			id = int32(len(names))
			index[l] = id
			names = append(names, l)
		}
		ids[i] = id
	}
	return sampleOf(mat.DenseCopyOf(x), ids, names)
}

// NewSampleInts is NewSample with integer labels; class names are the
// decimal labels.
func NewSampleInts(x mat.Matrix, labels []int) (*Sample, error) {
	ls := make([]string, len(labels))
	for i, l := range labels {
		ls[i] = strconv.Itoa(l)
	}
	return NewSample(x, ls)
}

// classOrder returns the distinct labels, numerically sorted when all
// are integers, else lexically.
func classOrder(labels []string) []string {
	seen := map[string]bool{}
	var out []string
	numeric := true
	for _, l := range labels {
		if !seen[l] {
			seen[l] = true
			out = append(out, l)
			if _, err := strconv.ParseInt(l, 10, 64); err != nil {
				numeric = false
			}
		}
	}
	if numeric {
		sort.Slice(out, func(i, j int) bool {
			a, _ := strconv.ParseInt(out[i], 10, 64)
			b, _ := strconv.ParseInt(out[j], 10, 64)
			return a < b
		})
	} else {
		sort.Strings(out)
	}
	return out
}

// Counts returns the number of rows of each class.
func (s *Sample) Counts() []int {
	c := make([]int, len(s.Classes))
	for _, l := range s.Labels {
		c[l]++
	}
	return c
}

func (s *Sample) checkCounts() error {
	for c, k := range s.Counts() {
		if k < MinClassPoints {
			return fmt.Errorf("trace: class %q has %d points, need at least %d", s.Classes[c], k, MinClassPoints)
		}
	}
	return nil
}

// Cap returns a sample with at most perClass rows of each class, chosen
// uniformly at random with the seed (stratified subsampling); chosen
// rows keep their original order. perClass ≤ 0 means no cap. A class at
// or under the cap is kept whole. The same seed gives the same rows.
func (s *Sample) Cap(perClass int, seed uint64) *Sample {
	if perClass <= 0 {
		return s
	}
	byClass := make([][]int, len(s.Classes))
	for i, l := range s.Labels {
		byClass[l] = append(byClass[l], i)
	}
	rng := rand.New(rand.NewPCG(seed, 0x63726561736521))
	var keep []int
	for _, idx := range byClass {
		if len(idx) > perClass {
			idx = slices.Clone(idx)
			rng.Shuffle(len(idx), func(i, j int) { idx[i], idx[j] = idx[j], idx[i] })
			idx = idx[:perClass]
		}
		keep = append(keep, idx...)
	}
	sort.Ints(keep)
	if len(keep) == len(s.Labels) {
		return s
	}
	return s.subset(keep)
}

// subset returns the sample of the rows keep, in that order, with their
// labels and source row numbers.
func (s *Sample) subset(keep []int) *Sample {
	_, d := s.X.Dims()
	out := &Sample{X: mat.NewDense(len(keep), d, nil), Labels: make([]int, len(keep)), Classes: s.Classes, Rows: make([]int, len(keep)), Source: s.Source, SourceRows: s.SourceRows}
	for k, i := range keep {
		out.X.SetRow(k, s.X.RawRowView(i))
		out.Labels[k] = s.Labels[i]
		if i < len(s.Rows) {
			out.Rows[k] = s.Rows[i]
		}
	}
	return out
}

// CSVSettings control ReadCSV.
type CSVSettings struct {
	// Label names the label column: a header name, or a 1-based column
	// number. Empty means the last column. A header name takes
	// precedence over a number.
	Label string
	// Header says whether the first record is a header: "auto" (the
	// zero value "" too) treats it as a header when one of its feature
	// cells is not a number, or when Label is not a column number;
	// "yes" and "no" force it.
	Header string
}

// ReadCSV reads a labeled sample: comma-separated records, one per
// point, with one label column (strings or integers) and numeric
// feature columns. Lines starting with '#' are skipped. Errors name the
// file (name), line and column. See CSVSettings for the header rule.
func ReadCSV(r io.Reader, name string, set *CSVSettings) (*Sample, error) {
	if set == nil {
		set = &CSVSettings{}
	}
	switch set.Header {
	case "yes", "no", "", "auto":
	default:
		return nil, fmt.Errorf("trace: header setting %q: want auto, yes or no", set.Header)
	}
	cr := csv.NewReader(csvnum.Reader(r, MaxCSVBytes, MaxCSVLine, "trace.MaxCSV"))
	cr.Comment = '#'
	cr.TrimLeadingSpace = true
	cr.FieldsPerRecord = -1 // counted below, to say expected and found
	cr.ReuseRecord = true
	// next returns the next record and its line, or nil at the end.
	next := func() ([]string, int, error) {
		rec, err := cr.Read()
		if err == io.EOF {
			return nil, 0, nil
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, 0, fmt.Errorf("%s:%d: column %d: %v", name, pe.Line, pe.Column, pe.Err)
			}
			return nil, 0, fmt.Errorf("%s: %w", name, err)
		}
		line, _ := cr.FieldPos(0)
		return rec, line, nil
	}
	first, firstLine, err := next()
	if err != nil {
		return nil, err
	}
	if first == nil {
		return nil, fmt.Errorf("%s: no records", name)
	}
	first = slices.Clone(first)
	width := len(first)
	if width < 2 {
		return nil, fmt.Errorf("%s:%d: need a label column and at least one feature column, found %d column(s)", name, firstLine, width)
	}
	first[0] = strings.TrimPrefix(first[0], "\uFEFF")
	col, header, err := labelColumn(first, name, set)
	if err != nil {
		return nil, err
	}
	// Records are parsed as they are read: eight bytes a feature cell
	// and one class id a row, whatever the text held.
	var data []float64
	var ids []int32
	index := map[string]int32{}
	var names []string
	add := func(rec []string, line int) error {
		if len(data)+width-1 > MaxCSVCells {
			return fmt.Errorf("%s:%d: more than %d feature cells (trace.MaxCSVCells)", name, line, MaxCSVCells)
		}
		for j, c := range rec {
			c = strings.TrimSpace(c)
			if j == col {
				if c == "" {
					return fmt.Errorf("%s:%d: column %d: empty label", name, line, j+1)
				}
				id, ok := index[c]
				if !ok {
					if len(names) == MaxClasses {
						return fmt.Errorf("%s:%d: column %d: more than %d distinct labels (trace.MaxClasses)", name, line, j+1, MaxClasses)
					}
					c = strings.Clone(c) // not the record's line
					id = int32(len(names))
					index[c] = id
					names = append(names, c)
				}
				ids = append(ids, id)
				continue
			}
			v, err := strconv.ParseFloat(c, 64)
			if err != nil {
				return fmt.Errorf("%s:%d: column %d: %s is not a number", name, line, j+1, csvnum.QuoteCell(c))
			}
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("%s:%d: column %d: %s is not finite", name, line, j+1, csvnum.QuoteCell(c))
			}
			data = append(data, v)
		}
		return nil
	}
	if !header {
		if err := add(first, firstLine); err != nil {
			return nil, err
		}
	}
	for {
		rec, line, err := next()
		if err != nil {
			return nil, err
		}
		if rec == nil {
			break
		}
		if len(rec) != width {
			return nil, fmt.Errorf("%s:%d: %d cells, expected %d as on line %d", name, line, len(rec), width, firstLine)
		}
		if err := add(rec, line); err != nil {
			return nil, err
		}
	}
	if len(ids) == 0 {
		return nil, fmt.Errorf("%s: no data rows", name)
	}
	s, err := sampleOf(mat.NewDense(len(ids), width-1, data), ids, names)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	s.Source = name
	return s, nil
}

// labelColumn returns the 0-based label column and whether the first
// record is a header, by the rules of CSVSettings.
func labelColumn(first []string, name string, set *CSVSettings) (col int, header bool, err error) {
	width := len(first)
	col = -1
	header = set.Header == "yes"
	if set.Label != "" && set.Header != "no" {
		for j, h := range first {
			if strings.TrimSpace(h) == set.Label {
				col, header = j, true
			}
		}
	}
	if col >= 0 {
		return col, header, nil
	}
	switch set.Label {
	case "":
		col = width - 1
	default:
		k, err := strconv.Atoi(set.Label)
		if err != nil {
			return 0, false, fmt.Errorf("%s: no label column named %q (header: %s)", name, set.Label, strings.Join(first, ","))
		}
		if k < 1 || k > width {
			return 0, false, fmt.Errorf("%s: label column %d out of range 1..%d", name, k, width)
		}
		col = k - 1
	}
	if set.Header == "" || set.Header == "auto" {
		for j, c := range first {
			if j == col {
				continue
			}
			if _, err := strconv.ParseFloat(strings.TrimSpace(c), 64); err != nil {
				header = true
				break
			}
		}
	}
	return col, header, nil
}

// sampleOf returns the sample of the rows of x (kept, not copied) whose
// labels are names[ids[i]]; the names are distinct. Classes are ordered
// as NewSample orders them.
func sampleOf(x *mat.Dense, ids []int32, names []string) (*Sample, error) {
	if len(names) > MaxClasses {
		return nil, fmt.Errorf("trace: %d classes, above the limit of %d (trace.MaxClasses)", len(names), MaxClasses)
	}
	classes := classOrder(names)
	index := make(map[string]int, len(classes))
	for c, name := range classes {
		index[name] = c
	}
	class := make([]int, len(names))
	for id, name := range names {
		class[id] = index[name]
	}
	n := len(ids)
	s := &Sample{X: x, Labels: make([]int, n), Classes: classes, Rows: make([]int, n), SourceRows: n}
	for i, id := range ids {
		s.Labels[i] = class[id]
		s.Rows[i] = i
	}
	if err := s.checkCounts(); err != nil {
		return nil, err
	}
	return s, nil
}

// ReadNPY reads a sample from two NPY streams: features, a 2-D array
// (n × width) of any numeric dtype numpy writes (float16/32/64,
// int8..64, uint8..64, bool), and labels, a 1-D array of length n of
// integers, bools or strings; either byte order, C or Fortran order
// (internal/npy). The names are used in errors.
func ReadNPY(features io.Reader, featuresName string, labels io.Reader, labelsName string) (*Sample, error) {
	fa, err := npy.Read(features)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot read NPY features: %v", featuresName, err)
	}
	if len(fa.Shape) != 2 || fa.Numbers == nil {
		return nil, fmt.Errorf("%s: features are %s of shape %v, want a 2-D numeric array", featuresName, fa.Descr, fa.Shape)
	}
	if fa.Shape[0] == 0 || fa.Shape[1] == 0 {
		return nil, fmt.Errorf("%s: features of shape %v are empty", featuresName, fa.Shape)
	}
	la, err := npy.Read(labels)
	if err != nil {
		return nil, fmt.Errorf("%s: cannot read NPY labels: %v", labelsName, err)
	}
	if len(la.Shape) != 1 {
		return nil, fmt.Errorf("%s: labels have shape %v, want one dimension", labelsName, la.Shape)
	}
	if la.Shape[0] != fa.Shape[0] {
		return nil, fmt.Errorf("%s has %d labels but %s has %d rows", labelsName, la.Shape[0], featuresName, fa.Shape[0])
	}
	names := la.Strings
	if names == nil {
		if la.Kind == 'f' {
			return nil, fmt.Errorf("%s: labels are %s, want integers, bools or strings", labelsName, la.Descr)
		}
		names = make([]string, len(la.Numbers))
		for i, v := range la.Numbers {
			names[i] = strconv.FormatFloat(v, 'f', -1, 64)
		}
	}
	x := mat.NewDense(fa.Shape[0], fa.Shape[1], fa.Numbers)
	s, err := NewSample(x, names)
	if err != nil {
		return nil, fmt.Errorf("%s, %s: %w", featuresName, labelsName, err)
	}
	s.Source = featuresName
	return s, nil
}
