// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"context"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestDispatch(t *testing.T) {
	for _, test := range []struct {
		name     string
		args     []string
		wantCode int
		wantErr  string
	}{
		{name: "no arguments", args: nil, wantCode: 2, wantErr: "usage: crease"},
		{name: "help", args: []string{"help"}, wantCode: 0, wantErr: "commands:"},
		{name: "unknown", args: []string{"frobnicate"}, wantCode: 2, wantErr: `unknown command "frobnicate"`},
		{name: "version", args: []string{"version"}, wantCode: 0},
	} {
		t.Run(test.name, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := creaseMain(context.Background(), test.args, strings.NewReader(""), &stdout, &stderr)
			if code != test.wantCode {
				t.Errorf("exit status %d, want %d (stderr %q)", code, test.wantCode, stderr.String())
			}
			if !strings.Contains(stderr.String(), test.wantErr) {
				t.Errorf("stderr %q does not contain %q", stderr.String(), test.wantErr)
			}
		})
	}
}

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.json")
	if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	// A failing writer leaves the old file and no temporary behind.
	err := writeFileAtomic(path, func(w io.Writer) error {
		io.WriteString(w, "partial")
		return io.ErrUnexpectedEOF
	})
	if err == nil {
		t.Fatal("want the writer's error")
	}
	got, _ := os.ReadFile(path)
	if string(got) != "old" {
		t.Errorf("after a failed write the file holds %q, want %q", got, "old")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("temporary file left behind: %v", entries)
	}
	if err := writeFileAtomic(path, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); err != nil {
		t.Fatal(err)
	}
	got, _ = os.ReadFile(path)
	if string(got) != "new" {
		t.Errorf("file holds %q, want %q", got, "new")
	}
}
