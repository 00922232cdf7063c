package statics

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective/kinematics"
)

// staticsK is the composite stiffness diag(EI_x, EI_y, GJ), N·m².
func staticsK(eix, eiy, gj float64) [3][3]float64 {
	return [3][3]float64{{eix, 0, 0}, {0, eiy, 0}, {0, 0, gj}}
}

// staticsBeam is one straight link of length L.
func staticsBeam(L, EI, GJ, mass float64) []kinematics.Link {
	return []kinematics.Link{{Start: 0, End: L, K: staticsK(EI, EI, GJ), MassPerLength: mass}}
}

// staticsPlanarAngle is the tip tangent angle in the x–z plane, measured
// from +z toward +x, rad.
func staticsPlanarAngle(p kinematics.Pose) float64 { return math.Atan2(p.R[0][2], p.R[2][2]) }

// Both solution paths of Solve.
var staticsPaths = []struct {
	name string
	set  Settings
	dead bool
}{
	{"dead-load shortcut", Settings{}, true},
	{"full shooting", Settings{Shooting: true}, false},
}

// LD-1: cantilever under a dead tip load perpendicular to the straight rod.
// Source: Bisshopp & Drucker, Large Deflection of Cantilever Beams, Q. Appl.
// Math. 3, 1945 (published closed form); values from objective/statics/REFERENCE.md §5.2.
func TestElasticaLD1(t *testing.T) {
	const L, EI = 0.3, 0.02
	links := staticsBeam(L, EI, EI/1.35, 0)
	rows := []struct {
		alpha, theta, dy, dx float64 // α = PL²/EI; tip angle; δ_y/L along the load; δ_x/L shortening
	}{
		// The α = 1 tip angle is verifyLD1Angle and the α = 10 δ_y/L verifyLD1Deflection of
		// verification.go.
		{1, verifyLD1Angle.Published, 0.301721, 0.056433},
		{5, 1.215368, 0.713792, 0.387628},
		{10, 1.430286, verifyLD1Deflection.Published, 0.554996},
	}
	for _, path := range staticsPaths {
		for _, row := range rows {
			t.Run(fmt.Sprintf("%s/alpha=%g", path.name, row.alpha), func(t *testing.T) {
				P := row.alpha * EI / (L * L)
				set := path.set
				sh, err := Solve(links, Load{TipForce: [3]float64{P, 0, 0}}, &set)
				require.NoError(t, err, "elastica α=%g", row.alpha)
				assert.Equal(t, path.dead, sh.DeadLoad, "path used for α=%g", row.alpha)
				assert.Equal(t, Converged, sh.Status, "status for α=%g", row.alpha)
				// The table gives six decimals: 1e-6 absolute is half a unit in
				// the last place plus the RK4 error (100 steps); it is tighter
				// than 1e-4 relative for every entry.
				assert.InDelta(t, row.theta, staticsPlanarAngle(sh.Tip), 1e-6, "tip angle at α=%g", row.alpha)
				assert.InDelta(t, row.dy, sh.Tip.P[0]/L, 1e-6, "δ_y/L at α=%g", row.alpha)
				assert.InDelta(t, row.dx, 1-sh.Tip.P[2]/L, 1e-6, "δ_x/L at α=%g", row.alpha)
				assert.InDelta(t, 0, sh.Tip.P[1], 1e-12, "out-of-plane tip displacement at α=%g", row.alpha)
				// Global equilibrium of the free body [derived]: n(0) = P,
				// m(0) = p(L) × P.
				assert.InDelta(t, P, sh.BaseForce[0], 1e-9*P, "base force at α=%g", row.alpha)
				want := cross(sh.Tip.P, [3]float64{P, 0, 0})
				assert.InDelta(t, want[1], sh.BaseMoment[1], 1e-8*P*L, "base moment at α=%g", row.alpha)
			})
		}
	}
}

// objective/statics/REFERENCE.md §5.2: the linear estimate at α = 1 gives δ/L = 1/3, 10.5 %
// above the elastica value 0.301721 (Bisshopp & Drucker 1945).
func TestElasticaLinearEstimateOvershoot(t *testing.T) {
	const L, EI = 0.3, 0.02
	P := EI / (L * L)
	dp, dphi, err := LinearTipDeflection(staticsBeam(L, EI, EI, 0), Load{TipForce: [3]float64{P, 0, 0}})
	require.NoError(t, err)
	assert.InEpsilon(t, 1.0/3, dp[0]/L, 1e-12, "linear δ/L at α=1 (PL³/3EI)")
	assert.InEpsilon(t, 0.5, dphi[1], 1e-12, "linear tip rotation at α=1 (PL²/2EI)")
	assert.InDelta(t, 0.105, (dp[0]/L)/0.301721-1, 5e-4, "linear overshoot at α=1 (objective/statics/REFERENCE.md §5.2: 10.5 %%)")
	assert.Greater(t, norm3(dp)/L, LinearDeflectionLimit, "α=1 must be flagged")
}

