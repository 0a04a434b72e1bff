// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"slices"
	"strings"
	"testing"

	"crease.dev/crease/trace"
)

// validate checks v against the subset of JSON Schema (draft 2020-12)
// that schema.json uses: type, properties, required,
// additionalProperties, items, $ref into $defs, enum, minItems and
// maxItems. It returns the first violation, naming its path.
func validate(root, s map[string]any, v any, path string) error {
	if ref, ok := s["$ref"].(string); ok {
		name := strings.TrimPrefix(ref, "#/$defs/")
		s = root["$defs"].(map[string]any)[name].(map[string]any)
	}
	if t, ok := s["type"]; ok {
		var types []string
		switch t := t.(type) {
		case string:
			types = []string{t}
		case []any:
			for _, x := range t {
				types = append(types, x.(string))
			}
		}
		if !slices.Contains(types, jsonType(v)) && !(jsonType(v) == "integer" && slices.Contains(types, "number")) {
			return fmt.Errorf("%s: %s, want %v", path, jsonType(v), types)
		}
	}
	if e, ok := s["enum"].([]any); ok && !slices.Contains(e, v) {
		return fmt.Errorf("%s: %v not in %v", path, v, e)
	}
	switch v := v.(type) {
	case map[string]any:
		props, _ := s["properties"].(map[string]any)
		req, _ := s["required"].([]any)
		for _, r := range req {
			if _, ok := v[r.(string)]; !ok {
				return fmt.Errorf("%s: missing %q", path, r)
			}
		}
		for k, x := range v {
			if p, ok := props[k]; ok {
				if err := validate(root, p.(map[string]any), x, path+"."+k); err != nil {
					return err
				}
				continue
			}
			switch ap := s["additionalProperties"].(type) {
			case bool:
				if !ap {
					return fmt.Errorf("%s: field %q not in the schema", path, k)
				}
			case map[string]any:
				if err := validate(root, ap, x, path+"."+k); err != nil {
					return err
				}
			}
		}
	case []any:
		if n, ok := s["minItems"].(float64); ok && float64(len(v)) < n {
			return fmt.Errorf("%s: %d items, want ≥ %v", path, len(v), n)
		}
		if n, ok := s["maxItems"].(float64); ok && float64(len(v)) > n {
			return fmt.Errorf("%s: %d items, want ≤ %v", path, len(v), n)
		}
		if it, ok := s["items"].(map[string]any); ok {
			for i, x := range v {
				if err := validate(root, it, x, fmt.Sprintf("%s[%d]", path, i)); err != nil {
					return err
				}
			}
		}
	}
	return nil
}

func jsonType(v any) string {
	switch v := v.(type) {
	case nil:
		return "null"
	case bool:
		return "boolean"
	case string:
		return "string"
	case float64:
		if v == math.Trunc(v) {
			return "integer"
		}
		return "number"
	case []any:
		return "array"
	case map[string]any:
		return "object"
	}
	return "unknown"
}

// describedEverywhere checks that every property of the schema has a
// description, so the schema document lists every field.
func describedEverywhere(t *testing.T, s any, path string) {
	switch s := s.(type) {
	case map[string]any:
		if props, ok := s["properties"].(map[string]any); ok {
			for k, p := range props {
				if _, ok := p.(map[string]any)["description"]; !ok {
					t.Errorf("schema: %s.%s has no description", path, k)
				}
			}
		}
		for k, x := range s {
			describedEverywhere(t, x, path+"."+k)
		}
	}
}

// TestSchema validates traces (with and without timing, with a softmax
// stage) against trace/schema.json.
func TestSchema(t *testing.T) {
	b, err := os.ReadFile("schema.json")
	if err != nil {
		t.Fatal(err)
	}
	var schema map[string]any
	if err := json.Unmarshal(b, &schema); err != nil {
		t.Fatal(err)
	}
	describedEverywhere(t, schema, "")
	set := trace.DefaultSettings()
	set.Scale = 0.2
	set.Timing = true
	timed, err := trace.Run(context.Background(), projectModel(), circles(t), set)
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open("../testdata/onnx/digits_sample.csv")
	if err != nil {
		t.Fatal(err)
	}
	s, err := trace.ReadCSV(f, "digits_sample.csv", nil)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	digits, err := trace.RunFile(context.Background(), "../testdata/onnx/digits.onnx", s, &trace.Settings{Cap: 10, SkipProbe: true, Rule: trace.ScalePersistence, MaxThreshold: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	for name, tr := range map[string]*trace.Trace{"circles": circleTrace(t), "timed": timed, "digits": digits} {
		var buf bytes.Buffer
		if err := tr.WriteJSON(&buf); err != nil {
			t.Fatal(err)
		}
		var v any
		if err := json.Unmarshal(buf.Bytes(), &v); err != nil {
			t.Fatal(err)
		}
		if err := validate(schema, schema, v, "$"); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	// The validator itself must reject a broken trace.
	var v map[string]any
	var buf bytes.Buffer
	circleTrace(t).WriteJSON(&buf)
	json.Unmarshal(buf.Bytes(), &v)
	v["stages"].([]any)[1].(map[string]any)["glued"].(map[string]any)["cross"] = "many"
	if err := validate(schema, schema, v, "$"); err == nil || !strings.Contains(err.Error(), "glued.cross") {
		t.Errorf("broken trace: got %v, want an error at glued.cross", err)
	}
}
