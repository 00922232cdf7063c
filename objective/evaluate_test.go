package objective

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/integrate/quad"

	"plica/objective/kinematics"
	"plica/surrogate"

	"plica/objective/statics"
)

// measuredBellows is a bellows with isotropic measured stiffness.
func measuredBellows(ls, lc, kappa, ei, gj, mpl float64) Bellows {
	return Bellows{StraightLength: ls, CurvedLength: lc, Precurvature: [2]float64{0, kappa},
		Measured: &Measured{EI: [2]float64{ei, ei}, GJ: gj, LinearDensity: mpl}}
}

// TestSingleArcSweep: one bellows, all of it curved, swept about its base
// axis. The tip of a planar arc of curvature κ and length L lies at
// ρ = (1 − cos κL)/κ from the axis and its tangent makes the angle κL with
// it (objective/kinematics/REFERENCE.md §3.3, planar case; derived from the stated equations).
func TestSingleArcSweep(t *testing.T) {
	const kappa, L = 10.0, 0.1
	d := &Design{Bellows: []Bellows{measuredBellows(0, L, kappa, 1, 50, 0.01)}}
	res, err := Evaluate(d, &Scenario{Load: Load{NoGravity: true}})
	require.NoError(t, err)
	sc := res.Scores
	assert.InEpsilon(t, (1-math.Cos(kappa*L))/kappa, sc.Reach, 1e-12, "reach of a single arc")
	assert.InEpsilon(t, kappa*L, sc.BendAngleMax, 1e-12, "tip angle κL")
	assert.InDelta(t, 0, sc.BendAngleRange, 1e-12, "one shape: no bend range")
	assert.Equal(t, 1, sc.DOF, "common rotation only")
	assert.InDelta(t, kappa, sc.ResidualCurvature, 1e-9, "cannot straighten alone")
	assert.InDelta(t, 0, sc.TipSag, 0, "no gravity, no sag")
}

// TestBalancedPairSurface: two equal bellows with equal pre-curvature κ
// overlapping over their whole length. The link curvature is κ|cos(Δ/2)|
// (objective/kinematics/REFERENCE.md §3.1 isotropic closed form with k1 = k2: |u| = κ sqrt((1 + cos Δ)/2)),
// so the tip runs along the family of arcs of curvature k ∈ [0, κ], from
// straight to fully bent. Revolved about the base axis, that curve sweeps
// the area A = 2π ∫ ρ ds (Pappus' centroid theorem) with
// (ρ, z)(k) = ((1 − cos kL)/k, sin(kL)/k). The reference integrates this
// with gonum's Gauss–Legendre quadrature.
func TestBalancedPairSurface(t *testing.T) {
	const kappa, L = 10.0, 0.1
	d := &Design{Bellows: []Bellows{
		measuredBellows(0, L, kappa, 1, 50, 0.01),
		measuredBellows(0, L, kappa, 1, 50, 0.01),
	}}
	res, err := Evaluate(d, &Scenario{Load: Load{NoGravity: true}, Workspace: Workspace{RelativeSteps: 2048}})
	require.NoError(t, err)
	sc := res.Scores
	tip := func(k float64) (rho, z float64) {
		if k == 0 {
			return 0, L
		}
		return (1 - math.Cos(k*L)) / k, math.Sin(k*L) / k
	}
	// ds/dk by central differences of the closed form, integrated by quad.Fixed.
	area := quad.Fixed(func(k float64) float64 {
		const h = 1e-6
		r1, z1 := tip(k - h)
		r2, z2 := tip(k + h)
		rho, _ := tip(k)
		return 2 * math.Pi * rho * math.Hypot(r2-r1, z2-z1) / (2 * h)
	}, 1e-3, kappa, 64, nil, 0)
	assert.InEpsilon(t, area, sc.SurfaceArea, 2e-4, "revolved tip surface of a balanced pair")
	assert.InEpsilon(t, (1-math.Cos(kappa*L))/kappa, sc.Reach, 1e-9, "reach = fully bent arc")
	assert.InDelta(t, 0, sc.StraightTipOffset, 1e-9, "balanced pair straightens")
	assert.InDelta(t, 0, sc.ResidualCurvature, 1e-9, "balanced pair straightens")
	assert.InEpsilon(t, kappa*L, sc.BendAngleRange, 1e-9, "from straight to κL")
	assert.Equal(t, 2, sc.DOF)
}

