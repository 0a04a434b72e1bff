// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"fmt"
	"log"
	"os"
	"strings"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

// exampleTrace traces two rings of 24 points (testdata/trace/rings.csv)
// through identity, ReLU and a projection onto the first coordinate.
func exampleTrace() *trace.Trace {
	f, err := os.Open("../testdata/trace/rings.csv")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	sample, err := trace.ReadCSV(f, "rings.csv", &trace.CSVSettings{Label: "ring"})
	if err != nil {
		log.Fatal(err)
	}
	stages := []onnxload.Stage{
		{Kind: onnxload.Affine, In: 2, Out: 2, Nodes: []string{"fc1"}, W: mat.NewDense(2, 2, []float64{1, 0, 0, 1}), B: []float64{0, 0}},
		{Kind: onnxload.ReLU, In: 2, Out: 2, Nodes: []string{"relu1"}},
		{Kind: onnxload.Affine, In: 2, Out: 2, Nodes: []string{"proj"}, W: mat.NewDense(2, 2, []float64{1, 0, 0, 0}), B: []float64{0, 0}},
	}
	// The default reading (ScaleRatio); with 24 points a ring, β₁ is
	// read right but marked undetermined: too few points to be sure.
	tr, err := trace.Run(context.Background(), stages, sample, nil)
	if err != nil {
		log.Fatal(err)
	}
	return tr
}

func ExampleRun() {
	tr := exampleTrace()
	tr.WriteTable(os.Stdout)
	fmt.Println(tr.Separation())
	// Output:
	// stage  kind    width  whole   high    low     glued within  glued cross  knn    probe  margin
	// 0      input   2      (2,2?)  (1,1?)  (1,1?)  -             -            1.000  1.000  11.5
	// 1      affine  2      (2,2?)  (1,1?)  (1,1?)  0             0            1.000  1.000  11.5
	// 2      relu    2      (2,2?)  (1,1?)  (1,1?)  0             0            1.000  1.000  11.5
	// 3      affine  2      (1,0?)  (1,0?)  (1,0?)  22            46           0.375  0.375  0
	// the classes are first linearly separable at stage 0; k-NN accuracy peaks at stage 0 (1.000); stage 3 (affine, width 2) lowers it from 1.000 to 0.375
}

func ExampleTrace_Series() {
	tr := exampleTrace()
	b1, err := tr.Series("low", "betti.1")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("β₁ of low:", b1)
	cross, _ := tr.Series("", "glued.cross")
	fmt.Println("cross-class glued pairs:", cross)
	// Output:
	// β₁ of low: [1 1 1 0]
	// cross-class glued pairs: [NaN 0 0 46]
}

func ExampleTrace_First() {
	tr := exampleTrace()
	fmt.Println("every class simple from stage", tr.First(0, trace.AllSimple))
	fmt.Println("first cross-class gluing at stage", tr.First(0, trace.CrossGlued))
	loopGone := tr.First(0, func(s *trace.Stage) bool { return s.Group("high").Betti[1] == 0 })
	fmt.Println("high loses its loop at stage", loopGone)
	// Output:
	// every class simple from stage 3
	// first cross-class gluing at stage 3
	// high loses its loop at stage 3
}

func ExampleTrace_StageOfNode() {
	tr := exampleTrace()
	s := tr.StageOfNode("relu1")
	fmt.Println(s.Index, s.Kind, s.Group("low").Betti)
	fmt.Println(len(tr.StagesOfKind(trace.KindAffine)), "affine stages")
	fmt.Println(tr.Stage(0).Kind, tr.Stage(9) == nil)
	// Output:
	// 2 relu [1 1]
	// 2 affine stages
	// input true
}

func ExampleTrace_Summaries() {
	for _, s := range exampleTrace().Summaries() {
		fmt.Printf("%d %-6s whole β=%v simple classes=%d cross=%d\n", s.Index, s.Kind, s.Betti, s.Simple, s.Cross)
	}
	// Output:
	// 0 input  whole β=[2 2] simple classes=0 cross=0
	// 1 affine whole β=[2 2] simple classes=0 cross=0
	// 2 relu   whole β=[2 2] simple classes=0 cross=0
	// 3 affine whole β=[1 0] simple classes=2 cross=46
}

