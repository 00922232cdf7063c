package convolution

import "math"

// Result is a model of one convolution.
type Result struct {
	K                 float64 // k_conv = axial force per movement e of one convolution, N/m
	StrainPerMovement float64 // peak meridional surface strain per unit movement e, 1/m
}

// Strip is the r-weighted strip (curved-beam) model of one convolution
// (surrogate/REFERENCE.md §2.1): it cuts the wall into meridional strips of unit
// circumferential width, neglects hoop action and meridional stretching,
// and integrates over one pitch (r-weighted form; the approach of Turner &
// Ford, Stress and deflection studies of flat-plate and toroidal expansion
// bellows, Proc. IMechE, 1957, from memory):
//
//	ζ̄ = ∫ζ/r ds / ∫ds/r,  k_conv = 2πD / ∫(ζ − ζ̄)²/r ds,
//	ε_peak = k_conv·e·max|ζ − ζ̄|·t/(4π r D),
//
// with D = E t³/(12(1 − ν²)) for wall t and meridional modulus E. Over
// half a convolution r is monotone, so |ζ − ζ̄|/r peaks at the root or
// crown apex. It also returns the integrals over one pitch.
func Strip(m *Meridian, wall, e, nu float64) (Result, Moments) {
	rMean := m.rMean
	mo := m.PitchMoments()
	t, w := wall, m.depth
	d := e * t * t * t / (12 * (1 - nu*nu))
	zbar := mo.B1 / mo.B0
	iz := mo.B2 - mo.B1*mo.B1/mo.B0
	k := 2 * math.Pi * d / iz
	peak := math.Max((zbar+w/2)/(rMean-w/2), (w/2-zbar)/(rMean+w/2))
	return Result{K: k, StrainPerMovement: k * t * peak / (4 * math.Pi * d)}, mo
}
