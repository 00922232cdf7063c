// Package shell is a linear axisymmetric thin-shell (Kirchhoff–Love)
// finite-element model on a meridian polyline: conical-frustum elements,
// three degrees of freedom per node, banded Cholesky solve. Units are
// consistent (any set).
package shell

import (
	"math"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/gonum/mat"
)

// Wall is the shell wall: meridional modulus Es (across layers of a
// print), hoop modulus Et (in layer), one Poisson ratio Nu and thickness T.
// The orthotropic constitutive matrices use the geometric-mean coupling
// ν·sqrt(Es·Et) (Huber's approximation for orthotropic plates, Huber 1923,
// from memory), which is symmetric, positive definite for ν < 1 and
// isotropic when Es = Et:
//
//	[N_s, N_θ] = t/(1−ν²)·[[Es, ν√(Es Et)], [ν√(Es Et), Et]]·[ε_s, ε_θ]
//	[M_s, M_θ] = t³/(12(1−ν²))·(same matrix)·[κ_s, κ_θ]
type Wall struct{ Es, Et, Nu, T float64 }

// gauss5 are the 5-point Gauss–Legendre nodes and weights on [0, 1]
// (Abramowitz & Stegun 1964, Table 25.4, mapped from [−1, 1]).
var gauss5x, gauss5w = func() ([5]float64, [5]float64) {
	x := [5]float64{-0.9061798459386640, -0.5384693101056831, 0, 0.5384693101056831, 0.9061798459386640}
	w := [5]float64{0.2369268850561891, 0.4786286704993665, 0.5688888888888889, 0.4786286704993665, 0.2369268850561891}
	for i := range x {
		x[i] = (x[i] + 1) / 2
		w[i] /= 2
	}
	return x, w
}()

// elementStiffness returns the global 6×6 stiffness of the conical-frustum
// element from (r1, z1) to (r2, z2) (surrogate/REFERENCE.md §2.3): local DOFs per node
// u (tangential, linear), w (normal, cubic Hermite with slopes ×ℓ),
// χ = dw/ds; strains ε_s = du/ds, ε_θ = (u cφ − w sφ)/r, κ_s = −d²w/ds²,
// κ_θ = −(cφ/r) dw/ds; K_e = 2π ∫ Bᵀ C B r ds by 5-point Gauss; global DOFs
// (U radial, W axial, χ) with u = U cφ + W sφ, w = −U sφ + W cφ.
// This is the frustum element of Grafton & Strome, Analysis of
// axisymmetrical shells by the direct stiffness method, AIAA J. 1, 1963
// (from memory).
func elementStiffness(r1, z1, r2, z2 float64, m Wall, ke *[6][6]float64) {
	l := math.Hypot(r2-r1, z2-z1)
	c, s := (r2-r1)/l, (z2-z1)/l
	f := m.T / (1 - m.Nu*m.Nu)
	a11, a22, a12 := f*m.Es, f*m.Et, f*m.Nu*math.Sqrt(m.Es*m.Et)
	g := m.T * m.T / 12
	d11, d22, d12 := g*a11, g*a22, g*a12

	var kl [6][6]float64
	for q, xi := range gauss5x {
		r := r1 + xi*(r2-r1)
		x2, x3 := xi*xi, xi*xi*xi
		h := [4]float64{1 - 3*x2 + 2*x3, (xi - 2*x2 + x3) * l, 3*x2 - 2*x3, (-x2 + x3) * l}
		hp := [4]float64{(-6*xi + 6*x2) / l, 1 - 4*xi + 3*x2, (6*xi - 6*x2) / l, -2*xi + 3*x2}             // dw/ds
		hpp := [4]float64{(-6 + 12*xi) / (l * l), (-4 + 6*xi) / l, (6 - 12*xi) / (l * l), (-2 + 6*xi) / l} // d²w/ds²
		var b [4][6]float64
		b[0][0], b[0][3] = -1/l, 1/l
		b[1][0], b[1][3] = c*(1-xi)/r, c*xi/r
		for k, j := range [4]int{1, 2, 4, 5} {
			b[1][j] = -s * h[k] / r
			b[2][j] = -hpp[k]
			b[3][j] = -c * hp[k] / r
		}
		wq := 2 * math.Pi * gauss5w[q] * r * l
		for i := 0; i < 6; i++ {
			// (C B)_{·,i}
			cb0 := a11*b[0][i] + a12*b[1][i]
			cb1 := a12*b[0][i] + a22*b[1][i]
			cb2 := d11*b[2][i] + d12*b[3][i]
			cb3 := d12*b[2][i] + d22*b[3][i]
			for j := 0; j <= i; j++ {
				v := wq * (b[0][j]*cb0 + b[1][j]*cb1 + b[2][j]*cb2 + b[3][j]*cb3)
				kl[j][i] += v
			}
		}
	}
	for i := 0; i < 6; i++ {
		for j := 0; j < i; j++ {
			kl[i][j] = kl[j][i]
		}
	}
	// K = Tᵀ K_l T, T = blockdiag(R, R), R = [[c, s, 0], [−s, c, 0], [0, 0, 1]].
	var t [6][6]float64
	for n := 0; n < 2; n++ {
		o := 3 * n
		t[o][o], t[o][o+1] = c, s
		t[o+1][o], t[o+1][o+1] = -s, c
		t[o+2][o+2] = 1
	}
	var kt [6][6]float64 // K_l T
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			var v float64
			for k := 0; k < 6; k++ {
				v += kl[i][k] * t[k][j]
			}
			kt[i][j] = v
		}
	}
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			var v float64
			for k := 0; k < 6; k++ {
				v += t[k][i] * kt[k][j]
			}
			ke[i][j] = v
		}
	}
}

