// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package csvnum reads numeric comma-separated tables, one row per line,
// and reports bad cells by line and column.
package csvnum

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"strconv"
	"strings"
	"sync"
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

// chunkBytes is the size of the blocks of whole lines that Read parses
// side by side.
const chunkBytes = 1 << 20

// Read parses r as a numeric table. Blank lines and lines that start
// with '#' are skipped. Every row must have the same number of cells.
// The name is used in error messages only. Read returns the cells row
// by row in one slice, and the row width. It reads at most MaxBytes,
// lines of at most MaxLine bytes, and holds eight bytes per cell. It
// parses blocks of whole lines on up to GOMAXPROCS goroutines (it runs
// before any computation on the table, so it shares the cores with
// none) and reports the error a reading line by line would report
// first.
func Read(r io.Reader, name string, set *Settings) ([]float64, int, error) {
	if set == nil {
		set = &Settings{}
	}
	maxCells := set.MaxCells
	if maxCells <= 0 {
		maxCells = MaxCells
	}
	cr := &capReader{r: r, left: MaxBytes, max: MaxBytes, maxLine: MaxLine, what: "csvnum.Max"}
	workers := max(1, runtime.GOMAXPROCS(0))
	work := make(chan *block)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for b := range work {
				b.part = parseLines(b.text, b.line, name, -1, 0, math.MaxInt, set)
				close(b.done)
			}
		}()
	}
	defer func() {
		close(work)
		wg.Wait()
	}()

	var data []float64
	width := -1
	// collect adds the oldest block's rows to the table.
	var pending []*block
	collect := func() error {
		b := pending[0]
		pending = pending[1:]
		<-b.done
		p := b.part
		if p.err != nil || (width >= 0 && p.width >= 0 && p.width != width) || len(data)+len(p.data) > maxCells {
			// Read the block again from where the table stands: the
			// error it gives is the first a line-by-line reading meets.
			p = parseLines(b.text, b.line, name, width, len(data), maxCells, set)
			if p.err != nil {
				return p.err
			}
		}
		if width < 0 {
			width = p.width
		}
		if data == nil {
			data = p.data
		} else {
			data = append(data, p.data...)
		}
		return nil
	}
	queue := func(text []byte, line int) error {
		if len(pending) == 2*workers {
			if err := collect(); err != nil {
				return err
			}
		}
		b := &block{text: text, line: line, done: make(chan struct{})}
		work <- b
		pending = append(pending, b)
		return nil
	}
	finish := func(readErr error) ([]float64, int, error) {
		for len(pending) > 0 {
			if err := collect(); err != nil {
				return nil, 0, err
			}
		}
		if readErr != nil {
			return nil, 0, readErr
		}
		if len(data) == 0 {
			return nil, 0, fmt.Errorf("%s: %w", name, ErrEmpty)
		}
		return data, width, nil
	}

	buf := make([]byte, 0, chunkBytes)
	line := 1
	for {
		for len(buf) < cap(buf) {
			n, err := cr.Read(buf[len(buf):cap(buf)])
			buf = buf[:len(buf)+n]
			if err == nil {
				continue
			}
			if cr.err != nil {
				// A limit cuts the last line, which is not parsed.
				k := bytes.LastIndexByte(buf, '\n') + 1
				if k > 0 {
					if err := queue(buf[:k], line); err != nil {
						return nil, 0, err
					}
				}
				return finish(fmt.Errorf("%s:%d: %w", name, line+bytes.Count(buf[:k], []byte{'\n'}), cr.err))
			}
			if err != io.EOF {
				return finish(fmt.Errorf("%s: %w", name, err))
			}
			if len(buf) > 0 {
				if err := queue(buf, line); err != nil {
					return nil, 0, err
				}
			}
			return finish(nil)
		}
		k := bytes.LastIndexByte(buf, '\n') + 1
		if k == 0 {
			// No whole line yet: grow the block; the line limit stops
			// this.
			grown := make([]byte, len(buf), min(2*cap(buf), MaxLine+chunkBytes))
			copy(grown, buf)
			buf = grown
			continue
		}
		text := buf[:k]
		rest := buf[k:]
		buf = make([]byte, len(rest), max(chunkBytes, 2*len(rest)))
		copy(buf, rest)
		if err := queue(text, line); err != nil {
			return nil, 0, err
		}
		line += bytes.Count(text, []byte{'\n'})
	}
}

// block is a run of whole lines that a worker parses.
type block struct {
	text []byte
	line int // the 1-based number of its first line
	done chan struct{}
	part parsed
}

// parsed is what parseLines makes of a block of lines.
type parsed struct {
	data  []float64
	width int // −1 with no row
	err   error
}

// parseLines parses the lines of text, the first numbered line, as rows
// of a table that has width cells a row (−1: not yet known) and count
// cells before them, of at most maxCells.
func parseLines(text []byte, line int, name string, width, count, maxCells int, set *Settings) parsed {
	p := parsed{width: width}
	for len(text) > 0 {
		var raw []byte
		if k := bytes.IndexByte(text, '\n'); k >= 0 {
			raw, text = text[:k], text[k+1:]
		} else {
			raw, text = text, nil
		}
		row := strings.TrimSpace(string(raw))
		if line == 1 {
			row = strings.TrimPrefix(row, "\uFEFF")
		}
		if row == "" || strings.HasPrefix(row, "#") {
			line++
			continue
		}
		cells := strings.Count(row, ",") + 1
		if p.width >= 0 && cells != p.width {
			p.err = &Error{Name: name, Line: line, Reason: fmt.Sprintf("row has %d cells, want %d like the rows before", cells, p.width)}
			return p
		}
		p.width = cells
		if count+len(p.data)+cells > maxCells {
			p.err = &Error{Name: name, Line: line, Reason: fmt.Sprintf("table exceeds the limit of %d cells (csvnum.MaxCells)", maxCells)}
			return p
		}
		if p.data == nil {
			p.data = make([]float64, 0, cells*(1+bytes.Count(text, []byte{'\n'})))
		}
		for j := range cells {
			f := row
			if k := strings.IndexByte(row, ','); k >= 0 {
				f, row = row[:k], row[k+1:]
			}
			f = strings.TrimSpace(f)
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				p.err = &Error{Name: name, Line: line, Column: j + 1, Reason: fmt.Sprintf("%s is not a number", QuoteCell(f))}
				return p
			}
			if !set.AllowNonFinite && (math.IsNaN(v) || math.IsInf(v, 0)) {
				p.err = &Error{Name: name, Line: line, Column: j + 1, Reason: fmt.Sprintf("%s is not finite", QuoteCell(f))}
				return p
			}
			p.data = append(p.data, v)
		}
		line++
	}
	return p
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
