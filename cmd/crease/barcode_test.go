// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

func runBarcodeCLI(t *testing.T, stdin string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := creaseMain(context.Background(), append([]string{"barcode"}, args...), strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

func TestBarcodeCLI(t *testing.T) {
	// Unit square: three H0 bars die at the side length 1 and the loop
	// lives from 1 to the diagonal √2 (hand-checked).
	square := "0,0\n1,0\n1,1\n0,1\n"
	// Regular hexagon of side 1: H1 [1,√3) and H2 [√3,2) (hand-checked:
	// the complex at scale √3 is the boundary of an octahedron).
	var hex strings.Builder
	for i := 0; i < 6; i++ {
		a := float64(i) * math.Pi / 3
		fmt.Fprintf(&hex, "%.17g,%.17g\n", math.Cos(a), math.Sin(a))
	}
	for _, test := range []struct {
		name  string
		in    string
		args  []string
		want  string // after the header line
		match func(string) bool
		warn  string // on stderr
	}{
		{name: "square", in: square, args: []string{"-"},
			want: "0\t0\t1\n0\t0\t1\n0\t0\t1\n0\t0\tinf\n1\t1\t1.4142135623730951\n"},
		{name: "square H0 only, flags after file", in: square, args: []string{"-", "--top-dim", "0"},
			want: "0\t0\t1\n0\t0\t1\n0\t0\t1\n0\t0\tinf\n"},
		{name: "square truncated", in: square, args: []string{"-", "--stop-at", "1.2"},
			want: "0\t0\t1\n0\t0\t1\n0\t0\t1\n0\t0\tinf\n1\t1\tinf\n"},
		{name: "hexagon H2", in: hex.String(), args: []string{"--top-dim", "2", "-"},
			match: func(s string) bool {
				lines := strings.Split(strings.TrimSpace(s), "\n")
				return len(lines) == 8 && strings.HasPrefix(lines[6], "1\t") && strings.HasPrefix(lines[7], "2\t1.73205080756887")
			}},
		{name: "square collapsed", in: square, args: []string{"-", "--edge-collapse"},
			want: "0\t0\t1\n0\t0\t1\n0\t0\t1\n0\t0\tinf\n1\t1\t1.4142135623730951\n"},
		{name: "square collapsed truncated", in: square, args: []string{"-", "--stop-at", "1.2", "--edge-collapse"},
			want: "0\t0\t1\n0\t0\t1\n0\t0\t1\n0\t0\tinf\n1\t1\tinf\n"},
		{name: "hexagon H2 collapsed", in: hex.String(), args: []string{"--top-dim", "2", "--edge-collapse", "-"},
			match: func(s string) bool {
				lines := strings.Split(strings.TrimSpace(s), "\n")
				return len(lines) == 8 && strings.HasPrefix(lines[6], "1\t1") && strings.Contains(lines[6], "\t1.73205080756887") && strings.HasPrefix(lines[7], "2\t1.73205080756887")
			}},
		{name: "deprecated names", in: square, args: []string{"-", "--maxdim", "0", "--threshold", "1.2"},
			want: "0\t0\t1\n0\t0\t1\n0\t0\t1\n0\t0\tinf\n", warn: "--maxdim is deprecated; use --top-dim"},
		{name: "landmarks", in: square, args: []string{"-", "--landmarks", "2", "--seed", "3"},
			want: "0\t0\t1.4142135623730951\n0\t0\tinf\n"}, // max–min picks opposite corners
	} {
		t.Run(test.name, func(t *testing.T) {
			code, out, errs := runBarcodeCLI(t, test.in, test.args...)
			if code != 0 {
				t.Fatalf("exit %d, stderr %q", code, errs)
			}
			body, ok := strings.CutPrefix(out, "dim\tlo\thi\n")
			if !ok {
				t.Errorf("no header line: %q", out)
			}
			if !strings.Contains(errs, test.warn) {
				t.Errorf("stderr %q, want %q", errs, test.warn)
			}
			if test.match != nil {
				if !test.match(body) {
					t.Errorf("unexpected output:\n%s", out)
				}
			} else if body != test.want {
				t.Errorf("got\n%s\nwant\n%s", body, test.want)
			}
		})
	}
}

func TestBarcodeCLIBadInput(t *testing.T) {
	for _, test := range []struct {
		name, in string
		args     []string
		want     string // substring of stderr
	}{
		{"non-numeric", "0,0\n1,zz\n", []string{"-"}, "<stdin>:2: column 2"},
		{"ragged", "0,0\n1,2,3\n", []string{"-"}, "<stdin>:2"},
		{"nan", "0,0\nNaN,1\n", []string{"-"}, "<stdin>:2: column 1"},
		// Squares of 1e155 overflow float64 (IEEE 754 ends near 1.8e308);
		// this cloud once read as three infinite H0 bars.
		{"overflowing squares", "0,0\n1e155,0\n2e155,0\n", []string{"-"}, "1e+155 at row 2, column 1 is above 1e+150"},
		{"overflowing squares, collapsed", "0,0\n1e155,0\n2e155,0\n", []string{"-", "--edge-collapse", "--stop-at", "1e300"}, "above 1e+150"},
		{"empty", "", []string{"-"}, "no data rows"},
		{"one point", "1,2\n", []string{"-"}, "at least 2 points"},
		{"maxdim", "0,0\n1,1\n", []string{"-", "--top-dim", "4"}, "maximal dimension 4"},
		{"old name of top-dim", "0,0\n1,1\n", []string{"-", "--maxdim", "4"}, "maximal dimension 4"},
		{"field", "0,0\n1,1\n", []string{"-", "--prime", "4"}, "field 4 is not a prime"},
		{"threshold", "0,0\n1,1\n", []string{"-", "--stop-at", "-1"}, "threshold -1"},
		{"k too big", "0,0\n1,1\n", []string{"-", "--metric", "knn", "--graph-k", "2"}, "K < 2 points"},
		{"metric", "0,0\n1,1\n", []string{"-", "--metric", "manhattan"}, "unknown metric"},
		{"no file", "", nil, "usage"},
		{"missing file", "", []string{"/nonexistent/points.csv"}, "no such file"},
		{"one point, collapsed at a threshold", "1,2,3\n", []string{"-", "--edge-collapse", "--stop-at", "1"}, "at least 2 points"},
		{"zero vector, cosine collapsed", "0,0,0\n1,1,1\n", []string{"-", "--edge-collapse", "--metric", "cosine", "--stop-at", "1"}, "row 1 is the zero vector"},
	} {
		t.Run(test.name, func(t *testing.T) {
			code, out, errs := runBarcodeCLI(t, test.in, test.args...)
			if code != 2 {
				t.Errorf("exit %d, want 2", code)
			}
			if out != "" {
				t.Errorf("wrote %q to stdout", out)
			}
			if !strings.Contains(errs, test.want) {
				t.Errorf("stderr %q does not contain %q", errs, test.want)
			}
		})
	}
}

// TestBarcodeCLICollapse runs the truncated clouds of
// testdata/homology/gudhi.json through crease barcode with and without
// the edge collapse (which starts from the pairs within the threshold)
// and compares the output with each other, byte for byte, and with the
// bars of GUDHI 3.7.1 (Debian python3-gudhi, RipsComplex + persistence;
// generator testdata/gen/homology_clouds.py) within 1e-9.
func TestBarcodeCLICollapse(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "homology", "gudhi.json"))
	if err != nil {
		t.Fatal(err)
	}
	var fix struct {
		Versions map[string]string `json:"versions"`
		Cases    []struct {
			Name, File, Mode string
			MaxDim           int     `json:"maxdim"`
			Threshold        float64 `json:"threshold"`
			Field            int     `json:"field"`
			Bars             [][][2]*float64
		} `json:"cases"`
	}
	if err := json.Unmarshal(b, &fix); err != nil {
		t.Fatal(err)
	}
	if v := fix.Versions["gudhi"]; v != "3.7.1" {
		t.Fatalf("fixture made with GUDHI %q, want 3.7.1", v)
	}
	ran := 0
	for _, c := range fix.Cases {
		if c.Mode != "truncated" {
			continue
		}
		ran++
		t.Run(c.Name, func(t *testing.T) {
			file := filepath.Join("..", "..", "testdata", "homology", c.File)
			args := []string{file, "--top-dim", strconv.Itoa(c.MaxDim), "--prime", strconv.Itoa(c.Field),
				"--stop-at", strconv.FormatFloat(c.Threshold, 'g', -1, 64)}
			code, collapsed, errs := runBarcodeCLI(t, "", append(args, "--edge-collapse")...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			code, plain, errs := runBarcodeCLI(t, "", append(args, "--edge-collapse=false")...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			if collapsed != plain {
				t.Errorf("collapsed output differs from the plain one:\n%s\nplain:\n%s", collapsed, plain)
			}
			got := make([][][2]float64, c.MaxDim+1)
			for _, line := range strings.Split(strings.TrimSpace(collapsed), "\n")[1:] { // after the header
				var d int
				var birth, death float64
				if _, err := fmt.Sscanf(strings.ReplaceAll(line, "inf", "+Inf"), "%d\t%g\t%g", &d, &birth, &death); err != nil {
					t.Fatalf("line %q: %v", line, err)
				}
				got[d] = append(got[d], [2]float64{birth, death})
			}
			for d, bars := range c.Bars {
				if len(bars) != len(got[d]) {
					t.Errorf("H%d: %d bars, GUDHI %d", d, len(got[d]), len(bars))
					continue
				}
				used := make([]bool, len(got[d]))
				for _, w := range bars {
					wd := math.Inf(1)
					if w[1] != nil {
						wd = *w[1]
					}
					found := false
					for i, g := range got[d] {
						if !used[i] && math.Abs(g[0]-*w[0]) <= 1e-9 && (g[1] == wd || math.Abs(g[1]-wd) <= 1e-9) {
							used[i], found = true, true
							break
						}
					}
					if !found {
						t.Errorf("H%d: GUDHI bar [%v, %v) missing", d, *w[0], wd)
					}
				}
			}
		})
	}
	if ran < 4 {
		t.Fatalf("only %d truncated fixture clouds", ran)
	}
}

// TestBarcodeCLICollapseMetrics checks the collapse paths of the other
// metrics (cosine from the pairs within the threshold, knn from all
// distances) against the plain computation, byte for byte.
func TestBarcodeCLICollapseMetrics(t *testing.T) {
	file := filepath.Join("..", "..", "testdata", "homology", "torus200_h2.csv")
	for _, args := range [][]string{
		{"--metric", "cosine", "--stop-at", "0.05"},
		{"--metric", "cosine", "--stop-at", "0.05", "--top-dim", "2"},
		{"--metric", "knn", "--graph-k", "6", "--stop-at", "3"},
		{"--stop-at", "100"}, // beyond the enclosing radius
	} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			code, collapsed, errs := runBarcodeCLI(t, "", append([]string{file, "--edge-collapse"}, args...)...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			code, plain, errs := runBarcodeCLI(t, "", append([]string{file, "--edge-collapse=false"}, args...)...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			if collapsed != plain {
				t.Errorf("collapsed output differs from the plain one:\n%s\nplain:\n%s", collapsed, plain)
			}
			if strings.Count(collapsed, "\n") < 2 {
				t.Errorf("only %q", collapsed)
			}
		})
	}
}
