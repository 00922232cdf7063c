package kinematics

// LinkTransformIntegral returns the link transform of LinkTransform(u, s)
// together with the integral of its position over the link,
// J = ∫₀ˢ p(τ) dτ, in the link's start frame, m². Integrating the closed
// form p(τ) = (τ I + b(τ) û + c(τ) û²) e3 of (3.2) term by term, with
// ∫ b = c and ∫ c = d, gives (objective/kinematics/REFERENCE.md §3.3, derived)
//
//	J = (s²/2 I + c û + d û²) e3,  d = (x²/2 − 1 + cos x)/k⁴,  x = k s.
//
// d cancels for small x; below |x| = 0.5 it uses its Taylor series
// s⁴ (1/24 − x²/720 + x⁴/40320 − x⁶/3628800 + x⁸/479001600), whose
// truncation is below 1e-16 relative there [derived]. The compliance
// integrals of objective use J for the self-weight moment in closed form.
func LinkTransformIntegral(u [3]float64, s float64) (Pose, [3]float64) {
	k2 := u[0]*u[0] + u[1]*u[1] + u[2]*u[2]
	a, b, c, cx := linkCoeffs(k2, s)
	x2 := k2 * s * s
	var d float64
	if x2 < 0.25 {
		s4 := s * s * s * s
		d = s4 * (1.0/24 + x2*(-1.0/720+x2*(1.0/40320+x2*(-1.0/3628800+x2*(1.0/479001600)))))
	} else {
		// x²/2 − (1 − cos x) with 1 − cos x = b k²
		d = (0.5*x2 - b*k2) / (k2 * k2)
	}
	u1, u2, u3 := u[0], u[1], u[2]
	J := [3]float64{c*u2 + d*u1*u3, -c*u1 + d*u2*u3, 0.5*s*s - d*(u1*u1+u2*u2)}
	return linkPose(u, s, a, b, c, cx), J
}
