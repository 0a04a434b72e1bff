// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

//go:build ignore

// Command betti_suite reads every sample of the textbook suite
// (internal/spaces: random samples of spaces whose Betti numbers are in
// Hatcher, Algebraic Topology, 2002) with homology.Read at its defaults
// and H0–H2, and prints the README's table: per space and size, how
// many of the four embeddings (R⁸ and R⁶⁴, isometric and stretched to
// condition number 10) read right, how many of those are confident in
// every dimension, and how many are confidently wrong.
//
//	go run testdata/gen/betti_suite.go [-v] [-seed S]
//
// With -v it also prints every wrong or undetermined reading with its
// evidence; -seed S draws the same cases afresh (every seed offset by
// S). Spaces marked Apart are shown but left out of the totals.
package main

import (
	"context"
	"flag"
	"fmt"
	"log"

	"crease.dev/crease/homology"
	"crease.dev/crease/internal/spaces"
)

func main() {
	verbose := flag.Bool("v", false, "print every wrong or undetermined reading with its evidence")
	seed := flag.Uint64("seed", 0, "offset every seed of the suite by this much (a fresh draw of the same cases)")
	flag.Parse()
	sizes := []int{60, 150, 400, 1000}
	type cell struct{ right, sure, wrongSure, total int }
	cells := map[string]map[int]*cell{}
	var order []string
	isApart := map[string]bool{}
	for _, c := range spaces.SuiteSeeded(*seed, sizes) {
		name := c.Space.Name
		if c.Space.Name == "rp2" {
			name = fmt.Sprintf("rp2 (Z/%d)", c.Field)
		}
		if c.Space.Apart != "" {
			isApart[name] = true
		}
		if cells[name] == nil {
			cells[name] = map[int]*cell{}
			order = append(order, name)
		}
		if cells[name][c.N] == nil {
			cells[name][c.N] = &cell{}
		}
		rd, err := homology.Read(context.Background(), c.Points(), &homology.ReadSettings{MaxDim: 2, Field: c.Field})
		if err != nil {
			log.Fatalf("%s: %v", c.Name(), err)
		}
		cl := cells[name][c.N]
		cl.total++
		right, sure, ws := true, true, false
		for d, b := range rd.Betti {
			sure = sure && rd.Confident[d]
			if b != c.Truth(2)[d] {
				right = false
				ws = ws || rd.Confident[d]
			}
		}
		if *verbose && (!right || !sure) {
			fmt.Printf("%s: read %v confident %v, truth %v\n", c.Name(), rd.Betti, rd.Confident, c.Truth(2))
			for d, e := range rd.Evidence {
				fmt.Printf("\tH%d [%.3g, %.3g) weakest %.3g strongest %.3g bound %.3g %s\n", d, e.Lo, e.Hi, e.Weakest, e.Strongest, e.Bound, e.Why)
			}
		}
		if right {
			cl.right++
			if sure {
				cl.sure++
			}
		}
		if ws {
			cl.wrongSure++
		}
	}
	fmt.Print("| space (truth) |")
	for _, n := range sizes {
		fmt.Printf(" n = %d |", n)
	}
	fmt.Print("\n|---|")
	for range sizes {
		fmt.Print("---|")
	}
	fmt.Println()
	for _, name := range order {
		var truth []int
		for _, c := range spaces.Suite(sizes[:1]) {
			if (c.Space.Name != "rp2" && c.Space.Name == name) || (c.Space.Name == "rp2" && fmt.Sprintf("rp2 (Z/%d)", c.Field) == name) {
				truth = c.Truth(2)
				break
			}
		}
		label := name
		if isApart[name] {
			label += " (apart)"
		}
		fmt.Printf("| %s %v |", label, truth)
		for _, n := range sizes {
			cl := cells[name][n]
			s := fmt.Sprintf(" %d/%d right, %d sure", cl.right, cl.total, cl.sure)
			if cl.wrongSure > 0 {
				s += fmt.Sprintf(", **%d sure and wrong**", cl.wrongSure)
			}
			fmt.Print(s + " |")
		}
		fmt.Println()
	}
	var big, small, apart cell
	for _, name := range order {
		for n, cl := range cells[name] {
			if isApart[name] {
				if n >= 150 {
					apart.right += cl.right
					apart.total += cl.total
				}
				continue
			}
			t := &big
			if n < 150 {
				t = &small
			}
			t.right += cl.right
			t.sure += cl.sure
			t.wrongSure += cl.wrongSure
			t.total += cl.total
		}
	}
	fmt.Printf("\nn ≥ 150: %d of %d right (%.1f %%), %d right and sure, %d sure and wrong; n = 60: %d of %d right, %d sure and wrong\n",
		big.right, big.total, 100*float64(big.right)/float64(big.total), big.sure, big.wrongSure, small.right, small.total, small.wrongSure)
	if apart.total > 0 {
		fmt.Printf("reported apart (not in the totals above), n ≥ 150: %d of %d right\n", apart.right, apart.total)
	}
}