// Problem is a linear axisymmetric shell problem on a meridian polyline
// (nodes R[i], Z[i]): three global DOFs per node (U radial, W axial, χ
// rotation), index 3i+0..2. Loads are total (around the circumference)
// nodal forces.
type Problem struct {
	R, Z  []float64
	Wall  Wall
	Fixed []bool    // per DOF
	Value []float64 // prescribed values of fixed DOFs
	Load  []float64 // nodal loads of free DOFs (nil: none)
}

const shellBand = 5 // half bandwidth: an element couples 6 consecutive DOFs

// SolveError is a shell problem Solve cannot solve (too few nodes, a
// stiffness matrix that is not positive definite, a non-finite result).
// Its message names the package; Reason is the bare reason.
type SolveError struct{ Reason string }

func (e *SolveError) Error() string { return "shell: " + e.Reason }

// Solve returns the displacements and the reactions K·d − Load; a failure
// is a *SolveError.
func (p *Problem) Solve() (d, react []float64, err error) {
	nn := len(p.R)
	if nn < 2 {
		return nil, nil, &SolveError{Reason: "mesh needs at least two nodes"}
	}
	n := 3 * nn
	bw := shellBand + 1
	kb := make([]float64, n*bw) // upper band, row-major: K[i][j] at i*bw + j − i
	var ke [6][6]float64
	for e := 0; e+1 < nn; e++ {
		elementStiffness(p.R[e], p.Z[e], p.R[e+1], p.Z[e+1], p.Wall, &ke)
		o := 3 * e
		for i := 0; i < 6; i++ {
			for j := i; j < 6; j++ {
				kb[(o+i)*bw+j-i] += ke[i][j]
			}
		}
	}
	orig := append([]float64(nil), kb...)
	at := func(i, j int) float64 { // symmetric access into orig
		if j < i {
			i, j = j, i
		}
		if j-i > shellBand {
			return 0
		}
		return orig[i*bw+j-i]
	}
	rhs := make([]float64, n)
	for i := range rhs {
		if p.Load != nil && !p.Fixed[i] {
			rhs[i] = p.Load[i]
		}
	}
	for j := 0; j < n; j++ {
		if !p.Fixed[j] {
			continue
		}
		v := p.Value[j]
		for i := max(0, j-shellBand); i <= min(n-1, j+shellBand); i++ {
			if i != j && !p.Fixed[i] {
				rhs[i] -= at(i, j) * v
			}
		}
		for i := max(0, j-shellBand); i <= j; i++ {
			kb[i*bw+j-i] = 0
		}
		for k := j; k <= min(n-1, j+shellBand); k++ {
			kb[j*bw+k-j] = 0
		}
		kb[j*bw] = 1
		rhs[j] = v
	}
	// Banded Cholesky (LAPACK dpbtrf/dpbtrs through gonum). mat.BandCholesky
	// would add an O(n²) condition estimate that costs more than the solve.
	a := mat.NewSymBandDense(n, shellBand, kb).RawSymBand()
	u, ok := lapack64.Pbtrf(a)
	if !ok {
		return nil, nil, &SolveError{Reason: "stiffness matrix is not positive definite"}
	}
	d = rhs
	lapack64.Pbtrs(u, blas64.General{Rows: n, Cols: 1, Stride: 1, Data: d})
	for _, v := range d {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, nil, &SolveError{Reason: "solve produced a non-finite displacement"}
		}
	}
	react = make([]float64, n)
	for i := 0; i < n; i++ {
		var v float64
		for j := max(0, i-shellBand); j <= min(n-1, i+shellBand); j++ {
			v += at(i, j) * d[j]
		}
		if p.Load != nil {
			v -= p.Load[i]
		}
		react[i] = v
	}
	return d, react, nil
}

// PeakMeridionalStrain returns, for displacements d, max |ε_s ± κ_s t/2| over the element ends
// (κ_s is linear and ε_s constant in an element, so the ends bound it).
func (p *Problem) PeakMeridionalStrain(d []float64) float64 {
	var peak float64
	for e := 0; e+1 < len(p.R); e++ {
		dr, dz := p.R[e+1]-p.R[e], p.Z[e+1]-p.Z[e]
		l := math.Hypot(dr, dz)
		c, s := dr/l, dz/l
		o := 3 * e
		u1 := c*d[o] + s*d[o+1]
		w1 := -s*d[o] + c*d[o+1]
		u2 := c*d[o+3] + s*d[o+4]
		w2 := -s*d[o+3] + c*d[o+4]
		x1, x2 := d[o+2], d[o+5]
		es := (u2 - u1) / l
		// κ_s = −d²w/ds² at ξ = 0 and ξ = 1.
		k0 := -((-6*w1+6*w2)/(l*l) + (-4*x1-2*x2)/l)
		k1 := -((6*w1-6*w2)/(l*l) + (2*x1+4*x2)/l)
		for _, k := range [2]float64{k0, k1} {
			peak = math.Max(peak, math.Abs(es+k*p.Wall.T/2))
			peak = math.Max(peak, math.Abs(es-k*p.Wall.T/2))
		}
	}
	return peak
}
