// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"codeberg.org/sbinet/npyio"

	"crease.dev/crease/trace"
)

const (
	digitsModel  = "../../testdata/onnx/digits.onnx"
	digitsSample = "../../testdata/onnx/digits_sample.csv"
)

// smallCSV writes a CSV with width feature columns and classes a, b (n
// rows each) and returns its path.
func smallCSV(t *testing.T, width, n int, extra string) string {
	var b strings.Builder
	for c, name := range []string{"a", "b"} {
		for i := range n {
			for j := range width {
				b.WriteString([]string{"0.1", "0.5", "0.9", "0.3"}[(i+j+c)%4])
				b.WriteString(",")
			}
			b.WriteString(name + "\n")
		}
	}
	b.WriteString(extra)
	p := filepath.Join(t.TempDir(), "s.csv")
	if err := os.WriteFile(p, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestTraceCommand traces the digits model and checks that the JSON
// file reads back, that two runs give the same bytes and that the
// table shows every stage.
func TestTraceCommand(t *testing.T) {
	dir := t.TempDir()
	var outs [2][]byte
	for i := range outs {
		out := filepath.Join(dir, "t.json")
		var stdout, stderr bytes.Buffer
		code := creaseMain(context.Background(), []string{"trace", digitsModel, digitsSample, "--labels", "label", "--per-class-cap", "10", "--out", out}, nil, &stdout, &stderr)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr.String())
		}
		if stderr.Len() != 0 {
			t.Errorf("stderr is not a terminal but got %q", stderr.String())
		}
		if !strings.Contains(stdout.String(), "100 of 300 rows, 10 classes; rule ratio (α = 0.05, k = 8)") {
			t.Errorf("no settings line:\n%s", stdout.String())
		}
		if !strings.Contains(stdout.String(), "5      affine  10") {
			t.Errorf("table lacks the last stage:\n%s", stdout.String())
		}
		b, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		outs[i] = b
	}
	if !bytes.Equal(outs[0], outs[1]) {
		t.Error("two runs with the same seed wrote different JSON")
	}
	tr, err := trace.ReadJSON(bytes.NewReader(outs[0]))
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Stages) != 6 || tr.Model.SHA256 == "" || tr.Sample.Rows != 300 || len(tr.Sample.Indices) != 100 {
		t.Errorf("stages %d, sha %q, rows %d, used %d", len(tr.Stages), tr.Model.SHA256, tr.Sample.Rows, len(tr.Sample.Indices))
	}
}

// TestVersion keeps the version in traces equal to crease version's.
func TestVersion(t *testing.T) {
	if trace.Version != Version {
		t.Errorf("trace.Version %q, crease Version %q", trace.Version, Version)
	}
}

// TestTraceBadInput checks exit status 2, a message naming the problem
// and no output file for each kind of bad input.
func TestTraceBadInput(t *testing.T) {
	dir := t.TempDir()
	notNPY := filepath.Join(dir, "x.npy")
	os.WriteFile(notNPY, []byte("not an npy file"), 0o644)
	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"unknown label column", []string{digitsModel, digitsSample, "--labels", "digit"}, `no label column named "digit"`},
		{"small class", []string{digitsModel, smallCSV(t, 64, 5, strings.Repeat("0,", 64)+"c\n"+strings.Repeat("0,", 64)+"c\n")}, `class "c" has 2 points`},
		{"width", []string{digitsModel, smallCSV(t, 3, 5, "")}, "s.csv has 3 feature columns but " + digitsModel + " takes inputs of width 64"},
		{"nan", []string{digitsModel, smallCSV(t, 64, 5, strings.Repeat("0,", 63)+"NaN,a\n")}, "column 64: \"NaN\" is not finite"},
		{"npy", []string{digitsModel, notNPY, "--labels", notNPY}, "x.npy: cannot read NPY features"},
		{"npy without labels", []string{digitsModel, notNPY}, "need --labels LABELS.npy"},
		{"missing model", []string{filepath.Join(dir, "none.onnx"), digitsSample}, "none.onnx"},
		{"rule", []string{digitsModel, digitsSample, "--rule", "wide"}, "unknown scale rule"},
		{"args", []string{digitsModel}, "usage"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(dir, "out.json")
			var stdout, stderr bytes.Buffer
			code := creaseMain(context.Background(), append(append([]string{"trace"}, tc.args...), "--out", out), nil, &stdout, &stderr)
			if code != 2 {
				t.Errorf("exit %d, want 2", code)
			}
			if !strings.Contains(stderr.String(), tc.want) {
				t.Errorf("stderr %q lacks %q", stderr.String(), tc.want)
			}
			if _, err := os.Stat(out); err == nil {
				t.Error("output file written on error")
			}
			left, _ := filepath.Glob(filepath.Join(dir, ".crease-*"))
			if len(left) > 0 {
				t.Errorf("temporary files left: %v", left)
			}
		})
	}
}

