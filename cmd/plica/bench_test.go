package main

import (
	"context"
	"io"
	"path/filepath"
	"strconv"
	"testing"
	"time"
)

// BenchmarkDemoSearchWorkers runs the shipped demo search (problems/examples/boom-search.toml,
// 30,000 evaluations, seed 1, the report included) as "plica search" does, with one worker and
// then with two, in every iteration, and reports each one's wall time (s-w1, s-w2), the
// process's CPU time per run (cpu-s-w1, cpu-s-w2; it does not grow while another process holds
// a core) and the speed-up, the ratio of the wall times (DEVELOPERS.md, "Search speed"; the
// target is 1.8 on two free cores). On a machine whose cores other processes share, the
// speed-up says more about the load than about plica.
func BenchmarkDemoSearchWorkers(b *testing.B) {
	if testing.Short() {
		b.Skip("a full demo search per worker count")
	}
	var wall, cpu [3]time.Duration
	n := 0
	for b.Loop() {
		for _, w := range []int{1, 2} {
			dir := filepath.Join(b.TempDir(), "run"+strconv.Itoa(w))
			c0, t0 := processCPU(), time.Now()
			code := run(context.Background(), []string{"search", examples + "boom-search.toml", "-o", dir, "-workers", strconv.Itoa(w), "-seed", "1", "-quiet"}, io.Discard, io.Discard)
			wall[w] += time.Since(t0)
			cpu[w] += processCPU() - c0
			if code != 0 {
				b.Fatalf("plica search with %d workers: exit status %d", w, code)
			}
		}
		n++
	}
	for _, w := range []int{1, 2} {
		b.ReportMetric(wall[w].Seconds()/float64(n), "s-w"+strconv.Itoa(w))
		if cpu[w] > 0 {
			b.ReportMetric(cpu[w].Seconds()/float64(n), "cpu-s-w"+strconv.Itoa(w))
		}
	}
	b.ReportMetric(wall[1].Seconds()/wall[2].Seconds(), "speedup")
}
