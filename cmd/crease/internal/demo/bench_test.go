// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package demo

import (
	"context"
	"runtime"
	"sync"
	"testing"
	"time"

	"crease.dev/crease/trace"
)

// heapPeak calls f and returns the largest heap in use seen while it ran
// (polled every 2 ms, after a GC beforehand), in bytes above the level
// before the call.
func heapPeak(f func()) uint64 {
	runtime.GC()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	base := ms.HeapInuse
	peak := base
	var mu sync.Mutex
	stop := make(chan struct{})
	var wg sync.WaitGroup
	wg.Go(func() {
		t := time.NewTicker(2 * time.Millisecond)
		defer t.Stop()
		var m runtime.MemStats
		for {
			select {
			case <-stop:
				return
			case <-t.C:
				runtime.ReadMemStats(&m)
				mu.Lock()
				peak = max(peak, m.HeapInuse)
				mu.Unlock()
			}
		}
	})
	f()
	close(stop)
	wg.Wait()
	return peak - base
}

// BenchmarkDemoTrace traces the well-sized demo model (all 6 stages plus
// the input, 3 classes, H0–H1) at the trace's default settings
// (per-class cap trace.DefaultCap, whole sample included), at the demo's
// settings (all 300 points per class, ε = 0.2 × diameter, classes only)
// and at the demo's settings with the whole sample. It reports
// the peak heap in MB and the share of worker time spent in homology;
// ns/op is the wall time of one trace.
func BenchmarkDemoTrace(b *testing.B) {
	stages, err := Stages(Wide)
	if err != nil {
		b.Fatal(err)
	}
	s, err := Sample()
	if err != nil {
		b.Fatal(err)
	}
	for _, bc := range []struct {
		name string
		set  func() *trace.Settings
	}{
		{"default", trace.DefaultSettings},
		{"demo", Settings},
		{"demo-with-whole", func() *trace.Settings { s := Settings(); s.SkipWhole = false; return s }},
	} {
		b.Run(bc.name, func(b *testing.B) {
			var share float64
			var peak uint64
			for b.Loop() {
				set := bc.set()
				set.Timing = true
				var tr *trace.Trace
				p := heapPeak(func() { tr, err = trace.Run(context.Background(), stages, s, set) })
				if err != nil {
					b.Fatal(err)
				}
				share += tr.Timing.HomologyShare()
				peak = max(peak, p)
			}
			b.ReportMetric(share/float64(b.N), "homology-share")
			b.ReportMetric(float64(peak)/(1<<20), "peak-MB")
		})
	}
}
