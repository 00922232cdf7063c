package kinematics

import (
	"errors"
	"fmt"
	"math"
)

// Elastic stability (snap-through) of two nested tubes (objective/kinematics/REFERENCE.md §4).
// Rigid-torsion kinematics hides snapping, so it is checked separately:
// the relative twist ψ of two tubes whose curved sections overlap over a
// length L obeys ψ″ = c sin ψ (4.1); linearised about the anti-aligned
// state it first admits a neighbouring equilibrium at √c L = π/2, or at
// √c β_eff tan(√c L) = 1 with torsionally compliant transmission (4.3)
// [published (framework): Dupont, Lock, Itkowitz & Butler, IEEE T-RO
// 26(2), 2010; Gilbert, Hendrick & Webster, Elastic Stability of
// Concentric Tube Robots: A Stability Measure and Design Test, IEEE T-RO
// 32(1), 2016; the formulas here are derived, the isotropic special case
// c = (1+ν)κ1κ2 matches the published test, from memory].

// PairStability is the snap-through test of one pair of tubes.
type PairStability struct {
	// C is the twist coefficient c (4.1), or c_eff (objective/kinematics/REFERENCE.md §4.3) for anisotropic
	// tubes, 1/m². Zero when the pair cannot snap (a straight tube, or an
	// energy that does not depend on the relative angle).
	C float64
	// BetaEff is the effective transmission length β_eff (4.2), m.
	BetaEff float64
	// Overlap is the length L of the overlapped curved sections, m.
	Overlap float64
	// Lambda is λ = L√c.
	Lambda float64
	// LCrit is the critical overlap length from (4.3), m; +Inf when C = 0.
	LCrit float64
	// Margin is 1 − L/L_crit: positive when snap-free, 1 when C = 0.
	Margin float64
	// Measure is J = cos λ − √c β_eff sin λ, the stability measure
	// ∂ψ'(L)/∂ψ'(0) at the anti-aligned actuator angle (objective/kinematics/REFERENCE.md §4.2
	// [derived]); it is positive exactly while λ < π/2 and the pair is
	// snap-free.
	Measure float64
	// SnapFree reports L < L_crit: no actuator angle makes the pair snap.
	SnapFree bool
}

// TwistCoefficient returns c of the relative-twist equation ψ″ = c sin ψ
// for two tubes with isotropic bending tensors (4.1):
//
//	c = κ1 κ2 · k1 k2/(k1 + k2) · (1/GJ1 + 1/GJ2),   κ_i = |u_i*|, k_i = EI_i
//
// [derived; for plain circular tubes with a common ν it is (1+ν)κ1κ2].
// It returns an error if a bending tensor is not isotropic (use
// EffectiveTwistCoefficient) or a stiffness is not positive.
func TwistCoefficient(inner, outer Tube) (float64, error) {
	k := [2]float64{}
	for i, t := range [2]Tube{inner, outer} {
		b := t.Bending
		if err := stabCheckTube(i, t); err != nil {
			return 0, err
		}
		if b[0][1] != 0 || b[1][0] != 0 || math.Abs(b[0][0]-b[1][1]) > 1e-12*b[0][0] {
			return 0, fmt.Errorf("twist coefficient: tube %d bending %v is not isotropic (expected EI_x = EI_y, no coupling)", i+1, b)
		}
		k[i] = b[0][0]
	}
	kappa1 := math.Hypot(inner.Precurvature[0], inner.Precurvature[1])
	kappa2 := math.Hypot(outer.Precurvature[0], outer.Precurvature[1])
	return kappa1 * kappa2 * k[0] * k[1] / (k[0] + k[1]) * (1/inner.Torsion + 1/outer.Torsion), nil
}

