// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package csvnum reads numeric comma-separated tables, one row per line,
// and reports bad cells by line and column.
package csvnum

import (
	"bufio"
	"bytes"
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

// Limits on what a table may make a reader hold: a longer stream or
// line (/dev/zero) is refused while reading, not after.
const (
	// MaxBytes is the most bytes read from one table (256 MiB).
	MaxBytes = 256 << 20
	// MaxLine is the longest line read (16 MiB).
	MaxLine = 16 << 20
	// MaxCells bounds rows × columns (2^26 cells, 512 MiB as float64).
	MaxCells = 1 << 26
)

// Reader wraps r and fails once more than max bytes come, or a line
// grows longer than maxLine. The errors name the limit as what+"Bytes"
// or what+"Line" (for Read, "csvnum.MaxBytes"), to say where it is set.
func Reader(r io.Reader, max, maxLine int64, what string) io.Reader {
	return &capReader{r: r, left: max, max: max, maxLine: maxLine, what: what}
}

// capReader is the reader returned by Reader.
type capReader struct {
	r         io.Reader
	left, max int64
	maxLine   int64
	line      int64 // bytes since the last newline
	what      string
	err       error // the limit error, once returned
}

func (c *capReader) Read(p []byte) (int, error) {
	if c.left <= 0 {
		var one [1]byte
		if n, _ := c.r.Read(one[:]); n > 0 {
			c.err = fmt.Errorf("input larger than %d bytes (%sBytes)", c.max, c.what)
			return 0, c.err
		}
		return c.r.Read(p)
	}
	if int64(len(p)) > c.left {
		p = p[:c.left]
	}
	n, err := c.r.Read(p)
	c.left -= int64(n)
	if i := bytes.LastIndexByte(p[:n], '\n'); i >= 0 {
		c.line = int64(n - 1 - i)
	} else {
		c.line += int64(n)
	}
	if c.line > c.maxLine {
		c.err = fmt.Errorf("a line longer than %d bytes (%sLine)", c.maxLine, c.what)
		return 0, c.err
	}
	return n, err
}

// Settings control Read. The zero value reads plain numeric rows with no
// header and rejects NaN and ±Inf.
type Settings struct {
	// AllowNonFinite accepts NaN and ±Inf cells.
	AllowNonFinite bool
	// MaxCells bounds rows×columns; zero means MaxCells.
	MaxCells int
}

// Read parses r as a numeric table. Blank lines and lines that start
// with '#' are skipped. Every row must have the same number of cells.
// The name is used in error messages only. Read returns the cells row
// by row in one slice, and the row width. It reads at most MaxBytes,
// lines of at most MaxLine bytes, and holds eight bytes per cell.
func Read(r io.Reader, name string, set *Settings) ([]float64, int, error) {
	if set == nil {
		set = &Settings{}
	}
	maxCells := set.MaxCells
	if maxCells <= 0 {
		maxCells = MaxCells
	}
	cr := &capReader{r: r, left: MaxBytes, max: MaxBytes, maxLine: MaxLine, what: "csvnum.Max"}
	sc := bufio.NewScanner(cr)
	sc.Buffer(make([]byte, 64*1024), MaxLine+1)
	var data []float64
	width := -1
	line := 0
	for sc.Scan() {
		line++
		if cr.err != nil {
			// The scanner hands out the partial line before the limit
			// error; that line was cut and is not parsed.
			return nil, 0, fmt.Errorf("%s:%d: %w", name, line, cr.err)
		}
		text := strings.TrimSpace(sc.Text())
		if line == 1 {
			text = strings.TrimPrefix(text, "\uFEFF")
		}
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		cells := strings.Count(text, ",") + 1
		if width >= 0 && cells != width {
			return nil, 0, &Error{Name: name, Line: line, Reason: fmt.Sprintf("row has %d cells, want %d like the rows before", cells, width)}
		}
		width = cells
		if len(data)+width > maxCells {
			return nil, 0, &Error{Name: name, Line: line, Reason: fmt.Sprintf("table exceeds the limit of %d cells (csvnum.MaxCells)", maxCells)}
		}
		for j := 0; j < width; j++ {
			f := text
			if k := strings.IndexByte(text, ','); k >= 0 {
				f, text = text[:k], text[k+1:]
			}
			f = strings.TrimSpace(f)
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				return nil, 0, &Error{Name: name, Line: line, Column: j + 1, Reason: fmt.Sprintf("%s is not a number", QuoteCell(f))}
			}
			if !set.AllowNonFinite && (math.IsNaN(v) || math.IsInf(v, 0)) {
				return nil, 0, &Error{Name: name, Line: line, Column: j + 1, Reason: fmt.Sprintf("%s is not finite", QuoteCell(f))}
			}
			data = append(data, v)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, 0, fmt.Errorf("%s: %w", name, err)
	}
	if len(data) == 0 {
		return nil, 0, fmt.Errorf("%s: %w", name, ErrEmpty)
	}
	return data, width, nil
}

// QuoteCell quotes a cell for an error message, cut to its first 40
// bytes when longer.
func QuoteCell(f string) string {
	const most = 40
	if len(f) <= most {
		return strconv.Quote(f)
	}
	return fmt.Sprintf("%q… (%d bytes)", f[:most], len(f))
}
