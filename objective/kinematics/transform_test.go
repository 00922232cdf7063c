package kinematics

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// closedFormTol is the objective/kinematics/REFERENCE.md §5.1 tolerance for closed forms (1e-9
// relative); the values below are O(0.1 m) or O(1), so it is applied as an
// absolute tolerance scaled by the magnitude of the expected value (floor
// 1e-12 for zero entries).
func closedFormTol(want float64) float64 { return math.Max(1e-9*math.Abs(want), 1e-12) }

func assertPose(t *testing.T, want, got Pose, tol func(float64) float64, msg string, args ...any) {
	t.Helper()
	for i := range 3 {
		for j := range 3 {
			assert.InDeltaf(t, want.R[i][j], got.R[i][j], tol(want.R[i][j]), msg+": R[%d][%d]", append(args, i, j)...)
		}
		assert.InDeltaf(t, want.P[i], got.P[i], tol(want.P[i]), msg+": P[%d]", append(args, i)...)
	}
}

func withinAbs(d float64) func(float64) float64 { return func(float64) float64 { return d } }

// ry returns R_y(α) = [[cos α, 0, sin α], [0, 1, 0], [−sin α, 0, cos α]].
func rotYMat(alpha float64) [3][3]float64 {
	s, c := math.Sincos(alpha)
	return [3][3]float64{{c, 0, s}, {0, 1, 0}, {-s, 0, c}}
}

func TestLinkTransformCheckValues(t *testing.T) {
	cases := []struct {
		name string
		u    [3]float64
		s    float64
		want Pose
		tol  func(float64) float64
	}{
		{
			// CC-1: objective/kinematics/REFERENCE.md §5.2, derived from (3.2): quarter circle of radius
			// 0.1 m in the default convention (bends toward +x).
			name: "CC-1 default convention",
			u:    [3]float64{0, 10, 0}, s: math.Pi / 20,
			want: Pose{R: [3][3]float64{{0, 0, 1}, {0, 1, 0}, {-1, 0, 0}}, P: [3]float64{0.1, 0, 0.1}},
			tol:  closedFormTol,
		},
		{
			// CC-2: objective/kinematics/REFERENCE.md §5.2, derived: the same arc with u = (κ, 0, 0), the
			// convention of much of the concentric-tube literature (bends
			// toward −y).
			name: "CC-2 literature convention",
			u:    [3]float64{10, 0, 0}, s: math.Pi / 20,
			want: Pose{R: [3][3]float64{{1, 0, 0}, {0, 0, -1}, {0, 1, 0}}, P: [3]float64{0, -0.1, 0.1}},
			tol:  closedFormTol,
		},
		// CC-5 (a full circle returns to the identity to 1e-15) is verifyCC5 in verification.go.
		{
			// CC-4 third row: objective/kinematics/REFERENCE.md §5.2, derived: u = 0 is a straight segment.
			name: "CC-4 u=0",
			u:    [3]float64{0, 0, 0}, s: 0.1,
			want: Pose{R: Identity().R, P: [3]float64{0, 0, 0.1}},
			tol:  withinAbs(0),
		},
		{
			// Pure twist: R = R_z(u_z s), p = s e3 (derived from (3.2): û e3 = 0).
			name: "pure twist",
			u:    [3]float64{0, 0, 3}, s: 0.5,
			want: Pose{R: RotZ(1.5).R, P: [3]float64{0, 0, 0.5}},
			tol:  withinAbs(1e-15),
		},
		{
			// Planar case of objective/kinematics/REFERENCE.md §3.3: p = ((1 − cos κs)/κ, 0, sin(κs)/κ),
			// R = R_y(κs); κs = 1.3 (trigonometric branch).
			name: "planar arc",
			u:    [3]float64{0, 2.6, 0}, s: 0.5,
			want: Pose{R: rotYMat(1.3), P: [3]float64{(1 - math.Cos(1.3)) / 2.6, 0, math.Sin(1.3) / 2.6}},
			tol:  closedFormTol,
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got := LinkTransform(tc.u, tc.s)
			assertPose(t, tc.want, got, tc.tol, "LinkTransform(u=%v, s=%g)", tc.u, tc.s)
		})
	}
}

// naiveLateralOffset is p_x of a planar link with b written as
// (1 − cos x)/k², the form objective/kinematics/REFERENCE.md §3.3 warns against: p_x = (1 − cos ks)/k.
func naiveLateralOffset(k, s float64) float64 { return (1 - math.Cos(k*s)) / k }