// Straight cantilever, small loads: Roark's Formulas for Stress and Strain,
// Table 8.1 cases 1a and 2a (Young & Budynas, 7th ed., 2002), and Gere &
// Timoshenko, Mechanics of Materials, App. G, Table G-1 cases 1 and 4 (4th
// ed., 1997); case numbers from memory, formulas objective/REFERENCE.md §6, §7.1.
func TestCantileverSmallLoad(t *testing.T) {
	const L, EI, m = 0.3, 0.02, 0.05
	const a = 0.3 * L // Roark 1a: load at distance a from the free end
	// α = PL²/EI = 1e-3: the first geometric correction of δ is O(α²) by
	// symmetry, about 1e-7 relative [derived].
	P := 1e-3 * EI / (L * L)
	g := 1e-3 * EI / (m * L * L * L) // f L³/EI = 1e-3
	f := m * g
	rows := []struct {
		name         string
		links        []kinematics.Link
		load         Load
		delta, theta float64 // tip deflection along +x, tip rotation about +y; theta NaN if not checked
	}{
		{"G&T G-1 case 4 and Roark 1a (a=0): end load", staticsBeam(L, EI, EI/1.3, 0),
			Load{TipForce: [3]float64{P, 0, 0}}, P * L * L * L / (3 * EI), P * L * L / (2 * EI)},
		{"Roark 1a: load at a=0.3L from the free end", staticsBeam(L, EI, EI/1.3, 0),
			Load{PointForces: []PointForce{{S: L - a, Force: [3]float64{P, 0, 0}}}},
			P * (2*L*L*L - 3*L*L*a + a*a*a) / (6 * EI), math.NaN()},
		{"G&T G-1 case 1 and Roark 2a: uniform load (self-weight)", staticsBeam(L, EI, EI/1.3, m),
			Load{Gravity: [3]float64{g, 0, 0}}, f * L * L * L * L / (8 * EI), f * L * L * L / (6 * EI)},
	}
	for _, row := range rows {
		t.Run(row.name+"/linear estimate", func(t *testing.T) {
			dp, dphi, err := LinearTipDeflection(row.links, row.load)
			require.NoError(t, err, row.name)
			// objective/statics/REFERENCE.md §5.1: 1e-9 for closed forms (the integrands are
			// polynomials that RK4 integrates exactly).
			assert.InEpsilon(t, row.delta, dp[0], 1e-9, "%s: δ", row.name)
			if !math.IsNaN(row.theta) {
				assert.InEpsilon(t, row.theta, dphi[1], 1e-9, "%s: θ", row.name)
			}
			assert.InDelta(t, 0, dp[1], 1e-15, "%s: δ_y", row.name)
		})
		for _, path := range staticsPaths {
			t.Run(row.name+"/"+path.name, func(t *testing.T) {
				set := path.set
				set.Tolerance = 1e-13
				sh, err := Solve(row.links, row.load, &set)
				require.NoError(t, err, row.name)
				// 1e-6: the O(α²) geometric correction at α = 1e-3 plus the
				// solver tolerance [derived].
				assert.InEpsilon(t, row.delta, sh.Tip.P[0], 1e-6, "%s: δ", row.name)
				if !math.IsNaN(row.theta) {
					assert.InEpsilon(t, row.theta, staticsPlanarAngle(sh.Tip), 1e-6, "%s: θ", row.name)
				}
			})
		}
	}
}

