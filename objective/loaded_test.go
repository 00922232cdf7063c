package objective

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective/kinematics"
)

// TestWorkspaceSagsCantilever: a straight cantilever under gravity across
// it sags at every sampled tip by δ = m_p g L³/(3EI) + m' g L⁴/(8EI)
// (Roark's Formulas for Stress and Strain, 7th ed., Table 8.1, cases 1a
// and 2a), whatever the common rotation (EI is isotropic); the tips are
// exactly those of WorkspaceTips.
func TestWorkspaceSagsCantilever(t *testing.T) {
	const L, EI, mp, mpl = 0.3, 0.5, 0.02, 0.04
	d := &Design{Bellows: []Bellows{measuredBellows(L, 0, 0, EI, 20, mpl)}}
	robot, _, err := d.Robot()
	require.NoError(t, err)
	w := Workspace{RelativeSteps: 8, BaseSteps: 8}
	ld := Load{PayloadMass: mp}
	tips, sags, err := WorkspaceSags(robot, w, ld)
	require.NoError(t, err)
	ref, err := WorkspaceTips(robot, w)
	require.NoError(t, err)
	assert.Equal(t, ref, tips, "the same samples as WorkspaceTips")
	require.Len(t, sags, len(tips))
	want := StandardGravity * (mp*L*L*L/(3*EI) + mpl*L*L*L*L/(8*EI))
	for k, s := range sags {
		// 1e-3: the compliance's default quadrature (TestComplianceCantilever checks 1e-4 with the fine rule)
		assert.InEpsilon(t, want, s, 1e-3, "sag at sample %d", k)
	}
	_, none, err := WorkspaceSags(robot, w, Load{NoGravity: true})
	require.NoError(t, err)
	for _, s := range none {
		assert.Zero(t, s, "no gravity, no sag")
	}
}

// TestWorkspaceSagsTurned: for a pre-curved arc, the sag WorkspaceSags
// gives for the j-th common rotation equals the sag of the arc actually
// turned by that angle (its actuation angle increased by φ), computed from
// that shape's own compliance: turning the compliance analytically agrees
// with turning the arc.
func TestWorkspaceSagsTurned(t *testing.T) {
	const L, EI, mp, mpl = 0.25, 0.5, 0.02, 0.04
	d := &Design{Bellows: []Bellows{measuredBellows(0, L, 4, EI, 20, mpl)}}
	robot, _, err := d.Robot()
	require.NoError(t, err)
	w := Workspace{RelativeSteps: 4, BaseSteps: 8}
	ld := Load{PayloadMass: mp}
	_, sags, err := WorkspaceSags(robot, w, ld)
	require.NoError(t, err)
	require.GreaterOrEqual(t, len(sags), w.BaseSteps)
	g := ld.GravityVector()
	e := &evaluator{robot: robot, payload: mp, strainPerCurvature: make([]float64, 1)}
	first := plan(1, defaults(w)).acts[0]
	for j := range w.BaseSteps {
		phi := 2 * math.Pi * float64(j) / float64(w.BaseSteps)
		a := kinematics.Actuation{Theta: []float64{first.Theta[0] + phi}, Beta: append([]float64(nil), first.Beta...)}
		sh, err := e.evalShape(a)
		require.NoError(t, err)
		direct := 0.0
		gn := StandardGravity
		for r := range 3 {
			for q := range 3 {
				direct += g[r] / gn * sh.comp[r][q] * g[q]
			}
		}
		assert.InEpsilon(t, direct, sags[j], 1e-9, "common rotation %d", j)
	}
	assert.NotEqual(t, sags[0], sags[w.BaseSteps/4], "a curved arm sags differently when turned")
}
