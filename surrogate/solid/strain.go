package solid

import "math"

// Strain is a small-strain tensor in engineering components
// [ε11, ε22, ε33, γ12, γ13, γ23] with 1 = x or r, 2 = y or z and
// 3 = the out-of-plane or circumferential (θ) direction. In harmonic 1 a
// nodal Strain holds amplitudes: the normal components and γ12 vary as
// cos θ, γ13 and γ23 as sin θ.
type Strain [6]float64

// Harmonic1 returns the harmonic-1 amplitudes e evaluated at the
// circumferential angle θ.
func (e Strain) Harmonic1(theta float64) Strain {
	s, c := math.Sincos(theta)
	return Strain{e[0] * c, e[1] * c, e[2] * c, e[3] * c, e[4] * s, e[5] * s}
}

// Principal returns the principal strains, largest first, by the
// closed-form eigenvalues of a symmetric 3×3 matrix (Smith, Eigenvalues of
// a symmetric 3×3 matrix, Communications of the ACM 4(4), 1961; from
// memory).
func (e Strain) Principal() [3]float64 {
	a11, a22, a33 := e[0], e[1], e[2]
	a12, a13, a23 := e[3]/2, e[4]/2, e[5]/2
	p1 := a12*a12 + a13*a13 + a23*a23
	q := (a11 + a22 + a33) / 3
	b11, b22, b33 := a11-q, a22-q, a33-q
	p2 := b11*b11 + b22*b22 + b33*b33 + 2*p1
	if p1 == 0 {
		d := [3]float64{a11, a22, a33}
		if d[0] < d[1] {
			d[0], d[1] = d[1], d[0]
		}
		if d[1] < d[2] {
			d[1], d[2] = d[2], d[1]
		}
		if d[0] < d[1] {
			d[0], d[1] = d[1], d[0]
		}
		return d
	}
	p := math.Sqrt(p2 / 6)
	det := b11*(b22*b33-a23*a23) - a12*(a12*b33-a23*a13) + a13*(a12*a23-b22*a13)
	r := det / (2 * p * p * p)
	r = max(-1, min(1, r))
	phi := math.Acos(r) / 3
	l1 := q + 2*p*math.Cos(phi)
	l3 := q + 2*p*math.Cos(phi+2*math.Pi/3)
	return [3]float64{l1, 3*q - l1 - l3, l3}
}

// MaxPrincipal returns the principal strain of largest magnitude, with
// its sign (positive in tension).
func (e Strain) MaxPrincipal() float64 {
	p := e.Principal()
	if -p[2] > p[0] {
		return p[2]
	}
	return p[0]
}

// Along returns the normal strain along the in-plane unit direction
// (c1, c2) of the 1–2 plane (for a wall, the meridional strain with the
// midline tangent).
func (e Strain) Along(c1, c2 float64) float64 {
	return e[0]*c1*c1 + e[1]*c2*c2 + e[3]*c1*c2
}

// Stress returns the stress [σ11, σ22, σ33, τ12, τ13, τ23], Pa, of an
// isotropic material (Hooke's law; common practice). For a plane-stress
// strain with ε33 filled in (as the solver does) σ33 comes out zero.
func (m Material) Stress(e Strain) [6]float64 {
	g := m.E / (2 * (1 + m.Nu))
	lam := m.E * m.Nu / ((1 + m.Nu) * (1 - 2*m.Nu))
	tr := e[0] + e[1] + e[2]
	return [6]float64{
		lam*tr + 2*g*e[0], lam*tr + 2*g*e[1], lam*tr + 2*g*e[2],
		g * e[3], g * e[4], g * e[5],
	}
}
