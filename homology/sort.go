// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"math"
	"math/bits"
	"slices"
	"sync"

	"crease.dev/crease/internal/budget"
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
	n := len(s)
	chunks := (n + sortChunk - 1) / sortChunk
	err := parallelJobs(ctx, chunks, func(j int) {
		slices.SortFunc(s[j*sortChunk:min((j+1)*sortChunk, n)], order)
	})
	buf := make([]simplex, n)
	src, dst := s, buf
	for width := sortChunk; width < n && err == nil; width *= 2 {
		pairs := (n + 2*width - 1) / (2 * width)
		err = parallelJobs(ctx, pairs, func(j int) {
			lo := j * 2 * width
			mid, hi := min(lo+width, n), min(lo+2*width, n)
			merge(dst[lo:hi], src[lo:mid], src[mid:hi], order)
		})
		src, dst = dst, src
	}
	if err != nil {
		return err
	}
	if &src[0] != &s[0] {
		copy(s, src)
	}
	return nil
}

// insertionSort sorts a short slice in filtration order, or the reverse
// order, with the comparison written out (no call per comparison). The
// lengths are not NaN.
func insertionSort(a []simplex, reverse bool) {
	for k := 1; k < len(a); k++ {
		x := a[k]
		j := k
		for ; j > 0; j-- {
			y := a[j-1]
			var after bool // y comes after x
			if reverse {
				after = y.d < x.d || (y.d == x.d && y.i > x.i)
			} else {
				after = y.d > x.d || (y.d == x.d && y.i < x.i)
			}
			if !after {
				break
			}
			a[j] = y
		}
		a[j] = x
	}
}

// parallelJobs runs job(0..jobs−1) on all cores, each job once, and
// stops handing out jobs when ctx is cancelled, returning ctx.Err().
func parallelJobs(ctx context.Context, jobs int, job func(j int)) error {
	var (
		mu       sync.Mutex
		next     int
		firstErr error
		wg       sync.WaitGroup
	)
	for range min(budget.Workers(ctx), jobs) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				mu.Lock()
				j := next
				next++
				if firstErr == nil && ctx.Err() != nil {
					firstErr = ctx.Err()
				}
				stop := firstErr != nil
				mu.Unlock()
				if stop || j >= jobs {
					return
				}
				job(j)
			}
		}()
	}
	wg.Wait()
	return firstErr
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

// bucketMin is the length below which sortFiltration uses a plain
// comparison sort.
const bucketMin = 1 << 12

// bucketSize is the mean number of elements per bucket of bucketSort:
// small enough that a bucket sorts within the cache.
const bucketSize = 32

// sortFiltration sorts s in filtration order (filtrationOrder) or, with
// reverse, in the opposite order. It distributes the simplices into
// buckets by length (see lengthBuckets), in one pass that reads and one
// that writes them, then sorts each bucket in the cache, short ones by
// insertion, the buckets shared among all cores (sortBuckets). Unlike a
// comparison sort of all of s this touches main memory a fixed number
// of times. Lengths that lengthBuckets refuses fall back to
// parallelSort. It uses a buffer as long as s.
func sortFiltration(ctx context.Context, s []simplex, reverse bool) error {
	order := filtrationOrder
	if reverse {
		order = reverseOrder
	}
	if len(s) < bucketMin {
		slices.SortFunc(s, order)
		return nil
	}
	lo, hi := s[0].d, s[0].d
	for _, x := range s {
		lo, hi = min(lo, x.d), max(hi, x.d)
	}
	bk, ok := newLengthBuckets(lo, hi, len(s), reverse)
	if !ok {
		return parallelSort(ctx, s, order)
	}
	start := make([]int, bk.n+1)
	for _, x := range s {
		start[bk.of(x.d)+1]++
	}
	buf := make([]simplex, len(s))
	fill := bucketStarts(start)
	for _, x := range s {
		b := bk.of(x.d)
		buf[fill[b]] = x
		fill[b]++
	}
	if err := sortEachBucket(ctx, buf, start, reverse); err != nil {
		return err
	}
	copy(s, buf)
	return nil
}

// sortEachBucket sorts each bucket s[start[b]:start[b+1]] in filtration
// order or, with reverse, the opposite, short ones by insertion, the
// buckets shared among all cores (sortBuckets).
func sortEachBucket(ctx context.Context, s []simplex, start []int, reverse bool) error {
	order := filtrationOrder
	if reverse {
		order = reverseOrder
	}
	return sortBuckets(ctx, start, func(i, j int) {
		if a := s[i:j]; len(a) <= 48 {
			insertionSort(a, reverse)
		} else {
			slices.SortFunc(a, order)
		}
	})
}

// lengthBuckets maps lengths to buckets in order: interpolating a
// length between the least and the greatest is monotone in floating
// point, so a shorter length never lands in a later bucket (with
// reverse, an earlier one).
type lengthBuckets struct {
	lo, scale float64
	n         int
	reverse   bool
}

// newLengthBuckets returns buckets for count lengths in [lo, hi], about
// bucketSize a bucket, and false when the lengths are all equal, not all
// finite, or spread over a subnormal range.
func newLengthBuckets(lo, hi float64, count int, reverse bool) (lengthBuckets, bool) {
	if !(hi > lo) || isInf(hi) || math.IsNaN(lo) || math.IsNaN(hi) {
		return lengthBuckets{}, false
	}
	n := 1 << bits.Len(uint(count/bucketSize))
	scale := float64(n) / (hi - lo)
	return lengthBuckets{lo, scale, n, reverse}, !isInf(scale)
}

// of returns the bucket of length d.
func (bk lengthBuckets) of(d float64) int {
	b := max(0, min(int((d-bk.lo)*bk.scale), bk.n-1))
	if bk.reverse {
		b = bk.n - 1 - b
	}
	return b
}

// bucketStarts turns start, whose entry b+1 counts the elements of
// bucket b, into the bucket boundaries and returns a copy of the starts
// for filling.
func bucketStarts(start []int) []int {
	for b := 1; b < len(start); b++ {
		start[b] += start[b-1]
	}
	return slices.Clone(start[:len(start)-1])
}

// sortBuckets calls sortRange(start[b], start[b+1]) for every bucket b
// with more than one element, groups of buckets of about sortChunk
// elements as one job each, on all cores; it checks ctx between jobs.
func sortBuckets(ctx context.Context, start []int, sortRange func(i, j int)) error {
	nb := len(start) - 1
	var cuts []int
	for b := 0; b < nb; {
		e := b + 1
		for e < nb && start[e+1]-start[b] <= sortChunk {
			e++
		}
		cuts = append(cuts, b)
		b = e
	}
	cuts = append(cuts, nb)
	return parallelJobs(ctx, len(cuts)-1, func(j int) {
		for b := cuts[j]; b < cuts[j+1]; b++ {
			if start[b+1]-start[b] > 1 {
				sortRange(start[b], start[b+1])
			}
		}
	})
}
