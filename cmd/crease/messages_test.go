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

// TestBadInputMessages runs the bad inputs a new user met (each message
// must name the file and the place, never a library package, exit with
// status 2 and leave no output file behind).
func TestBadInputMessages(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	ragged := write("ragged.csv", "a,b,y\n1,2,p\n3,4,5,p\n")
	narrow := write("narrow.csv", "a,b,y\n1,2,p\n3,4,p\n5,6,p\n")
	cells := write("cells.csv", "1,2\n3,zz\n")
	empty := write("empty.json", "")
	notDir := write("plain", "x")
	for _, tc := range []struct {
		name string
		args []string
		want []string
	}{
		{"wrong cell count", []string{"trace", digitsModel, ragged}, []string{"ragged.csv:3: 4 cells, expected 3 as on line 1"}},
		{"width names both files", []string{"trace", digitsModel, narrow}, []string{"narrow.csv has 2 feature columns", "digits.onnx takes inputs of width 64"}},
		{"bad cell in forward", []string{"forward", digitsModel, cells}, []string{"cells.csv:2: column 2"}},
		{"empty trace", []string{"report", empty}, []string{"empty.json: the file is empty"}},
		{"output under a file", []string{"trace", digitsModel, digitsSample, "--out", filepath.Join(notDir, "t.json")}, []string{"plain/t.json: cannot create its folder"}},
		{"class order lacks a class", []string{"trace", digitsModel, digitsSample, "--class-order", "0,1,2,3,4,5,6,7,8,x"}, []string{"class order does not name class \"9\""}},
		{"help of an unknown command", []string{"nosuch"}, []string{"unknown command \"nosuch\""}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(dir, "out", "t.json")
			args := tc.args
			if args[0] == "trace" && !strings.Contains(strings.Join(args, " "), "--out") {
				args = append(args, "--out", out)
			}
			var stdout, stderr bytes.Buffer
			code := creaseMain(context.Background(), args, nil, &stdout, &stderr)
			msg := stderr.String()
			if code != exitBadInput {
				t.Errorf("exit %d, want %d (%s)", code, exitBadInput, msg)
			}
			for _, w := range tc.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q lacks %q", msg, w)
				}
			}
			// Past the "crease CMD: " that starts every message.
			body := msg[strings.Index(msg, ": ")+2:]
			for _, pkg := range []string{"csvnum:", "trace:", "npy:", "onnxload:", "homology:", "knn:"} {
				if strings.Contains(body, pkg) {
					t.Errorf("message %q shows the library prefix %q", msg, pkg)
				}
			}
			if _, err := os.Stat(out); err == nil {
				t.Error("an output file was written")
				os.Remove(out)
			}
		})
	}
}
