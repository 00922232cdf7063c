package surrogate

import (
	"math"

	"plica/surrogate/convolution"
)

// stripResult is the r-weighted strip model of one convolution
// (convolution.Strip, surrogate/REFERENCE.md §2.1) with its integrals over one pitch.
type stripResult struct {
	convolution.Result
	mom convolution.Moments
}

// stripModel runs the strip model on the wall with meridional modulus e.
func stripModel(g *Geometry, e, nu float64) stripResult {
	m := g.HalfMeridian()
	r, mo := convolution.Strip(&m, g.Wall, e, nu)
	return stripResult{Result: r, mom: mo}
}

// UCfStrip returns the strip-model flexibility factor of a U-convolution
// with semicircular crowns and radial flanks, C1 = 2·rm/w (surrogate/REFERENCE.md §2.1):
//
//	Cf_strip = (1−C1)³ + (3π/2)·C1(1−C1)² + 6·C1²(1−C1) + (3π/4)·C1³,
//
// so that k_conv = π Dm E t³ / (2(1−ν²) w³ Cf_strip) with r ≈ Rm.
// Cf_strip(0) = 1 (flat flanks: the guided-cantilever flank of surrogate/REFERENCE.md §2.4).
func UCfStrip(c1 float64) float64 {
	a := 1 - c1
	return a*a*a + 1.5*math.Pi*c1*a*a + 6*c1*c1*a + 0.75*math.Pi*c1*c1*c1
}