// Two links of different stiffness, tip load P. By superposition [derived
// from Gere & Timoshenko, Table G-1, case 4 (end load: PL³/3EI, PL²/2EI) and
// case 6 (end moment M: ML²/2EI, ML/EI)]: the distal link (length b, EI2)
// deflects as a cantilever, Pb³/(3EI2) and slope Pb²/(2EI2). The proximal
// link (length a, EI1) carries P and the moment Pb at its end: deflection
// Pa³/(3EI1) + Pb·a²/(2EI1), slope Pa²/(2EI1) + Pb·a/EI1, and its end slope
// swings the distal link rigidly by slope·b. Altogether
//
//	δ = P/EI1·(a³/3 + a²b + ab²) + Pb³/(3EI2),  θ = P/(2EI1)·(a² + 2ab) + Pb²/(2EI2).
//
// A point force at the joint (s = a) gives Pa³/(3EI1) + Pa²b/(2EI1) at the tip.
func TestCantileverPiecewiseStiffness(t *testing.T) {
	const a, b, EI1, EI2 = 0.12, 0.18, 0.05, 0.01
	links := []kinematics.Link{
		{Start: 0, End: a, K: staticsK(EI1, EI1, EI1/1.3)},
		{Start: a, End: a + b, K: staticsK(EI2, EI2, EI2/1.3)},
	}
	P := 1e-3 * EI2 / ((a + b) * (a + b))
	rows := []struct {
		name         string
		load         Load
		delta, theta float64
	}{
		{"tip load", Load{TipForce: [3]float64{P, 0, 0}},
			P/EI1*(a*a*a/3+a*a*b+a*b*b) + P*b*b*b/(3*EI2), P/(2*EI1)*(a*a+2*a*b) + P*b*b/(2*EI2)},
		{"point load at the joint", Load{PointForces: []PointForce{{S: a, Force: [3]float64{P, 0, 0}}}},
			P*a*a*a/(3*EI1) + P*a*a*b/(2*EI1), P * a * a / (2 * EI1)},
	}
	for _, row := range rows {
		dp, dphi, err := LinearTipDeflection(links, row.load)
		require.NoError(t, err, row.name)
		assert.InEpsilon(t, row.delta, dp[0], 1e-9, "linear estimate, %s: δ", row.name)
		assert.InEpsilon(t, row.theta, dphi[1], 1e-9, "linear estimate, %s: θ", row.name)
		for _, path := range staticsPaths {
			set := path.set
			set.Tolerance = 1e-13
			sh, err := Solve(links, row.load, &set)
			require.NoError(t, err, "%s, %s", row.name, path.name)
			assert.InEpsilon(t, row.delta, sh.Tip.P[0], 1e-6, "%s, %s: δ", path.name, row.name)
			assert.InEpsilon(t, row.theta, staticsPlanarAngle(sh.Tip), 1e-6, "%s, %s: θ", path.name, row.name)
		}
	}
}

// Quarter-circle cantilever of radius R, clamped at the base with tangent
// +z and curved toward +x (u* = (0, 1/R, 0)): p(φ) = R(1 − cos φ, 0, sin φ),
// φ = s/R ∈ [0, π/2], tip at (R, 0, R) with tangent +x. Castigliano's
// second theorem, bending (and torsion) energy only, inextensible
// [derived; the classical curved-bar results, e.g. Timoshenko, Strength of
// Materials, Part I, 1955, from memory]. The moment of a tip force
// F about the section at φ is M(φ) = (p(L) − p(φ)) × F with
// p(L) − p(φ) = R(cos φ, 0, 1 − sin φ):
//
//   - F = P e_z (in-plane, normal to the tip tangent): M = (0, −PR cos φ, 0),
//     δ_z = ∫ M_y²/(P EI) R dφ = PR³/EI ∫cos²φ dφ = πPR³/(4EI).
//   - F = P e_x (in-plane, along the tip tangent): M = (0, PR(1 − sin φ), 0),
//     δ_x = PR³/EI ∫(1 − sin φ)² dφ = (3π/4 − 2) PR³/EI.
//   - cross term: δ_x under P e_z = δ_z under P e_x
//     = −PR³/EI ∫cos φ (1 − sin φ) dφ = −PR³/(2EI).
//   - F = P e_y (out of plane): M = PR(−(1 − sin φ), 0, cos φ); in the body
//     frame d1 = (cos φ, 0, −sin φ), d3 = (sin φ, 0, cos φ) this is bending
//     M·d1 = −PR cos φ (about d1, EI_x) and torsion M·d3 = PR(1 − sin φ), so
//     δ_y = PR³ [π/(4EI) + (3π/4 − 2)/GJ].
func TestCastiglianoQuarterCircle(t *testing.T) {
	const R, EI, GJ = 0.1, 0.02, 0.012
	L := math.Pi * R / 2
	links := []kinematics.Link{{Start: 0, End: L, U: [3]float64{0, 1 / R, 0}, K: staticsK(EI, EI, GJ)}}
	c := R * R * R / EI
	rows := []struct {
		name string
		dir  [3]float64
		want [3]float64 // tip displacement per unit force, m/N
	}{
		{"in-plane, normal to the tip tangent (e_z)", [3]float64{0, 0, 1}, [3]float64{-c / 2, 0, math.Pi / 4 * c}},
		{"in-plane, along the tip tangent (e_x)", [3]float64{1, 0, 0}, [3]float64{(3*math.Pi/4 - 2) * c, 0, -c / 2}},
		{"out of plane with torsion (e_y)", [3]float64{0, 1, 0},
			[3]float64{0, R * R * R * (math.Pi/(4*EI) + (3*math.Pi/4-2)/GJ), 0}},
	}
	P := 1e-4 * EI / (L * L)
	unloaded, err := Solve(links, Load{}, nil)
	require.NoError(t, err)
	require.InDelta(t, R, unloaded.Tip.P[0], 1e-9, "unloaded tip x")
	require.InDelta(t, R, unloaded.Tip.P[2], 1e-9, "unloaded tip z")
	for _, row := range rows {
		t.Run(row.name, func(t *testing.T) {
			scale := norm3(row.want)
			dp, _, err := LinearTipDeflection(links, Load{TipForce: scale3(row.dir, P)})
			require.NoError(t, err, row.name)
			for i := range 3 {
				// 1e-9 of the largest component: objective/statics/REFERENCE.md §5.1 closed forms.
				assert.InDelta(t, row.want[i], dp[i]/P, 1e-9*scale, "linear estimate %s, component %d", row.name, i)
			}
			for _, path := range staticsPaths {
				set := path.set
				set.Tolerance = 1e-13
				plus, err := Solve(links, Load{TipForce: scale3(row.dir, P)}, &set)
				require.NoError(t, err, "%s, %s", row.name, path.name)
				minus, err := Solve(links, Load{TipForce: scale3(row.dir, -P)}, &set)
				require.NoError(t, err, "%s, %s", row.name, path.name)
				// Central difference in the load: the O(P²) terms cancel, so at
				// PL²/EI = 1e-4 the nonlinear compliance matches to ~1e-8;
				// 1e-6 allows the RK4 error of 100 steps [derived].
				for i := range 3 {
					got := (plus.Tip.P[i] - minus.Tip.P[i]) / (2 * P)
					assert.InDelta(t, row.want[i], got, 1e-6*scale, "%s, %s, component %d", path.name, row.name, i)
				}
			}
		})
	}
}

