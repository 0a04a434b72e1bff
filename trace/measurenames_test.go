// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"encoding/json"
	"os"
	"regexp"
	"slices"
	"strings"
	"testing"

	"crease.dev/crease/trace"
)

// TestMeasureTableCoversTraces runs two models with every stage kind
// the table names (affine, ReLU, softmax) and checks that every measure
// they record is in the table, recorded where the table says (stage or
// class).
func TestMeasureTableCoversTraces(t *testing.T) {
	runs := []struct{ model, data, label string }{
		{"../testdata/trace/circles_text.onnx", "../testdata/trace/circles_text.csv", "circle"},
		{"../testdata/compare/base.onnx", "../testdata/compare/rings3.csv", ""},
	}
	seen := map[string]bool{}
	for _, r := range runs {
		f, err := os.Open(r.data)
		if err != nil {
			t.Fatal(err)
		}
		s, err := trace.ReadCSV(f, r.data, &trace.CSVSettings{Label: r.label})
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		tr, err := trace.RunFile(context.Background(), r.model, s, &trace.Settings{Cap: 40})
		if err != nil {
			t.Fatal(err)
		}
		for _, name := range tr.MeasureNames() {
			seen[name] = true
			if err := trace.CheckMeasure(name); err != nil {
				t.Errorf("%s: %v", r.model, err)
			}
		}
		for _, st := range tr.Stages {
			for name := range st.Measures {
				if m, _ := trace.LookupMeasure(name); !m.Stage {
					t.Errorf("%s: %s is recorded for stage %d; the table says it is not a stage measure", r.model, name, st.Index)
				}
			}
			for _, g := range st.Classes {
				for name := range g.Measures {
					if m, _ := trace.LookupMeasure(name); !m.Class {
						t.Errorf("%s: %s is recorded for class %s; the table says it is not a class measure", r.model, name, g.Label)
					}
				}
			}
		}
	}
	if !seen["voronoi.inside"] || !seen["fold.dead"] || !seen["affine.rank"] {
		t.Errorf("the traces lack a softmax, ReLU or affine stage: measures %v", seen)
	}
}

// TestSchemaListsMeasures checks that trace/schema.json describes
// exactly the stage and class measures of the table.
func TestSchemaListsMeasures(t *testing.T) {
	raw, err := os.ReadFile("schema.json")
	if err != nil {
		t.Fatal(err)
	}
	var schema map[string]any
	if err := json.Unmarshal(raw, &schema); err != nil {
		t.Fatal(err)
	}
	var descs []string
	var walk func(v any, key string)
	walk = func(v any, key string) {
		switch x := v.(type) {
		case map[string]any:
			for k, e := range x {
				if k == "description" && key == "measures" {
					if s, ok := e.(string); ok {
						descs = append(descs, s)
					}
				}
				walk(e, k)
			}
		case []any:
			for _, e := range x {
				walk(e, key)
			}
		}
	}
	walk(schema, "")
	if len(descs) != 2 {
		t.Fatalf("found %d measures descriptions in schema.json, want 2 (stage and class)", len(descs))
	}
	word := regexp.MustCompile(`[a-z0-9_]+\.[a-z0-9_]+`)
	for _, d := range descs {
		class := strings.HasPrefix(d, "Per-class")
		var want []string
		for _, m := range trace.Measures() {
			recorded := (class && m.Class) || (!class && m.Stage)
			// Topology and glued pairs live in their own fields.
			if !recorded || strings.Contains(m.Name, "<d>") || !strings.Contains(m.Name, ".") || strings.HasPrefix(m.Name, "glued.") {
				continue
			}
			want = append(want, m.Name)
		}
		got := word.FindAllString(d, -1)
		slices.Sort(got)
		got = slices.Compact(got)
		slices.Sort(want)
		if !slices.Equal(got, want) {
			t.Errorf("schema.json measures (class %v) name %v; the table has %v", class, got, want)
		}
	}
}

func TestCheckMeasure(t *testing.T) {
	for _, tc := range []struct {
		name string
		want string // "" means known
	}{
		{"knn.accuracy", ""},
		{"betti.1", ""},
		{"bars.12", ""},
		{"betti.x", `unknown measure "betti.x"`},
		{"knn.acuracy", "knn.accuracy"},
		{"nothing", "see trace.Measures"},
	} {
		err := trace.CheckMeasure(tc.name)
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%s: %v", tc.name, err)
		case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}
