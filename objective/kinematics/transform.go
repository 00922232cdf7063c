package kinematics

import "math"

// Identity returns the identity pose (R = I, P = 0).
func Identity() Pose {
	return Pose{R: [3][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}}}
}

// Mul returns the composition a·b of two rigid transforms: the pose b,
// expressed in the frame of a, mapped into a's parent frame,
// R = R_a R_b, P = R_a P_b + P_a.
func (a Pose) Mul(b Pose) Pose {
	var c Pose
	for i := range 3 {
		ai := a.R[i]
		for j := range 3 {
			c.R[i][j] = ai[0]*b.R[0][j] + ai[1]*b.R[1][j] + ai[2]*b.R[2][j]
		}
		c.P[i] = ai[0]*b.P[0] + ai[1]*b.P[1] + ai[2]*b.P[2] + a.P[i]
	}
	return c
}

// Apply maps the point x given in the frame of a into a's parent frame,
// R_a x + P_a.
func (a Pose) Apply(x [3]float64) [3]float64 {
	var y [3]float64
	for i := range 3 {
		y[i] = a.R[i][0]*x[0] + a.R[i][1]*x[1] + a.R[i][2]*x[2] + a.P[i]
	}
	return y
}

// Inverse returns the inverse transform (Rᵀ, −Rᵀ P).
func (a Pose) Inverse() Pose {
	var b Pose
	for i := range 3 {
		for j := range 3 {
			b.R[i][j] = a.R[j][i]
		}
	}
	for i := range 3 {
		b.P[i] = -(b.R[i][0]*a.P[0] + b.R[i][1]*a.P[1] + b.R[i][2]*a.P[2])
	}
	return b
}

// Thresholds of the series branches in linkCoeffs. Below seriesX the
// coefficients a and b of (3.2) use their Taylor series (truncation error
// about 1e-16 relative at the threshold, derived in objective/kinematics/REFERENCE.md §3.3); c keeps
// its series up to seriesXC with terms through x⁸ (the option named in
// objective/kinematics/REFERENCE.md §3.3: truncation ≈ x¹⁰/13! ≈ 1.6e-20 relative at 0.1), because x − sin x
// cancels to about 1e-11 relative just above 1e-2.
const (
	seriesX  = 1e-2
	seriesXC = 0.1
)

// linkCoeffs returns the coefficients of the closed-form link transform
// (3.2) for curvature norm² k2 = |u|² and length s:
//
//	a = sin(x)/k, b = 2 sin²(x/2)/k², c = (x − sin x)/k³, x = k s,
//
// and cx = cos x = 1 − b k². There is no singularity at k = 0.
func linkCoeffs(k2, s float64) (a, b, c, cx float64) {
	k := math.Sqrt(k2)
	x := k * s
	ax := math.Abs(x)
	if ax >= seriesXC {
		sh, ch := sincos(0.5 * x)
		sx := 2 * sh * ch
		ik := 1 / k
		a = sx * ik
		b = 2 * sh * sh * ik * ik
		c = (x - sx) * ik * ik * ik
		cx = 1 - 2*sh*sh
		return a, b, c, cx
	}
	x2 := x * x
	s2 := s * s
	// c = s³ (1/6 − x²/120 + x⁴/5040 − x⁶/362880 + x⁸/39916800), Taylor
	// series of (x − sin x)/x³ [derived].
	c = s2 * s * (1.0/6 + x2*(-1.0/120+x2*(1.0/5040+x2*(-1.0/362880+x2*(1.0/39916800)))))
	if ax >= seriesX {
		sh, ch := sincos(0.5 * x)
		ik := 1 / k
		a = 2 * sh * ch * ik
		b = 2 * sh * sh * ik * ik
		cx = 1 - 2*sh*sh
		return a, b, c, cx
	}
	// Series of objective/kinematics/REFERENCE.md §3.3 (3.2).
	a = s * (1 + x2*(-1.0/6+x2*(1.0/120+x2*(-1.0/5040+x2*(1.0/362880)))))
	b = s2 * (0.5 + x2*(-1.0/24+x2*(1.0/720+x2*(-1.0/40320+x2*(1.0/3628800)))))
	cx = 1 - b*k2
	return a, b, c, cx
}

