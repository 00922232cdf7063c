package kinematics

import (
	"fmt"
	"math"
)

// LinkTube is one tube as it enters the equilibrium of a single link
// (objective/kinematics/REFERENCE.md §3.1): its base angle, its stiffness in its own material frame
// and its precurvature in that link (zero where the tube is straight).
type LinkTube struct {
	// Theta is the tube angle θ_i about +z, rad.
	Theta float64
	// Bending is the symmetric EI tensor about the tube's own x and y axes,
	// N·m². The off-diagonal entry is taken as the mean of [0][1] and [1][0].
	Bending [2][2]float64
	// Torsion is GJ, N·m².
	Torsion float64
	// Precurvature is u*_i = (u*_x, u*_y, u*_z) in the tube's own frame in
	// this link, 1/m; zero where the tube is straight. u*_z is a pre-twist
	// (0 for planar tubes).
	Precurvature [3]float64
}

// rotatedBending returns the entries of R_z(θ) B R_z(θ)ᵀ for the symmetric
// tensor B = [[p, q], [q, r]], given c = cos θ and s = sin θ. Writing
// B = m I + D with m = (p + r)/2 and the traceless part D, the rotation turns
// D by 2θ [derived]:
//
//	xx = m + d cos 2θ − q sin 2θ, yy = m − (d cos 2θ − q sin 2θ),
//	xy = d sin 2θ + q cos 2θ,     d = (p − r)/2.
//
// For q = 0 this is objective/kinematics/REFERENCE.md (3.1): [[a c² + b s², (a − b) c s], …].
func rotatedBending(m, d, q, c, s float64) (xx, xy, yy float64) {
	c2 := c*c - s*s
	s2 := 2 * c * s
	dd := d*c2 - q*s2
	return m + dd, d*s2 + q*c2, m - dd
}

// bendingParts splits a symmetric 2×2 tensor into its mean m, half
// difference d and off-diagonal q (mean of the two off-diagonal entries).
func bendingParts(b [2][2]float64) (m, d, q float64) {
	return 0.5 * (b[0][0] + b[1][1]), 0.5 * (b[0][0] - b[1][1]), 0.5 * (b[0][1] + b[1][0])
}

// EquilibriumCurvature returns the body-frame curvature u (1/m) of one link
// and the composite stiffness K = Σ R_z(θ_i) K_i R_z(θ_i)ᵀ (N·m², z entry
// Σ GJ_i) of the tubes present in it, from the moment balance (3.1) of
// objective/kinematics/REFERENCE.md §3.1:
//
//	u = (Σ K̃_i)⁻¹ Σ K̃_i ũ_i,  K̃_i = R_z(θ_i) K_i R_z(θ_i)ᵀ,  ũ_i = R_z(θ_i) u*_i.
//
// The isotropic form is from Webster, Romano & Cowan, IEEE T-RO 2009 and
// Dupont, Lock, Itkowitz & Butler, IEEE T-RO 2010 (from memory); the
// anisotropic form with full symmetric tensors is derived there. R_z mixes
// only x and y, so the x–y part is a 2×2 solve (Cramer's rule) and
// u_z = Σ GJ_i u*_iz / Σ GJ_i (0 for planar tubes). Since K̃_i ũ_i =
// R_z(θ_i) K_i u*_i, the moments are rotated rather than the curvatures.
//
// It returns an error if tubes is empty or the summed tensor is not
// positive definite (EI_xx > 0, det > 0 and Σ GJ > 0).
func EquilibriumCurvature(tubes []LinkTube) (u [3]float64, K [3][3]float64, err error) {
	if len(tubes) == 0 {
		return u, K, fmt.Errorf("equilibrium curvature of a link with no tubes")
	}
	var kxx, kxy, kyy, gj, mx, my, mz float64
	for _, t := range tubes {
		s, c := sincos(t.Theta)
		m, d, q := bendingParts(t.Bending)
		xx, xy, yy := rotatedBending(m, d, q, c, s)
		kxx += xx
		kxy += xy
		kyy += yy
		// Moment K_i u*_i in the tube's own frame, then rotated by θ_i.
		ux, uy := t.Precurvature[0], t.Precurvature[1]
		bx := t.Bending[0][0]*ux + q*uy
		by := q*ux + t.Bending[1][1]*uy
		mx += c*bx - s*by
		my += s*bx + c*by
		gj += t.Torsion
		mz += t.Torsion * t.Precurvature[2]
	}
	K = [3][3]float64{{kxx, kxy, 0}, {kxy, kyy, 0}, {0, 0, gj}}
	det := kxx*kyy - kxy*kxy
	if !(kxx > 0 && det > 0 && gj > 0) || math.IsInf(det, 0) || math.IsInf(gj, 0) {
		return u, K, fmt.Errorf("summed link stiffness is not positive definite "+
			"(EI_xx %g N·m², EI_xy %g N·m², EI_yy %g N·m², det %g N²·m⁴, GJ %g N·m²)", kxx, kxy, kyy, det, gj)
	}
	u[0] = (mx*kyy - kxy*my) / det
	u[1] = (kxx*my - kxy*mx) / det
	u[2] = mz / gj
	return u, K, nil
}