func ExampleCompare() {
	a := exampleTrace()
	b := exampleTrace()
	c, err := trace.Compare(a, b, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("identical traces diverge at", c.Diverge)
	// Output:
	// identical traces diverge at -1
}

func ExampleReadCSV() {
	const data = `# two classes in the plane
x,y,kind
0,0,dot
1,0,dot
0,1,dot
5,5,cross
6,5,cross
5,6,cross
6,6,cross
`
	s, err := trace.ReadCSV(strings.NewReader(data), "points.csv", &trace.CSVSettings{Label: "kind"})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(s.Classes, s.Counts(), s.Labels)
	_, err = trace.ReadCSV(strings.NewReader(data), "points.csv", &trace.CSVSettings{Label: "colour"})
	fmt.Println(err)
	// Output:
	// [cross dot] [4 3] [1 1 1 0 0 0 0]
	// points.csv: no label column named "colour" (header: x,y,kind)
}

func ExampleSample_Cap() {
	x := mat.NewDense(8, 1, []float64{0, 1, 2, 3, 4, 5, 6, 7})
	s, err := trace.NewSampleInts(x, []int{0, 0, 0, 0, 0, 1, 1, 1})
	if err != nil {
		log.Fatal(err)
	}
	c := s.Cap(3, 42)
	fmt.Println(c.Counts(), len(c.Rows))
	fmt.Println("class 1 kept whole:", c.Rows[3:])
	// Output:
	// [3 3] 6
	// class 1 kept whole: [5 6 7]
}

func ExampleTrace_WriteCSV() {
	tr := exampleTrace()
	var b strings.Builder
	if err := tr.WriteCSV(&b); err != nil {
		log.Fatal(err)
	}
	for _, line := range strings.Split(b.String(), "\n") {
		if strings.HasPrefix(line, "stage,") || strings.HasPrefix(line, "3,affine,low,betti.") || strings.HasPrefix(line, "3,affine,,glued.") {
			fmt.Println(line)
		}
	}
	// Output:
	// stage,kind,class,measure,value
	// 3,affine,,glued.cross,46
	// 3,affine,,glued.total,68
	// 3,affine,,glued.within,22
	// 3,affine,low,betti.0,1
	// 3,affine,low,betti.1,0
}

func ExampleRunFile() {
	f, err := os.Open("../testdata/onnx/digits_sample.csv")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	sample, err := trace.ReadCSV(f, "digits_sample.csv", &trace.CSVSettings{Label: "label"})
	if err != nil {
		log.Fatal(err)
	}
	set := trace.DefaultSettings()
	set.Cap = 10 // ten digits of each class
	set.SkipProbe = true
	tr, err := trace.RunFile(context.Background(), "../testdata/onnx/digits.onnx", sample, set)
	if err != nil {
		log.Fatal(err)
	}
	for _, s := range tr.Stages {
		knn, _ := s.Value("", "knn.accuracy")
		fmt.Printf("%d %-6s width %2d  5-NN accuracy %.2f\n", s.Index, s.Kind, s.Width, knn)
	}
	fmt.Println(len(tr.Sample.Indices), "of", tr.Sample.Rows, "rows; model hash of", len(tr.Model.SHA256), "hex digits")
	// Output:
	// 0 input  width 64  5-NN accuracy 0.94
	// 1 affine width 32  5-NN accuracy 0.99
	// 2 relu   width 32  5-NN accuracy 1.00
	// 3 affine width 16  5-NN accuracy 0.97
	// 4 relu   width 16  5-NN accuracy 1.00
	// 5 affine width 10  5-NN accuracy 1.00
	// 100 of 300 rows; model hash of 64 hex digits
}

func ExampleTrace_All() {
	tr := exampleTrace()
	for i, s := range tr.All() {
		if s.Glued != nil && s.Glued.Within > 0 {
			fmt.Println("stage", i, "glues", s.Glued.Within, "pairs within classes")
			break
		}
	}
	// Output:
	// stage 3 glues 22 pairs within classes
}

// ExampleSettings shows that a partly filled Settings means the defaults
// for every field left zero: only the named fields change.
func ExampleSettings() {
	f, err := os.Open("../testdata/onnx/digits_sample.csv")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	sample, err := trace.ReadCSV(f, "digits_sample.csv", &trace.CSVSettings{Label: "label"})
	if err != nil {
		log.Fatal(err)
	}
	for _, set := range []*trace.Settings{
		{Cap: 10, SkipProbe: true},
		{Cap: 10, SkipProbe: true, MaxDim: trace.H0Only},
	} {
		tr, err := trace.RunFile(context.Background(), "../testdata/onnx/digits.onnx", sample, set)
		if err != nil {
			log.Fatal(err)
		}
		s := tr.Settings
		fmt.Printf("maxdim %d, rule %v, seed %d, glue tau %v, overlap k %d; input reads %s\n",
			s.MaxDim, s.Rule, s.Seed, s.GlueTau, s.OverlapK, tr.Stages[0].Whole.BettiString())
	}
	// Output:
	// maxdim 1, rule ratio, seed 1, glue tau 0.1, overlap k 5; input reads (1,0?)
	// maxdim 0, rule ratio, seed 1, glue tau 0.1, overlap k 5; input reads (1)
}

// ExampleLinearCKA compares two representations of the same four
// points: a rotated, scaled and shifted copy aligns perfectly; a copy
// with one coordinate dropped less so.
func ExampleLinearCKA() {
	x := mat.NewDense(4, 2, []float64{0, 0, 1, 0, 0, 2, 1, 3})
	rot := mat.NewDense(4, 2, nil)
	for i := range 4 {
		a, b := x.At(i, 0), x.At(i, 1)
		rot.Set(i, 0, 3*(0.6*a-0.8*b)+5)
		rot.Set(i, 1, 3*(0.8*a+0.6*b)-1)
	}
	first := x.Slice(0, 4, 0, 1)
	same, _ := trace.LinearCKA(x, rot)
	part, _ := trace.LinearCKA(x, first)
	fmt.Printf("rotated %.3f, one coordinate %.3f\n", same, part)
	// Output: rotated 1.000, one coordinate 0.182
}

// ExampleCompareFiles asks whether a model and its float16-rounded copy
// (testdata/compare, made by testdata/gen/compare_models.py) reshape a
// sample alike, and then the same of a copy with half its hidden
// weights pruned.
func ExampleCompareFiles() {
	f, err := os.Open("../testdata/compare/rings3.csv")
	if err != nil {
		log.Fatal(err)
	}
	s, err := trace.ReadCSV(f, "rings3.csv", nil)
	f.Close()
	if err != nil {
		log.Fatal(err)
	}
	for _, copy := range []string{"fp16", "pruned"} {
		c, err := trace.CompareFiles(context.Background(), "../testdata/compare/base.onnx", "../testdata/compare/"+copy+".onnx", s, nil, &trace.AlikeSettings{Replicates: 4})
		if err != nil {
			log.Fatal(err)
		}
		if c.Alike() {
			fmt.Printf("%s: alike\n", copy)
		} else {
			fmt.Printf("%s: differs first at %s in %s\n", copy, c.First.Stage, c.First.Name)
		}
	}
	// Output:
	// fp16: alike
	// pruned: differs first at stage 1 / 1 in cka
}
