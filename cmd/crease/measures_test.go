// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"context"
	"os"
	"strings"
	"testing"
)

// TestMeasuresInREADME checks that the README's table of measures is
// the one `crease measures --markdown` prints from trace.Measures, so
// that the two cannot drift apart.
func TestMeasuresInREADME(t *testing.T) {
	var stdout, stderr bytes.Buffer
	if code := creaseMain(context.Background(), []string{"measures", "--markdown"}, nil, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(readme), stdout.String()) {
		t.Errorf("README.md lacks the table of `crease measures --markdown`; regenerate it:\n%s", stdout.String())
	}
	stdout.Reset()
	if code := creaseMain(context.Background(), []string{"measures", "extra"}, nil, &stdout, &stderr); code != 2 {
		t.Errorf("measures with an argument: exit %d, want 2", code)
	}
}