// EffectiveTwistCoefficient returns c_eff of two tubes with any bending
// tensors and planar precurvatures (objective/kinematics/REFERENCE.md §4.3 [derived]). The bending
// energy per length, minimised over the shared x–y curvature, is
//
//	V(Δ) = ½ Σ ũ_iᵀ K̃_i ũ_i − ½ bᵀ (Σ K̃_i)⁻¹ b,   b = Σ K̃_i ũ_i,   Δ = θ2 − θ1
//
// and c_eff = −V″(Δ0)(1/GJ1 + 1/GJ2) at the maximum Δ0 of V, with V″
// evaluated analytically. Δ0 is found by sampling V at 72 angles and
// refining with Newton's method on V'. For isotropic or mildly anisotropic
// pairs Δ0 is the anti-aligned state; strongly anisotropic pairs can peak
// elsewhere (the pair TR-3 of objective/kinematics/REFERENCE.md §5.3 has a local minimum at Δ = π
// and maxima near ±2.04 rad). For isotropic tubes c_eff equals
// TwistCoefficient. The second result is Δ0 ∈ [0, 2π), rad.
func EffectiveTwistCoefficient(inner, outer Tube) (c, delta0 float64, err error) {
	for i, t := range [2]Tube{inner, outer} {
		if err := stabCheckTube(i, t); err != nil {
			return 0, 0, err
		}
	}
	e := stabPair(inner, outer)
	best, vbest := 0.0, math.Inf(-1)
	const samples = 72
	for k := range samples {
		d := 2 * math.Pi * float64(k) / samples
		if v := e.energy(d); v > vbest {
			best, vbest = d, v
		}
	}
	// Newton on V' from the best sample, kept inside its bracket.
	lo, hi := best-2*math.Pi/samples, best+2*math.Pi/samples
	d := best
	for range 50 {
		_, v1, v2 := e.derivatives(d)
		if v2 >= 0 {
			break // not at a maximum (flat V): keep the sampled point
		}
		step := -v1 / v2
		nd := math.Min(math.Max(d+step, lo), hi)
		if math.Abs(nd-d) < 1e-15 {
			d = nd
			break
		}
		d = nd
	}
	_, _, v2 := e.derivatives(d)
	c = -v2 * (1/inner.Torsion + 1/outer.Torsion)
	if c < 0 {
		// V has no strict maximum (V constant to rounding).
		c = 0
	}
	return c, math.Mod(d+2*math.Pi, 2*math.Pi), nil
}

// EffectiveTransmission returns β_eff (4.2), m, from the torsionally
// compliant lengths ℓ_t1, ℓ_t2 of the two tubes between their actuators and
// the start of the overlapped curved region:
//
//	β_eff = (ℓ_t1/GJ1 + ℓ_t2/GJ2) / (1/GJ1 + 1/GJ2)
func EffectiveTransmission(inner, outer Tube, transmission [2]float64) float64 {
	a, b := 1/inner.Torsion, 1/outer.Torsion
	return (transmission[0]*a + transmission[1]*b) / (a + b)
}

// CriticalLength returns the overlap length at which a neighbouring
// equilibrium of the anti-aligned pair first appears (4.3), m:
//
//	√c β_eff tan(√c L_crit) = 1,   i.e.   L_crit = atan2(1, √c β_eff)/√c ∈ (0, π/(2√c)]
//
// which is π/(2√c) without transmission (β_eff = 0). It returns +Inf when
// c ≤ 0 (no snapping) and NaN when betaEff < 0 or an input is NaN.
func CriticalLength(c, betaEff float64) float64 {
	switch {
	case math.IsNaN(c) || math.IsNaN(betaEff) || betaEff < 0:
		return math.NaN()
	case c <= 0:
		return math.Inf(1)
	}
	rc := math.Sqrt(c)
	return math.Atan2(1, rc*betaEff) / rc
}

