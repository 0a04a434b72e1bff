// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package relu_test

import (
	"context"
	"fmt"

	"crease.dev/crease/relu"
	"gonum.org/v1/gonum/mat"
)

func ExampleAffine() {
	// Projection of R³ onto its first two coordinates.
	w := mat.NewDense(2, 3, []float64{1, 0, 0, 0, 1, 0})
	in := mat.NewDense(4, 3, []float64{
		0, 0, 0,
		1, 0, 0,
		0, 1, 0,
		0, 0, 1, // same image as the first point
	})
	var out mat.Dense
	out.Mul(in, w.T())
	r, err := relu.Affine(w, in, &out, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("rank", r.Rank, "kernel", r.Kernel, "cond", r.Cond)
	fmt.Println("sample rank", r.RankIn, "->", r.RankOut)
	fmt.Println("forces identifications", r.ForcesIdentifications, "identified pairs", r.Identified)
	// Output:
	// rank 2 kernel 1 cond 1
	// sample rank 3 -> 2
	// forces identifications true identified pairs 1
}

func ExampleCentredRank() {
	// Three collinear points span a line.
	x := mat.NewDense(3, 2, []float64{0, 0, 1, 2, 2, 4})
	rk, _, sv, err := relu.CentredRank(x)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("rank %d, σ = %.4f\n", rk, sv)
	// Output:
	// rank 1, σ = [3.1623 0.0000]
}

func ExampleFold() {
	pre := mat.NewDense(3, 2, []float64{
		1, 2, // untouched
		-1, 3, // sent to a face
		-2, -1, // sent to the origin
	})
	post := mat.NewDense(3, 2, []float64{1, 2, 0, 3, 0, 0})
	r, err := relu.Fold(pre, post, []int{0, 1, 1}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("zeroed", r.Zeroed)
	fmt.Println("untouched", r.Untouched, "face", r.Face, "origin", r.Origin)
	fmt.Println("dead", r.Dead, "always active", r.AlwaysActive)
	fmt.Printf("patterns %d, entropy %.4f bits\n", r.Patterns, r.Entropy)
	// Output:
	// zeroed [0 1 2]
	// untouched 1 face 1 origin 1
	// dead [] always active []
	// patterns 3, entropy 1.5850 bits
}

func ExampleGlue() {
	pre := mat.NewDense(4, 1, []float64{-2, -1, 1, 2})
	post := mat.NewDense(4, 1, []float64{0, 0, 1, 2})
	r, err := relu.Glue(context.Background(), pre, post, []int{0, 1, 1, 1}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("scales", r.ScaleIn, r.ScaleOut)
	fmt.Println("glued", r.Total, "within", r.Within, "across", r.Cross)
	fmt.Printf("%+v\n", r.Examples)
	// Output:
	// scales 1 0.5
	// glued 1 within 0 across 1
	// [{I:0 J:1 In:1 Out:0 Cross:true}]
}

func ExampleDistort() {
	in := mat.NewDense(4, 1, []float64{0, 1, 2, 3})
	out := mat.NewDense(4, 1, []float64{0, 2, 4, 6}) // doubles every distance
	r, err := relu.Distort(context.Background(), in, out, &relu.DistortSettings{K: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.P10, r.Median, r.P90, r.Pairs)
	// Output:
	// 2 2 2 4
}

func ExampleAffineContext() {
	// A rotation by 90° is injective and perfectly conditioned.
	w := mat.NewDense(2, 2, []float64{0, -1, 1, 0})
	in := mat.NewDense(3, 2, []float64{0, 0, 1, 0, 0, 2})
	var out mat.Dense
	out.Mul(in, w.T())
	r, err := relu.AffineContext(context.Background(), w, in, &out, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Rank, r.Kernel, r.Cond, r.Injective, r.Settings.Identify)
	// Output:
	// 2 0 1 true 1e-09
}
