// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package csvnum

import (
	"errors"
	"io"
	"math"
	"runtime"
	"strconv"
	"strings"
	"testing"
	"testing/iotest"
)

func TestRead(t *testing.T) {
	t.Parallel()
	for _, test := range []struct {
		name      string
		in        string
		set       *Settings
		wantRows  int
		wantWidth int
		wantLine  int // 0 means no *Error
		wantCol   int
		wantEmpty bool
	}{
		{name: "plain", in: "1,2\n3,4\n", wantRows: 2, wantWidth: 2},
		{name: "comments and blanks", in: "# head\n\n1, 2 \n  3,4\n", wantRows: 2, wantWidth: 2},
		{name: "byte order mark", in: "\uFEFF1,2\n", wantRows: 1, wantWidth: 2},
		{name: "no final newline", in: "1,2\n3,4", wantRows: 2, wantWidth: 2},
		{name: "ragged", in: "1,2\n3\n", wantLine: 2},
		{name: "not a number", in: "1,2\n3,x\n", wantLine: 2, wantCol: 2},
		{name: "empty cell", in: "1,,2\n", wantLine: 1, wantCol: 2},
		{name: "NaN rejected", in: "NaN,1\n", wantLine: 1, wantCol: 1},
		{name: "Inf rejected", in: "1,-Inf\n", wantLine: 1, wantCol: 2},
		{name: "NaN allowed", in: "NaN,1\n", set: &Settings{AllowNonFinite: true}, wantRows: 1, wantWidth: 2},
		{name: "cell limit", in: "1,2\n3,4\n", set: &Settings{MaxCells: 3}, wantLine: 2},
		{name: "empty", in: "", wantEmpty: true},
		{name: "only comments", in: "# x\n\n", wantEmpty: true},
	} {
		t.Run(test.name, func(t *testing.T) {
			data, w, err := Read(iotest.OneByteReader(strings.NewReader(test.in)), "t.csv", test.set)
			if test.wantEmpty {
				if !errors.Is(err, ErrEmpty) {
					t.Fatalf("got error %v, want ErrEmpty", err)
				}
				return
			}
			if test.wantLine != 0 {
				var e *Error
				if !errors.As(err, &e) {
					t.Fatalf("got error %v, want *Error", err)
				}
				if e.Line != test.wantLine || e.Column != test.wantCol || e.Name != "t.csv" {
					t.Fatalf("got %s line %d column %d, want t.csv line %d column %d", e.Name, e.Line, e.Column, test.wantLine, test.wantCol)
				}
				return
			}
			if err != nil {
				t.Fatalf("unexpected error: %v", err)
			}
			if w != test.wantWidth || len(data) != test.wantRows*w {
				t.Fatalf("got %d cells in rows of width %d, want %d rows of width %d", len(data), w, test.wantRows, test.wantWidth)
			}
		})
	}
}

func TestReadExact(t *testing.T) {
	t.Parallel()
	// %.17g round-trips every float64 exactly (IEEE 754; Go strconv).
	want := []float64{0.1, -1e-300, math.MaxFloat64, 5e-324}
	data, _, err := Read(strings.NewReader("0.10000000000000001,-1.0000000000000001e-300,1.7976931348623157e+308,4.9406564584124654e-324\n"), "x", nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range want {
		if data[i] != v {
			t.Errorf("cell %d: got %v, want %v", i, data[i], v)
		}
	}
}

// endless is a stream of one repeated byte pattern that never ends, as
// /dev/zero or `yes` give.
type endless struct {
	pat string
	off int
}

func (e *endless) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = e.pat[e.off]
		e.off = (e.off + 1) % len(e.pat)
	}
	return len(p), nil
}

