// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"math/rand/v2"
	"slices"
	"testing"
)

func TestParallelSort(t *testing.T) {
	// Compared with the standard library's sort on a large random input
	// with many ties.
	rng := rand.New(rand.NewPCG(1, 1))
	for _, n := range []int{10, sortChunk + 7, 5*sortChunk + 123} {
		s := make([]simplex, n)
		for i := range s {
			s[i] = simplex{float64(rng.IntN(100)), int64(rng.IntN(1 << 30))}
		}
		want := slices.Clone(s)
		slices.SortFunc(want, filtrationOrder)
		if err := parallelSort(context.Background(), s, filtrationOrder); err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(s, want) {
			t.Errorf("n=%d: not sorted like slices.SortFunc", n)
		}
	}
}
