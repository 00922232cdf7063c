package surrogate

import (
	"testing"
	"time"
)

// benchBellows returns demo bellows (invented numbers) of each profile,
// all inside the generated tables.
func benchBellows() map[string]Bellows {
	s := validBellows()
	u := s
	u.Profile, u.Depth = UShape, 4e-3
	tr := s
	tr.Profile, tr.FlatFraction = Trapezoid, 0.3
	sp := s
	sp.SpineWidth = 0.1 * 3.141592653589793 * 2 * s.MeanRadius() // β 0.1: the spine and its blends
	return map[string]Bellows{"sinusoid": s, "u": u, "trapezoid": tr, "sinusoid-spined": sp}
}

// BenchmarkSectionStrip measures one Strip-fidelity Section (target
// < 5 µs per evaluation).
func BenchmarkSectionStrip(b *testing.B) {
	for _, name := range []string{"sinusoid", "u", "trapezoid", "sinusoid-spined"} {
		bl := benchBellows()[name]
		b.Run(name, func(b *testing.B) {
			if s, err := bl.Section(Strip); err != nil || s.Fidelity != Strip {
				b.Fatalf("%s: strip section failed or fell back: %v", name, err)
			}
			start := time.Now()
			n := 0
			for b.Loop() {
				if _, err := bl.Section(Strip); err != nil {
					b.Fatal(err)
				}
				n++
			}
			b.ReportMetric(float64(time.Since(start).Nanoseconds())/1e3/float64(n), "us/eval")
		})
	}
}

// BenchmarkSectionShell measures one Shell-fidelity Section (target
// < 5 ms per evaluation; 240 elements per half U or trapezoid
// convolution, 400 per half sinusoid).
func BenchmarkSectionShell(b *testing.B) {
	for _, name := range []string{"sinusoid", "u", "trapezoid"} {
		bl := benchBellows()[name]
		b.Run(name, func(b *testing.B) {
			start := time.Now()
			n := 0
			for b.Loop() {
				if _, err := bl.Section(Shell); err != nil {
					b.Fatal(err)
				}
				n++
			}
			b.ReportMetric(float64(time.Since(start).Nanoseconds())/1e6/float64(n), "ms/eval")
		})
	}
}
