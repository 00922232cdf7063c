package problems

import (
	"context"
	"math/rand/v2"
	"testing"
)

// BenchmarkSpecEvaluate measures one candidate evaluation through the Spec
// (design from the variables, then objective.Evaluate) on the demo problem.
func BenchmarkSpecEvaluate(b *testing.B) {
	s, err := LoadProblem("examples/boom-search.toml")
	if err != nil {
		b.Fatal(err)
	}
	p := s.SearchProblem()
	x := make([]float64, p.Dim)
	for i := range x {
		x[i] = p.Lower[i] + 0.37*(p.Upper[i]-p.Lower[i])
	}
	b.ResetTimer()
	for b.Loop() {
		if _, err := s.Evaluate(x); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/eval")
}

// BenchmarkSpecDesign measures building one candidate's design alone.
func BenchmarkSpecDesign(b *testing.B) {
	s, err := LoadProblem("examples/boom-search.toml")
	if err != nil {
		b.Fatal(err)
	}
	x := s.Midpoint()
	for b.Loop() {
		if _, _, err := s.Design(x); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/1e3/float64(b.N), "us/design")
}

// BenchmarkArmCandidates measures the cost of the arm demo's search
// candidates (problems/examples/arm-search.toml): 64 fixed pseudo-random
// candidates over its ranges and options, as a search's first generations
// draw them, each through the search problem's evaluator (design, checks,
// evaluation, margins; refused candidates included, as the search pays
// for them too). It reports the mean cost per candidate and the share
// refused.
func BenchmarkArmCandidates(b *testing.B) {
	s, err := LoadProblem("examples/arm-search.toml")
	if err != nil {
		b.Fatal(err)
	}
	p := s.SearchProblem()
	rng := rand.New(rand.NewPCG(1, 2))
	xs := make([][]float64, 64)
	for k := range xs {
		x := make([]float64, p.Dim)
		for i := range x {
			if p.Categorical[i] > 0 {
				x[i] = float64(rng.IntN(p.Categorical[i]))
			} else {
				x[i] = p.Lower[i] + rng.Float64()*(p.Upper[i]-p.Lower[i])
			}
		}
		xs[k] = x
	}
	f := make([]float64, p.NumObjectives)
	g := make([]float64, p.NumConstraints)
	refused, n := 0, 0
	for b.Loop() {
		if err := p.Evaluate(context.Background(), int64(n), xs[n%len(xs)], f, g); err != nil {
			refused++
		}
		n++
	}
	b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(n), "ms/candidate")
	b.ReportMetric(float64(refused)/float64(n), "refused")
}
