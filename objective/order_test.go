package objective

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// TestBellowsOrderHint: the nesting clearance is the outer bellows' root
// radius inside its wall less the inner bellows' outer radius (objective/
// margins.go clearance; derived by hand here). Listed innermost first, a
// 23.6 mm bellows inside a 30 mm one (depth 3 mm, wall 0.6 mm) clears by
// 15 − 3 − 0.6 − 11.8 = −0.4 mm: a failed check, by less than the wall, and
// no hint. Listed outermost first, the 30 mm one "inside" the 23.6 mm one
// clears by 11.8 − 3 − 0.6 − 15 = −6.8 mm, more than the 0.6 mm wall: the
// result names the pair and the warning says bellows 1 is the innermost.
func TestBellowsOrderHint(t *testing.T) {
	petg, ok := surrogate.LookupMaterial("petg")
	require.True(t, ok)
	tube := func(od float64) Bellows {
		return Bellows{Model: &surrogate.Bellows{Geometry: surrogate.Geometry{OuterDiameter: od, Depth: 3e-3, Pitch: 6e-3, Wall: 0.6e-3}, Material: petg},
			StraightLength: 0.1, CurvedLength: 0.08, Precurvature: [2]float64{0, 3}}
	}
	sc := &Scenario{Load: Load{NoGravity: true}, Workspace: Workspace{RelativeSteps: 8, BaseSteps: 4}}
	hinted := func(r *Result) bool {
		for _, w := range r.Warnings {
			if strings.Contains(w, "innermost first") {
				return true
			}
		}
		return false
	}
	tight, err := Evaluate(&Design{Bellows: []Bellows{tube(23.6e-3), tube(30e-3)}}, sc)
	require.NoError(t, err)
	c := findCheck(tight, "clearance[1-2]")
	require.NotNil(t, c)
	assert.InDelta(t, -0.4, c.Value, 1e-9, "innermost first: clearance in mm")
	assert.False(t, c.Pass, "a negative clearance fails")
	assert.Empty(t, tight.MisorderedPairs, "fails by no more than the wall: no order hint")
	assert.False(t, hinted(tight), "no order hint in %q", tight.Warnings)

	reversed, err := Evaluate(&Design{Bellows: []Bellows{tube(30e-3), tube(23.6e-3)}}, sc)
	require.NoError(t, err)
	c = findCheck(reversed, "clearance[1-2]")
	require.NotNil(t, c)
	assert.InDelta(t, -6.8, c.Value, 1e-9, "outermost first: clearance in mm")
	assert.Equal(t, []int{1}, reversed.MisorderedPairs, "the pair of bellows 1 and 2")
	assert.True(t, hinted(reversed), "order hint in %q", reversed.Warnings)
}
