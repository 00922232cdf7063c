package surrogate

import (
	"math"

	"plica/surrogate/convolution"
)

// SpineArcs returns the half angle h of the spine and the angle b of each
// blend beside it about the axis, rad (both 0 without a spine): the spine
// is SpineWidth/Rm wide, each blend one convolution depth w at Rm,
// b = w/Rm, cut at the side opposite the spine when h + w/Rm > π
// (surrogate/REFERENCE.md §2.8; fecheck's 3-D shell model has the same).
func (g Geometry) SpineArcs() (h, b float64) {
	if g.SpineWidth <= 0 {
		return 0, 0
	}
	rm := g.MeanRadius()
	h = math.Min(g.SpineWidth/rm/2, math.Pi)
	return h, math.Min(g.Depth/rm, math.Pi-h)
}

// SpineBlend returns the blend fraction f at angle phi about the axis: 0
// on the spine, rising linearly to 1 across an arc of w/Rm beyond each
// edge of the spine, 1 on the convolutions (1 everywhere without a spine).
// The wall's centreline at f is its plain twin moved toward the
// convolution's meridian point by f (SpineTwins).
func (g Geometry) SpineBlend(phi float64) float64 {
	if g.SpineWidth <= 0 {
		return 1
	}
	h, _ := g.SpineArcs()
	d := math.Abs(math.Remainder(phi-g.SpineAngle, 2*math.Pi))
	b := g.Depth / g.MeanRadius()
	switch {
	case d <= h:
		return 0
	case d >= h+b:
		return 1
	}
	return (d - h) / b
}

// SpineTwins returns, for each piece of the half meridian, the plain
// twin's height at the piece's start and end, m: the plain strip of a
// spine pairs the point at parameter u of piece i with the point on Rm at
// z = z_i0 + u·(z_i1 − z_i0), the half pitch shared among the pieces in
// proportion to their length (the continuum limit of fecheck's mesh,
// which shares its elements so; exact for the sinusoid, whose twin lies
// at its own height; surrogate/REFERENCE.md §2.8).
func SpineTwins(m *convolution.Meridian) [][2]float64 {
	l := m.PieceLengths()
	total := 0.0
	for _, v := range l {
		total += v
	}
	out := make([][2]float64, len(l))
	s := 0.0
	for i, v := range l {
		out[i] = [2]float64{m.Pitch() / 2 * s / total, m.Pitch() / 2 * (s + v) / total}
		s += v
	}
	// the last twin ends at the crown apex's height exactly
	out[len(out)-1][1] = m.Pitch() / 2
	return out
}

// 16-point Gauss–Legendre nodes and weights on [−1, 1] (positive half;
// Abramowitz & Stegun, Handbook of Mathematical Functions, 1964, Table 25.4).
var gl16x = [8]float64{
	0.0950125098376374, 0.2816035507792589, 0.4580167776572274, 0.6178762444026438,
	0.7554044083550030, 0.8656312023878318, 0.9445750230732326, 0.9894009349916499,
}
var gl16w = [8]float64{
	0.1894506104550685, 0.1826034150449236, 0.1691565193950025, 0.1495959888165767,
	0.1246289712555339, 0.0951585116824928, 0.0622535239386479, 0.0271524594117541,
}

// blendArea returns the midsurface area of one blend over one pitch, m²
// (surrogate/REFERENCE.md §2.8). With ψ = h + f·b the angle from the
// spine's centre, the centreline at (u, f) is R = Rm + f·(r(u) − Rm),
// Z = z_t(u) + f·(z(u) − z_t(u)) (z_t the plain twin's height), and the
// area element of the surface (R cos ψ, R sin ψ, Z) is
//
//	|X_u × X_ψ| = sqrt(R²·(R_u² + Z_u²) + (Z_u·R_ψ − R_u·Z_ψ)²) du dψ
//
// (elementary differential geometry, common practice). It is integrated
// by 16-point Gauss–Legendre in f over [0, fMax] and in u over each piece
// of the half meridian, twice for the two halves of a pitch (mirror
// images); the integrand is smooth in both (a square root of a positive
// polynomial in f).
func blendArea(g *Geometry, mer *convolution.Meridian, b float64) float64 {
	rm := g.MeanRadius()
	fMax := math.Min(1, b*rm/g.Depth)
	tw := SpineTwins(mer)
	// the meridian's nodes: position, derivative and the twin's
	type node struct{ w, r, z, rp, zp, zt, ztp float64 }
	var ns []node
	for i, p := range mer.Pieces() {
		for k := range 16 {
			x, w := gl16x[k%8], gl16w[k%8]
			if k >= 8 {
				x = -x
			}
			u := (1 + x) / 2
			n := node{w: w / 2, zt: tw[i][0] + u*(tw[i][1]-tw[i][0]), ztp: tw[i][1] - tw[i][0]}
			switch p.Kind {
			case convolution.Line:
				n.r, n.z = p.R0+u*(p.R1-p.R0), p.Z0+u*(p.Z1-p.Z0)
				n.rp, n.zp = p.R1-p.R0, p.Z1-p.Z0
			case convolution.Arc:
				a := p.A0 + u*(p.A1-p.A0)
				s, c := math.Sincos(a)
				n.r, n.z = p.Rc+p.Rad*c, p.Zc+p.Rad*s
				n.rp, n.zp = -p.Rad*s*(p.A1-p.A0), p.Rad*c*(p.A1-p.A0)
			default:
				th := p.A0 + u*(p.A1-p.A0)
				s, c := math.Sincos(th)
				n.r, n.z = p.Rc-p.Rad*c, p.Zc*th
				n.rp, n.zp = p.Rad*s*(p.A1-p.A0), p.Zc*(p.A1-p.A0)
			}
			ns = append(ns, n)
		}
	}
	a := 0.0
	for k := range 16 {
		x, w := gl16x[k%8], gl16w[k%8]
		if k >= 8 {
			x = -x
		}
		f := fMax * (1 + x) / 2
		s := 0.0
		for _, n := range ns {
			r := rm + f*(n.r-rm)
			ru, zu := f*n.rp, n.ztp+f*(n.zp-n.ztp)
			// ∂/∂ψ = (Rm/w)·∂/∂f
			rpsi, zpsi := (n.r-rm)*rm/g.Depth, (n.z-n.zt)*rm/g.Depth
			c := zu*rpsi - ru*zpsi
			s += n.w * math.Sqrt(r*r*(ru*ru+zu*zu)+c*c)
		}
		a += w / 2 * fMax * s
	}
	// dψ = (w/Rm)·df; the two halves of the pitch
	return 2 * a * g.Depth / rm
}

// wallAreaPerLength returns the midsurface area of the wall per unit
// length, m, from a2 = ∫_pitch r ds: 2π·a2/q without a spine; with one,
// the convolutions' share (2π − 2h − 2b)·a2/q, the plain spine's 2h·Rm
// and the two blends' 2·blendArea/q (surrogate/REFERENCE.md §2.8).
func (g *Geometry) wallAreaPerLength(a2 float64) float64 {
	q := g.Pitch
	if g.SpineWidth <= 0 {
		return 2 * math.Pi / q * a2
	}
	h, b := g.SpineArcs()
	mer := g.HalfMeridian()
	return (2*math.Pi-2*h-2*b)/q*a2 + g.MeanRadius()*2*h + 2*blendArea(g, &mer, b)/q
}