// To first order a follower tip force equals the dead force it applies in
// the unloaded tip frame [derived: the difference is the load times the
// tip rotation, second order]. On the quarter circle of
// TestCastiglianoQuarterCircle the tip frame has d1 = −e_z, so a follower
// force P d1 has the compliance of a dead force −P e_z: tip displacement
// P(R³/(2EI), 0, −πR³/(4EI)) (Castigliano, derived there).
func TestStaticsFollowerForceSmallLoad(t *testing.T) {
	const R, EI, GJ = 0.1, 0.02, 0.012
	L := math.Pi * R / 2
	links := []kinematics.Link{{Start: 0, End: L, U: [3]float64{0, 1 / R, 0}, K: staticsK(EI, EI, GJ)}}
	c := R * R * R / EI
	want := [3]float64{c / 2, 0, -math.Pi / 4 * c}
	P := 1e-4 * EI / (L * L)
	set := &Settings{Tolerance: 1e-13}
	plus, err := Solve(links, Load{FollowerForce: [3]float64{P, 0, 0}}, set)
	require.NoError(t, err)
	assert.False(t, plus.DeadLoad, "follower loads need the full shooting")
	minus, err := Solve(links, Load{FollowerForce: [3]float64{-P, 0, 0}}, set)
	require.NoError(t, err)
	dp, _, err := LinearTipDeflection(links, Load{FollowerForce: [3]float64{P, 0, 0}})
	require.NoError(t, err)
	for i := range 3 {
		got := (plus.Tip.P[i] - minus.Tip.P[i]) / (2 * P)
		assert.InDelta(t, want[i], got, 1e-6*norm3(want), "follower force, nonlinear, component %d", i)
		assert.InDelta(t, want[i], dp[i]/P, 1e-9*norm3(want), "follower force, linear estimate, component %d", i)
	}
}