// linkPose assembles R = cos x·I + a û + b u uᵀ (which equals I + a û + b û²
// because û² = u uᵀ − k² I) and p = (s I + b û + c û²) e3.
func linkPose(u [3]float64, s, a, b, c, cx float64) Pose {
	u1, u2, u3 := u[0], u[1], u[2]
	bu1, bu2, bu3 := b*u1, b*u2, b*u3
	cu3 := c * u3
	// Built as one composite literal from values in registers, so the
	// compiler writes the result once (no zeroing and no copy of a
	// temporary, whose 16-byte loads of 8-byte stores stall store
	// forwarding).
	return Pose{
		R: [3][3]float64{
			{cx + bu1*u1, bu1*u2 - a*u3, bu1*u3 + a*u2},
			{bu1*u2 + a*u3, cx + bu2*u2, bu2*u3 - a*u1},
			{bu1*u3 - a*u2, bu2*u3 + a*u1, cx + bu3*u3},
		},
		P: [3]float64{bu2 + cu3*u1, cu3*u2 - bu1, s - c*(u1*u1+u2*u2)},
	}
}

// LinkTransform returns the pose of the end of a link of constant body-frame
// curvature/twist u (1/m) and arc length s (m) relative to its start: the
// SE(3) exponential exp(ξ̂ s) with ξ̂ = [[û, e3], [0, 0]] in the closed form
// (3.2) of objective/kinematics/REFERENCE.md §3.3 (Lynch & Park, Modern Robotics, 2017, Prop. 3.25,
// specialised to unit tangent speed):
//
//	R = I + a û + b û²,  p = (s I + b û + c û²) e3,
//	a = sin(x)/k,  b = 2 sin²(x/2)/k²,  c = (x − sin x)/k³,  k = |u|, x = k s.
//
// b is written with sin²(x/2), never (1 − cos x)/k², which cancels; for
// |x| < 1e-2 the coefficients use their Taylor series, so a straight link
// (u = 0) is exact. Any u is allowed, including twist u_z.
func LinkTransform(u [3]float64, s float64) Pose {
	k2 := u[0]*u[0] + u[1]*u[1] + u[2]*u[2]
	a, b, c, cx := linkCoeffs(k2, s)
	return linkPose(u, s, a, b, c, cx)
}

// ArcPose returns the constant-curvature arc transform T(κ, φ, ℓ) in the
// polar form of Webster & Jones, "Design and Kinematic Modeling of Constant
// Curvature Continuum Robots: A Review", IJRR 29(13), 2010 (objective/kinematics/REFERENCE.md §3.4):
// curvature κ (1/m), bending-plane angle φ (rad, measured from +x about +z)
// and arc length ℓ (m).
//
//	[ cosφ cosκℓ   −sinφ   cosφ sinκℓ   cosφ (1 − cosκℓ)/κ ]
//	[ sinφ cosκℓ    cosφ   sinφ sinκℓ   sinφ (1 − cosκℓ)/κ ]
//	[   −sinκℓ        0       cosκℓ          sinκℓ/κ       ]
//
// The tip frame is rolled by φ about the tangent:
// ArcPose(κ, φ, ℓ)·R_z(−φ) = LinkTransform(κ(−sin φ, cos φ, 0), ℓ). The
// terms (1 − cos κℓ)/κ and sin κℓ/κ are evaluated through the coefficients
// of (3.2), so κ → 0 is exact and free of cancellation.
func ArcPose(kappa, phi, ell float64) Pose {
	k2 := kappa * kappa
	a, b, _, cx := linkCoeffs(k2, ell)
	sx := kappa * a  // sin κℓ
	off := kappa * b // (1 − cos κℓ)/κ
	sp, cp := sincos(phi)
	return Pose{
		R: [3][3]float64{
			{cp * cx, -sp, cp * sx},
			{sp * cx, cp, sp * sx},
			{-sx, 0, cx},
		},
		P: [3]float64{cp * off, sp * off, a},
	}
}

// RotZ returns the pure rotation R_z(θ) = [[cos θ, −sin θ, 0], [sin θ,
// cos θ, 0], [0, 0, 1]] (objective/kinematics/REFERENCE.md §1.1).
func RotZ(theta float64) Pose {
	s, c := sincos(theta)
	return Pose{R: [3][3]float64{{c, -s, 0}, {s, c, 0}, {0, 0, 1}}}
}
