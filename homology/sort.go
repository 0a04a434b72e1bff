// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"runtime"
	"slices"
	"sync"
)

// sortChunk is the number of simplices sorted between context checks.
const sortChunk = 1 << 15

// parallelSort sorts s by order: chunks are sorted on all cores, then
// merged pairwise; the context is checked between chunks, so a
// cancellation is seen within a few milliseconds.
func parallelSort(ctx context.Context, s []simplex, order func(a, b simplex) int) error {
	if len(s) <= sortChunk {
		slices.SortFunc(s, order)
		return nil
	}
	workers := runtime.GOMAXPROCS(0)
	var firstErr error
	var mu sync.Mutex
	run := func(jobs int, job func(j int)) {
		var wg sync.WaitGroup
		next := 0
		for g := 0; g < workers; g++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for {
					mu.Lock()
					j := next
					next++
					stop := firstErr != nil
					if !stop && ctx.Err() != nil {
						firstErr = ctx.Err()
						stop = true
					}
					mu.Unlock()
					if stop || j >= jobs {
						return
					}
					job(j)
				}
			}()
		}
		wg.Wait()
	}
	n := len(s)
	chunks := (n + sortChunk - 1) / sortChunk
	run(chunks, func(j int) {
		slices.SortFunc(s[j*sortChunk:min((j+1)*sortChunk, n)], order)
	})
	buf := make([]simplex, n)
	src, dst := s, buf
	for width := sortChunk; width < n && firstErr == nil; width *= 2 {
		pairs := (n + 2*width - 1) / (2 * width)
		run(pairs, func(j int) {
			lo := j * 2 * width
			mid, hi := min(lo+width, n), min(lo+2*width, n)
			merge(dst[lo:hi], src[lo:mid], src[mid:hi], order)
		})
		src, dst = dst, src
	}
	if firstErr != nil {
		return firstErr
	}
	if &src[0] != &s[0] {
		copy(s, src)
	}
	return nil
}

func merge(dst, a, b []simplex, order func(a, b simplex) int) {
	i, j, k := 0, 0, 0
	for i < len(a) && j < len(b) {
		if order(b[j], a[i]) < 0 {
			dst[k] = b[j]
			j++
		} else {
			dst[k] = a[i]
			i++
		}
		k++
	}
	k += copy(dst[k:], a[i:])
	copy(dst[k:], b[j:])
}