// RK4 is fourth order (Kutta 1901; Butcher, Numerical Methods for Ordinary
// Differential Equations, 2008, from memory): halving h divides
// the error by 2⁴ = 16. The observed order uses successive differences of
// the tip position on grids h, h/2, h/4, … (Richardson; Roache,
// Verification and Validation in Computational Science and Engineering,
// 1998, from memory), so no reference solution is needed.
func TestStaticsRK4Order(t *testing.T) {
	// Two precurved anisotropic links under gravity and a tip force, with
	// large loaded curvature so the error is well above the solver tolerance.
	links := []kinematics.Link{
		{Start: 0, End: 0.1, U: [3]float64{-2, 5, 0}, K: [3][3]float64{{0.02, 0.004, 0}, {0.004, 0.03, 0}, {0, 0, 0.015}}, MassPerLength: 0.1},
		{Start: 0.1, End: 0.25, U: [3]float64{0, 12, 1}, K: staticsK(0.008, 0.012, 0.006), MassPerLength: 0.05},
	}
	load := Load{TipForce: [3]float64{0.3, 0.2, -0.1}, TipMoment: [3]float64{0, 0.01, 0.002}, Gravity: [3]float64{0, -9.81, 0}}
	for _, path := range staticsPaths {
		var tips [][3]float64
		for _, res := range []int{10, 20, 40, 80, 160} {
			set := path.set
			set.Resolution, set.MinLinkSteps, set.MaxStepAngle, set.Tolerance = res, 1, -1, 1e-14
			sh, err := Solve(links, load, &set)
			require.NoError(t, err, "%s, resolution %d", path.name, res)
			tips = append(tips, sh.Tip.P)
		}
		for k := 0; k+2 < len(tips); k++ {
			ratio := norm3(sub(tips[k], tips[k+1])) / norm3(sub(tips[k+1], tips[k+2]))
			t.Logf("%s: error ratio %.4g", path.name, ratio)
			// objective/statics/REFERENCE.md §2: ≈ 16 per halving; (14, 18) tells fourth order
			// from third (8) and fifth (32) and allows pre-asymptotic grids.
			assert.True(t, ratio > 14 && ratio < 18, "%s: error ratio %.3g between resolutions %d and %d (want ≈ 16)",
				path.name, ratio, 10<<k, 20<<k)
		}
	}
}

// A pure end moment bends a straight rod into a circle of curvature M/EI
// (Euler–Bernoulli moment–curvature relation, common practice); the arc is
// p = ((1 − cos κL)/κ, 0, sin κL/κ), R = R_y(κL) (objective/kinematics/REFERENCE.md §3.3, planar
// case). This is exact at any size, and the same for a follower moment about
// the tip's d2 = e_y. A moment −EI κ* about y cancels a precurvature κ*
// (u = u* + K⁻¹Rᵀm = 0), so the rod comes out straight.
func TestStaticsPureMoment(t *testing.T) {
	const L, EI = 0.3, 0.02
	straight := staticsBeam(L, EI, EI/1.3, 0)
	curved := []kinematics.Link{{Start: 0, End: L, U: [3]float64{0, 8, 0}, K: staticsK(EI, EI, EI/1.3)}}
	arc := func(k float64) [3]float64 {
		return [3]float64{(1 - math.Cos(k*L)) / k, 0, math.Sin(k*L) / k}
	}
	const M = 2 * EI / L // κL = 2 rad
	rows := []struct {
		name  string
		links []kinematics.Link
		load  Load
		set   Settings
		want  [3]float64
		angle float64
		dead  bool
		tol   float64 // rad; position tolerance tol·L
	}{
		// RK4 on R' = Rû with constant u errs by x⁵/120 per step, x = h|u|
		// [derived from the Taylor series of exp]: κL = 2 in 100 steps
		// gives ~3e-9 rad in all.
		{"dead moment, dead-load shortcut", straight, Load{TipMoment: [3]float64{0, M, 0}}, Settings{}, arc(M / EI), 2, true, 1e-8},
		{"dead moment, full shooting", straight, Load{TipMoment: [3]float64{0, M, 0}}, Settings{Shooting: true}, arc(M / EI), 2, false, 1e-8},
		{"follower moment", straight, Load{FollowerMoment: [3]float64{0, M, 0}}, Settings{}, arc(M / EI), 2, false, 1e-8},
		{"moment straightening a precurved rod", curved, Load{TipMoment: [3]float64{0, -8 * EI, 0}}, Settings{}, [3]float64{0, 0, L}, 0, true, 1e-8},
		// κL = 30 with x ≤ 0.1: κL·x⁴/120 ≈ 2.5e-5 rad.
		{"curvature 100/m, grid refined by the step-angle rule", straight, Load{TipMoment: [3]float64{0, 100 * EI, 0}}, Settings{}, arc(100), math.Remainder(100*L, 2*math.Pi), true, 3e-5},
	}
	for _, row := range rows {
		t.Run(row.name, func(t *testing.T) {
			set := row.set
			sh, err := Solve(row.links, row.load, &set)
			require.NoError(t, err, row.name)
			assert.Equal(t, row.dead, sh.DeadLoad, "path of %s", row.name)
			for i := range 3 {
				assert.InDelta(t, row.want[i], sh.Tip.P[i], row.tol*L, "%s: tip component %d", row.name, i)
			}
			assert.InDelta(t, row.angle, staticsPlanarAngle(sh.Tip), row.tol, "%s: tip angle", row.name)
			for k := 1; k < len(sh.Samples); k++ {
				a, b := sh.Samples[k-1], sh.Samples[k]
				h := b.S - a.S
				assert.LessOrEqual(t, h*norm3(b.U), 0.1*(1+1e-6), "%s: step %d breaks h|u| ≤ 0.1", row.name, k)
			}
		})
	}
}

