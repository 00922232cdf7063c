package main

import (
	"fmt"

	"plica/objective"
	"plica/objective/kinematics"
)

// loadedPose solves the shape under the design's [load] with the exact rod
// model (objective.LoadedBackbone) and returns the loaded tip and its
// backbone thinned to about step.
func loadedPose(links []kinematics.Link, sc *objective.Scenario, step float64) (kinematics.Pose, []float64, []kinematics.Pose, error) {
	tip, ss, poses, err := objective.LoadedBackbone(links, sc.Load, step)
	if err != nil {
		return kinematics.Pose{}, nil, nil, fmt.Errorf("pose -loaded: %w", err)
	}
	return tip, ss, poses, nil
}
