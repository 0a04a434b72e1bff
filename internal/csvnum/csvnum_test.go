// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package csvnum

import (
	"errors"
	"math"
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
			rows, w, err := Read(iotest.OneByteReader(strings.NewReader(test.in)), "t.csv", test.set)
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
			if len(rows) != test.wantRows || w != test.wantWidth {
				t.Fatalf("got %d rows of width %d, want %d of width %d", len(rows), w, test.wantRows, test.wantWidth)
			}
		})
	}
}

func TestReadExact(t *testing.T) {
	t.Parallel()
	// %.17g round-trips every float64 exactly (IEEE 754; Go strconv).
	want := []float64{0.1, -1e-300, math.MaxFloat64, 5e-324}
	rows, _, err := Read(strings.NewReader("0.10000000000000001,-1.0000000000000001e-300,1.7976931348623157e+308,4.9406564584124654e-324\n"), "x", nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range want {
		if rows[0][i] != v {
			t.Errorf("cell %d: got %v, want %v", i, rows[0][i], v)
		}
	}
}