// Non-convergence is reported, never returned as a shape (objective/statics/REFERENCE.md §2).
func TestStaticsNonConvergence(t *testing.T) {
	const L, EI = 0.3, 0.02
	links := staticsBeam(L, EI, EI/1.3, 0)
	absurd := Load{TipForce: [3]float64{1e6 * EI / (L * L), 0, 0}}
	rows := []struct {
		name string
		load Load
		set  Settings
	}{
		{"dead-load shortcut, 1 iteration", absurd, Settings{MaxIterations: 1}},
		{"full shooting, 1 iteration", absurd, Settings{MaxIterations: 1, Shooting: true}},
		{"no continuation, 1 iteration", absurd, Settings{MaxIterations: 1, ContinuationSteps: -1}},
		{"α = 5 with continuation disabled", Load{TipForce: [3]float64{5 * EI / (L * L), 0, 0}}, Settings{ContinuationSteps: -1, MaxIterations: 2}},
	}
	for _, row := range rows {
		set := row.set
		sh, err := Solve(links, row.load, &set)
		assert.Nil(t, sh, "%s: no shape on failure", row.name)
		require.Error(t, err, row.name)
		assert.ErrorIs(t, err, ErrNotConverged, row.name)
		var se *Error
		require.ErrorAs(t, err, &se, row.name)
		assert.NotEqual(t, Converged, se.Status, row.name)
		assert.Greater(t, se.Residual, 1e-10, "%s: residual", row.name)
		_, _, err = TipSag(links, row.load, &set)
		assert.ErrorIs(t, err, ErrNotConverged, "TipSag, %s", row.name)
	}
}

// Continuation rescues a direct solve that stalls (objective/statics/REFERENCE.md §2): at
// α = 5 the rigid-body guess lies past the fold of the dead-load shooting
// map. The result is still LD-1 (Bisshopp & Drucker 1945).
func TestStaticsContinuation(t *testing.T) {
	const L, EI = 0.3, 0.02
	sh, err := Solve(staticsBeam(L, EI, EI/1.3, 0), Load{TipForce: [3]float64{5 * EI / (L * L), 0, 0}}, nil)
	require.NoError(t, err)
	assert.Positive(t, sh.ContinuationSteps, "α=5 needs continuation from the rigid guess")
	assert.InDelta(t, 0.713792, sh.Tip.P[0]/L, 1e-6, "δ_y/L at α=5")
}

func TestStaticsInvalidInput(t *testing.T) {
	good := staticsBeam(0.3, 0.02, 0.015, 0.01)
	rows := []struct {
		name  string
		links []kinematics.Link
		load  Load
	}{
		{"no links", nil, Load{}},
		{"first link not at the base", []kinematics.Link{{Start: 0.01, End: 0.3, K: staticsK(1, 1, 1)}}, Load{}},
		{"gap between links", []kinematics.Link{{Start: 0, End: 0.1, K: staticsK(1, 1, 1)}, {Start: 0.2, End: 0.3, K: staticsK(1, 1, 1)}}, Load{}},
		{"empty link", []kinematics.Link{{Start: 0, End: 0.1, K: staticsK(1, 1, 1)}, {Start: 0.1, End: 0.1, K: staticsK(1, 1, 1)}}, Load{}},
		{"stiffness not positive definite", []kinematics.Link{{Start: 0, End: 0.1, K: staticsK(1, 0, 1)}}, Load{}},
		{"stiffness not symmetric", []kinematics.Link{{Start: 0, End: 0.1, K: [3][3]float64{{1, 0.5, 0}, {0, 1, 0}, {0, 0, 1}}}}, Load{}},
		{"negative mass", []kinematics.Link{{Start: 0, End: 0.1, K: staticsK(1, 1, 1), MassPerLength: -1}}, Load{}},
		{"point force at the base", good, Load{PointForces: []PointForce{{S: 0, Force: [3]float64{1, 0, 0}}}}},
		{"point force beyond the tip", good, Load{PointForces: []PointForce{{S: 0.31, Force: [3]float64{1, 0, 0}}}}},
		{"NaN tip force", good, Load{TipForce: [3]float64{math.NaN(), 0, 0}}},
		{"infinite gravity", good, Load{Gravity: [3]float64{0, math.Inf(-1), 0}}},
	}
	for _, row := range rows {
		sh, err := Solve(row.links, row.load, nil)
		assert.Nil(t, sh, row.name)
		require.Error(t, err, row.name)
		assert.NotErrorIs(t, err, ErrNotConverged, "%s is an input error", row.name)
		_, _, err = LinearTipDeflection(row.links, row.load)
		assert.Error(t, err, "LinearTipDeflection, %s", row.name)
	}
}

