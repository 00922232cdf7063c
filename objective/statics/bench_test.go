package statics

import (
	"testing"

	"plica/objective/kinematics"
)

// BenchmarkStatics times loaded-statics solves. "us/solve" is wall time per
// solve; "integrations/solve" counts RK4 passes over the whole backbone.
func BenchmarkStatics(b *testing.B) {
	r := staticsTwoTubeRobot()
	a := kinematics.Actuation{Theta: []float64{0.4, -1.1}, Beta: []float64{-0.25, -0.10}}
	links, err := r.Links(a, nil)
	if err != nil {
		b.Fatal(err)
	}
	sagLoad := Load{Gravity: [3]float64{-9.81, 0, 0}}
	const L, EI = 0.3, 0.02
	beam := staticsBeam(L, EI, EI/1.3, 0)
	tip := func(alpha float64) Load { return Load{TipForce: [3]float64{alpha * EI / (L * L), 0, 0}} }
	cases := []struct {
		name  string
		solve func() (*Shape, error)
	}{
		{"two-tube-sag/robot", func() (*Shape, error) { _, s, err := RobotTipSag(r, a, sagLoad, nil); return s, err }},
		{"two-tube-sag/links", func() (*Shape, error) { _, s, err := TipSag(links, sagLoad, nil); return s, err }},
		{"two-tube-dead-load/links", func() (*Shape, error) { return Solve(links, sagLoad, nil) }},
		{"two-tube-shooting/links", func() (*Shape, error) { return Solve(links, sagLoad, &Settings{Shooting: true}) }},
		{"elastica-alpha=1/dead-load", func() (*Shape, error) { return Solve(beam, tip(1), nil) }},
		{"elastica-alpha=1/shooting", func() (*Shape, error) { return Solve(beam, tip(1), &Settings{Shooting: true}) }},
		{"elastica-alpha=10/dead-load", func() (*Shape, error) { return Solve(beam, tip(10), nil) }},
		{"elastica-alpha=5/continuation", func() (*Shape, error) { return Solve(beam, tip(5), nil) }},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			var sh *Shape
			n := 0
			for b.Loop() {
				var err error
				if sh, err = c.solve(); err != nil {
					b.Fatal(err)
				}
				n++
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/1e3/float64(n), "us/solve")
			b.ReportMetric(float64(sh.Integrations), "integrations/solve")
			b.ReportMetric(float64(sh.Iterations), "iterations/solve")
		})
	}
	b.Run("linear-estimate/links", func(b *testing.B) {
		n := 0
		for b.Loop() {
			if _, _, err := LinearTipDeflection(links, sagLoad); err != nil {
				b.Fatal(err)
			}
			n++
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/1e3/float64(n), "us/solve")
	})
}
