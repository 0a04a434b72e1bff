// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"context"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"
)

// TestWriteOutputsFaults checks that the outputs of a run are committed
// together or not at all: when the second output fails (a full disk as
// the kernel reports it, ENOSPC), when a writer panics, or when the run
// is interrupted before the commit, every target keeps its old content,
// no temporary file is left, and the error names the target.
func TestWriteOutputsFaults(t *testing.T) {
	ok := func(s string) func(io.Writer) error {
		return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
	}
	full := func(w io.Writer) error {
		io.WriteString(w, "partial")
		return &os.PathError{Op: "write", Path: "/somewhere/.crease-123.tmp", Err: syscall.ENOSPC}
	}
	boom := func(io.Writer) error { panic("writer bug") }
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	for _, test := range []struct {
		name      string
		ctx       context.Context
		second    func(io.Writer) error
		wantErr   string // in the error, with the target's name
		wantPanic bool
	}{
		{name: "full disk", ctx: context.Background(), second: full, wantErr: syscall.ENOSPC.Error()},
		{name: "panic", ctx: context.Background(), second: boom, wantPanic: true},
		{name: "interrupted", ctx: cancelled, second: ok("new b"), wantErr: context.Canceled.Error()},
	} {
		t.Run(test.name, func(t *testing.T) {
			dir := t.TempDir()
			a, b := filepath.Join(dir, "a.json"), filepath.Join(dir, "b.csv")
			os.WriteFile(a, []byte("old a"), 0o600)
			os.WriteFile(b, []byte("old b"), 0o644)
			var err error
			panicked := func() (p bool) {
				defer func() { p = recover() != nil }()
				err = writeOutputs(test.ctx, []output{{a, ok("new a")}, {b, test.second}})
				return false
			}()
			if panicked != test.wantPanic {
				t.Fatalf("panicked %v, want %v", panicked, test.wantPanic)
			}
			if !test.wantPanic {
				if err == nil || !strings.Contains(err.Error(), test.wantErr) {
					t.Fatalf("err = %v, want %q", err, test.wantErr)
				}
				if strings.Contains(err.Error(), ".tmp") {
					t.Errorf("err = %v names a temporary file", err)
				}
				if test.ctx.Err() == nil && !strings.Contains(err.Error(), b) {
					t.Errorf("err = %v does not name %s", err, b)
				}
			}
			for path, want := range map[string]string{a: "old a", b: "old b"} {
				if got, _ := os.ReadFile(path); string(got) != want {
					t.Errorf("%s holds %q, want %q", filepath.Base(path), got, want)
				}
			}
			if entries, _ := os.ReadDir(dir); len(entries) != 2 {
				t.Errorf("files in the folder: %v, want a.json and b.csv only", entries)
			}
		})
	}
}

// TestWriteOutputsFullDisk writes into a real full file system: a 64 KiB
// tmpfs mounted for the test, which needs root on Linux; elsewhere the
// test is skipped (TestWriteOutputsFaults covers ENOSPC by injection).
func TestWriteOutputsFullDisk(t *testing.T) {
	if runtime.GOOS != "linux" || os.Geteuid() != 0 {
		t.Skip("mounting a small tmpfs needs root on Linux")
	}
	dir := t.TempDir()
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", "size=64k", "tmpfs", dir).CombinedOutput(); err != nil {
		t.Skipf("cannot mount a tmpfs here: %v %s", err, out)
	}
	defer exec.Command("umount", dir).Run()
	target := filepath.Join(dir, "t.json")
	os.WriteFile(target, []byte("old"), 0o644)
	big := func(w io.Writer) error {
		buf := make([]byte, 1<<16)
		for range 4 { // 256 KiB into 64 KiB
			if _, err := w.Write(buf); err != nil {
				return err
			}
		}
		return nil
	}
	err := writeFileAtomic(context.Background(), target, big)
	if !errors.Is(err, syscall.ENOSPC) && (err == nil || !strings.Contains(err.Error(), "no space left")) {
		t.Fatalf("err = %v, want no space left on device", err)
	}
	if !strings.Contains(err.Error(), target) || strings.Contains(err.Error(), ".tmp") {
		t.Errorf("err = %v, want the target named and no temporary file", err)
	}
	if got, _ := os.ReadFile(target); string(got) != "old" {
		t.Errorf("target holds %q after a full disk, want %q", got, "old")
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("files left: %v", entries)
	}
}