// TestTaskCoverage: task points on the swept tip surface are reached, and
// points beyond the arm's length are not (derived: the tip never leaves the
// ball of radius L about the base).
func TestTaskCoverage(t *testing.T) {
	const kappa, L = 10.0, 0.1
	d := &Design{Bellows: []Bellows{
		measuredBellows(0, L, kappa, 1, 50, 0.01),
		measuredBellows(0, L, kappa, 1, 50, 0.01),
	}}
	var on []TaskPoint
	for _, k := range []float64{2.5, 5.3, 7.7} {
		rho, z := (1-math.Cos(k*L))/k, math.Sin(k*L)/k
		for _, az := range []float64{0.3, 2.0, -1.2} {
			on = append(on, TaskPoint{Position: [3]float64{rho * math.Cos(az), rho * math.Sin(az), z}, Tolerance: 0.2e-3})
		}
	}
	res, err := Evaluate(d, &Scenario{Load: Load{NoGravity: true}, Tasks: on})
	require.NoError(t, err)
	assert.Equal(t, 1.0, res.Scores.TaskCoverage, "every point on the surface is reached")
	off := []TaskPoint{{Position: [3]float64{0, 0, 2 * L}}, {Position: [3]float64{L, L, L}}, {Position: [3]float64{0, 0, -0.01}}}
	res, err = Evaluate(d, &Scenario{Load: Load{NoGravity: true}, Tasks: off})
	require.NoError(t, err)
	assert.Equal(t, 0.0, res.Scores.TaskCoverage, "no point beyond reach is reached")
	c := findCheck(res, "task_miss")
	require.NotNil(t, c)
	assert.False(t, c.Pass, "every point required by default: the task_miss check fails")
	// the tip never leaves the ball of radius L: (0, 0, 2L) misses by at least L − 1 mm
	assert.GreaterOrEqual(t, c.Value, (L-1e-3)*mmPerM-1e-9)
}

func findCheck(res *Result, name string) *Check {
	for i := range res.Checks {
		if res.Checks[i].Name == name {
			return &res.Checks[i]
		}
	}
	return nil
}

// TestComplianceCantilever: the linear compliance of a straight cantilever
// with a tip mass m_p and mass per length m' under gravity g perpendicular
// to it is δ = m_p g L³/(3EI) + m' g L⁴/(8EI) (Roark's Formulas for Stress
// and Strain, 7th ed., Table 8.1, cases 1a with a = 0 and 2a; Gere &
// Timoshenko, Mechanics of Materials, 4th ed., App. G, Table G-1, cases 4
// and 1).
func TestComplianceCantilever(t *testing.T) {
	const L, EI, mp, mpl = 0.3, 0.5, 0.02, 0.04
	d := &Design{Bellows: []Bellows{measuredBellows(L, 0, 0, EI, 20, mpl)}}
	robot, st, err := d.Robot()
	require.NoError(t, err)
	e := &evaluator{d: d, robot: robot, st: st, payload: mp, strainPerCurvature: make([]float64, 1), fine: true}
	sh, err := e.evalShape(kinematics.Actuation{Theta: []float64{0}, Beta: []float64{0}})
	require.NoError(t, err)
	want := mp*L*L*L/(3*EI) + mpl*L*L*L*L/(8*EI)
	assert.InEpsilon(t, want, sh.comp[0][0], 1e-4, "δx per unit g_x")
	assert.InEpsilon(t, want, sh.comp[1][1], 1e-4, "δy per unit g_y")
	assert.InDelta(t, 0, sh.comp[2][2], 1e-12, "inextensible: no axial compliance")
}

// TestComplianceMatchesLinearEstimate compares the closed-matrix
// compliance with the kinematics package's independent linear estimate
// (objective/statics/REFERENCE.md §3) on a curved, two-bellows, piecewise shape.
func TestComplianceMatchesLinearEstimate(t *testing.T) {
	d := &Design{Bellows: []Bellows{
		measuredBellows(0.15, 0.11, 9, 0.6, 30, 0.02),
		measuredBellows(0.15, 0.10, 4, 1.1, 45, 0.03),
	}}
	robot, st, err := d.Robot()
	require.NoError(t, err)
	e := &evaluator{d: d, robot: robot, st: st, payload: 0.05, strainPerCurvature: make([]float64, 2), fine: true}
	a := kinematics.Actuation{Theta: []float64{0.7, -0.4}, Beta: []float64{0, 0}}
	sh, err := e.evalShape(a)
	require.NoError(t, err)
	links, err := robot.Links(a, nil)
	require.NoError(t, err)
	for _, g := range [][3]float64{{0, -9.81, 0}, {9.81, 0, 0}, {0, 0, 9.81}} {
		dp, _, err := statics.LinearTipDeflection(links, statics.Load{Gravity: g, TipForce: [3]float64{0.05 * g[0], 0.05 * g[1], 0.05 * g[2]}})
		require.NoError(t, err)
		for i := range 3 {
			got := sh.comp[i][0]*g[0] + sh.comp[i][1]*g[1] + sh.comp[i][2]*g[2]
			assert.InDelta(t, dp[i], got, 2e-4*math.Max(1e-6, norm(dp)), "component %d for g=%v", i, g)
		}
	}
}

