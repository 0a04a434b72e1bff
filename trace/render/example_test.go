// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package render_test

import (
	"bytes"
	"fmt"
	"strings"

	"crease.dev/crease/trace/render"
)

// ExampleHTML writes the self-contained report of a trace: one inline
// SVG per Betti dimension, one for the collapse measures, one for the
// separation, one per class-overlap measure and one barcode per stage.
func ExampleHTML() {
	tr, err := twoRingTrace() // two rings through an identity, a ReLU and a projection
	if err != nil {
		fmt.Println(err)
		return
	}
	var b bytes.Buffer
	if err := render.HTML(&b, tr); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("stages:", len(tr.Stages))
	fmt.Println("plots:", strings.Count(b.String(), "<svg"))
	fmt.Println("scripts:", strings.Count(b.String(), "<script"))
	// Output:
	// stages: 4
	// plots: 23
	// scripts: 0
}

// ExampleBettiSVG plots β₁ of each class across the stages.
func ExampleBettiSVG() {
	tr, err := twoRingTrace()
	if err != nil {
		fmt.Println(err)
		return
	}
	var b bytes.Buffer
	if err := render.BettiSVG(&b, tr, 1); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(strings.Contains(b.String(), "<svg"), strings.Contains(b.String(), "high"))
	fmt.Println(render.BettiSVG(&b, tr, 3))
	// Output:
	// true true
	// render: dimension 3 outside 0..1
}
