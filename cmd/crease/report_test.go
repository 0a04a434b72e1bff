// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestDemoAndReport runs crease demo with --dir, then crease report on
// one of the traces it wrote, and checks the report file and the
// errors of bad input (exit status 2, no output file left behind).
func TestDemoAndReport(t *testing.T) {
	// A folder that does not exist yet: --dir creates it.
	dir := filepath.Join(t.TempDir(), "new", "demo")
	var out, errb bytes.Buffer
	if code := creaseMain(context.Background(), []string{"demo", "--dir", dir}, nil, &out, &errb); code != 0 {
		t.Fatalf("crease demo: exit %d: %s", code, errb.String())
	}
	for _, s := range []string{"arm_wide", "arm_narrow", "verdict on arm_wide", "verdict on arm_narrow", "softmax", "certifies nothing"} {
		if !strings.Contains(out.String(), s) {
			t.Errorf("crease demo output lacks %q", s)
		}
	}
	report := filepath.Join(dir, "pages", "report.html")
	errb.Reset()
	if code := creaseMain(context.Background(), []string{"report", filepath.Join(dir, "arm_wide.json"), "--out", report}, nil, &out, &errb); code != 0 {
		t.Fatalf("crease report: exit %d: %s", code, errb.String())
	}
	page, err := os.ReadFile(report)
	if err != nil {
		t.Fatal(err)
	}
	// The demo traces classes only, so each of the 7 stages has 3
	// barcodes; 18 class-overlap measures are recorded (trace.Measures:
	// every overlap measure but knn.k and probe.converged).
	if n := bytes.Count(page, []byte("<svg")); n != 2+1+1+18+7*3 {
		t.Errorf("report has %d plots, want 43 (β0, β1, collapse, separation, 18 overlap measures, 21 barcodes)", n)
	}

	side := filepath.Join(dir, "pages", "side.html")
	if code := creaseMain(context.Background(), []string{"report", filepath.Join(dir, "arm_wide.json"), filepath.Join(dir, "arm_narrow.json"), "--out", side}, nil, &out, &errb); code != 0 {
		t.Fatalf("crease report A B: exit %d: %s", code, errb.String())
	}
	if b, err := os.ReadFile(side); err != nil || !bytes.Contains(b, []byte(`class="pair"`)) || !bytes.Contains(b, []byte("arm_narrow.onnx")) {
		t.Errorf("side-by-side report: %v; want two columns naming both models", err)
	}

	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte(`{"schema": 1, "stages": [`), 0o644)
	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"truncated json", []string{"report", bad, "--out", filepath.Join(dir, "x.html")}, "bad.json"},
		{"missing file", []string{"report", filepath.Join(dir, "none.json"), "--out", filepath.Join(dir, "x.html")}, "none.json"},
		{"no argument", []string{"report"}, "want one trace file"},
		{"demo argument", []string{"demo", "extra"}, "takes no arguments"},
	} {
		errb.Reset()
		if code := creaseMain(context.Background(), tc.args, nil, &out, &errb); code != 2 {
			t.Errorf("%s: exit %d, want 2", tc.name, code)
		}
		if !strings.Contains(errb.String(), tc.want) {
			t.Errorf("%s: stderr %q lacks %q", tc.name, errb.String(), tc.want)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "x.html")); !os.IsNotExist(err) {
		t.Errorf("a failed report left an output file (stat: %v)", err)
	}
}