func TestLinkTransformNearZeroCurvature(t *testing.T) {
	// CC-4: objective/kinematics/REFERENCE.md §5.2, derived from (3.2). p_x = 2 sin²(ks/2)/k = k s²/2
	// (1 − (ks)²/12 + …), p_z = s − k² s³/6 + …; the relative tolerance is the
	// objective/kinematics/REFERENCE.md §5.1 closed-form tolerance 1e-9.
	cases := []struct {
		name      string
		k, s      float64
		wantX     float64
		wantZ     float64
		zTol      float64
		naiveFail bool
	}{
		// p_z = 0.1 − 1.6667e-16 (objective/kinematics/REFERENCE.md §5.2: "0.1 − 1.7e-16"); the tolerance is
		// one ulp of 0.1 (1.4e-17), so the k² s³/6 term must be there.
		// p_x is verifyCC4 of verification.go.
		{name: "k=1e-6", k: 1e-6, s: 0.1, wantX: verifyCC4.Published, wantZ: 0.1 - 1e-12*1e-3/6, zTol: 1.4e-17, naiveFail: true},
		{name: "k=1e-9", k: 1e-9, s: 0.1, wantX: 5e-12, wantZ: 0.1, zTol: 1.4e-17, naiveFail: true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got := LinkTransform([3]float64{0, tc.k, 0}, tc.s)
			assert.InEpsilon(t, tc.wantX, got.P[0], 1e-9, "LinkTransform(u=(0,%g,0), s=%g).P[0]", tc.k, tc.s)
			assert.Equal(t, 0.0, got.P[1], "LinkTransform(u=(0,%g,0), s=%g).P[1]", tc.k, tc.s)
			assert.InDelta(t, tc.wantZ, got.P[2], tc.zTol, "LinkTransform(u=(0,%g,0), s=%g).P[2]", tc.k, tc.s)
			// R = R_y(ks) to 1e-15.
			assertPose(t, Pose{R: rotYMat(tc.k * tc.s), P: got.P}, got, withinAbs(1e-15), "LinkTransform(u=(0,%g,0), s=%g)", tc.k, tc.s)

			// The cancelling form must fail the same check (objective/kinematics/REFERENCE.md §5.2: it gives
			// 4.996e-9 at k = 1e-6 and 0 at k = 1e-9 in IEEE double).
			naive := naiveLateralOffset(tc.k, tc.s)
			relErr := math.Abs(naive-tc.wantX) / tc.wantX
			if tc.naiveFail {
				assert.Greater(t, relErr, 1e-9, "naive (1 − cos x)/k at k=%g gives %.10g, expected to miss %.10g", tc.k, naive, tc.wantX)
			}
		})
	}
	// The specific values quoted in objective/kinematics/REFERENCE.md §3.3 for the naive form.
	assert.InDelta(t, 4.996e-9, naiveLateralOffset(1e-6, 0.1), 0.0005e-9, "naive form at k=1e-6 (objective/kinematics/REFERENCE.md §3.3)")
	assert.Equal(t, 0.0, naiveLateralOffset(1e-9, 0.1), "naive form at k=1e-9 (objective/kinematics/REFERENCE.md §3.3)")
}

func TestArcPoseWebsterJones(t *testing.T) {
	// CC-3: objective/kinematics/REFERENCE.md §5.2 — Webster & Jones, "Design and Kinematic Modeling of
	// Constant Curvature Continuum Robots: A Review", IJRR 29(13), 2010, polar
	// map; values derived.
	cases := []struct {
		name            string
		kappa, phi, ell float64
		want            Pose
	}{
		{"phi=0", 10, 0, math.Pi / 20,
			Pose{R: [3][3]float64{{0, 0, 1}, {0, 1, 0}, {-1, 0, 0}}, P: [3]float64{0.1, 0, 0.1}}},
		{"phi=pi/2", 10, math.Pi / 2, math.Pi / 20,
			Pose{R: [3][3]float64{{0, -1, 0}, {0, 0, 1}, {-1, 0, 0}}, P: [3]float64{0, 0.1, 0.1}}},
		// κ = 0: straight (series branch), frame rolled by φ.
		{"kappa=0", 0, 0.3, 0.2, Pose{R: RotZ(0.3).R, P: [3]float64{0, 0, 0.2}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got := ArcPose(tc.kappa, tc.phi, tc.ell)
			assertPose(t, tc.want, got, closedFormTol, "ArcPose(κ=%g, φ=%g, ℓ=%g)", tc.kappa, tc.phi, tc.ell)
		})
	}
}

