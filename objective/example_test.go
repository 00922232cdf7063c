package objective_test

import (
	"fmt"

	"plica/objective"
)

// ExampleEvaluate scores the balanced pair of measured bellows of the
// shipped demo (problems/examples/boom-measured.toml; invented numbers).
// EI1·κ1 = EI2·κ2, so anti-aligned the pair is straight (objective/kinematics/REFERENCE.md §3.5);
// aligned, the 100 mm curved overlap bends at (k1κ1 + k2κ2)/(k1 + k2) =
// 20/3 1/m, so the tip of the 350 mm straight part plus that arc lies
// (1 − cos(2/3))/(20/3) m = 32.12 mm off the axis (objective/kinematics/REFERENCE.md §3.3, planar
// case); the mass is (0.05 + 0.08) kg/m · 0.45 m = 58.5 g. All derived.
func ExampleEvaluate() {
	d := &objective.Design{Bellows: []objective.Bellows{
		{StraightLength: 0.35, CurvedLength: 0.1, Precurvature: [2]float64{0, 10},
			Measured: &objective.Measured{EI: [2]float64{1, 1}, GJ: 50, LinearDensity: 0.05}},
		{StraightLength: 0.35, CurvedLength: 0.1, Precurvature: [2]float64{0, 5},
			Measured: &objective.Measured{EI: [2]float64{2, 2}, GJ: 100, LinearDensity: 0.08}},
	}}
	res, err := objective.Evaluate(d, &objective.Scenario{Load: objective.Load{NoGravity: true}})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, name := range []string{"reach_mm", "straight_tip_offset_mm", "mass_g"} {
		s, _ := objective.LookupScore(name)
		fmt.Printf("%s %.2f\n", name, s.Value(&res.Scores))
	}
	fmt.Println("pass:", res.Pass)
	// Output:
	// reach_mm 32.12
	// straight_tip_offset_mm 0.00
	// mass_g 58.50
	// pass: true
}
