// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"bytes"
	"fmt"
	"strings"
)

// ExampleTrace_WriteHTML writes the self-contained report of a trace:
// one inline SVG per Betti dimension, one for the collapse measures and
// one barcode per stage.
func ExampleTrace_WriteHTML() {
	tr, err := twoRingTrace() // two rings through an identity, a ReLU and a projection
	if err != nil {
		fmt.Println(err)
		return
	}
	var b bytes.Buffer
	if err := tr.WriteHTML(&b); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("stages:", len(tr.Stages))
	fmt.Println("plots:", strings.Count(b.String(), "<svg"))
	fmt.Println("scripts:", strings.Count(b.String(), "<script"))
	// Output:
	// stages: 4
	// plots: 8
	// scripts: 0
}

// ExampleTrace_WriteBettiSVG plots β₁ of each class across the stages.
func ExampleTrace_WriteBettiSVG() {
	tr, err := twoRingTrace()
	if err != nil {
		fmt.Println(err)
		return
	}
	var b bytes.Buffer
	if err := tr.WriteBettiSVG(&b, 1); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(strings.Contains(b.String(), "<svg"), strings.Contains(b.String(), "high"))
	fmt.Println(tr.WriteBettiSVG(&b, 3))
	// Output:
	// true true
	// trace: render: dimension 3 outside 0..1
}
