package search

import (
	"context"
	"strconv"
	"testing"
	"time"
)

// BenchmarkNSGA2Overhead measures the cost of NSGA-II itself per evaluation (search/REFERENCE.md §2.3: about
// a few milliseconds per generation at N = 100 with the O(MN²) sort): N = 100, two objectives, ZDT1 with 10
// or 30 variables as a trivial evaluator (tens of nanoseconds), one worker, 20 000 evaluations
// per run. Target: ≤ 1 µs per evaluation.
func BenchmarkNSGA2Overhead(b *testing.B) {
	for _, dim := range []int{10, 30} {
		b.Run("N=100/M=2/dim="+strconv.Itoa(dim), func(b *testing.B) {
			p := ZDT1(dim)
			overhead(b, p)
		})
	}
}

// BenchmarkNSGA2OverheadDTLZ2 is BenchmarkNSGA2Overhead on DTLZ2 (Deb, Thiele, Laumanns and
// Zitzler 2002) with three objectives and 12 variables, the usual choice n = M + 9: the efficient
// non-dominated sort and the batch archive of search/REFERENCE.md §2.2 and §2.13. Target: within
// 3× of the two-objective figure.
func BenchmarkNSGA2OverheadDTLZ2(b *testing.B) {
	p := DTLZ2(3, 12)
	b.Run("N=100/M=3/dim=12", func(b *testing.B) {
		overhead(b, p)
	})
}

// overhead runs NSGA-II with defaults (N = 100), one worker and 20 000 evaluations per run on p,
// and reports wall time per evaluation (ns/eval) and process CPU time per evaluation
// (cpu-ns/eval; it includes the garbage collector's work on the other core, and does not grow
// when other processes take the cores).
func overhead(b *testing.B, p Problem) {
	var evals int64
	cpu0 := processCPU()
	for b.Loop() {
		res, err := Run(context.Background(), p, &Settings{Seed: 1, Workers: 1, MaxEvaluations: 20000}, &NSGA2{})
		if err != nil {
			b.Fatal(err)
		}
		evals += res.Evaluations
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(evals), "ns/eval")
	if cpu := processCPU() - cpu0; cpu > 0 {
		b.ReportMetric(float64(cpu.Nanoseconds())/float64(evals), "cpu-ns/eval")
	}
	b.ReportMetric(float64(evals)/float64(b.N), "evals/op")
}

// spin busies the CPU for d, like a model evaluation.
func spin(d time.Duration) {
	for start := time.Now(); time.Since(start) < d; {
	}
}

// BenchmarkWorkers1ms measures throughput with a 1 ms CPU-bound evaluation and 1 or 2 workers
// (N = 20, 100 evaluations per run); the speed-up is the ratio of the evals/s figures.
func BenchmarkWorkers1ms(b *testing.B) {
	p := ZDT1(10)
	inner := p.Evaluate
	p.Evaluate = func(ctx context.Context, i int64, x, f, g []float64) error {
		spin(time.Millisecond)
		return inner(ctx, i, x, f, g)
	}
	for _, w := range []int{1, 2} {
		b.Run("workers="+strconv.Itoa(w), func(b *testing.B) {
			var evals int64
			for b.Loop() {
				res, err := Run(context.Background(), p, &Settings{Seed: 1, Workers: w, Population: 20, MaxEvaluations: 100}, &NSGA2{})
				if err != nil {
					b.Fatal(err)
				}
				evals += res.Evaluations
			}
			b.ReportMetric(float64(evals)/b.Elapsed().Seconds(), "evals/s")
		})
	}
}