// Tip sag under self-weight: Gere & Timoshenko, Table G-1, case 1
// (δ = fL⁴/8EI) at small load; zero without gravity; with an extra tip
// force the sag still equals the gravity-only linear deflection to first
// order (superposition, objective/REFERENCE.md §6).
func TestTipSag(t *testing.T) {
	const L, EI, m = 0.3, 0.02, 0.05
	g := 1e-3 * EI / (m * L * L * L)
	beam := staticsBeam(L, EI, EI/1.3, m)
	sag, sh, err := TipSag(beam, Load{Gravity: [3]float64{0, -g, 0}}, &Settings{Tolerance: 1e-13})
	require.NoError(t, err)
	require.NotNil(t, sh)
	assert.InEpsilon(t, m*g*L*L*L*L/(8*EI), sag, 1e-6, "sag of a straight cantilever (fL⁴/8EI)")
	assert.InEpsilon(t, -m*g*L*L*L*L/(8*EI), sh.Tip.P[1], 1e-6, "tip y of the loaded shape")

	sag, _, err = TipSag(beam, Load{TipForce: [3]float64{1, 0, 0}}, nil)
	require.NoError(t, err)
	assert.Equal(t, 0.0, sag, "no gravity, no sag")

	curved := []kinematics.Link{
		{Start: 0, End: 0.1, K: staticsK(0.03, 0.03, 0.02), MassPerLength: 0.08},
		{Start: 0.1, End: 0.25, U: [3]float64{0, 4, 0}, K: staticsK(0.01, 0.01, 0.008), MassPerLength: 0.04},
	}
	grav := [3]float64{-1e-3, 0, 0} // small, so second-order terms stay ~1e-3 relative
	load := Load{Gravity: grav, TipForce: [3]float64{0, 1e-4, 0}}
	sag, _, err = TipSag(curved, load, &Settings{Tolerance: 1e-13})
	require.NoError(t, err)
	dp, _, err := LinearTipDeflection(curved, Load{Gravity: grav})
	require.NoError(t, err)
	assert.InEpsilon(t, -dp[0], sag, 1e-3, "sag of a precurved two-link rod vs linear gravity deflection")
}

// Samples run from the clamp to the tip, and with no load the curvature is
// the link precurvature, the base loads vanish and no iteration is needed.
func TestStaticsSamples(t *testing.T) {
	links := []kinematics.Link{
		{Start: 0, End: 0.05, K: staticsK(0.03, 0.03, 0.02), MassPerLength: 0.08},
		{Start: 0.05, End: 0.2, U: [3]float64{-3, 4, 0}, K: staticsK(0.01, 0.02, 0.008), MassPerLength: 0.04},
	}
	sh, err := Solve(links, Load{}, nil)
	require.NoError(t, err)
	assert.Equal(t, 0, sh.Iterations, "unloaded: the rigid guess is exact")
	assert.Equal(t, [3]float64{}, sh.BaseForce, "unloaded base force")
	assert.Equal(t, [3]float64{}, sh.BaseMoment, "unloaded base moment")
	require.NotEmpty(t, sh.Samples)
	assert.Equal(t, 0.0, sh.Samples[0].S, "first sample at the base")
	assert.Equal(t, [3][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}}, sh.Samples[0].Pose.R, "base frame")
	last := sh.Samples[len(sh.Samples)-1]
	assert.Equal(t, 0.2, last.S, "last sample at the tip")
	assert.Equal(t, sh.Tip, last.Pose, "last sample is the tip")
	// N_j = max(10, ceil(100 l_j/L)): 25 and 75 steps, plus one start node per link.
	assert.Len(t, sh.Samples, 25+75+2, "sample count")
	for k, smp := range sh.Samples {
		if k > 0 {
			assert.GreaterOrEqual(t, smp.S, sh.Samples[k-1].S, "sample %d order", k)
		}
		want := links[0].U
		if smp.S > 0.05 || (smp.S == 0.05 && k > 0 && sh.Samples[k-1].S == 0.05) {
			want = links[1].U
		}
		assert.Equal(t, want, smp.U, "unloaded curvature at sample %d (s=%g)", k, smp.S)
	}
}