func norm(v [3]float64) float64 { return math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2]) }

// TestMeasuredEqualsGeometry: a design given by geometry and the same
// design given by the stiffness the surrogate computes for it must score
// the same (the scores depend on the stiffness only).
func TestMeasuredEqualsGeometry(t *testing.T) {
	petg, ok := surrogate.LookupMaterial("petg")
	require.True(t, ok)
	geo := func(od, depth, pitch float64) *surrogate.Bellows {
		return &surrogate.Bellows{Geometry: surrogate.Geometry{OuterDiameter: od, Depth: depth, Pitch: pitch, Wall: 0.6e-3}, Material: petg}
	}
	g := &Design{Bellows: []Bellows{
		{Model: geo(20e-3, 2.4e-3, 8e-3), StraightLength: 0.15, CurvedLength: 0.11, Precurvature: [2]float64{0, 8}},
		{Model: geo(30e-3, 3e-3, 10e-3), StraightLength: 0.15, CurvedLength: 0.10, Precurvature: [2]float64{0, 4}},
	}}
	st, err := g.Stiffness()
	require.NoError(t, err)
	m := &Design{}
	for i, b := range g.Bellows {
		m.Bellows = append(m.Bellows, Bellows{StraightLength: b.StraightLength, CurvedLength: b.CurvedLength, Precurvature: b.Precurvature,
			Measured: &Measured{EI: [2]float64{st[i].EI[0][0], st[i].EI[1][1]}, GJ: st[i].GJ, LinearDensity: st[i].LinearDensity, OuterDiameter: b.Model.OuterDiameter}})
	}
	sc := &Scenario{Load: Load{PayloadMass: 0.02}}
	rg, err := Evaluate(g, sc)
	require.NoError(t, err)
	rm, err := Evaluate(m, sc)
	require.NoError(t, err)
	a, b := rg.Scores, rm.Scores
	for _, c := range []struct {
		name string
		x, y float64
	}{
		{"tip sag", a.TipSag, b.TipSag}, {"linear sag", a.TipSagLinear, b.TipSagLinear}, {"reach", a.Reach, b.Reach},
		{"bend range", a.BendAngleRange, b.BendAngleRange}, {"residual curvature", a.ResidualCurvature, b.ResidualCurvature},
		{"straight offset", a.StraightTipOffset, b.StraightTipOffset}, {"surface", a.SurfaceArea, b.SurfaceArea},
		{"stability", a.StabilityMargin, b.StabilityMargin}, {"mass", a.Mass, b.Mass},
	} {
		assert.InDelta(t, c.x, c.y, 1e-12*math.Max(1, math.Abs(c.x)), "%s: geometry vs measured", c.name)
	}
	assert.Equal(t, SourceMeasured, rm.Bellows[0].Source)
	assert.True(t, math.IsNaN(b.PeakStrain), "measured stiffness has no wall model")
	assert.False(t, math.IsNaN(a.PeakStrain), "geometry has a wall model")
}

// TestSagAgainstElasticaLimit: a straight horizontal cantilever under a
// small tip payload sags PL³/(3EI) (Roark Table 8.1 case 1a, a = 0); the
// exact model agrees to second order in the load.
func TestSagAgainstElasticaLimit(t *testing.T) {
	const L, EI = 0.2, 2.0
	d := &Design{Bellows: []Bellows{measuredBellows(L, 0, 0, EI, 50, 0)}}
	sc := &Scenario{Load: Load{PayloadMass: 0.001, Gravity: [3]float64{0, -9.80665, 0}}}
	res, err := Evaluate(d, sc)
	require.NoError(t, err)
	P := 0.001 * 9.80665
	want := P * L * L * L / (3 * EI)
	assert.InEpsilon(t, want, res.Scores.TipSag, 1e-4, "exact sag at small load")
	assert.InEpsilon(t, want, res.Scores.TipSagLinear, 1e-4, "linear sag")
}

func BenchmarkEvaluateTwoBellows(b *testing.B) {
	d := &Design{Bellows: []Bellows{
		measuredBellows(0.15, 0.11, 9, 0.6, 30, 0.02),
		measuredBellows(0.15, 0.10, 4, 1.1, 45, 0.03),
	}}
	sc := &Scenario{Load: Load{PayloadMass: 0.05}, Workspace: Workspace{RelativeSteps: 64, BaseSteps: 64}}
	benchEvaluate(b, d, sc)
}

