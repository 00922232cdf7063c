package search

import (
	"context"
	"math/rand/v2"
	"runtime"
	"slices"
	"strconv"
	"testing"
	"time"
)

// BenchmarkNSGA2Overhead measures the cost of NSGA-II itself per evaluation (search/REFERENCE.md
// §2.15): N = 100, two objectives, ZDT1 with 10 or 30 variables as a trivial evaluator (tens of
// nanoseconds), one worker, 20 000 evaluations per run. Target: ≤ 1 µs per evaluation.
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
// when other processes take the cores). It also reports the CPU time of the test function alone
// (fn-cpu-ns/eval, evaluateCPU) and the overhead proper, cpu-ns/eval less that
// (overhead-cpu-ns/eval).
//
// It also reports the heap allocations per evaluation of a whole run (allocs/eval) and of the
// steady state (steady-allocs/eval: generations 101 to 200 of the run, counted from the
// Progress hook), when the archive and the free list of designs have stopped growing.
func overhead(b *testing.B, p Problem) {
	var evals, steadyEvals int64
	var steadyAllocs uint64
	var ms runtime.MemStats
	var at100 uint64
	set := &Settings{Seed: 1, Workers: 1, MaxEvaluations: 20000, Progress: func(pr Progress) {
		switch pr.Generation {
		case 100:
			runtime.ReadMemStats(&ms)
			at100 = ms.Mallocs
		case 199:
			runtime.ReadMemStats(&ms)
			steadyAllocs += ms.Mallocs - at100
			steadyEvals += 99 * DefaultPopulation
		}
	}}
	runtime.ReadMemStats(&ms)
	mallocs0 := ms.Mallocs
	cpu0 := processCPU()
	for b.Loop() {
		res, err := Run(context.Background(), p, set, &NSGA2{})
		if err != nil {
			b.Fatal(err)
		}
		evals += res.Evaluations
	}
	cpu := processCPU() - cpu0
	runtime.ReadMemStats(&ms)
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(evals), "ns/eval")
	if cpu > 0 {
		b.ReportMetric(float64(cpu.Nanoseconds())/float64(evals), "cpu-ns/eval")
	}
	if fn := evaluateCPU(p); cpu > 0 && fn > 0 {
		b.ReportMetric(fn, "fn-cpu-ns/eval")
		b.ReportMetric(float64(cpu.Nanoseconds())/float64(evals)-fn, "overhead-cpu-ns/eval")
	}
	b.ReportMetric(float64(evals)/float64(b.N), "evals/op")
	b.ReportMetric(float64(ms.Mallocs-mallocs0)/float64(evals), "allocs/eval")
	if steadyEvals > 0 {
		b.ReportMetric(float64(steadyAllocs)/float64(steadyEvals), "steady-allocs/eval")
	}
}

