// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

//go:build !unix

package main

import "os"

// newFileMode is the mode of a new output file.
func newFileMode() os.FileMode { return 0o666 }