// TwoTubeStability runs the snap-free test of objective/kinematics/REFERENCE.md §4.2 for two tubes
// whose curved sections overlap over overlap (m), with torsionally
// compliant transmission lengths transmission = (ℓ_t1, ℓ_t2) (m, zero for
// rigid transmission). c is EffectiveTwistCoefficient (equal to (4.1) for
// isotropic tubes); the pair is snap-free iff L < L_crit.
func TwoTubeStability(inner, outer Tube, overlap float64, transmission [2]float64) (PairStability, error) {
	if !(overlap >= 0) || math.IsInf(overlap, 0) {
		return PairStability{}, fmt.Errorf("stability: overlap %g m (expected ≥ 0)", overlap)
	}
	for i, l := range transmission {
		if !(l >= 0) || math.IsInf(l, 0) {
			return PairStability{}, fmt.Errorf("stability: transmission length of tube %d is %g m (expected ≥ 0)", i+1, l)
		}
	}
	c, _, err := EffectiveTwistCoefficient(inner, outer)
	if err != nil {
		return PairStability{}, err
	}
	ps := PairStability{C: c, BetaEff: EffectiveTransmission(inner, outer, transmission), Overlap: overlap}
	rc := math.Sqrt(c)
	ps.Lambda = overlap * rc
	ps.LCrit = CriticalLength(c, ps.BetaEff)
	ps.Margin = 1 - overlap/ps.LCrit
	ps.Measure = math.Cos(ps.Lambda) - rc*ps.BetaEff*math.Sin(ps.Lambda)
	ps.SnapFree = overlap < ps.LCrit
	return ps, nil
}

// SnapStability runs TwoTubeStability for tubes inner and inner+1 of the
// robot (0-based, innermost first) at the insertions of a (threads
// applied). The overlap is the intersection of the two curved sections in
// front of the base plane (behind it the actuation unit holds the tubes
// straight); each transmission length runs from the tube's actuator, at
// s = β_i, to the start of the overlap. Tube angles do not enter. With no
// overlap the pair is trivially snap-free (L = 0).
func (r *Robot) SnapStability(a Actuation, inner int) (PairStability, error) {
	if err := r.Validate(); err != nil {
		return PairStability{}, err
	}
	if err := r.CheckActuation(a); err != nil {
		return PairStability{}, err
	}
	if inner < 0 || inner+1 >= len(r.Tubes) {
		return PairStability{}, fmt.Errorf("stability: no tube pair (%d, %d) in a set of %d tubes", inner+1, inner+2, len(r.Tubes))
	}
	beta := r.EffectiveInsertion(a)
	t1, t2 := r.Tubes[inner], r.Tubes[inner+1]
	b1, b2 := beta[inner], beta[inner+1]
	start := math.Max(0, math.Max(b1+t1.StraightLength, b2+t2.StraightLength))
	end := math.Min(b1+t1.Length(), b2+t2.Length())
	overlap := math.Max(0, end-start)
	var tr [2]float64
	if overlap > 0 {
		tr = [2]float64{start - b1, start - b2}
	}
	return TwoTubeStability(t1, t2, overlap, tr)
}

func stabCheckTube(i int, t Tube) error {
	b := t.Bending
	det := b[0][0]*b[1][1] - b[0][1]*b[1][0]
	switch {
	case !(t.Torsion > 0) || math.IsInf(t.Torsion, 0):
		return fmt.Errorf("stability: tube %d torsional stiffness GJ = %g N·m² (expected > 0)", i+1, t.Torsion)
	case !(b[0][0] > 0) || !(det > 0) || math.Abs(b[0][1]-b[1][0]) > 1e-9*(b[0][0]+b[1][1]):
		return fmt.Errorf("stability: tube %d bending %v N·m² is not symmetric positive definite", i+1, b)
	case math.IsNaN(t.Precurvature[0]) || math.IsNaN(t.Precurvature[1]) ||
		math.IsInf(t.Precurvature[0], 0) || math.IsInf(t.Precurvature[1], 0):
		return errors.New("stability: precurvature is not finite")
	}
	return nil
}

// stabEnergy holds the pair in tube 1's frame (θ1 = 0, θ2 = Δ).
type stabEnergy struct {
	k1, k2 [2][2]float64
	b1     [2]float64 // K1 u1*
	v2     [2]float64 // K2 u2*
	e0     float64    // ½ Σ u_i*ᵀ K_i u_i*
}

func stabPair(inner, outer Tube) stabEnergy {
	var e stabEnergy
	e.k1, e.k2 = inner.Bending, outer.Bending
	u1, u2 := inner.Precurvature, outer.Precurvature
	e.b1 = stab2Mul(e.k1, u1)
	e.v2 = stab2Mul(e.k2, u2)
	e.e0 = 0.5 * (u1[0]*e.b1[0] + u1[1]*e.b1[1] + u2[0]*e.v2[0] + u2[1]*e.v2[1])
	return e
}

