// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func onnxCSV(rows [][]float64) string {
	var b strings.Builder
	for _, r := range rows {
		for j, v := range r {
			if j > 0 {
				b.WriteByte(',')
			}
			b.WriteString(strconv.FormatFloat(v, 'g', -1, 64))
		}
		b.WriteByte('\n')
	}
	return b.String()
}

// TestForwardMatchesTorch runs crease forward on the fixtures' input rows
// and compares every stage's printed output with PyTorch's module output.
func TestForwardMatchesTorch(t *testing.T) {
	for _, name := range []string{"iris", "opset14_softplus_sigmoid", "reshape"} {
		ref := readOnnxReference(t, name)
		for k, s := range ref.Stages {
			var out, errb bytes.Buffer
			code := creaseMain(t.Context(), []string{"forward", onnxFixtures + name + ".onnx", "-", "--stage", strconv.Itoa(k + 1)},
				strings.NewReader(onnxCSV(ref.Input)), &out, &errb)
			if code != 0 {
				t.Fatalf("%s stage %d: exit %d: %s", name, k, code, errb.String())
			}
			lines := strings.Split(strings.TrimSpace(out.String()), "\n")
			if len(lines) != len(s.Output) {
				t.Fatalf("%s stage %d: %d lines, want %d", name, k, len(lines), len(s.Output))
			}
			for i, line := range lines {
				cells := strings.Split(line, ",")
				if len(cells) != len(s.Output[i]) {
					t.Fatalf("%s stage %d row %d: %d cells, want %d", name, k, i, len(cells), len(s.Output[i]))
				}
				for j, c := range cells {
					v, err := strconv.ParseFloat(c, 64)
					if err != nil {
						t.Fatal(err)
					}
					// Relative 1e-5, the acceptance tolerance against PyTorch.
					if w := s.Output[i][j]; math.Abs(v-w) > 1e-5*math.Max(math.Abs(w), 1e-1) {
						t.Errorf("%s stage %d [%d,%d]: got %v, want %v", name, k, i, j, v, w)
					}
				}
			}
		}
	}
}

func TestForwardDefaultIsLastStage(t *testing.T) {
	ref := readOnnxReference(t, "digits")
	in := onnxCSV(ref.Input)
	var last, def bytes.Buffer
	creaseMain(t.Context(), []string{"forward", "--stage", "-1", onnxFixtures + "digits.onnx", "-"}, strings.NewReader(in), &last, &last)
	creaseMain(t.Context(), []string{"forward", onnxFixtures + "digits.onnx", "-"}, strings.NewReader(in), &def, &def)
	if last.String() != def.String() || last.Len() == 0 {
		t.Errorf("default output differs from --stage -1")
	}
	if n := strings.Count(def.String(), "\n"); n != len(ref.Input) {
		t.Errorf("%d output rows, want %d", n, len(ref.Input))
	}
}

func TestForwardErrors(t *testing.T) {
	iris := onnxFixtures + "iris.onnx"
	for _, c := range []struct {
		name, stdin, want string
		args              []string
	}{
		{"width mismatch", "1,2,3\n", "has 3 columns but " + iris + " takes inputs of width 4", []string{"forward", iris, "-"}},
		{"bad cell", "1,2,x,4\n", "<stdin>:1: column 3", []string{"forward", iris, "-"}},
		{"ragged", "1,2,3,4\n1,2\n", "<stdin>:2", []string{"forward", iris, "-"}},
		{"empty", "", "no data rows", []string{"forward", iris, "-"}},
		{"stage out of range", "1,2,3,4\n", "--stage 9 is out of range", []string{"forward", iris, "-", "--stage", "9"}},
		{"missing input", "", "nope.csv", []string{"forward", iris, "nope.csv"}},
		{"one arg", "", "want a model and an input file", []string{"forward", iris}},
		{"bad model", "1\n", "empty file", []string{"forward", onnxFixtures + "malformed/empty.onnx", "-"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			code := creaseMain(t.Context(), c.args, strings.NewReader(c.stdin), &out, &errb)
			if code != 2 {
				t.Errorf("exit %d, want 2", code)
			}
			if !strings.Contains(errb.String(), c.want) {
				t.Errorf("stderr %q does not contain %q", errb.String(), c.want)
			}
			if out.Len() != 0 {
				t.Errorf("stdout not empty: %q", out.String())
			}
		})
	}
}

// TestForwardLabeledCSV checks that forward and barcode read the
// labeled CSV of crease trace with --labels, dropping that column.
func TestForwardLabeledCSV(t *testing.T) {
	labeled, err := os.ReadFile(digitsSample)
	if err != nil {
		t.Fatal(err)
	}
	// The same rows without the header and the label column (the last).
	var plain strings.Builder
	for i, line := range strings.Split(strings.TrimSpace(string(labeled)), "\n") {
		if i == 0 {
			continue
		}
		plain.WriteString(line[:strings.LastIndexByte(line, ',')] + "\n")
	}
	for _, cmd := range [][]string{{"forward", digitsModel}, {"barcode", "--top-dim", "0"}} {
		var a, b, errb bytes.Buffer
		if code := creaseMain(t.Context(), append(append([]string{}, cmd...), digitsSample, "--labels", "label"), nil, &a, &errb); code != 0 {
			t.Fatalf("%s --labels: exit %d: %s", cmd[0], code, errb.String())
		}
		if code := creaseMain(t.Context(), append(append([]string{}, cmd...), "-"), strings.NewReader(plain.String()), &b, &errb); code != 0 {
			t.Fatalf("%s: exit %d: %s", cmd[0], code, errb.String())
		}
		if a.String() != b.String() || a.Len() == 0 {
			t.Errorf("%s: --labels output differs from the unlabeled rows' (%d and %d bytes)", cmd[0], a.Len(), b.Len())
		}
	}
}

// BenchmarkWriteForwardCSV prints 20 000 rows of 64 outputs, the shape
// of a hidden stage of the digits model, and reports rows per second.
func BenchmarkWriteForwardCSV(b *testing.B) {
	const rows, cols = 20000, 64
	m := mat.NewDense(rows, cols, nil)
	x := uint64(1)
	for i := range rows {
		for j := range cols {
			x = x*6364136223846793005 + 1442695040888963407
			m.Set(i, j, float64(x>>11)/(1<<53)*100-50)
		}
	}
	for b.Loop() {
		if err := writeForwardCSV(io.Discard, m); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(rows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
}
