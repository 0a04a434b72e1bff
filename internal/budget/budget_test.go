// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package budget

import (
	"context"
	"runtime"
	"testing"
)

func TestWorkers(t *testing.T) {
	ctx := context.Background()
	if got := Workers(ctx); got != runtime.GOMAXPROCS(0) {
		t.Errorf("no budget: %d workers, want GOMAXPROCS %d", got, runtime.GOMAXPROCS(0))
	}
	for _, tc := range []struct{ set, want int }{{1, 1}, {3, 3}, {0, runtime.GOMAXPROCS(0)}, {-2, runtime.GOMAXPROCS(0)}} {
		if got := Workers(WithWorkers(ctx, tc.set)); got != tc.want {
			t.Errorf("WithWorkers(%d): %d workers, want %d", tc.set, got, tc.want)
		}
	}
	if got := Workers(WithWorkers(WithWorkers(ctx, 4), 1)); got != 1 {
		t.Errorf("a nested budget of 1 gives %d workers", got)
	}
}
