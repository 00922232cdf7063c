package problems

import "testing"

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
