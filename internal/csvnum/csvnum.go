// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package csvnum reads numeric comma-separated tables, one row per line,
// and reports bad cells by line and column.
package csvnum

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// Error describes a bad cell or row in a numeric table. Line and Column
// are 1-based; Column is 0 when the whole row is at fault.
type Error struct {
	Name   string // file name, or "<stdin>"
	Line   int
	Column int
	Reason string
}

func (e *Error) Error() string {
	if e.Column > 0 {
		return fmt.Sprintf("%s:%d: column %d: %s", e.Name, e.Line, e.Column, e.Reason)
	}
	return fmt.Sprintf("%s:%d: %s", e.Name, e.Line, e.Reason)
}

// ErrEmpty is returned when a table has no data rows.
var ErrEmpty = errors.New("csvnum: no data rows")

// Settings control Read. The zero value reads plain numeric rows with no
// header and rejects NaN and ±Inf.
type Settings struct {
	// AllowNonFinite accepts NaN and ±Inf cells.
	AllowNonFinite bool
	// MaxCells bounds rows×columns; zero means 1<<28.
	MaxCells int
}

// Read parses r as a numeric table. Blank lines and lines that start
// with '#' are skipped. Every row must have the same number of cells.
// The name is used in error messages only. Read returns the rows and the
// row width.
func Read(r io.Reader, name string, set *Settings) ([][]float64, int, error) {
	if set == nil {
		set = &Settings{}
	}
	maxCells := set.MaxCells
	if maxCells <= 0 {
		maxCells = 1 << 28
	}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 1<<30)
	var rows [][]float64
	width := -1
	cells := 0
	line := 0
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if line == 1 {
			text = strings.TrimPrefix(text, "\uFEFF")
		}
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		fields := strings.Split(text, ",")
		if width >= 0 && len(fields) != width {
			return nil, 0, &Error{Name: name, Line: line, Reason: fmt.Sprintf("row has %d cells, want %d like the rows before", len(fields), width)}
		}
		width = len(fields)
		cells += width
		if cells > maxCells {
			return nil, 0, &Error{Name: name, Line: line, Reason: fmt.Sprintf("table exceeds the limit of %d cells", maxCells)}
		}
		row := make([]float64, width)
		for j, f := range fields {
			f = strings.TrimSpace(f)
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				return nil, 0, &Error{Name: name, Line: line, Column: j + 1, Reason: fmt.Sprintf("%q is not a number", f)}
			}
			if !set.AllowNonFinite && (math.IsNaN(v) || math.IsInf(v, 0)) {
				return nil, 0, &Error{Name: name, Line: line, Column: j + 1, Reason: fmt.Sprintf("%q is not finite", f)}
			}
			row[j] = v
		}
		rows = append(rows, row)
	}
	if err := sc.Err(); err != nil {
		return nil, 0, fmt.Errorf("%s: %w", name, err)
	}
	if len(rows) == 0 {
		return nil, 0, fmt.Errorf("%s: %w", name, ErrEmpty)
	}
	return rows, width, nil
}
