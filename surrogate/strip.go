package surrogate

import "math"

// stripResult is the r-weighted strip (curved-beam) model of one
// convolution (PHYSICS §6.1).
type stripResult struct {
	k       float64 // k_conv, N/m
	epsPerE float64 // peak meridional surface strain per unit movement e, 1/m
	mom     moments // integrals over one pitch
}

// stripModel cuts the wall into meridional strips of unit circumferential
// width, neglects hoop action and meridional stretching, and integrates
// over one pitch (PHYSICS §6.1, r-weighted form; the approach of Turner &
// Ford, Stress and deflection studies of flat-plate and toroidal expansion
// bellows, Proc. IMechE, 1957, from memory):
//
//	ζ̄ = ∫ζ/r ds / ∫ds/r,  k_conv = 2πD / ∫(ζ − ζ̄)²/r ds,
//	ε_peak = k_conv·e·max|ζ − ζ̄|·t/(4π r D),
//
// with D = E t³/(12(1 − ν²)) from the across-layer modulus. Over half a
// convolution r is monotone, so |ζ − ζ̄|/r peaks at the root or crown apex.
func stripModel(g *Geometry, m *meridian, e, nu float64) stripResult {
	rMean := g.MeanRadius()
	mo := m.pitchMoments(rMean)
	t, w := g.Wall, g.Depth
	d := e * t * t * t / (12 * (1 - nu*nu))
	zbar := mo.B1 / mo.B0
	iz := mo.B2 - mo.B1*mo.B1/mo.B0
	k := 2 * math.Pi * d / iz
	peak := math.Max((zbar+w/2)/(rMean-w/2), (w/2-zbar)/(rMean+w/2))
	return stripResult{k: k, epsPerE: k * t * peak / (4 * math.Pi * d), mom: mo}
}

// UCfStrip returns the strip-model flexibility factor of a U-convolution
// with semicircular crowns and radial flanks, C1 = 2·rm/w (PHYSICS §6.1):
//
//	Cf_strip = (1−C1)³ + (3π/2)·C1(1−C1)² + 6·C1²(1−C1) + (3π/4)·C1³,
//
// so that k_conv = π Dm E t³ / (2(1−ν²) w³ Cf_strip) with r ≈ Rm.
// Cf_strip(0) = 1 (flat flanks: the guided-cantilever flank of §6.4).
func UCfStrip(c1 float64) float64 {
	a := 1 - c1
	return a*a*a + 1.5*math.Pi*c1*a*a + 6*c1*c1*a + 0.75*math.Pi*c1*c1*c1
}
