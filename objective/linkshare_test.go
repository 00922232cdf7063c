package objective

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective/kinematics"
	"plica/surrogate"
)

// shareCases are the designs and scenarios on which link sharing is
// compared with the straightforward path: the sag cases, the growth sets
// on a grid (three bellows at 64 steps, four at 16) and on a Halton set
// (four at 32), an anisotropic three-bellows set (links keyed on every
// present bellows), a single bellows, no gravity (compliance of every
// shape) and insertion ranges on two bellows (the structure changes
// between samples).
func shareCases() []struct {
	name string
	d    *Design
	sc   *Scenario
} {
	cases := sagCases()
	aniso := threeBellows()
	aniso.Bellows[1].Measured.EI = [2]float64{0.5, 1.2}
	one := &Design{Bellows: []Bellows{measuredBellows(0.1, 0.1, 8, 0.5, 30, 0.02)}}
	// bellows with a wall model, so the strains are not zero
	petg, _ := surrogate.LookupMaterial("petg")
	geo := func(od, wall float64) *surrogate.Bellows {
		return &surrogate.Bellows{Geometry: surrogate.Geometry{OuterDiameter: od, Depth: 3e-3, Pitch: 10e-3, Wall: wall}, Material: petg}
	}
	walls := &Design{Bellows: []Bellows{
		{Model: geo(24e-3, 0.5e-3), StraightLength: 0.16, CurvedLength: 0.1, Precurvature: [2]float64{0, 4}},
		{Model: geo(30e-3, 0.6e-3), StraightLength: 0.12, CurvedLength: 0.1, Precurvature: [2]float64{0, 3}},
		{Model: geo(36e-3, 0.7e-3), StraightLength: 0.1, CurvedLength: 0.06, Precurvature: [2]float64{0, 2}},
	}}
	ld := Load{PayloadMass: 0.05}
	return append(cases, []struct {
		name string
		d    *Design
		sc   *Scenario
	}{
		{"three 64", threeBellows(), &Scenario{Load: ld, Workspace: Workspace{BaseSteps: 16}}},
		{"four grid 16", fourBellows(), &Scenario{Load: ld, Workspace: Workspace{RelativeSteps: 16, BaseSteps: 16}}},
		{"four Halton", fourBellows(), &Scenario{Load: ld, Workspace: Workspace{RelativeSteps: 32, BaseSteps: 16, Samples: 1500}}},
		{"three anisotropic", aniso, &Scenario{Load: ld, Workspace: Workspace{RelativeSteps: 20, BaseSteps: 16}}},
		{"one", one, &Scenario{Load: ld}},
		{"three with walls", walls, &Scenario{Load: ld, Workspace: Workspace{RelativeSteps: 16, BaseSteps: 16}}},
		{"three no gravity", threeBellows(), &Scenario{Load: Load{NoGravity: true}, Workspace: Workspace{RelativeSteps: 12, BaseSteps: 8}}},
		{"three two insertions", threeBellows(), &Scenario{Load: ld, Workspace: Workspace{RelativeSteps: 8, BaseSteps: 8, InsertionSteps: 3,
			Insertion: [][2]float64{{-0.03, 0}, {-0.02, 0}}}}},
	}...)
}

// TestLinkShareEqualsFull: with link sharing every sampled shape has the
// same tip pose, curvature, strains, sag bound (once refined; the arc bound
// of the sample loop is at least that) and compliance, bit for bit,
// as when every sample's links are solved from scratch (the straightforward
// path, shareLinks off), and Evaluate gives the same scores and checks.
func TestLinkShareEqualsFull(t *testing.T) {
	bits := func(sh *shape) string {
		var s string
		add := func(v float64) { s += fmt.Sprintf("%x ", math.Float64bits(v)) }
		for i := range 3 {
			add(sh.tip.P[i])
			for j := range 3 {
				add(sh.tip.R[i][j])
				add(sh.comp[i][j])
			}
		}
		add(sh.kmax)
		add(sh.bound)
		for _, v := range sh.strain {
			add(v)
		}
		return s + fmt.Sprint(sh.hasComp, sh.act)
	}
	shapes := func(c struct {
		name string
		d    *Design
		sc   *Scenario
	}) []string {
		robot, st, err := c.d.Robot()
		require.NoError(t, err)
		e := &evaluator{d: c.d, sc: c.sc, robot: robot, st: st, payload: c.sc.Load.PayloadMass, strainPerCurvature: make([]float64, len(st))}
		for i, s := range st {
			if s.Section != nil {
				e.strainPerCurvature[i] = s.Section.StrainPerCurvature
			}
		}
		require.NoError(t, e.workspace(defaults(c.sc.Workspace), &Result{}), c.name)
		var out []string
		for _, sh := range e.shapes {
			// the arc bound of the shared path bounds the refined one
			arc := sh.bound
			e.refineBound(sh)
			if !(arc >= sh.bound) && !math.IsNaN(sh.bound) {
				t.Errorf("%s: arc bound %g below the bound %g", c.name, arc, sh.bound)
			}
			out = append(out, bits(sh))
		}
		return out
	}
	for _, c := range shareCases() {
		shared := shapes(c)
		resShared, err := Evaluate(c.d, c.sc)
		require.NoError(t, err, c.name)
		shareLinks = false
		full := shapes(c)
		resFull, err := Evaluate(c.d, c.sc)
		shareLinks = true
		require.NoError(t, err, c.name)
		require.Equal(t, len(full), len(shared), c.name)
		for k := range full {
			require.Equal(t, full[k], shared[k], "%s: shape %d", c.name, k)
		}
		assert.Equal(t, fmt.Sprintf("%#v", resFull.Scores), fmt.Sprintf("%#v", resShared.Scores), c.name)
		assert.Equal(t, fmt.Sprintf("%#v", resFull.Checks), fmt.Sprintf("%#v", resShared.Checks), c.name)
		if c.name == "three with walls" {
			assert.Positive(t, resFull.Scores.PeakStrain, "strains computed")
		}
	}
}

// TestMulPoseEqualsMul: mulPose is kinematics.Pose.Mul with pointers, bit
// for bit, on random poses (the straightforward path it replaces).
func TestMulPoseEqualsMul(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	pose := func() kinematics.Pose {
		var p kinematics.Pose
		for i := range 3 {
			for j := range 3 {
				p.R[i][j] = rng.NormFloat64()
			}
			p.P[i] = rng.NormFloat64()
		}
		return p
	}
	for range 1000 {
		a, b := pose(), pose()
		var got kinematics.Pose
		mulPose(&got, &a, &b)
		require.Equal(t, a.Mul(b), got)
	}
}

// TestLinkShareReuse: the link tables are pooled across evaluations and
// keyed by structure; evaluating the cases in reverse order, after every
// other design has used the pool, gives the same scores as in order.
func TestLinkShareReuse(t *testing.T) {
	cases := shareCases()
	first := make([]string, len(cases))
	for i, c := range cases {
		res, err := Evaluate(c.d, c.sc)
		require.NoError(t, err, c.name)
		first[i] = fmt.Sprintf("%#v", res.Scores)
	}
	for i := len(cases) - 1; i >= 0; i-- {
		res, err := Evaluate(cases[i].d, cases[i].sc)
		require.NoError(t, err, cases[i].name)
		assert.Equal(t, first[i], fmt.Sprintf("%#v", res.Scores), cases[i].name)
	}
}
