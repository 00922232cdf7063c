package statics_test

import (
	"fmt"

	"plica/objective/kinematics"

	"plica/objective/statics"
)

// A straight cantilever (L = 0.3 m, EI = 0.02 N·m²) under a dead tip force
// perpendicular to it with PL²/EI = 1: the large-deflection solution is the
// elastica of Bisshopp & Drucker (1945), δ/L = 0.3017; the small-load linear
// estimate PL³/3EI overshoots by about 10 %.
func ExampleSolve() {
	const L, EI = 0.3, 0.02
	links := []kinematics.Link{{Start: 0, End: L, K: [3][3]float64{{EI, 0, 0}, {0, EI, 0}, {0, 0, EI / 1.3}}}}
	load := statics.Load{TipForce: [3]float64{EI / (L * L), 0, 0}}
	shape, err := statics.Solve(links, load, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	dp, _, err := statics.LinearTipDeflection(links, load)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("nonlinear: deflection/L = %.4f, shortening/L = %.4f (%v)\n",
		shape.Tip.P[0]/L, 1-shape.Tip.P[2]/L, shape.Status)
	fmt.Printf("linear:    deflection/L = %.4f\n", dp[0]/L)
	// Output:
	// nonlinear: deflection/L = 0.3017, shortening/L = 0.0564 (converged)
	// linear:    deflection/L = 0.3333
}

// Self-weight sag of a horizontal two-tube robot (demo bellows values):
// gravity acts along −x of the base frame. The rod pulls on the base with
// the weight in front of the base plane, 9.81·(0.20·0.015 + 0.15·0.03) =
// 0.0736 N.
func ExampleRobotTipSag() {
	r := &kinematics.Robot{Tubes: []kinematics.Tube{
		{StraightLength: 0.35, CurvedLength: 0.10, Precurvature: [2]float64{0, 10},
			Bending: [2][2]float64{{0.004, 0}, {0, 0.004}}, Torsion: 0.003, LinearDensity: 0.015},
		{StraightLength: 0.15, CurvedLength: 0.10, Precurvature: [2]float64{0, 5},
			Bending: [2][2]float64{{0.012, 0}, {0, 0.008}}, Torsion: 0.009, LinearDensity: 0.03},
	}}
	a := kinematics.Actuation{Theta: []float64{0, 0}, Beta: []float64{-0.25, -0.10}}
	sag, shape, err := statics.RobotTipSag(r, a, statics.Load{Gravity: [3]float64{-9.81, 0, 0}}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("tip sag %.3f mm; base force %.4f N along x; %d Newton iterations, %d integrations\n",
		sag*1e3, shape.BaseForce[0], shape.Iterations, shape.Integrations)
	// Output:
	// tip sag 4.113 mm; base force -0.0736 N along x; 3 Newton iterations, 5 integrations
}