// TestCompareCommand compares a digits trace with itself and with a
// trace at another seed: the first agrees, the second diverges, names
// the differing seed, and exits 1 when a tolerance is given; a Betti
// tolerance alone judges Betti numbers only.
func TestCompareCommand(t *testing.T) {
	dir := t.TempDir()
	for i, seed := range []string{"1", "2"} {
		var stdout, stderr bytes.Buffer
		out := filepath.Join(dir, []string{"a.json", "b.json"}[i])
		if code := creaseMain(context.Background(), []string{"trace", digitsModel, digitsSample, "--per-class-cap", "10", "--seed", seed, "--out", out}, nil, &stdout, &stderr); code != 0 {
			t.Fatalf("trace exit %d: %s", code, stderr.String())
		}
	}
	a, b := filepath.Join(dir, "a.json"), filepath.Join(dir, "b.json")
	for _, tc := range []struct {
		name string
		args []string
		code int
		want string
	}{
		{"same", []string{a, a, "--tol", "0"}, 0, "no divergence"},
		{"differ no tol", []string{a, b}, 0, "first divergence at stage "},
		{"differ tol", []string{a, b, "--tol", "1e-9"}, 1, "first divergence at stage "},
		{"seeds named", []string{a, b}, 0, "# warning: settings differ: seed 1 vs 2"},
		{"betti only", []string{a, b, "--betti-tol", "100"}, 0, "no divergence"},
		{"missing", []string{a, filepath.Join(dir, "none.json")}, 2, ""},
		{"not a trace", []string{a, digitsSample}, 2, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := creaseMain(context.Background(), append([]string{"compare"}, tc.args...), nil, &stdout, &stderr)
			if code != tc.code {
				t.Errorf("exit %d, want %d (stderr %q)", code, tc.code, stderr.String())
			}
			if !strings.Contains(stdout.String(), tc.want) {
				t.Errorf("stdout %q lacks %q", stdout.String(), tc.want)
			}
		})
	}
}

// TestCompareModelsCommand compares the three-ring classifier of
// testdata/compare with its float16 copy (alike: exit 0), its pruned copy
// (different: exit 1, naming the stage) and with bad input (exit 2).
func TestCompareModelsCommand(t *testing.T) {
	dir := "../../testdata/compare/"
	for _, tc := range []struct {
		name string
		args []string
		code int
		want string
	}{
		{"float16", []string{dir + "base.onnx", dir + "fp16.onnx", dir + "rings3.csv", "--replicates", "4"}, 0, "verdict: alike"},
		{"pruned", []string{dir + "base.onnx", dir + "pruned.onnx", dir + "rings3.csv", "--replicates", "4"}, 1, "verdict: different; stage 1 / 1"},
		{"CKA matrix", []string{dir + "base.onnx", dir + "narrow.onnx", dir + "rings3.csv", "--replicates", "3", "--cka-matrix"}, 1, "linear CKA, stage of A (rows) × stage of B (columns):"},
		{"JSON out", []string{dir + "base.onnx", dir + "narrow.onnx", dir + "rings3.csv", "--replicates", "3", "--out", filepath.Join(t.TempDir(), "c.json")}, 1, "verdict: different"},
		{"tolerance on models", []string{dir + "base.onnx", dir + "fp16.onnx", dir + "rings3.csv", "--tol", "1"}, 2, ""},
		{"wrong width", []string{dir + "base.onnx", digitsModel, dir + "rings3.csv"}, 2, ""},
		{"missing data", []string{dir + "base.onnx", dir + "fp16.onnx", dir + "none.csv"}, 2, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := creaseMain(context.Background(), append([]string{"compare"}, tc.args...), nil, &stdout, &stderr)
			if code != tc.code {
				t.Errorf("exit %d, want %d (stderr %q)", code, tc.code, stderr.String())
			}
			if !strings.Contains(stdout.String(), tc.want) {
				t.Errorf("stdout %q lacks %q", stdout.String(), tc.want)
			}
			if i := slices.Index(tc.args, "--out"); i >= 0 {
				b, err := os.ReadFile(tc.args[i+1])
				var got struct {
					Verdict string
					Pairs   []struct{ Quantities []struct{ Name string } }
					CKA     [][]*float64
				}
				if err == nil {
					err = json.Unmarshal(b, &got)
				}
				if err != nil || got.Verdict != "different" || len(got.Pairs) != 6 || len(got.CKA) != 6 {
					t.Errorf("comparison JSON: %v; verdict %q, %d pairs, %d CKA rows; want different, 6, 6", err, got.Verdict, len(got.Pairs), len(got.CKA))
				}
			}
		})
	}
}