// SolveRobot runs on the links of Robot.Links; unloaded, its tip matches
// the closed-form chain of link transforms (Robot.Tip) to the RK4 error.
// Geometry SEG-1 (objective/kinematics/REFERENCE.md §5.4), stiffness scaled to bellows values.
func TestRobotStatics(t *testing.T) {
	r := staticsTwoTubeRobot()
	for _, th := range [][]float64{{0, 0}, {0, math.Pi}, {0.4, -1.1}} {
		a := kinematics.Actuation{Theta: th, Beta: []float64{-0.25, -0.10}}
		sh, err := SolveRobot(r, a, Load{}, nil)
		require.NoError(t, err, "θ=%v", th)
		tip, err := r.Tip(a)
		require.NoError(t, err, "θ=%v", th)
		for i := range 3 {
			assert.InDelta(t, tip.P[i], sh.Tip.P[i], 1e-10, "unloaded tip position θ=%v component %d", th, i)
			for j := range 3 {
				assert.InDelta(t, tip.R[i][j], sh.Tip.R[i][j], 1e-9, "unloaded tip rotation θ=%v (%d,%d)", th, i, j)
			}
		}
		load := Load{Gravity: [3]float64{-9.81, 0, 0}, TipForce: [3]float64{0, 0.05, 0}}
		links, err := r.Links(a, nil)
		require.NoError(t, err)
		want, err := Solve(links, load, nil)
		require.NoError(t, err)
		got, err := SolveRobot(r, a, load, nil)
		require.NoError(t, err)
		assert.Equal(t, want.Tip, got.Tip, "SolveRobot = Solve(Robot.Links) at θ=%v", th)
		sag, _, err := RobotTipSag(r, a, load, nil)
		require.NoError(t, err)
		wantSag, _, err := TipSag(links, load, nil)
		require.NoError(t, err)
		assert.Equal(t, wantSag, sag, "RobotTipSag = TipSag(Robot.Links) at θ=%v", th)
	}
	_, err := SolveRobot(r, kinematics.Actuation{Theta: []float64{0}, Beta: []float64{0}}, Load{}, nil)
	assert.Error(t, err, "actuation of the wrong length")
}

// staticsTwoTubeRobot is SEG-1's geometry (objective/kinematics/REFERENCE.md §5.4) with printed
// bellows stiffness and mass (demo values).
func staticsTwoTubeRobot() *kinematics.Robot {
	return &kinematics.Robot{Tubes: []kinematics.Tube{
		{StraightLength: 0.35, CurvedLength: 0.10, Precurvature: [2]float64{0, 10},
			Bending: [2][2]float64{{0.004, 0}, {0, 0.004}}, Torsion: 0.003, LinearDensity: 0.015},
		{StraightLength: 0.15, CurvedLength: 0.10, Precurvature: [2]float64{0, 5},
			Bending: [2][2]float64{{0.012, 0}, {0, 0.008}}, Torsion: 0.009, LinearDensity: 0.03},
	}}
}

// Status strings name each outcome.
func TestStatusString(t *testing.T) {
	for s, want := range map[Status]string{
		Converged: "converged", IterationLimit: "iteration limit",
		Stalled: "stalled", NonFinite: "non-finite state", Status(9): "Status(9)",
	} {
		assert.Equal(t, want, s.String(), "status %d", int(s))
	}
	err := &Error{Status: Stalled, Iterations: 7, Residual: 0.25, LoadFactor: 1}
	assert.Equal(t, "the rod statics did not converge: stalled after 7 iterations at 1 of the load (residual 0.25)", err.Error())
	assert.True(t, errors.Is(err, ErrNotConverged), "Error wraps ErrNotConverged")
}

// Solve keeps no shared state: concurrent solves of the same input
// give bit-identical shapes (the cases run concurrently).
func TestStaticsConcurrent(t *testing.T) {
	r := staticsTwoTubeRobot()
	a := kinematics.Actuation{Theta: []float64{0.4, -1.1}, Beta: []float64{-0.25, -0.10}}
	links, err := r.Links(a, nil)
	require.NoError(t, err)
	load := Load{Gravity: [3]float64{-9.81, 0, 0}, TipForce: [3]float64{0, 0.2, 0.1},
		PointForces: []PointForce{{S: 0.12, Force: [3]float64{0.05, 0, 0}}}}
	want, err := Solve(links, load, nil)
	require.NoError(t, err)
	const workers = 5
	got := make([]*Shape, workers)
	errs := make([]error, workers)
	done := make(chan struct{})
	for w := range workers {
		go func() {
			got[w], errs[w] = Solve(links, load, nil)
			done <- struct{}{}
		}()
	}
	for range workers {
		<-done
	}
	for w := range workers {
		require.NoError(t, errs[w], "worker %d", w)
		assert.Equal(t, want.Tip, got[w].Tip, "worker %d tip", w)
		assert.Equal(t, want.Samples, got[w].Samples, "worker %d samples", w)
	}
}