func TestArcPoseRelation(t *testing.T) {
	// objective/kinematics/REFERENCE.md §3.4 relation [derived]: T_WJ(κ, φ, ℓ)·R_z(−φ) = exp(ξ̂ℓ) with
	// u = κ(−sin φ, cos φ, 0). Random arcs, including κ → 0 (series branches)
	// and negative κ; tolerance 1e-14 (a few roundings of O(1) entries).
	rng := rand.New(rand.NewPCG(3, 4))
	for i := range 300 {
		kappa := (rng.Float64()*2 - 1) * 30
		switch i % 3 {
		case 1:
			kappa *= 1e-4
		case 2:
			kappa *= 1e-9
		}
		phi := (rng.Float64()*2 - 1) * 2 * math.Pi
		ell := rng.Float64() * 0.3
		sp, cp := math.Sincos(phi)
		want := LinkTransform([3]float64{-kappa * sp, kappa * cp, 0}, ell)
		got := ArcPose(kappa, phi, ell).Mul(RotZ(-phi))
		assertPose(t, want, got, withinAbs(1e-14), "ArcPose(κ=%g, φ=%g, ℓ=%g)·R_z(−φ)", kappa, phi, ell)
	}
}

// expTwist returns exp([[û, e3], [0, 0]]·s) computed by gonum's mat.Exp
// (Padé approximation with scaling and squaring), a general-purpose reference.
func expTwist(u [3]float64, s float64) Pose {
	a := mat.NewDense(4, 4, []float64{
		0, -u[2] * s, u[1] * s, 0,
		u[2] * s, 0, -u[0] * s, 0,
		-u[1] * s, u[0] * s, 0, s,
		0, 0, 0, 0,
	})
	var e mat.Dense
	e.Exp(a)
	var p Pose
	for i := range 3 {
		for j := range 3 {
			p.R[i][j] = e.At(i, j)
		}
		p.P[i] = e.At(i, 3)
	}
	return p
}

func TestLinkTransformMatchesMatrixExponential(t *testing.T) {
	// Closed form (3.2) against gonum mat.Exp of the 4×4 twist (source:
	// gonum.org/v1/gonum/mat Dense.Exp, a general-purpose reference library;
	// Lynch & Park, Modern Robotics, 2017, for exp(ξ̂ s)). 400 seeded random
	// twists with |x| from 1e-9 to ~10 rad, twist u_z included, exercising
	// every branch of the coefficients; tolerance 1e-12 absolute (entries are
	// O(1) and positions O(0.3 m)).
	rng := rand.New(rand.NewPCG(1, 1))
	for i := range 400 {
		var u [3]float64
		for j := range u {
			u[j] = (rng.Float64()*2 - 1) * 20
		}
		scale := []float64{1, 1, 0.05, 5e-3, 1e-4, 1e-9}[i%6]
		for j := range u {
			u[j] *= scale
		}
		s := rng.Float64()*0.3 + 0.01
		if i%7 == 0 {
			s = -s // negative arc length: exp(−ξ̂ s), the inverse
		}
		want := expTwist(u, s)
		got := LinkTransform(u, s)
		assertPose(t, want, got, withinAbs(1e-12), "LinkTransform(u=%v, s=%g) vs mat.Exp", u, s)
	}
}

func TestLinkTransformIsRotation(t *testing.T) {
	// R ∈ SO(3): RᵀR = I and det R = 1 [derived]; |p| ≤ s (a chord is not
	// longer than its arc) [derived].
	rng := rand.New(rand.NewPCG(5, 6))
	for range 200 {
		u := [3]float64{rng.NormFloat64() * 10, rng.NormFloat64() * 10, rng.NormFloat64() * 10}
		s := rng.Float64()
		p := LinkTransform(u, s)
		for i := range 3 {
			for j := range 3 {
				dot := p.R[0][i]*p.R[0][j] + p.R[1][i]*p.R[1][j] + p.R[2][i]*p.R[2][j]
				want := 0.0
				if i == j {
					want = 1
				}
				assert.InDelta(t, want, dot, 1e-14, "LinkTransform(u=%v, s=%g): (RᵀR)[%d][%d]", u, s, i, j)
			}
		}
		r := p.R
		det := r[0][0]*(r[1][1]*r[2][2]-r[1][2]*r[2][1]) - r[0][1]*(r[1][0]*r[2][2]-r[1][2]*r[2][0]) + r[0][2]*(r[1][0]*r[2][1]-r[1][1]*r[2][0])
		assert.InDelta(t, 1, det, 1e-14, "LinkTransform(u=%v, s=%g): det R", u, s)
		assert.LessOrEqual(t, math.Hypot(math.Hypot(p.P[0], p.P[1]), p.P[2]), s*(1+1e-15), "LinkTransform(u=%v, s=%g): |p| ≤ s", u, s)
	}
}

