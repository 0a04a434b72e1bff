// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"bytes"
	"io"
	"os"
	"strings"
	"testing"

	"codeberg.org/sbinet/npyio"
	"github.com/google/go-cmp/cmp"
	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/trace"
)

// TestReadCSV checks header detection, label columns and class order.
func TestReadCSV(t *testing.T) {
	for _, tc := range []struct {
		name, in string
		set      trace.CSVSettings
		classes  []string
		labels   []int
		x0       []float64
	}{
		{"header by name", "a,b,kind\n1,2,cat\n3,4,dog\n5,6,cat\n7,8,dog\n9,1,cat\n2,3,dog\n", trace.CSVSettings{Label: "kind"},
			[]string{"cat", "dog"}, []int{0, 1, 0, 1, 0, 1}, []float64{1, 2}},
		{"no header last column", "1,2,10\n3,4,9\n5,6,10\n7,8,9\n9,1,10\n2,3,9\n", trace.CSVSettings{},
			[]string{"9", "10"}, []int{1, 0, 1, 0, 1, 0}, []float64{1, 2}},
		{"first column by number", "# comment\ny,a,b\n0,1,2\n1,3,4\n0,5,6\n1,7,8\n0,9,1\n1,2,3\n", trace.CSVSettings{Label: "1"},
			[]string{"0", "1"}, []int{0, 1, 0, 1, 0, 1}, []float64{1, 2}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s, err := trace.ReadCSV(strings.NewReader(tc.in), "in.csv", &tc.set)
			if err != nil {
				t.Fatal(err)
			}
			if diff := cmp.Diff(tc.classes, s.Classes); diff != "" {
				t.Errorf("classes (-want +got):\n%s", diff)
			}
			if diff := cmp.Diff(tc.labels, s.Labels); diff != "" {
				t.Errorf("labels (-want +got):\n%s", diff)
			}
			if diff := cmp.Diff(tc.x0, s.X.RawRowView(0)); diff != "" {
				t.Errorf("first row (-want +got):\n%s", diff)
			}
		})
	}
}

// TestReadCSVErrors checks that errors name the file, line and column.
func TestReadCSVErrors(t *testing.T) {
	rows := "a,b,y\n1,2,p\n3,4,p\n5,6,p\n7,8,q\n9,1,q\n"
	for _, tc := range []struct {
		name, in string
		set      trace.CSVSettings
		want     string
	}{
		{"unknown label", rows + "2,3,q\n", trace.CSVSettings{Label: "class"}, `no label column named "class"`},
		{"label out of range", rows + "2,3,q\n", trace.CSVSettings{Label: "7"}, "label column 7 out of range 1..3"},
		{"small class", rows, trace.CSVSettings{Label: "y"}, `class "q" has 2 points`},
		{"nan", rows + "NaN,3,q\n", trace.CSVSettings{Label: "y"}, "in.csv:7: column 1: \"NaN\" is not finite"},
		{"text", rows + "2,x,q\n", trace.CSVSettings{Label: "y"}, "in.csv:7: column 2: \"x\" is not a number"},
		{"ragged", rows + "2,q\n", trace.CSVSettings{Label: "y"}, "in.csv:7"},
		{"empty", "", trace.CSVSettings{}, "no records"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := trace.ReadCSV(strings.NewReader(tc.in), "in.csv", &tc.set)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("got %v, want an error containing %q", err, tc.want)
			}
		})
	}
}

// TestReadNPY reads NPY files written with npyio and rejects a broken one.
func TestReadNPY(t *testing.T) {
	x := mat.NewDense(6, 2, []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12})
	var fx, fl bytes.Buffer
	if err := npyio.Write(&fx, x); err != nil {
		t.Fatal(err)
	}
	if err := npyio.Write(&fl, []int64{2, 5, 2, 5, 2, 5}); err != nil {
		t.Fatal(err)
	}
	s, err := trace.ReadNPY(bytes.NewReader(fx.Bytes()), "x.npy", bytes.NewReader(fl.Bytes()), "y.npy")
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff([]string{"2", "5"}, s.Classes); diff != "" {
		t.Errorf("classes (-want +got):\n%s", diff)
	}
	if !mat.Equal(s.X, x) {
		t.Errorf("features differ")
	}
	_, err = trace.ReadNPY(strings.NewReader("not npy"), "x.npy", bytes.NewReader(fl.Bytes()), "y.npy")
	if err == nil || !strings.Contains(err.Error(), "x.npy") {
		t.Errorf("got %v, want an error naming x.npy", err)
	}
	var ff bytes.Buffer
	npyio.Write(&ff, []float64{1, 2, 3, 4, 5, 6})
	_, err = trace.ReadNPY(bytes.NewReader(fx.Bytes()), "x.npy", &ff, "y.npy")
	if err == nil || !strings.Contains(err.Error(), "y.npy") {
		t.Errorf("got %v, want an error naming y.npy", err)
	}
}

