package search

import (
	"context"
	"math"

	"plica/search/front"
)

// VerificationCase is a published (or derived) value that this package's
// production code must reproduce. plica verify prints it (package
// results/verify gathers the cases of every model package) and the
// package's tests run it; the value is written here and nowhere else.
type VerificationCase struct {
	Area      string // the heading plica verify lists it under
	Name      string
	Unit      string
	Published float64
	Tolerance float64 // relative to |Published| when Relative, else absolute
	Relative  bool
	Source    string // where Published comes from: author, title, year, equation or table
	Slow      bool   // left out by plica verify -quick and go test -short
	Compute   func() (float64, error)
}

// VerificationCases returns the package's verification cases: Nelder–Mead
// on Rosenbrock's function and NSGA-II on ZDT1 (slow).
func VerificationCases() []VerificationCase {
	return []VerificationCase{verifyRosenbrock, verifyZDT1}
}

var (
	verifyRosenbrock = VerificationCase{Area: "search", Name: "Nelder–Mead on Rosenbrock from (−1.2, 1): distance to (1, 1)",
		Published: 0, Tolerance: 1e-6,
		Source: "Rosenbrock's minimum (1, 1); gonum optimize v0.17.0 Nelder–Mead",
		Compute: func() (float64, error) {
			p := Rosenbrock([]float64{math.Inf(-1), math.Inf(-1)}, []float64{math.Inf(1), math.Inf(1)})
			res, err := Run(context.Background(), p, &Settings{MaxEvaluations: 5000}, &NelderMead{Initial: []float64{-1.2, 1}})
			if err != nil {
				return math.NaN(), err
			}
			x := res.Population[0].X
			return math.Hypot(x[0]-1, x[1]-1), nil
		}}

	verifyZDT1 = VerificationCase{Area: "search", Name: "NSGA-II on ZDT1 (n = 30, N = 100, 25 000 evaluations, seed 1): hypervolume at (1, 1)",
		Published: 2.0 / 3, Tolerance: 0.01, Relative: true,
		Source: "Zitzler, Deb & Thiele, Evol. Comput. 8(2), 2000 (front f2 = 1 − sqrt(f1), HV 2/3); Deb et al. 2002",
		Slow:   true,
		Compute: func() (float64, error) {
			res, err := Run(context.Background(), ZDT1(30), &Settings{Seed: 1, MaxEvaluations: 25000, Reference: []float64{1, 1}}, &NSGA2{})
			if err != nil {
				return math.NaN(), err
			}
			var pts [][]float64
			for _, d := range res.Front {
				pts = append(pts, d.F)
			}
			return front.Hypervolume(pts, []float64{1, 1}), nil
		}}
)