// TestTraceCommandOptions checks the hop-count metric, the long CSV and
// NPY input on the digits sample.
func TestTraceCommandOptions(t *testing.T) {
	dir := t.TempDir()
	csvOut := filepath.Join(dir, "long.csv")
	var stdout, stderr bytes.Buffer
	code := creaseMain(context.Background(), []string{"trace", digitsModel, digitsSample, "--metric", "knn", "--hops", "1", "--per-class-cap", "8", "--skip-probe", "--csv", csvOut, "--out", filepath.Join(dir, "t.json")}, nil, &stdout, &stderr)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	b, err := os.ReadFile(csvOut)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(string(b), "stage,kind,class,measure,value\n") || !strings.Contains(string(b), "\n5,affine,9,betti.0,") {
		t.Errorf("long CSV lacks header or rows:\n%.300s", b)
	}
	f, err := os.Open(filepath.Join(dir, "t.json"))
	if err != nil {
		t.Fatal(err)
	}
	tr, err := trace.ReadJSON(f)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	if tr.Settings.Rule != trace.ScaleHops || tr.Settings.Hops != 1 || tr.Stages[0].Classes[0].Scale != 1 {
		t.Errorf("settings %+v, scale %v: want the hops rule at 1 hop", tr.Settings, tr.Stages[0].Classes[0].Scale)
	}
}

// TestTraceCommandNPY traces the digits sample given as an NPY pair and
// checks that it gives the same table as the CSV.
func TestTraceCommandNPY(t *testing.T) {
	f, err := os.Open(digitsSample)
	if err != nil {
		t.Fatal(err)
	}
	s, err := trace.ReadCSV(f, "digits_sample.csv", nil)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	xp, yp := filepath.Join(dir, "x.npy"), filepath.Join(dir, "y.npy")
	var xb, yb bytes.Buffer
	labels := make([]int64, len(s.Labels))
	for i, l := range s.Labels {
		labels[i] = int64(l) // classes are 0..9 in order, so index = digit
	}
	if err := npyio.Write(&xb, s.X); err != nil {
		t.Fatal(err)
	}
	if err := npyio.Write(&yb, labels); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(xp, xb.Bytes(), 0o644)
	os.WriteFile(yp, yb.Bytes(), 0o644)
	var tables [2]string
	for i, args := range [][]string{{digitsSample}, {xp, "--labels", yp}} {
		var stdout, stderr bytes.Buffer
		all := append([]string{"trace", digitsModel}, args...)
		all = append(all, "--per-class-cap", "8", "--skip-probe")
		if code := creaseMain(context.Background(), all, nil, &stdout, &stderr); code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, stderr.String())
		}
		tables[i] = stdout.String()
	}
	if tables[0] != tables[1] {
		t.Errorf("CSV and NPY tables differ:\n%s\n%s", tables[0], tables[1])
	}
}

// TestTraceOutputPaths checks that --out and --csv create missing
// folders, and that a path that cannot be written is refused before any
// work starts (nothing on stdout, exit 2).
func TestTraceOutputPaths(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "plain")
	os.WriteFile(file, []byte("x"), 0o644)
	for _, tc := range []struct {
		name string
		flag string
		path string
		want string // empty: success
	}{
		{"out in a missing folder", "--out", filepath.Join(dir, "a", "b", "t.json"), ""},
		{"csv in a missing folder", "--csv", filepath.Join(dir, "c", "t.csv"), ""},
		{"out under a file", "--out", filepath.Join(file, "t.json"), "cannot create its folder"},
		{"out is a folder", "--out", dir, "is a directory"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := creaseMain(context.Background(), []string{"trace", digitsModel, digitsSample, "--per-class-cap", "10", "--skip-probe", tc.flag, tc.path}, nil, &stdout, &stderr)
			if tc.want == "" {
				if code != 0 {
					t.Fatalf("exit %d: %s", code, stderr.String())
				}
				if fi, err := os.Stat(tc.path); err != nil || fi.Size() == 0 {
					t.Errorf("%s not written: %v", tc.path, err)
				}
				return
			}
			if code != 2 || stdout.Len() > 0 {
				t.Errorf("exit %d with %d bytes of output, want 2 before any work", code, stdout.Len())
			}
			if !strings.Contains(stderr.String(), tc.want) || !strings.Contains(stderr.String(), tc.path) {
				t.Errorf("stderr %q lacks %q and the path", stderr.String(), tc.want)
			}
		})
	}
}

// TestTraceTimingLine checks that --timing prints the shares of the
// parts of a trace.
func TestTraceTimingLine(t *testing.T) {
	var stdout, stderr bytes.Buffer
	if code := creaseMain(context.Background(), []string{"trace", digitsModel, digitsSample, "--per-class-cap", "10", "--skip-probe", "--timing"}, nil, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	for _, want := range []string{"# timing: total ", "homology ", "overlap measures ", "the homology"} {
		if !strings.Contains(stdout.String(), want) {
			t.Errorf("stdout lacks %q:\n%s", want, stdout.String())
		}
	}
}
