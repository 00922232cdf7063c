package search

import (
	"context"
	"math"
	"strconv"
	"testing"
	"time"
)

// BenchmarkNSGA2Overhead measures the cost of NSGA-II itself per evaluation (SEARCH.md §2.3: about
// 0.6 ms per generation at N = 100 with the O(MN²) sort): N = 100, two objectives, ZDT1 with 10
// or 30 variables as a trivial evaluator (tens of nanoseconds), one worker, 20 000 evaluations
// per run. Target: ≤ 1 µs per evaluation.
func BenchmarkNSGA2Overhead(b *testing.B) {
	for _, dim := range []int{10, 30} {
		b.Run("N=100/M=2/dim="+strconv.Itoa(dim), func(b *testing.B) {
			p := ZDT1(dim)
			var evals int64
			for b.Loop() {
				res, err := Run(context.Background(), p, &Settings{Seed: 1, Workers: 1, MaxEvaluations: 20000}, &NSGA2{})
				if err != nil {
					b.Fatal(err)
				}
				evals += res.Evaluations
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(evals), "ns/eval")
			b.ReportMetric(float64(evals)/float64(b.N), "evals/op")
		})
	}
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

// BenchmarkHypervolume measures the exact hypervolume of points on the unit sphere's positive
// orthant (a non-dominated set) with 2, 3 and 4 objectives.
func BenchmarkHypervolume(b *testing.B) {
	for _, c := range []struct{ m, n int }{{2, 200}, {3, 200}, {4, 100}} {
		b.Run("M="+strconv.Itoa(c.m)+"/n="+strconv.Itoa(c.n), func(b *testing.B) {
			pts := spherePoints(c.m, c.n)
			ref := make([]float64, c.m)
			for i := range ref {
				ref[i] = 1.1
			}
			for b.Loop() {
				Hypervolume(pts, ref)
			}
		})
	}
}

// spherePoints returns n deterministic points with Σ f_i² = 1, f_i ≥ 0.
func spherePoints(m, n int) [][]float64 {
	pts := make([][]float64, n)
	state := uint64(12345)
	for i := range pts {
		p := make([]float64, m)
		var s float64
		for k := range p {
			state = state*6364136223846793005 + 1442695040888963407
			p[k] = float64(state>>11)/(1<<53) + 1e-3
			s += p[k] * p[k]
		}
		for k := range p {
			p[k] /= math.Sqrt(s)
		}
		pts[i] = p
	}
	return pts
}
