// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"go/parser"
	"go/token"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestNoPlottingImports keeps plotting out of package trace and its test
// helpers: rendering lives in trace/render.
func TestNoPlottingImports(t *testing.T) {
	for _, dir := range []string{".", "tracecheck"} {
		files, err := filepath.Glob(filepath.Join(dir, "*.go"))
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range files {
			if strings.HasSuffix(f, "_test.go") {
				continue
			}
			af, err := parser.ParseFile(token.NewFileSet(), f, nil, parser.ImportsOnly)
			if err != nil {
				t.Fatal(err)
			}
			for _, im := range af.Imports {
				p, _ := strconv.Unquote(im.Path.Value)
				if strings.HasPrefix(p, "gonum.org/v1/plot") || p == "crease.dev/crease/trace/render" {
					t.Errorf("%s imports %s; plotting belongs in trace/render", f, p)
				}
			}
		}
	}
}
