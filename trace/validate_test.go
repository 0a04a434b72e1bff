// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"strings"
	"testing"

	"crease.dev/crease/trace"
)

// TestReadJSONHostile edits a real trace into each kind of hostile
// trace that once passed ReadJSON (a negative glued count panicked the
// report; Betti numbers of −2^63 passed compare; a maxdim of 100000
// made a 404 MB report) and checks the refusal names the place.
func TestReadJSONHostile(t *testing.T) {
	var buf bytes.Buffer
	if err := circleTrace(t).WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	good := buf.String()
	if _, err := trace.ReadJSON(strings.NewReader(good)); err != nil {
		t.Fatalf("the trace itself: %v", err)
	}
	// Edits that rewrite one field of the decoded trace.
	stage0 := func(m map[string]any) map[string]any { return m["stages"].([]any)[0].(map[string]any) }
	whole := func(m map[string]any) map[string]any { return stage0(m)["whole"].(map[string]any) }
	for _, tc := range []struct {
		name string
		edit func(m map[string]any)
		want string
	}{
		{"negative glued", func(m map[string]any) {
			m["stages"].([]any)[1].(map[string]any)["glued"].(map[string]any)["within"] = -5
		}, "do not add up"},
		{"negative betti", func(m map[string]any) { whole(m)["betti"].([]any)[0] = -9223372036854775808 }, "betti[0] = -9223372036854775808 is negative"},
		{"top_dim", func(m map[string]any) { m["settings"].(map[string]any)["top_dim"] = 100000 }, "top_dim 100000"},
		{"bad bar", func(m map[string]any) { whole(m)["bars"].([]any)[0].([]any)[0] = []any{3, 1} }, "is not a bar"},
		{"label out of range", func(m map[string]any) { m["sample"].(map[string]any)["labels"].([]any)[0] = 7 }, "sample.labels[0] = 7"},
		{"negative count", func(m map[string]any) { whole(m)["count"] = -1 }, "count -1"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var m map[string]any
			if err := json.Unmarshal([]byte(good), &m); err != nil {
				t.Fatal(err)
			}
			tc.edit(m)
			bad, err := json.Marshal(m)
			if err != nil {
				t.Fatal(err)
			}
			_, err = trace.ReadJSON(bytes.NewReader(bad))
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("err = %v, want it to mention %q", err, tc.want)
			}
		})
	}
	for _, tc := range []struct {
		name, old, new, want string
	}{
		{"syntax", `"stages": [`, `"stages": [}`, "line "},
		{"type", `"top_dim": 1`, `"top_dim": "one"`, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			bad := strings.Replace(good, tc.old, tc.new, 1)
			if tc.want == "" {
				// The line that holds the edit.
				tc.want = fmt.Sprintf("line %d, column ", 1+strings.Count(bad[:strings.Index(bad, tc.new)], "\n"))
			}
			_, err := trace.ReadJSON(strings.NewReader(bad))
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("err = %v, want it to mention %q", err, tc.want)
			}
		})
	}
}

// TestReadJSONPosition checks the line and column of decoding errors
// (1-based, at the offending byte) and that input not starting with '{'
// is refused at its first byte, before the rest is read (an endless
// stream of NUL bytes, as /dev/zero gives, ends at once).
func TestReadJSONPosition(t *testing.T) {
	for _, tc := range []struct {
		name string
		in   io.Reader
		want string
	}{
		{"double comma", strings.NewReader("{\n \"schema\": 1,,\n}"), "line 2, column 14: invalid character ','"},
		{"bad first byte", strings.NewReader("  \n x"), "line 2, column 2: byte 'x' where a trace starts with '{'"},
		{"NUL stream", endlessNUL{}, "line 1, column 1: byte '\\x00'"},
		{"wrong type", strings.NewReader("{\"schema\": \"one\"}"), "line 1, column 16: json: cannot unmarshal string"},
	} {
		_, err := trace.ReadJSON(tc.in)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want %q", tc.name, err, tc.want)
		}
	}
}

// endlessNUL reads as NUL bytes forever.
type endlessNUL struct{}

func (endlessNUL) Read(p []byte) (int, error) {
	clear(p)
	return len(p), nil
}

// TestReadJSONSchema1 checks that a trace of schema version 1, whose
// settings keys were renamed in version 2, reads back to the same
// settings.
func TestReadJSONSchema1(t *testing.T) {
	tr := circleTrace(t)
	var buf bytes.Buffer
	if err := tr.WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(buf.Bytes(), &m); err != nil {
		t.Fatal(err)
	}
	m["schema"] = 1
	set := m["settings"].(map[string]any)
	for old, new := range map[string]string{"maxdim": "top_dim", "scale": "scale_fraction", "persistence": "persistence_fraction", "k": "graph_k", "cap": "per_class_cap"} {
		v, ok := set[new]
		if !ok {
			t.Fatalf("no settings.%s in a version 2 trace", new)
		}
		set[old] = v
		delete(set, new)
	}
	v1, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	got, err := trace.ReadJSON(bytes.NewReader(v1))
	if err != nil {
		t.Fatalf("version 1 trace: %v", err)
	}
	a, b := tr.Settings, got.Settings
	a.Progress, b.Progress = nil, nil
	if fmt.Sprint(a) != fmt.Sprint(b) {
		t.Errorf("settings read from version 1:\n%+v\nwant\n%+v", b, a)
	}
}
