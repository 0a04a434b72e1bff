// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

//go:build !amd64 || noasm

package onnxload

// useTile is false: there is no tile kernel on this platform.
var useTile = false

// affineTileBias is never called where useTile is false.
func affineTileBias(k int, a *float64, lda int, p *float64, b *float64, c *float64, ldc int) {
	panic("onnxload: no tile kernel")
}
