package objective

import (
	"math"

	"plica/objective/kinematics"
	"plica/objective/statics"
)

// LoadedBackbone solves the shape of links under ld (self-weight, payload
// and tip loads, gravity as ld.GravityVector) with the geometrically exact
// rod model (objective/statics/REFERENCE.md §1) and returns the loaded tip
// and its backbone, one sample per RK4 node (duplicates at link boundaries
// dropped) thinned to about step (m), the tip always kept. pose -loaded
// and the report's loaded backbones both draw it.
func LoadedBackbone(links []kinematics.Link, ld Load, step float64) (kinematics.Pose, []float64, []kinematics.Pose, error) {
	g := ld.GravityVector()
	load := statics.Load{Gravity: g, TipMoment: ld.TipMoment}
	for i := range 3 {
		load.TipForce[i] = ld.PayloadMass*g[i] + ld.TipForce[i]
	}
	shape, err := statics.Solve(links, load, nil)
	if err != nil {
		return kinematics.Pose{}, nil, nil, err
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