// evaluateCPU is the process CPU time, in nanoseconds, of one call of p.Evaluate alone, on 1000
// points drawn uniformly in the box of p and evaluated 200 times each: the cost of the test
// function itself, which cpu-ns/eval includes and overhead-cpu-ns/eval leaves out.
func evaluateCPU(p Problem) float64 {
	rng := rand.New(rand.NewPCG(5, 6))
	xs := make([][]float64, 1000)
	for i := range xs {
		xs[i] = make([]float64, p.Dim)
		for j := range xs[i] {
			xs[i][j] = p.Lower[j] + (p.Upper[j]-p.Lower[j])*rng.Float64()
		}
	}
	f, g := make([]float64, p.NumObjectives), make([]float64, p.NumConstraints)
	ctx := context.Background()
	const rounds = 200
	cpu0 := processCPU()
	for range rounds {
		for i, x := range xs {
			if err := p.Evaluate(ctx, int64(i), x, f, g); err != nil {
				return 0
			}
		}
	}
	cpu := processCPU() - cpu0
	return float64(cpu.Nanoseconds()) / float64(rounds*len(xs))
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

// dtlz2Designs evaluates DTLZ2 (M = 3, 12 variables) at n random points whose distance variables
// lie within ±spread of their optimum, like a population near the front.
func dtlz2Designs(rng *rand.Rand, n int, spread float64) []*Design {
	p := DTLZ2(3, 12)
	ds := make([]*Design, n)
	for i := range ds {
		x := make([]float64, p.Dim)
		for j := range x {
			x[j] = rng.Float64()
			if j >= 2 {
				x[j] = 0.5 + spread*(2*rng.Float64()-1)
			}
		}
		f := make([]float64, 3)
		_ = p.Evaluate(context.Background(), 0, x, f, nil)
		ds[i] = &Design{Index: int64(i), X: x, F: f}
	}
	return ds
}

// BenchmarkSortM3 compares, in one process and under the same load, the O(M N²) sort and the
// efficient sort on 2N = 200 DTLZ2 designs near the front (spread 0.05: a few fronts) and far
// from it (spread 0.5: many fronts).
func BenchmarkSortM3(b *testing.B) {
	for _, spread := range []float64{0.05, 0.5} {
		ds := dtlz2Designs(rand.New(rand.NewPCG(1, 2)), 200, spread)
		sp := strconv.FormatFloat(spread, 'g', -1, 64)
		b.Run("naive/spread="+sp, func(b *testing.B) {
			for b.Loop() {
				nondominatedSortNaive(ds)
			}
		})
		b.Run("ENS-BS/spread="+sp, func(b *testing.B) {
			var s scratch
			for b.Loop() {
				s.nondominatedSortENS(ds, 3)
			}
		})
	}
}

// BenchmarkArchiveM3 compares offering 100 DTLZ2 children one at a time and as one batch to an
// archive of 200 mutually non-dominated members (M = 3), the work of one generation.
func BenchmarkArchiveM3(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 4))
	base := archive{m: 3, capacity: -1}
	for _, d := range dtlz2Designs(rng, 400, 0) {
		base.add(d)
	}
	base.items = base.items[:200]
	children := dtlz2Designs(rng, 100, 0.02)
	for i, d := range children {
		d.Index = int64(1000 + i)
	}
	b.Run("one-at-a-time", func(b *testing.B) {
		for b.Loop() {
			a := archive{m: 3, capacity: -1, items: slices.Clone(base.items)}
			for _, d := range children {
				a.add(d)
			}
		}
	})
	b.Run("batch", func(b *testing.B) {
		a := archive{m: 3, capacity: -1}
		for b.Loop() {
			a.items = append(a.items[:0], base.items...)
			a.addAll(children)
		}
	})
}

// BenchmarkVariation times the variation of one pair of parents (SBX crossover and polynomial
// mutation of both children, defaults, 30 continuous variables in [0, 1]) with the plain forms
// of operators_ref_test.go and with the run's operators of operators.go, which give the same
// children bit for bit (TestOperatorsMatchReference).
func BenchmarkVariation(b *testing.B) {
	p := ZDT1(30)
	v := Variation{}.resolve(p.Dim)
	rng := rand.New(rand.NewPCG(1, 2))
	parents := make([][]float64, 64)
	for i := range parents {
		parents[i] = make([]float64, p.Dim)
		for j := range parents[i] {
			parents[i][j] = rng.Float64()
		}
	}
	c1, c2 := make([]float64, p.Dim), make([]float64, p.Dim)
	b.Run("plain", func(b *testing.B) {
		r := rand.New(rand.NewPCG(3, 4))
		i := 0
		for b.Loop() {
			crossover(r, &p, &v, parents[i%64], parents[(i+1)%64], c1, c2)
			mutate(r, &p, &v, c1)
			mutate(r, &p, &v, c2)
			i++
		}
	})
	b.Run("operators", func(b *testing.B) {
		ops := newOperators(&p, &v)
		src := rand.NewPCG(3, 4)
		r := rand.New(src)
		i := 0
		for b.Loop() {
			ops.crossover(src, parents[i%64], parents[(i+1)%64], c1, c2)
			ops.mutate(r, src, c1)
			ops.mutate(r, src, c2)
			i++
		}
	})
}
