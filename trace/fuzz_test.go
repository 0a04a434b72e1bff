// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"bytes"
	"strings"
	"testing"

	"crease.dev/crease/trace"
	"crease.dev/crease/trace/render"
)

// FuzzReadCSV checks that ReadCSV never panics and that every sample it
// accepts is consistent: rows and labels agree, every class has at least
// MinClassPoints rows, class names are distinct.
func FuzzReadCSV(f *testing.F) {
	f.Add("a,b,y\n1,2,p\n3,4,p\n5,6,p\n", "y")
	f.Add("1,2,0\n3,4,0\n5,6,0\n7,8,1\n9,1,1\n2,3,1\n", "")
	f.Add("\"x\",y\n1,\"q\"\n", "2")
	f.Fuzz(func(t *testing.T, data, label string) {
		s, err := trace.ReadCSV(strings.NewReader(data), "f.csv", &trace.CSVSettings{Label: label})
		if err != nil {
			if !strings.Contains(err.Error(), "f.csv") && !strings.Contains(err.Error(), "header setting") {
				t.Errorf("error %q does not name the file", err)
			}
			return
		}
		n, _ := s.X.Dims()
		if n != len(s.Labels) || n != len(s.Rows) {
			t.Fatalf("%d rows, %d labels, %d row numbers", n, len(s.Labels), len(s.Rows))
		}
		seen := map[string]bool{}
		for c, k := range s.Counts() {
			if k < trace.MinClassPoints || seen[s.Classes[c]] {
				t.Fatalf("class %q: %d rows (seen before: %v)", s.Classes[c], k, seen[s.Classes[c]])
			}
			seen[s.Classes[c]] = true
		}
	})
}

// TestWorkersDeterministic checks that the number of workers does not
// change the JSON.
func TestWorkersDeterministic(t *testing.T) {
	var out [2]bytes.Buffer
	for i, w := range []int{1, 3} {
		set := trace.DefaultSettings()
		set.Scale = 0.2
		set.Workers = w
		tr, err := trace.Run(t.Context(), projectModel(), circles(t), set)
		if err != nil {
			t.Fatal(err)
		}
		tr.WriteJSON(&out[i])
	}
	if !bytes.Equal(out[0].Bytes(), out[1].Bytes()) {
		t.Error("1 and 3 workers gave different JSON")
	}
}

// countWriter counts the bytes written to it.
type countWriter struct{ n int }

func (c *countWriter) Write(p []byte) (int, error) {
	c.n += len(p)
	return len(p), nil
}

// FuzzReadJSON feeds edited traces to ReadJSON and every accepted trace
// to the readers of a trace (the report, the table, the long CSV and
// compare), which must not panic, and whose report must stay within a
// fixed multiple of the input (a 94 KB trace once made a 404 MB report).
func FuzzReadJSON(f *testing.F) {
	var buf bytes.Buffer
	if err := circleTrace(f).WriteJSON(&buf); err != nil {
		f.Fatal(err)
	}
	f.Add(buf.Bytes())
	f.Add([]byte(`{"schema": 1, "stages": []}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		tr, err := trace.ReadJSON(bytes.NewReader(data))
		if err != nil {
			return
		}
		var html countWriter
		_ = render.HTML(&html, tr)
		if limit := 2000*len(data) + 4<<20; html.n > limit {
			t.Fatalf("a %d-byte trace made a %d-byte report", len(data), html.n)
		}
		_ = tr.WriteTable(&countWriter{})
		_ = tr.WriteCSV(&countWriter{})
		_, _ = trace.Compare(tr, tr, nil)
	})
}