// parts returns, at relative angle d: A = R K2 Rᵀ, v = R K2 u2*,
// S = K1 + A, b = K1 u1* + v.
func (e *stabEnergy) parts(d float64) (A [2][2]float64, v [2]float64, S [2][2]float64, b [2]float64) {
	s, c := math.Sincos(d)
	R := [2][2]float64{{c, -s}, {s, c}}
	RK := stab2MM(R, e.k2)
	A = stab2MM(RK, [2][2]float64{{c, s}, {-s, c}})
	v = stab2Mul(R, e.v2)
	for i := range 2 {
		for j := range 2 {
			S[i][j] = e.k1[i][j] + A[i][j]
		}
		b[i] = e.b1[i] + v[i]
	}
	return A, v, S, b
}

func (e *stabEnergy) energy(d float64) float64 {
	_, _, S, b := e.parts(d)
	w := stab2Solve(S, b)
	return e.e0 - 0.5*(b[0]*w[0]+b[1]*w[1])
}

// derivatives returns V, V', V″ at d. With g = bᵀS⁻¹b, w = S⁻¹b,
// J = [[0, −1], [1, 0]], b' = Jv, b″ = −v, S' = JA − AJ,
// S″ = −2A − 2JAJ, w' = S⁻¹(b' − S'w) [derived]:
//
//	g'  = 2b'ᵀw − wᵀS'w
//	g″ = 2b″ᵀw + 2b'ᵀw' − 2wᵀS'w' − wᵀS″w,    V = e0 − g/2.
func (e *stabEnergy) derivatives(d float64) (v0, v1, v2 float64) {
	A, v, S, b := e.parts(d)
	w := stab2Solve(S, b)
	bp := [2]float64{-v[1], v[0]}   // J v
	bpp := [2]float64{-v[0], -v[1]} // −v
	JA := [2][2]float64{{-A[1][0], -A[1][1]}, {A[0][0], A[0][1]}}
	AJ := [2][2]float64{{A[0][1], -A[0][0]}, {A[1][1], -A[1][0]}}
	var Sp, Spp [2][2]float64
	JAJ := [2][2]float64{{-AJ[1][0], -AJ[1][1]}, {AJ[0][0], AJ[0][1]}}
	for i := range 2 {
		for j := range 2 {
			Sp[i][j] = JA[i][j] - AJ[i][j]
			Spp[i][j] = -2*A[i][j] - 2*JAJ[i][j]
		}
	}
	Spw := stab2Mul(Sp, w)
	wp := stab2Solve(S, [2]float64{bp[0] - Spw[0], bp[1] - Spw[1]})
	Sppw := stab2Mul(Spp, w)
	dot := func(a, b [2]float64) float64 { return a[0]*b[0] + a[1]*b[1] }
	g := dot(b, w)
	g1 := 2*dot(bp, w) - dot(w, Spw)
	g2 := 2*dot(bpp, w) + 2*dot(bp, wp) - 2*dot(Spw, wp) - dot(w, Sppw)
	return e.e0 - g/2, -g1 / 2, -g2 / 2
}

func stab2Mul(a [2][2]float64, x [2]float64) [2]float64 {
	return [2]float64{a[0][0]*x[0] + a[0][1]*x[1], a[1][0]*x[0] + a[1][1]*x[1]}
}

func stab2MM(a, b [2][2]float64) [2][2]float64 {
	var c [2][2]float64
	for i := range 2 {
		for j := range 2 {
			c[i][j] = a[i][0]*b[0][j] + a[i][1]*b[1][j]
		}
	}
	return c
}

func stab2Solve(a [2][2]float64, b [2]float64) [2]float64 {
	det := a[0][0]*a[1][1] - a[0][1]*a[1][0]
	return [2]float64{(a[1][1]*b[0] - a[0][1]*b[1]) / det, (a[0][0]*b[1] - a[1][0]*b[0]) / det}
}
