package main

import (
	"fmt"
	"math"

	"plica/objective"
	"plica/objective/kinematics"
	"plica/objective/statics"
)

// loadedPose solves the shape under the design's [load] (self-weight,
// payload and tip loads, gravity as in [load]) with the geometrically exact
// rod model (objective/statics/REFERENCE.md §1) and returns the loaded tip
// and its backbone, one sample per RK4 node (duplicates at link boundaries
// dropped) thinned to about step.
func loadedPose(links []kinematics.Link, sc *objective.Scenario, step float64) (kinematics.Pose, []float64, []kinematics.Pose, error) {
	ld := sc.Load
	g := ld.GravityVector()
	load := statics.Load{Gravity: g, TipMoment: ld.TipMoment}
	for i := range 3 {
		load.TipForce[i] = ld.PayloadMass*g[i] + ld.TipForce[i]
	}
	shape, err := statics.Solve(links, load, nil)
	if err != nil {
		return kinematics.Pose{}, nil, nil, fmt.Errorf("pose -loaded: %w", err)
	}
	var ss []float64
	var poses []kinematics.Pose
	last := math.Inf(-1)
	for k, s := range shape.Samples {
		if s.S-last < step && k != len(shape.Samples)-1 {
			continue
		}
		if s.S == last {
			continue
		}
		ss = append(ss, s.S)
		poses = append(poses, s.Pose)
		last = s.S
	}
	return shape.Tip, ss, poses, nil
}