// TestLimits checks that an endless stream is refused while it is read,
// by the line limit (no newline ever) or the cell limit (short rows),
// and that Reader's byte limit names itself; each within a memory bound
// of a small multiple of the limit that stopped it.
func TestLimits(t *testing.T) {
	for _, test := range []struct {
		name string
		r    io.Reader
		set  *Settings
		want string
		// bound on the bytes allocated: the limit that stops the
		// stream, held as text (the line) or as float64 cells, with
		// room for the slice's growth.
		bound uint64
	}{
		{name: "no newline", r: &endless{pat: "0"}, want: "csvnum.MaxLine", bound: 4 * MaxLine},
		// /dev/zero: the cut line is not parsed (its error would quote
		// 16 MiB of NUL bytes).
		{name: "NUL bytes", r: &endless{pat: "\x00"}, want: "csvnum.MaxLine", bound: 4 * MaxLine},
		// 2^20 cells of one line each: 8 bytes a cell, about five times
		// over for the slice's growth, and 16 for each line's string.
		{name: "short rows", r: &endless{pat: "1\n"}, set: &Settings{MaxCells: 1 << 20}, want: "csvnum.MaxCells", bound: 64 << 20},
	} {
		t.Run(test.name, func(t *testing.T) {
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			_, _, err := Read(test.r, "endless", test.set)
			runtime.ReadMemStats(&after)
			if err == nil || !strings.Contains(err.Error(), test.want) || len(err.Error()) > 200 {
				t.Fatalf("err = %.300v, want a short one naming %s", err, test.want)
			}
			if got := after.TotalAlloc - before.TotalAlloc; got > test.bound {
				t.Errorf("allocated %d bytes, above the bound %d", got, test.bound)
			}
		})
	}
	_, err := io.ReadAll(Reader(&endless{pat: "1,2\n"}, 1000, 100, "trace.MaxCSV"))
	if err == nil || !strings.Contains(err.Error(), "larger than 1000 bytes (trace.MaxCSVBytes)") {
		t.Errorf("Reader past its byte limit: err = %v", err)
	}
}

// FuzzRead feeds arbitrary text to Read: an error is an *Error naming a
// 1-based line (and a column for a bad cell), ErrEmpty or a limit;
// a table read has every row of the same width and only finite cells.
func FuzzRead(f *testing.F) {
	for _, s := range []string{"1,2\n3,4\n", "# c\n\n1\n", "\uFEFF1e308,-0\n", "1,,2\n", "NaN\n", "1,2\n3\n", " 0x1p-2 , 5e-324\r\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		data, w, err := Read(strings.NewReader(in), "f.csv", &Settings{MaxCells: 1 << 12})
		if err != nil {
			var e *Error
			switch {
			case errors.As(err, &e):
				if e.Line < 1 || e.Column < 0 || e.Name != "f.csv" {
					t.Fatalf("error %v: line %d column %d", err, e.Line, e.Column)
				}
			case errors.Is(err, ErrEmpty), strings.Contains(err.Error(), "csvnum.Max"):
			default:
				t.Fatalf("unexpected error %v", err)
			}
			return
		}
		if w < 1 || len(data)%w != 0 || len(data) == 0 {
			t.Fatalf("%d cells in rows of width %d", len(data), w)
		}
		for _, v := range data {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("non-finite cell %v", v)
			}
		}
	})
}

// BenchmarkRead reads a table of 20 000 rows of 64 cells printed as
// crease forward and numpy print them, and reports rows per second.
func BenchmarkRead(b *testing.B) {
	const rows, cols = 20000, 64
	var sb strings.Builder
	x := uint64(1)
	for range rows {
		for j := range cols {
			if j > 0 {
				sb.WriteByte(',')
			}
			x = x*6364136223846793005 + 1442695040888963407
			sb.WriteString(strconv.FormatFloat(float64(x>>11)/(1<<53)*16, 'g', 7, 64))
		}
		sb.WriteByte('\n')
	}
	in := sb.String()
	b.SetBytes(int64(len(in)))
	b.ResetTimer()
	for b.Loop() {
		data, width, err := Read(strings.NewReader(in), "bench", nil)
		if err != nil || width != cols || len(data) != rows*cols {
			b.Fatalf("got %d cells of width %d, %v", len(data), width, err)
		}
	}
	b.ReportMetric(float64(rows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
}
