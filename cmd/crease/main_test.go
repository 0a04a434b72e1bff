// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"context"
	"errors"
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
	err := writeFileAtomic(context.Background(), path, func(w io.Writer) error {
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
	if err := writeFileAtomic(context.Background(), path, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); err != nil {
		t.Fatal(err)
	}
	got, _ = os.ReadFile(path)
	if string(got) != "new" {
		t.Errorf("file holds %q, want %q", got, "new")
	}
}

// TestWriteFileAtomicModes checks that a replaced file keeps its mode
// and a new one gets 0666 less the umask, as os.Create would give it.
func TestWriteFileAtomicModes(t *testing.T) {
	dir := t.TempDir()
	private := filepath.Join(dir, "private.json")
	if err := os.WriteFile(private, []byte("old"), 0o600); err != nil {
		t.Fatal(err)
	}
	os.Chmod(private, 0o600)
	write := func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }
	if err := writeFileAtomic(context.Background(), private, write); err != nil {
		t.Fatal(err)
	}
	if fi, _ := os.Stat(private); fi.Mode().Perm() != 0o600 {
		t.Errorf("replaced file has mode %v, want 0600 kept", fi.Mode().Perm())
	}
	fresh := filepath.Join(dir, "fresh.json")
	if err := writeFileAtomic(context.Background(), fresh, write); err != nil {
		t.Fatal(err)
	}
	ref := filepath.Join(dir, "ref")
	f, err := os.Create(ref)
	if err != nil {
		t.Fatal(err)
	}
	f.Close()
	a, _ := os.Stat(fresh)
	b, _ := os.Stat(ref)
	if a.Mode().Perm() != b.Mode().Perm() {
		t.Errorf("new file has mode %v, os.Create gives %v", a.Mode().Perm(), b.Mode().Perm())
	}
}

// TestExitStatuses checks the documented statuses: 130 for an
// interrupted run (no output file left), 3 for an internal error, and
// that crease help CMD prints crease CMD -h.
func TestExitStatuses(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "t.json")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var stdout, stderr bytes.Buffer
	code := creaseMain(ctx, []string{"trace", digitsModel, digitsSample, "--out", out}, nil, &stdout, &stderr)
	if code != exitInterrupted || !strings.Contains(stderr.String(), "interrupted") {
		t.Errorf("cancelled trace: exit %d, stderr %q; want %d and \"interrupted\"", code, stderr.String(), exitInterrupted)
	}
	if left, _ := os.ReadDir(dir); len(left) != 0 {
		t.Errorf("files left after an interrupted run: %v", left)
	}

	register(&command{name: "panic-for-test", run: func(context.Context, []string, io.Reader, io.Writer, io.Writer) error {
		var m map[string]int
		m["x"] = 1 // a nil-map write: a bug
		return nil
	}})
	defer delete(commands, "panic-for-test")
	stderr.Reset()
	if code := creaseMain(context.Background(), []string{"panic-for-test"}, nil, &stdout, &stderr); code != exitInternal || !strings.Contains(stderr.String(), "internal error") {
		t.Errorf("panicking command: exit %d, stderr %q; want %d", code, stderr.String(), exitInternal)
	}

	var a, b bytes.Buffer
	ca := creaseMain(context.Background(), []string{"help", "trace"}, nil, &a, &a)
	cb := creaseMain(context.Background(), []string{"trace", "-h"}, nil, &b, &b)
	if ca != cb || a.String() != b.String() || !strings.Contains(a.String(), "--top-dim") || !strings.Contains(a.String(), "deprecated: use --top-dim") {
		t.Errorf("crease help trace (exit %d, %d bytes) differs from crease trace -h (exit %d, %d bytes)", ca, a.Len(), cb, b.Len())
	}
}

func TestPlainMessages(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"trace: stage 3: relu: no rows", "stage 3: no rows"},
		{"x.npy: cannot read NPY features: npy: invalid file: no magic", "x.npy: cannot read NPY features: invalid file: no magic"},
		{"decode m.onnx: onnxload: node \"a\" (Conv)", "decode m.onnx: node \"a\" (Conv)"},
		{"in.csv:3: csvnum: bad (knn: row 2)", "in.csv:3: bad (row 2)"},
		{"check failed: stage 2 differs", "check failed: stage 2 differs"},
	} {
		if got := plain(errors.New(tc.in)); got != tc.want {
			t.Errorf("plain(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
	var out, errb bytes.Buffer
	empty := filepath.Join(t.TempDir(), "empty.json")
	os.WriteFile(empty, nil, 0o644)
	if code := creaseMain(context.Background(), []string{"report", empty}, nil, &out, &errb); code != exitBadInput || !strings.Contains(errb.String(), "empty.json: the file is empty") || strings.Contains(errb.String(), "trace:") {
		t.Errorf("report of an empty file: exit %d, %q", code, errb.String())
	}
}

func TestParseBytes(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want int64
		ok   bool
	}{
		{"8GiB", 8 << 30, true}, {"512MiB", 512 << 20, true}, {"2GB", 2e9, true}, {"1000", 1000, true}, {"1.5KiB", 1536, true},
		{"lots", 0, false}, {"-1GiB", 0, false}, {"0", 0, false}, {"", 0, false},
	} {
		got, err := parseBytes(tc.in)
		if (err == nil) != tc.ok || got != tc.want {
			t.Errorf("parseBytes(%q) = %d, %v; want %d (ok %v)", tc.in, got, err, tc.want, tc.ok)
		}
	}
}
