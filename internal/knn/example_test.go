// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package knn_test

import (
	"context"
	"fmt"
	"sort"
	"sync"

	"crease.dev/crease/internal/knn"
	"gonum.org/v1/gonum/mat"
)

func ExampleSearch() {
	// Four points on a line at 0, 1, 3 and 6.
	x := mat.NewDense(4, 1, []float64{0, 1, 3, 6})
	g, err := knn.Search(context.Background(), x, 2)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i := range g.Index {
		fmt.Println(i, g.Index[i], g.Dist[i])
	}
	// Output:
	// 0 [1 2] [1 3]
	// 1 [0 2] [1 2]
	// 2 [1 0] [2 3]
	// 3 [2 1] [3 5]
}

func ExamplePairs() {
	x := mat.NewDense(4, 1, []float64{0, 1, 3, 6})
	var (
		mu    sync.Mutex
		pairs []knn.Pair
	)
	err := knn.Pairs(context.Background(), x, 2, func(b []knn.Pair) error {
		mu.Lock() // visit may run concurrently
		pairs = append(pairs, b...)
		mu.Unlock()
		return nil
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	sort.Slice(pairs, func(a, b int) bool {
		return pairs[a].I < pairs[b].I || pairs[a].I == pairs[b].I && pairs[a].J < pairs[b].J
	})
	fmt.Println(pairs)
	// Output:
	// [{0 1 1} {1 2 2}]
}