func TestPoseAlgebra(t *testing.T) {
	// Group laws of SE(3) [derived]: exp(ξ̂ s1)·exp(ξ̂ s2) = exp(ξ̂ (s1+s2)) for
	// one twist; T·T⁻¹ = I; identity is neutral; Apply agrees with Mul.
	rng := rand.New(rand.NewPCG(7, 8))
	for range 100 {
		u := [3]float64{rng.NormFloat64() * 8, rng.NormFloat64() * 8, rng.NormFloat64() * 2}
		s1, s2 := rng.Float64()*0.2, rng.Float64()*0.2
		a, b := LinkTransform(u, s1), LinkTransform(u, s2)
		assertPose(t, LinkTransform(u, s1+s2), a.Mul(b), withinAbs(1e-14), "exp(u=%v, %g)·exp(u, %g)", u, s1, s2)
		assertPose(t, Identity(), a.Mul(a.Inverse()), withinAbs(1e-15), "T·T⁻¹ for u=%v, s=%g", u, s1)
		assertPose(t, a, Identity().Mul(a), withinAbs(0), "I·T for u=%v, s=%g", u, s1)
		assertPose(t, a, a.Mul(Identity()), withinAbs(0), "T·I for u=%v, s=%g", u, s1)
		x := [3]float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		got := a.Apply(b.Apply(x))
		want := a.Mul(b).Apply(x)
		for i := range 3 {
			assert.InDelta(t, want[i], got[i], 1e-14, "Apply composition, u=%v, x=%v, [%d]", u, x, i)
		}
	}
}

func TestSincosMatchesMath(t *testing.T) {
	// The branch-free sincos (and its two-argument form) against Go's math.Sincos (Cephes polynomials,
	// the same coefficients; a general-purpose reference library). Both are
	// within about 1 ulp of the exact values, so they may differ by 2 ulp:
	// tolerance 2.3e-16 absolute on values in [−1, 1]. Special values and the
	// fallback beyond 1e6 rad are compared exactly.
	rng := rand.New(rand.NewPCG(9, 10))
	prev := 0.3
	check := func(x float64) {
		ws, wc := math.Sincos(x)
		gs, gc := sincos(x)
		require.InDelta(t, ws, gs, 2.3e-16, "sin(%v)", x)
		require.InDelta(t, wc, gc, 2.3e-16, "cos(%v)", x)
		// The two-argument form gives the same bits as two single calls.
		ps, pc := sincos(prev)
		s1, c1, s2, c2 := sincos2(x, prev)
		require.Equal(t, [4]float64{gs, gc, ps, pc}, [4]float64{s1, c1, s2, c2}, "sincos2(%v, %v)", x, prev)
		prev = x
	}
	for range 200000 {
		check((rng.Float64()*2 - 1) * 40)
	}
	for range 20000 {
		check((rng.Float64()*2 - 1) * 1e6)
	}
	for k := -64; k <= 64; k++ {
		// Quadrant boundaries, where the reduction picks either neighbour.
		x := float64(k) * math.Pi / 4
		check(x)
		check(math.Nextafter(x, math.Inf(1)))
		check(math.Nextafter(x, math.Inf(-1)))
	}
	for _, x := range []float64{0, 1e-300, -1e-300, 2e6, -3e9, 1e300} {
		ws, wc := math.Sincos(x)
		gs, gc := sincos(x)
		assert.Equal(t, ws, gs, "sin(%v)", x)
		assert.Equal(t, wc, gc, "cos(%v)", x)
		s1, c1, s2, c2 := sincos2(0.5, x)
		assert.Equal(t, ws, s2, "sincos2(0.5, %v)", x)
		assert.Equal(t, wc, c2, "sincos2(0.5, %v)", x)
		s0, c0 := sincos(0.5)
		assert.Equal(t, [2]float64{s0, c0}, [2]float64{s1, c1}, "sincos2(0.5, %v)", x)
	}
	for _, x := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		gs, gc := sincos(x)
		assert.True(t, math.IsNaN(gs) && math.IsNaN(gc), "sincos(%v) = (%v, %v), want NaN", x, gs, gc)
	}
}
