package solid

import "testing"

// BenchmarkAnalyze times both solves (axial and bending) with meshing
// and strain recovery on the default mesh of the convergence-study
// geometry (ms/solve counts the pair as one solve).
func BenchmarkAnalyze(b *testing.B) {
	c := deepSinusoid()
	ms := c.DefaultMesh()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Analyze(c, pla, ms); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/solve")
}

// BenchmarkAnalyzeThick is the thickest corner of the validated range
// (sinusoid w/q 1.6, t/2ρ 0.8: 16 elements through the wall).
func BenchmarkAnalyzeThick(b *testing.B) {
	c := Convolution{Profile: Sinusoid, MeanRadius: 0.012, Depth: 0.0064, Pitch: 0.004}
	c.Wall = 0.8 * 2 * c.FoldRadius()
	ms := c.DefaultMesh()
	for b.Loop() {
		if _, err := Analyze(c, pla, ms); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/solve")
}
