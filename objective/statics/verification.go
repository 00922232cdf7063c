package statics

import (
	"math"

	"plica/objective/kinematics"
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

// VerificationCases returns the package's verification cases: the
// large-deflection elastica of a cantilever and its small-load limit.
func VerificationCases() []VerificationCase {
	return []VerificationCase{verifyLD1Angle, verifyLD1Deflection, verifySmallLoad}
}

// elastica solves a straight cantilever (EI = 1, L = 1) under a dead tip
// load α perpendicular to it.
func elastica(alpha float64) (*Shape, error) {
	r := &kinematics.Robot{Tubes: []kinematics.Tube{{StraightLength: 1, Bending: [2][2]float64{{1, 0}, {0, 1}}, Torsion: 1}}}
	links, err := r.Links(kinematics.Actuation{Theta: []float64{0}, Beta: []float64{0}}, nil)
	if err != nil {
		return nil, err
	}
	return Solve(links, Load{TipForce: [3]float64{0, alpha, 0}}, nil)
}

var (
	verifyLD1Angle = VerificationCase{Area: "elastica", Name: "LD-1 α = PL²/EI = 1: tip angle", Unit: "rad",
		Published: 0.461352, Tolerance: 1e-4, Relative: true,
		Source: "Bisshopp & Drucker, Large Deflection of Cantilever Beams, Q. Appl. Math. 3, 1945; objective/statics/REFERENCE.md §5.2",
		Compute: func() (float64, error) {
			s, err := elastica(1)
			if err != nil {
				return math.NaN(), err
			}
			return math.Atan2(s.Tip.R[1][2], s.Tip.R[2][2]), nil
		}}

	verifyLD1Deflection = VerificationCase{Area: "elastica", Name: "LD-1 α = 10: deflection along the load δ_y/L",
		Published: 0.810609, Tolerance: 1e-4, Relative: true,
		Source: "Bisshopp & Drucker 1945; objective/statics/REFERENCE.md §5.2",
		Compute: func() (float64, error) {
			s, err := elastica(10)
			if err != nil {
				return math.NaN(), err
			}
			return s.Tip.P[1], nil
		}}

	verifySmallLoad = VerificationCase{Area: "elastica", Name: "small tip load α = 1e-3: δ/L against PL³/3EI",
		Published: 1e-3 / 3, Tolerance: 1e-5, Relative: true,
		Source: "Roark's Formulas for Stress and Strain, 7th ed., Table 8.1 case 1a; Gere & Timoshenko, App. G, case 4",
		Compute: func() (float64, error) {
			s, err := elastica(1e-3)
			if err != nil {
				return math.NaN(), err
			}
			return s.Tip.P[1], nil
		}}
)
