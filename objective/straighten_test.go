package objective_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
)

// equalTube is a measured bellows of unit bending stiffness, pre-curved by
// kappa over its curved length.
func equalTube(straight, curved, kappa float64) objective.Bellows {
	return objective.Bellows{StraightLength: straight, CurvedLength: curved, Precurvature: [2]float64{0, kappa},
		Measured: &objective.Measured{EI: [2]float64{1, 1}, GJ: 50, LinearDensity: 0.05}}
}

// TestEqualPairStraightensExactly: two equal pre-curved tubes of equal
// stiffness whose curved sections overlap straighten exactly at relative
// rotation π in the torsionally rigid nested-tube model (the link curvature
// is (k1κ1 − k2κ2)/(k1 + k2) = 0; Dupont, Lock, Itkowitz & Butler, Design
// and control of concentric-tube robots, 2010, from memory;
// objective/kinematics/REFERENCE.md §3.5). The straightest configuration
// then has no residual curvature, its tip on the axis at the full length
// and pointing along it.
func TestEqualPairStraightensExactly(t *testing.T) {
	d := &objective.Design{Bellows: []objective.Bellows{equalTube(0.2, 0.1, 8), equalTube(0.2, 0.1, 8)}}
	res, err := objective.Evaluate(d, &objective.Scenario{Load: objective.Load{NoGravity: true},
		Workspace:    objective.Workspace{RelativeSteps: 16, BaseSteps: 8},
		Requirements: objective.Requirements{MaxStraightTipOffset: 1e-3, MaxStraightTipAngle: 1 * math.Pi / 180}})
	require.NoError(t, err)
	sc := res.Scores
	assert.InDelta(t, 0, sc.ResidualCurvature, 1e-9, "residual curvature, 1/m")
	assert.InDelta(t, 0, sc.StraightTipOffset, 1e-12, "tip offset, m")
	assert.InDelta(t, 0, sc.StraightTipAngle, 1e-9, "tip angle, rad")
	for _, c := range res.Checks {
		if c.Name == "straight_tip_angle" || c.Name == "straight_tip_offset" {
			assert.True(t, c.Pass, "%s passes", c.Name)
		}
	}
}

// TestExposedCurvedTipDoesNotStraighten: the same equal pair with the
// inner tube 40 mm longer, all of it curved. At relative rotation π the
// nested section is straight (as above) and the exposed end is a free arc
// of curvature κ and length ℓ, so the tip turns by κℓ from the axis and
// lies (1 − cos κℓ)/κ off it (constant-curvature arc; Webster & Jones,
// Design and kinematic modeling of constant curvature continuum robots: a
// review, 2010). For equal tubes the nested curvature points along the
// bisector of the two pre-curvatures, never against the exposed arc, so
// no other rotation brings the tip closer to the axis: that configuration
// is the straightest. Its residual curvature (nested section only) is zero,
// while the tip angle shows the exposed arc and fails a 5° limit.
func TestExposedCurvedTipDoesNotStraighten(t *testing.T) {
	const kappa, ell = 8.0, 0.04
	d := &objective.Design{Bellows: []objective.Bellows{equalTube(0.2, 0.1+ell, kappa), equalTube(0.2, 0.1, kappa)}}
	res, err := objective.Evaluate(d, &objective.Scenario{Load: objective.Load{NoGravity: true},
		Workspace:    objective.Workspace{RelativeSteps: 16, BaseSteps: 8},
		Requirements: objective.Requirements{MaxStraightTipAngle: 5 * math.Pi / 180}})
	require.NoError(t, err)
	sc := res.Scores
	assert.InDelta(t, 0, sc.ResidualCurvature, 1e-9, "nested section straight, 1/m")
	assert.InDelta(t, (1-math.Cos(kappa*ell))/kappa, sc.StraightTipOffset, 1e-9, "tip offset of the free arc, m")
	assert.InDelta(t, kappa*ell, sc.StraightTipAngle, 1e-9, "tip angle of the free arc, rad")
	var found bool
	for _, c := range res.Checks {
		if c.Name == "straight_tip_angle" {
			found = true
			assert.False(t, c.Pass, "a tip turned by κℓ = 18.3° fails a 5° limit")
			assert.InDelta(t, kappa*ell*180/math.Pi, c.Value, 1e-7, "check value in degrees")
			assert.Equal(t, "deg", c.Unit)
		}
	}
	assert.True(t, found, "straight_tip_angle is checked when max_straight_tip_angle_deg is set")
	s, ok := objective.LookupScore("straight_tip_angle_deg")
	require.True(t, ok)
	assert.InDelta(t, kappa*ell*180/math.Pi, s.Value(&res.Scores), 1e-7)
}
