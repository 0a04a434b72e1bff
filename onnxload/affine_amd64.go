// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

//go:build !noasm

package onnxload

import "golang.org/x/sys/cpu"

// useTile reports whether affineTileBias may run: it needs AVX2 and FMA.
var useTile = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// affineTileBias computes a 4×8 tile of a product plus a bias into c,
// rows ldc apart (see affine_amd64.s).
//
//go:noescape
func affineTileBias(k int, a *float64, lda int, p *float64, b *float64, c *float64, ldc int)
