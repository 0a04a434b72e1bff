// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

//go:build unix

package main

import (
	"os"
	"sync"
	"syscall"
)

var umaskOnce = sync.OnceValue(func() os.FileMode {
	// Umask can only be read by setting it; set it back at once, before
	// any file of this process is created.
	m := syscall.Umask(0o022)
	syscall.Umask(m)
	return os.FileMode(m)
})

// newFileMode is the mode os.Create gives a new file: 0666 less the
// process's umask.
func newFileMode() os.FileMode { return 0o666 &^ umaskOnce() }