// TestThreadedPair: a helical inner bellows threaded into the outer one,
// with an insertion range, has three actuation parameters (so a voxel
// volume), a thread clearance check at crown and root, and a lead check;
// the clearances follow from the diameters (derived: crest gap
// (30/2 − 0.6) − 28/2 = 0.4 mm, root gap (30/2 − 3 − 0.6) − (28/2 − 3) =
// 0.4 mm).
func TestThreadedPair(t *testing.T) {
	petg, ok := surrogate.LookupMaterial("petg")
	require.True(t, ok)
	geo := func(od, wall float64) *surrogate.Bellows {
		return &surrogate.Bellows{Geometry: surrogate.Geometry{OuterDiameter: od, Depth: 3e-3, Pitch: 10e-3, Wall: wall, Helical: true}, Material: petg}
	}
	d := &Design{Bellows: []Bellows{
		{Model: geo(28e-3, 0.5e-3), StraightLength: 0.15, CurvedLength: 0.1, Precurvature: [2]float64{0, 3}, ThreadLead: 10e-3},
		{Model: geo(30e-3, 0.6e-3), StraightLength: 0.14, CurvedLength: 0.1, Precurvature: [2]float64{0, 2}},
	}}
	sc := &Scenario{Load: Load{NoGravity: true}, Workspace: Workspace{RelativeSteps: 16, BaseSteps: 8, InsertionSteps: 4,
		Insertion: [][2]float64{{-0.02, 0}, {0, 0}}}}
	res, err := Evaluate(d, sc)
	require.NoError(t, err)
	assert.Equal(t, 3, res.Scores.DOF, "relative rotation, common rotation, insertion")
	assert.Greater(t, res.Scores.Volume, 0.0, "voxel volume for three parameters")
	assert.InDelta(t, 0.4e-3, res.Scores.MinClearance, 1e-12, "thread clearance")
	c := findCheck(res, "thread_lead[1-2]")
	require.NotNil(t, c)
	assert.True(t, c.Pass, "lead equals the outer pitch")
	assert.Equal(t, CheckNames(d, sc), checkNames(res), "CheckNames lists the checks Evaluate makes")
}

func checkNames(r *Result) []string {
	var out []string
	for _, c := range r.Checks {
		out = append(out, c.Name)
	}
	return out
}

// TestStrainRatioMixedMaterials: with bellows of different materials the
// strain ratio is the worst ratio of a bellows' own peak strain to its own
// allowable strain, max_i ε_i/ε_allow,i (derived from the definition of the
// score), not the largest strain over the smallest allowable, which may
// belong to different bellows. A tpu inner bellows (allowable 10 %) carries
// most of the strain here, a petg outer one (2 %) the smallest allowable.
func TestStrainRatioMixedMaterials(t *testing.T) {
	tpu, ok := surrogate.LookupMaterial("tpu")
	require.True(t, ok)
	petg, ok := surrogate.LookupMaterial("petg")
	require.True(t, ok)
	geo := func(od, wall float64, m surrogate.Material) *surrogate.Bellows {
		return &surrogate.Bellows{Geometry: surrogate.Geometry{OuterDiameter: od, Depth: 3e-3, Pitch: 10e-3, Wall: wall}, Material: m}
	}
	d := &Design{Bellows: []Bellows{
		{Model: geo(20e-3, 0.5e-3, tpu), StraightLength: 0.15, CurvedLength: 0.1, Precurvature: [2]float64{0, 4}},
		{Model: geo(30e-3, 0.6e-3, petg), StraightLength: 0.15, CurvedLength: 0.1, Precurvature: [2]float64{0, 1.3}},
	}}
	sc := &Scenario{Load: Load{NoGravity: true}, Workspace: Workspace{RelativeSteps: 16, BaseSteps: 4}}
	res, err := Evaluate(d, sc)
	require.NoError(t, err)
	s := res.Scores
	want := math.Max(s.StrainPerBellows[0]/tpu.AllowableStrain, s.StrainPerBellows[1]/petg.AllowableStrain)
	ratio, ok := LookupScore("strain_ratio")
	require.True(t, ok)
	assert.InEpsilon(t, want, ratio.Value(&s), 1e-12, "strain_ratio of a tpu/petg pair (strains %v)", s.StrainPerBellows)
	assert.Less(t, ratio.Value(&s), s.PeakStrain/s.AllowableStrain, "the worst bellows' own ratio, not peak strain over the smallest allowable")
}
