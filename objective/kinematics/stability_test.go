package kinematics

import (
	"fmt"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// stabilityTube is a tube with a planar precurvature κ (default convention
// u* = (0, κ)), isotropic bending EI and torsion GJ.
func stabilityTube(kappa, EI, GJ float64) Tube {
	return Tube{CurvedLength: 0.1, Precurvature: [2]float64{0, kappa},
		Bending: [2][2]float64{{EI, 0}, {0, EI}}, Torsion: GJ}
}

// stabilityNitinol is a plain superelastic tube, E = 60 GPa, ν = 0.3:
// EI = E π(OD⁴ − ID⁴)/64, GJ = EI/(1 + ν) (objective/kinematics/REFERENCE.md §1.2).
func stabilityNitinol(od, id, kappa float64) Tube {
	const E, nu = 60e9, 0.3
	EI := E * math.Pi * (math.Pow(od, 4) - math.Pow(id, 4)) / 64
	return stabilityTube(kappa, EI, EI/(1+nu))
}

// ST-1 (objective/kinematics/REFERENCE.md §5.5): ν = 0.3, κ1 = κ2 = 10 /m → c = (1+ν)κ1κ2 = 130 /m²,
// independent of EI. Source: the form c = (1+ν)κ1κ2 is published (Dupont et
// al. 2010; Gilbert, Hendrick & Webster 2016; from memory); the
// numbers derived from (4.1).
func TestTwistCoefficientST1(t *testing.T) {
	rows := []struct {
		name         string
		inner, outer Tube
		want         float64
	}{
		{"ST-1, equal tubes", stabilityTube(10, 1, 1/1.3), stabilityTube(10, 1, 1/1.3), 130},
		{"ST-1, stiffness ratio 7", stabilityTube(10, 1, 1/1.3), stabilityTube(10, 7, 7/1.3), 130},
		{"ST-1, nitinol OD/ID 1.0/0.8 and 1.4/1.1 mm", stabilityNitinol(1.0e-3, 0.8e-3, 10), stabilityNitinol(1.4e-3, 1.1e-3, 10), 130},
		// (4.1) with different ν: c = κ1κ2((1+ν1)k2 + (1+ν2)k1)/(k1 + k2) [derived].
		{"different ν (0.3, 0.45), k = 1, 3", stabilityTube(8, 1, 1/1.3), stabilityTube(5, 3, 3/1.45), 8 * 5 * (1.3*3 + 1.45*1) / 4},
		// Bellows-like GJ unrelated to EI: (4.1) as written.
		{"bellows GJ", stabilityTube(6, 0.004, 0.02), stabilityTube(4, 0.01, 0.05), 24 * 0.004 * 0.01 / 0.014 * (1/0.02 + 1/0.05)},
		{"straight tube: no snapping", stabilityTube(0, 1, 1), stabilityTube(10, 1, 1), 0},
	}
	for _, row := range rows {
		c, err := TwistCoefficient(row.inner, row.outer)
		require.NoError(t, err, row.name)
		// objective/kinematics/REFERENCE.md §5.1: 1e-9 relative for closed forms.
		assert.InDelta(t, row.want, c, 1e-9*math.Max(row.want, 1), "(4.1) for %s", row.name)
		ce, d0, err := EffectiveTwistCoefficient(row.inner, row.outer)
		require.NoError(t, err, row.name)
		// objective/kinematics/REFERENCE.md §4.3 reduces exactly to (4.1) for isotropic tubes [derived].
		assert.InDelta(t, row.want, ce, 1e-9*math.Max(row.want, 1), "c_eff (objective/kinematics/REFERENCE.md §4.3) for %s", row.name)
		if row.want > 0 {
			assert.InDelta(t, math.Pi, d0, 1e-9, "anti-aligned Δ0 for %s", row.name)
		}
	}
	_, err := TwistCoefficient(stabilityTube(10, 1, 1), Tube{Precurvature: [2]float64{0, 10},
		Bending: [2][2]float64{{1, 0}, {0, 2}}, Torsion: 1})
	assert.Error(t, err, "anisotropic tube in TwistCoefficient")
}

// Isotropic tubes with precurvature in any direction of their own frame:
// c_eff still equals (4.1) with κ = |u*|; the maximum of V moves to the
// angle that anti-aligns the two precurvature vectors [derived].
func TestEffectiveTwistCoefficientRotatedPrecurvature(t *testing.T) {
	in := Tube{Precurvature: [2]float64{3, 4}, Bending: [2][2]float64{{2, 0}, {0, 2}}, Torsion: 1.5}
	out := Tube{Precurvature: [2]float64{-6, 0}, Bending: [2][2]float64{{5, 0}, {0, 5}}, Torsion: 4}
	want := 5 * 6 * 2 * 5 / 7.0 * (1/1.5 + 1/4.0)
	c, d0, err := EffectiveTwistCoefficient(in, out)
	require.NoError(t, err)
	assert.InEpsilon(t, want, c, 1e-9, "c_eff with u1*=(3,4), u2*=(−6,0)")
	// Anti-aligned: R(Δ0)(−6, 0) ∥ −(3, 4), i.e. Δ0 = atan2(4, 3).
	assert.InDelta(t, math.Atan2(4, 3), d0, 1e-9, "Δ0")
}

// Anisotropic pair TR-3 (objective/kinematics/REFERENCE.md §5.3, derived): the energy's inner
// minimiser S⁻¹b is the equilibrium curvature (3.1) in tube A's frame.
func TestStabilityEnergyTR3(t *testing.T) {
	a := Tube{Precurvature: [2]float64{0, 10}, Bending: [2][2]float64{{1, 0}, {0, 3}}, Torsion: 50}
	b := Tube{Precurvature: [2]float64{0, 8}, Bending: [2][2]float64{{2, 0}, {0, 0.5}}, Torsion: 50}
	e := stabPair(a, b)
	for _, row := range []struct {
		delta float64
		u     [2]float64
	}{
		{0, [2]float64{0, 9.714285714}},
		{math.Pi / 2, [2]float64{-2.666666667, 6}},
	} {
		_, _, S, bb := e.parts(row.delta)
		u := stab2Solve(S, bb)
		for i := range 2 {
			// TR-3 gives ten significant digits.
			assert.InDelta(t, row.u[i], u[i], 1e-9, "TR-3 curvature at Δ=%g, component %d", row.delta, i)
		}
	}
}

// c_eff for anisotropic pairs (objective/kinematics/REFERENCE.md §4.3, derived): Δ0 is the
// maximum of V on a fine grid, V′(Δ0) = 0, and the analytic V″ matches
// central differences at 1e-4 rad. For the strongly anisotropic TR-3 pair
// the anti-aligned state Δ = π is a local minimum of V and the maxima lie
// near ±2.04 rad; for mildly anisotropic diagonal tubes the maximum stays
// anti-aligned.
func TestEffectiveTwistCoefficientAnisotropic(t *testing.T) {
	rows := []struct {
		name      string
		a, b      Tube
		antiAlign bool
		gj1, gj2  float64
	}{
		{"TR-3", Tube{Precurvature: [2]float64{0, 10}, Bending: [2][2]float64{{1, 0}, {0, 3}}, Torsion: 50},
			Tube{Precurvature: [2]float64{0, 8}, Bending: [2][2]float64{{2, 0}, {0, 0.5}}, Torsion: 50}, false, 50, 50},
		{"mild anisotropy", Tube{Precurvature: [2]float64{0, 10}, Bending: [2][2]float64{{1, 0}, {0, 1.2}}, Torsion: 0.8},
			Tube{Precurvature: [2]float64{0, 6}, Bending: [2][2]float64{{2, 0}, {0, 1.8}}, Torsion: 1.5}, true, 0.8, 1.5},
		{"coupled bending tensor", Tube{Precurvature: [2]float64{1, 7}, Bending: [2][2]float64{{0.01, 0.002}, {0.002, 0.012}}, Torsion: 0.3},
			Tube{Precurvature: [2]float64{0, 5}, Bending: [2][2]float64{{0.02, 0}, {0, 0.025}}, Torsion: 0.5}, false, 0.3, 0.5},
	}
	for _, row := range rows {
		e := stabPair(row.a, row.b)
		c, d0, err := EffectiveTwistCoefficient(row.a, row.b)
		require.NoError(t, err, row.name)
		if row.antiAlign {
			assert.InDelta(t, math.Pi, d0, 1e-9, "%s: V largest anti-aligned", row.name)
		}
		vmax := math.Inf(-1)
		for k := range 20000 {
			vmax = math.Max(vmax, e.energy(2*math.Pi*float64(k)/20000))
		}
		// A grid step of 3e-4 rad misses the peak by at most ~V″·(1.6e-4)²/2.
		assert.GreaterOrEqual(t, e.energy(d0), vmax-1e-12*math.Abs(vmax), "%s: Δ0 is the maximum of V", row.name)
		_, v1, v2 := e.derivatives(d0)
		assert.InDelta(t, 0, v1, 1e-9*math.Abs(v2), "%s: V′(Δ0)", row.name)
		assert.Negative(t, v2, "%s: V″(Δ0) at a maximum", row.name)
		const h = 1e-4
		fd := (e.energy(d0+h) - 2*e.energy(d0) + e.energy(d0-h)) / (h * h)
		// Central difference: truncation h²V⁗/12 and rounding ε·V/h² both
		// stay below 1e-6 of V″ here [derived].
		assert.InEpsilon(t, -fd*(1/row.gj1+1/row.gj2), c, 1e-6, "%s: analytic V″ vs central differences", row.name)
		// First and second derivatives at generic angles.
		for _, d := range []float64{0.3, 1.2, 2.5, 4} {
			v0, v1, v2 := e.derivatives(d)
			assert.InDelta(t, e.energy(d), v0, 1e-12*math.Abs(v0), "%s: V at %g", row.name, d)
			assert.InDelta(t, (e.energy(d+h)-e.energy(d-h))/(2*h), v1, 1e-6*(1+math.Abs(v1)), "%s: V′ at %g", row.name, d)
			assert.InDelta(t, (e.energy(d+h)-2*e.energy(d)+e.energy(d-h))/(h*h), v2, 1e-5*(1+math.Abs(v2)), "%s: V″ at %g", row.name, d)
		}
	}
}

// ST-1 and ST-2 (objective/kinematics/REFERENCE.md §5.5, derived from (4.3)): c = 130 /m²,
// √c = 11.4017543, L_crit = π/(2√c) without transmission (verifyST1 of verification.go) and the
// root of (4.3) with β_eff = 0.05 m (verifyST2). The table gives eight decimals: 1e-8 absolute.
func TestCriticalLengthST1ST2(t *testing.T) {
	assert.InDelta(t, 11.4017543, math.Sqrt(130), 1e-7, "√c")
	rows := []struct {
		name       string
		beta, want float64
	}{
		{"ST-1 no transmission", 0, verifyST1.Published},
		{"ST-2 β_eff = 0.05 m", 0.05, verifyST2.Published},
	}
	for _, row := range rows {
		lc := CriticalLength(130, row.beta)
		assert.InDelta(t, row.want, lc, 1e-8, row.name)
		// The root satisfies (4.3).
		if row.beta > 0 {
			rc := math.Sqrt(130)
			assert.InDelta(t, 1, rc*row.beta*math.Tan(rc*lc), 1e-12, "%s: √c β tan(√c L) = 1", row.name)
		}
	}
	assert.True(t, math.IsInf(CriticalLength(0, 0.1), 1), "c = 0 never snaps")
	assert.True(t, math.IsNaN(CriticalLength(130, -1)), "negative β_eff")
	assert.True(t, math.IsNaN(CriticalLength(math.NaN(), 0)), "NaN c")
	// Huge transmission: L_crit → 1/(c β_eff) [derived: tan x ≈ x].
	assert.InEpsilon(t, 1/(130*1e6), CriticalLength(130, 1e6), 1e-9, "β_eff → ∞")
}

// TwoTubeStability at 0.97 and 1.03 of L_crit (ST-1, ST-2), checked against
// an independent test: the backward-shooting map from the tip angle ψ(L)
// to the actuator angle ψ_a of ψ″ = c sin ψ, ψ′(L) = 0,
// ψ(0) = ψ_a + β_eff ψ′(0), is monotone exactly when the pair is snap-free
// and folds when it is not (objective/kinematics/REFERENCE.md §4.2, §5.5 ST-2, derived).
func TestTwoTubeStabilityST1ST2(t *testing.T) {
	tube := stabilityNitinol(1.0e-3, 0.8e-3, 10)
	outer := stabilityNitinol(1.4e-3, 1.1e-3, 10)
	GJ1, GJ2 := tube.Torsion, outer.Torsion
	for _, row := range []struct {
		name  string
		lt    [2]float64 // transmission lengths
		beta  float64
		lcrit float64
	}{
		{"ST-1", [2]float64{0, 0}, 0, verifyST1.Published},
		// Equal transmission lengths give β_eff = ℓ for any GJ (4.2).
		{"ST-2", [2]float64{0.05, 0.05}, 0.05, verifyST2.Published},
		{"ST-2 from unequal lengths", [2]float64{0.05 * (1 + GJ1/GJ2), 0}, 0.05, verifyST2.Published},
	} {
		for _, frac := range []float64{0.97, 1.03} {
			t.Run(fmt.Sprintf("%s/L=%.2fLcrit", row.name, frac), func(t *testing.T) {
				L := frac * row.lcrit
				ps, err := TwoTubeStability(tube, outer, L, row.lt)
				require.NoError(t, err, row.name)
				assert.InDelta(t, 130, ps.C, 1e-9*130, "c")
				assert.InDelta(t, row.beta, ps.BetaEff, 1e-12, "β_eff (4.2)")
				assert.InDelta(t, row.lcrit, ps.LCrit, 1e-8, "L_crit")
				assert.InDelta(t, 1-frac, ps.Margin, 1e-6, "margin 1 − L/L_crit")
				assert.InDelta(t, L*math.Sqrt(130), ps.Lambda, 1e-12, "λ")
				snapFree := frac < 1
				assert.Equal(t, snapFree, ps.SnapFree, "snap-free at %.2f L_crit", frac)
				assert.Equal(t, snapFree, ps.Measure > 0, "J > 0 at %.2f L_crit (J = %g)", frac, ps.Measure)
				assert.Equal(t, snapFree, stabilityMapMonotone(ps.C, ps.BetaEff, L),
					"backward-shooting map monotone at %.2f L_crit", frac)
			})
		}
	}
}

// stabilityMapMonotone samples the map ψ(L) ↦ ψ_a on (0, 2π) and reports
// whether it is strictly increasing. Independent RK4, 1000 steps.
func stabilityMapMonotone(c, beta, L float64) bool {
	const steps, samples = 1000, 721
	h := -L / steps
	f := func(psi, dpsi float64) (float64, float64) { return dpsi, c * math.Sin(psi) }
	prev := math.Inf(-1)
	for k := 1; k < samples; k++ {
		psi, dpsi := 2*math.Pi*float64(k)/samples, 0.0
		for range steps {
			a1, b1 := f(psi, dpsi)
			a2, b2 := f(psi+h/2*a1, dpsi+h/2*b1)
			a3, b3 := f(psi+h/2*a2, dpsi+h/2*b2)
			a4, b4 := f(psi+h*a3, dpsi+h*b3)
			psi += h / 6 * (a1 + 2*a2 + 2*a3 + a4)
			dpsi += h / 6 * (b1 + 2*b2 + 2*b3 + b4)
		}
		psiA := psi - beta*dpsi
		if psiA <= prev {
			return false
		}
		prev = psiA
	}
	return true
}

// Robot.SnapStability with SEG-1's geometry (objective/kinematics/REFERENCE.md §5.4): tube 1
// curved on [0.10, 0.20], tube 2 on [0.05, 0.15], so the overlap is
// [0.10, 0.15] (L = 0.05 m) and the transmission lengths run from the
// actuators at β = −0.25, −0.10 to s = 0.10: 0.35 and 0.20 m [derived].
func TestRobotSnapStability(t *testing.T) {
	r := segOneRobot()
	a := Actuation{Theta: []float64{0, 0}, Beta: []float64{-0.25, -0.10}}
	got, err := r.SnapStability(a, 0)
	require.NoError(t, err)
	want, err := TwoTubeStability(r.Tubes[0], r.Tubes[1], 0.05, [2]float64{0.35, 0.20})
	require.NoError(t, err)
	assert.InDelta(t, want.Overlap, got.Overlap, 1e-15, "overlap")
	assert.InDelta(t, want.BetaEff, got.BetaEff, 1e-15, "β_eff")
	assert.InDelta(t, want.LCrit, got.LCrit, 1e-15, "L_crit")
	// Tube 2 retracted so its curved part ends at 0.06: overlap gone.
	a.Beta = []float64{-0.25, -0.19}
	got, err = r.SnapStability(a, 0)
	require.NoError(t, err)
	assert.Equal(t, 0.0, got.Overlap, "no overlap when tube 2's curve lies before tube 1's")
	assert.True(t, got.SnapFree, "no overlap is snap-free")
	assert.Equal(t, 1.0, got.Margin, "margin with no overlap")
	_, err = r.SnapStability(a, 1)
	assert.Error(t, err, "pair (2, 3) of a two-tube robot")
}

func TestTwoTubeStabilityInvalid(t *testing.T) {
	ok := stabilityTube(10, 1, 1)
	rows := []struct {
		name         string
		inner, outer Tube
		overlap      float64
		tr           [2]float64
	}{
		{"negative overlap", ok, ok, -0.1, [2]float64{}},
		{"NaN overlap", ok, ok, math.NaN(), [2]float64{}},
		{"negative transmission", ok, ok, 0.1, [2]float64{-1, 0}},
		{"zero GJ", ok, stabilityTube(10, 1, 0), 0.1, [2]float64{}},
		{"indefinite bending", Tube{Precurvature: [2]float64{0, 1}, Bending: [2][2]float64{{1, 2}, {2, 1}}, Torsion: 1}, ok, 0.1, [2]float64{}},
		{"NaN precurvature", stabilityTube(math.NaN(), 1, 1), ok, 0.1, [2]float64{}},
	}
	for _, row := range rows {
		_, err := TwoTubeStability(row.inner, row.outer, row.overlap, row.tr)
		assert.Error(t, err, row.name)
	}
}

// segOneRobot is the two-tube set of SEG-1 (objective/kinematics/REFERENCE.md §5.4).
func segOneRobot() *Robot {
	return &Robot{Tubes: []Tube{
		{StraightLength: 0.35, CurvedLength: 0.10, Precurvature: [2]float64{0, 10},
			Bending: [2][2]float64{{0.004, 0}, {0, 0.004}}, Torsion: 0.003, LinearDensity: 0.015},
		{StraightLength: 0.15, CurvedLength: 0.10, Precurvature: [2]float64{0, 5},
			Bending: [2][2]float64{{0.012, 0}, {0, 0.008}}, Torsion: 0.009, LinearDensity: 0.03},
	}}
}
