package surrogate

import "math"

// SpineTable holds the generated factors of a spine from the 3-D shell
// model (surrogate/REFERENCE.md §6.4), over the spine arc fraction
// β = SpineWidth/(π·Dm) and w/Dm for one profile at one depth-to-pitch
// ratio: the torsion factor f = GJ(spine)/GJ(no spine), and the
// corrections of the axial and bending stiffness of the spine-with-blends
// closed form (§2.8), c = [FE(spine)/FE(no spine)] / [closed form(spine)/
// closed form(no spine)]. Each is stored β fastest; its β = 0 row is 1
// exactly.
type SpineTable struct {
	Profile    Profile
	DepthPitch float64 // w/q the table was generated at
	Beta       []float64
	DepthDiam  []float64
	Factor     []float64 // GJ
	Axial      []float64 // EA
	Stretch    []float64 // EI in bending that stretches and compresses the spine
	Neutral    []float64 // EI in bending with the spine on the neutral plane
}

// SpineFactors are the generated factors of a spine at one geometry
// (all 1 without a spine, surrogate/REFERENCE.md §6.4).
type SpineFactors struct {
	GJ        float64 // GJ(spine)/GJ(no spine)
	EA        float64 // correction of the closed-form EA
	EIStretch float64 // correction of the closed-form EI that stretches the spine
	EINeutral float64 // correction of the closed-form EI with the spine on the neutral plane
}

// Spine arc fraction limits of the torsion factor (surrogate/REFERENCE.md §6.4).
const (
	// spineBetaMin and spineBetaMax bound the spined columns of the
	// tables.
	spineBetaMin = 0.05
	spineBetaMax = 0.15
)

// SpineFraction returns β = SpineWidth/(π·Dm), the share of the
// circumference taken by the spine (0 without one).
func (g Geometry) SpineFraction() float64 {
	if g.SpineWidth <= 0 {
		return 0
	}
	return g.SpineWidth / (2 * math.Pi * g.MeanRadius())
}

// spineTableFor returns the torsion table of profile p (nil for a
// trapezoid, which has none: the sinusoid's table stands in for it).
func spineTableFor(p Profile) *SpineTable {
	if p == UShape {
		return &spineUShape
	}
	return &spineSinusoid
}

// Lookup returns the factor at (β, w/Dm), bilinear in both over the
// spined columns (β ≥ Beta[1]); both are clamped to the table
// (OutOfRange reports a spined geometry outside it). β = 0 gives 1
// exactly. A spine narrower than Beta[1] takes the Beta[1] column, not a
// blend toward 1: most of the loss comes from the edge zones where the
// convolutions run out into the spine, which any spine has
// (surrogate/REFERENCE.md §6.4).
func (t *SpineTable) Lookup(beta, wd float64) float64 {
	return t.lookup(t.Factor, beta, wd)
}

// LookupAll returns every factor at (β, w/Dm), as Lookup does for GJ.
func (t *SpineTable) LookupAll(beta, wd float64) SpineFactors {
	return SpineFactors{GJ: t.lookup(t.Factor, beta, wd), EA: t.lookup(t.Axial, beta, wd),
		EIStretch: t.lookup(t.Stretch, beta, wd), EINeutral: t.lookup(t.Neutral, beta, wd)}
}

func (t *SpineTable) lookup(factor []float64, beta, wd float64) float64 {
	if beta <= 0 {
		return 1
	}
	i, u := bracket(t.Beta[1:], beta)
	i++
	j, v := bracket(t.DepthDiam, wd)
	nb := len(t.Beta)
	at := func(a, b int) float64 { return factor[b*nb+a] }
	return (1-u)*(1-v)*at(i, j) + u*(1-v)*at(i+1, j) + (1-u)*v*at(i, j+1) + u*v*at(i+1, j+1)
}

// bracket returns the interval index i of x in the ascending axis a and
// the fraction u ∈ [0, 1] across it, clamping x to the axis.
func bracket(a []float64, x float64) (int, float64) {
	n := len(a)
	if x <= a[0] {
		return 0, 0
	}
	if x >= a[n-1] {
		return n - 2, 1
	}
	i := 0
	for i < n-2 && x > a[i+1] {
		i++
	}
	return i, (x - a[i]) / (a[i+1] - a[i])
}

// SpineTorsionFactor returns GJ(spine)/GJ(no spine) of the geometry's
// revolved wall from the generated tables (1 without a spine), read at
// the bellows' pitch over mean diameter q/Dm: the table's w/Dm axis is
// q/Dm times the table's w/q (surrogate/REFERENCE.md §6.4).
func (g Geometry) SpineTorsionFactor() float64 {
	return g.SpineFactors().GJ
}

// SpineFactors returns all the generated spine factors of the geometry,
// read like SpineTorsionFactor (all exactly 1 without a spine).
func (g Geometry) SpineFactors() SpineFactors {
	beta := g.SpineFraction()
	if beta == 0 {
		return SpineFactors{GJ: 1, EA: 1, EIStretch: 1, EINeutral: 1}
	}
	t := spineTableFor(g.Profile)
	return t.LookupAll(beta, t.DepthPitch*g.Pitch/(2*g.MeanRadius()))
}

// spinePitchDiam returns the q/Dm range of the table of profile p.
func spinePitchDiam(p Profile) (lo, hi float64) {
	t := spineTableFor(p)
	return t.DepthDiam[0] / t.DepthPitch, t.DepthDiam[len(t.DepthDiam)-1] / t.DepthPitch
}
