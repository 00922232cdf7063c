package objective_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
)

// TestWorkspaceTips: WorkspaceTips are the tips the workspace scores use.
func TestWorkspaceTips(t *testing.T) {
	lateral := func(p [3]float64) float64 { return math.Hypot(p[0], p[1]) }
	t.Run("the scores' tips", func(t *testing.T) {
		// derived: the common rotation does not change the lateral
		// distance, so the largest lateral distance over the tips is
		// Scores.Reach and the smallest Scores.StraightTipOffset, up to
		// the rounding of the rotation
		d, sc, err := problems.LoadDesign("../problems/examples/boom-geometry.toml")
		require.NoError(t, err)
		robot, _, err := d.Robot()
		require.NoError(t, err)
		res, err := objective.Evaluate(d, sc)
		require.NoError(t, err)
		tips, err := objective.WorkspaceTips(robot, sc.Workspace)
		require.NoError(t, err)
		assert.Len(t, tips, 64*64, "64 relative by 64 common rotations (the defaults)")
		reach, offset := 0.0, math.Inf(1)
		for _, p := range tips {
			reach = math.Max(reach, lateral(p))
			offset = math.Min(offset, lateral(p))
		}
		assert.InEpsilon(t, res.Scores.Reach, reach, 1e-12, "reach of boom-geometry.toml")
		assert.InDelta(t, res.Scores.StraightTipOffset, offset, 1e-15, "straightest tip of boom-geometry.toml")
		for j := range 64 {
			assert.InDelta(t, lateral(tips[0]), lateral(tips[j]), 1e-15, "common rotation %d keeps the lateral distance", j)
		}
	})
	t.Run("balanced pair straightens at 180 degrees", func(t *testing.T) {
		// objective/kinematics/REFERENCE.md §3.5: the measured example is a balanced pair
		// (EI1·κ1 = EI2·κ2), straight at 180° relative rotation with the
		// tip on the axis at the full length, 450 mm (as TestPoseJSONContract)
		d, _, err := problems.LoadDesign("../problems/examples/boom-measured.toml")
		require.NoError(t, err)
		robot, _, err := d.Robot()
		require.NoError(t, err)
		tips, err := objective.WorkspaceTips(robot, objective.Workspace{RelativeSteps: 12, BaseSteps: 4})
		require.NoError(t, err)
		assert.Len(t, tips, 48, "12 relative by 4 common rotations")
		best := tips[0]
		for _, p := range tips {
			if lateral(p) < lateral(best) {
				best = p
			}
		}
		assert.InDelta(t, 0, lateral(best), 1e-12, "straight: on the axis")
		assert.InDelta(t, 0.45, best[2], 1e-12, "straight: z = full length")
	})
}