// TestCap checks stratified subsampling: at most the cap per class,
// classes under the cap kept whole, same seed same rows, rows in order.
func TestCap(t *testing.T) {
	f, err := os.Open("../testdata/onnx/digits_sample.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := trace.ReadCSV(f, "digits_sample.csv", &trace.CSVSettings{Label: "label"})
	if err != nil {
		t.Fatal(err)
	}
	a, b, c := s.Cap(20, 1), s.Cap(20, 1), s.Cap(20, 2)
	if !cmp.Equal(a.Rows, b.Rows) {
		t.Error("same seed gave different rows")
	}
	if cmp.Equal(a.Rows, c.Rows) {
		t.Error("different seeds gave the same rows")
	}
	for i, n := range a.Counts() {
		if want := min(20, s.Counts()[i]); n != want {
			t.Errorf("class %s: %d rows, want %d", a.Classes[i], n, want)
		}
	}
	for i := 1; i < len(a.Rows); i++ {
		if a.Rows[i] <= a.Rows[i-1] {
			t.Fatalf("rows not increasing at %d: %v", i, a.Rows)
		}
	}
	for k, r := range a.Rows {
		if !cmp.Equal(a.X.RawRowView(k), s.X.RawRowView(r)) || a.Labels[k] != s.Labels[r] {
			t.Fatalf("row %d does not match source row %d", k, r)
		}
	}
	if s.Cap(1000, 1) != s {
		t.Error("a cap above every class should keep the sample")
	}
}

// TestReadNPYNumpyTypes reads a sample numpy 1.24 wrote in its usual
// types (testdata/gen/npy_fixtures.py): float32 features with int64,
// string and bool labels.
func TestReadNPYNumpyTypes(t *testing.T) {
	open := func(name string) *os.File {
		f, err := os.Open("../testdata/npy/" + name + ".npy")
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { f.Close() })
		return f
	}
	for _, tc := range []struct {
		labels  string
		classes []string
	}{
		{"sample_y_i8", []string{"0", "1"}},
		{"sample_y_U", []string{"inner", "outer"}},
		{"sample_y_b", []string{"0", "1"}},
	} {
		s, err := trace.ReadNPY(open("sample_x_f4"), "x.npy", open(tc.labels), "y.npy")
		if err != nil {
			t.Fatalf("%s: %v", tc.labels, err)
		}
		if diff := cmp.Diff(tc.classes, s.Classes); diff != "" {
			t.Errorf("%s: classes (-want +got):\n%s", tc.labels, diff)
		}
		// float32 of k/8 is exact.
		if r, c := s.X.Dims(); r != 6 || c != 3 || s.X.At(5, 2) != 17.0/8 {
			t.Errorf("%s: features %d×%d, last %v", tc.labels, r, c, s.X.At(5, 2))
		}
	}
	_, err := trace.ReadNPY(open("sample_x_f4"), "x.npy", open("labels_i8"), "y.npy")
	if err == nil || !strings.Contains(err.Error(), "4 labels but x.npy has 6 rows") {
		t.Errorf("got %v, want a count mismatch naming both files", err)
	}
}

// zeros is an endless stream of NUL bytes, like /dev/zero.
type zeros struct{}

func (zeros) Read(p []byte) (int, error) {
	clear(p)
	return len(p), nil
}

// newlines is an endless stream of empty lines.
type newlines struct{}

func (newlines) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = '\n'
	}
	return len(p), nil
}

// TestReadCSVBounded checks that an endless stream is refused once it
// passes the limits, instead of being read into memory.
func TestReadCSVBounded(t *testing.T) {
	for _, tc := range []struct {
		name string
		r    io.Reader
		want string
	}{
		{"one endless line", zeros{}, "MaxCSVLine"},
		{"endless lines", newlines{}, "MaxCSVBytes"},
	} {
		_, err := trace.ReadCSV(tc.r, "endless.csv", nil)
		if err == nil || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), "endless.csv") {
			t.Errorf("%s: err = %v, want it to name the file and %s", tc.name, err, tc.want)
		}
	}
}
