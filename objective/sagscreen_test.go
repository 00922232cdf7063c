package objective

import (
	"fmt"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// sagCases are designs and scenarios for the screened sag scan: two, three
// and four bellows (demo values), gravity across the base axis (the
// default), along it and tilted, with and without payload, an anisotropic
// pair and an insertion range.
func sagCases() []struct {
	name string
	d    *Design
	sc   *Scenario
} {
	aniso := &Design{Bellows: []Bellows{
		measuredBellows(0.15, 0.11, 9, 0.6, 30, 0.02),
		measuredBellows(0.15, 0.10, 4, 1.1, 45, 0.03),
	}}
	aniso.Bellows[0].Measured.EI = [2]float64{0.3, 0.9}
	two := &Design{Bellows: []Bellows{
		measuredBellows(0.15, 0.11, 9, 0.6, 30, 0.02),
		measuredBellows(0.15, 0.10, 4, 1.1, 45, 0.03),
	}}
	ws := Workspace{RelativeSteps: 24, BaseSteps: 32}
	return []struct {
		name string
		d    *Design
		sc   *Scenario
	}{
		{"two default", two, &Scenario{Load: Load{PayloadMass: 0.05}}},
		{"two anisotropic", aniso, &Scenario{Load: Load{PayloadMass: 0.02}, Workspace: Workspace{BaseSteps: 48}}},
		{"three across", threeBellows(), &Scenario{Load: Load{PayloadMass: 0.05}, Workspace: ws}},
		{"three along", threeBellows(), &Scenario{Load: Load{PayloadMass: 0.05, Gravity: [3]float64{0, 0, -9.81}}, Workspace: ws}},
		{"three tilted no payload", threeBellows(), &Scenario{Load: Load{Gravity: [3]float64{3, -4, -8}}, Workspace: ws}},
		{"three insertion", threeBellows(), &Scenario{Load: Load{PayloadMass: 0.1},
			Workspace: Workspace{RelativeSteps: 12, BaseSteps: 16, InsertionSteps: 3, Insertion: [][2]float64{{-0.03, 0}}}}},
		// loaded task points screen every shape with its compliance
		// (task.go), including those the sag screen skipped
		{"two loaded task points", two, &Scenario{Load: Load{PayloadMass: 0.05}, Tasks: []TaskPoint{
			{Position: [3]float64{0.02, 0.01, 0.2}, Tolerance: 0.002},
			{Position: [3]float64{-0.01, 0.03, 0.18}, Tolerance: 0.002}}}},
		{"four", fourBellows(), &Scenario{Load: Load{PayloadMass: 0.05}, Workspace: Workspace{RelativeSteps: 12, BaseSteps: 24}}},
	}
}

// TestSagBoundHolds: sagBound is at least the largest linear sag of the
// shape over the common rotations, for every sampled shape and both Gauss
// rules (the inequality objective/REFERENCE.md §4.4 derives).
func TestSagBoundHolds(t *testing.T) {
	for _, c := range sagCases() {
		robot, st, err := c.d.Robot()
		require.NoError(t, err)
		w := defaults(c.sc.Workspace)
		g := c.sc.Load.GravityVector()
		gn := math.Sqrt(g[0]*g[0] + g[1]*g[1] + g[2]*g[2])
		hh := make([][6]float64, w.BaseSteps)
		for j := range hh {
			s, cs := math.Sincos(2 * math.Pi * float64(j) / float64(w.BaseSteps))
			gh := [3]float64{g[0] / gn, g[1] / gn, g[2] / gn}
			h := [3]float64{cs*gh[0] + s*gh[1], -s*gh[0] + cs*gh[1], gh[2]}
			hh[j] = [6]float64{gn * h[0] * h[0], gn * h[1] * h[1], gn * h[2] * h[2], gn * h[0] * h[1], gn * h[0] * h[2], gn * h[1] * h[2]}
		}
		for _, fine := range []bool{false, true} {
			e := &evaluator{d: c.d, robot: robot, st: st, payload: c.sc.Load.PayloadMass,
				strainPerCurvature: make([]float64, len(st)), gravity: g, screen: true, fine: fine,
				gravityNorm: gn, gravityZ: math.Abs(g[2]) / gn, gravityXY: math.Hypot(g[0], g[1]) / gn}
			worstRatio, count := 0.0, 0
			for _, a := range buildPlan(len(st), w).acts {
				sh, err := e.evalShape(a)
				require.NoError(t, err)
				if sh == nil {
					continue
				}
				require.NoError(t, e.shapeCompliance(sh))
				m := shapeMaxSag(sh, hh)
				require.Greater(t, m, 0.0, c.name)
				assert.LessOrEqual(t, m, sh.bound, "%s fine=%v: bound at %s", c.name, fine, degList(a.Theta))
				worstRatio = math.Max(worstRatio, m/sh.bound)
				count++
			}
			require.Positive(t, count)
			t.Logf("%s fine=%v: largest sag/bound %.3f over %d shapes", c.name, fine, worstRatio, count)
		}
	}
}

// TestSagScreenEqualsFull: the screened scan picks the same worst
// configuration as the straightforward scan over every shape's compliance,
// so every score is the same number.
func TestSagScreenEqualsFull(t *testing.T) {
	for _, c := range sagCases() {
		screened, err := Evaluate(c.d, c.sc)
		require.NoError(t, err, c.name)
		screenSag = false
		full, err := Evaluate(c.d, c.sc)
		screenSag = true
		require.NoError(t, err, c.name)
		// %#v: NaN scores (measured bellows have no strain) print alike
		assert.Equal(t, fmt.Sprintf("%#v", full.Scores), fmt.Sprintf("%#v", screened.Scores), c.name)
		assert.Equal(t, fmt.Sprintf("%#v", full.Checks), fmt.Sprintf("%#v", screened.Checks), c.name)
		assert.Positive(t, full.Scores.TipSag, c.name)
	}
}

// TestSagScreenSkips: on the three-bellows demo set at the default
// workspace the screen leaves out most compliances (what makes it worth
// having; the count is of this design, not a guarantee).
func TestSagScreenSkips(t *testing.T) {
	d := threeBellows()
	sc := &Scenario{Load: Load{PayloadMass: 0.05}}
	robot, st, err := d.Robot()
	require.NoError(t, err)
	e := &evaluator{d: d, sc: sc, robot: robot, st: st, payload: 0.05, strainPerCurvature: make([]float64, len(st))}
	res := &Result{}
	require.NoError(t, e.workspace(defaults(sc.Workspace), res))
	require.NoError(t, e.sag(res))
	computed := 0
	for _, sh := range e.shapes {
		if sh.hasComp {
			computed++
		}
	}
	t.Logf("compliances computed: %d of %d", computed, len(e.shapes))
	assert.Less(t, computed, len(e.shapes)/4)
}
