// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package budget carries a run's worker budget down the call tree in a
// context, so that a computation started by another (a trace's task, a
// homology run inside it) uses its share of the cores rather than
// starting a pool of all of them: one budget per run, passed down, no
// nested pools.
package budget

import (
	"context"
	"runtime"
)

type workersKey struct{}

// WithWorkers returns a context whose computations use at most n
// goroutines each; n < 1 leaves ctx unchanged.
func WithWorkers(ctx context.Context, n int) context.Context {
	if n < 1 {
		return ctx
	}
	return context.WithValue(ctx, workersKey{}, n)
}

// Workers returns the number of goroutines a computation under ctx may
// use: the budget set by WithWorkers, else GOMAXPROCS.
func Workers(ctx context.Context) int {
	if n, ok := ctx.Value(workersKey{}).(int); ok {
		return n
	}
	return runtime.GOMAXPROCS(0)
}
