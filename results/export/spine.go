package export

import (
	"math"

	"plica/surrogate"
	"plica/surrogate/convolution"
)

// column is one meridian section's angle about the axis in a spined
// mesh, with the blend fraction f there and its slopes df/dφ on the sides
// toward the previous and the next column (they differ at the blend's
// kinks), and the angles to those columns.
type column struct {
	phi, f, slopeL, slopeR, dL, dR float64
}

// spineColumns returns the angles of a spined wall's sections, ascending
// from the spine's first edge (results/export/REFERENCE.md §7): the spine
// in equal steps no wider than 2π/k, each blend in equal steps no wider
// than half that and at least 8 (the graded part), and the convolutions
// between the blends in equal steps no wider than 2π/k. The spine's edges
// and the blends' outer edges, where f has kinks, are columns.
func spineColumns(g surrogate.Geometry, k int) []column {
	h, b := g.SpineArcs()
	step := 2 * math.Pi / float64(k)
	type arc struct {
		len   float64
		n     int
		slope float64 // df/dψ along the arc, ψ from the spine's centre
		f0    float64
	}
	sb := g.MeanRadius() / g.Depth // df/dψ across a blend
	nb := max(8, int(math.Ceil(b/(step/2)-1e-9)))
	rest := 2*math.Pi - 2*h - 2*b
	arcs := []arc{{2 * h, max(1, int(math.Ceil(2*h/step-1e-9))), 0, 0}, {b, nb, sb, 0}}
	if rest > 1e-12 {
		arcs = append(arcs, arc{rest, max(1, int(math.Ceil(rest/step-1e-9))), 0, 1})
	} else {
		rest = 0
	}
	arcs = append(arcs, arc{b, nb, -sb, b * sb})
	var cols []column
	psi := -h
	for ai, a := range arcs {
		d := a.len / float64(a.n)
		for i := 0; i < a.n; i++ {
			c := column{phi: g.SpineAngle + psi + float64(i)*d, f: math.Min(1, a.f0+a.slope*float64(i)*d), slopeR: a.slope, dR: d}
			if i > 0 {
				c.slopeL, c.dL = a.slope, d
			} else {
				p := arcs[(ai+len(arcs)-1)%len(arcs)]
				c.slopeL, c.dL = p.slope, p.len/float64(p.n)
			}
			cols = append(cols, c)
		}
		psi += a.len
	}
	for i := range cols {
		cols[i].f = math.Max(0, math.Min(1, cols[i].f))
	}
	return cols
}

// twinPoints returns the twin heights z_t of the half meridian's points
// (halfPoints, same order): the plain strip of a spine pairs each point
// with the point on Rm at z_t (surrogate.SpineTwins).
func twinPoints(mer convolution.Meridian, perPiece int, t float64) []float64 {
	tw := surrogate.SpineTwins(&mer)
	var out []float64
	for pi, p := range mer.Pieces() {
		np := piecePoints(p, perPiece, t)
		for i := 0; i < np; i++ {
			if len(out) > 0 && i == 0 {
				continue
			}
			u := float64(i) / float64(np-1)
			out = append(out, tw[pi][0]+u*(tw[pi][1]-tw[pi][0]))
		}
	}
	return out
}

// offsetScaled is offset with the distance d times scale(i, n) at point
// i, n the unit direction the point moves in.
func offsetScaled(c [][2]float64, d float64, scale func(i int, n [2]float64) float64) [][2]float64 {
	one := offset(c, 1)
	out := make([][2]float64, len(c))
	for i := range c {
		v := [2]float64{one[i][0] - c[i][0], one[i][1] - c[i][1]}
		l := math.Hypot(v[0], v[1])
		s := scale(i, [2]float64{v[0] / l, v[1] / l})
		out[i] = [2]float64{c[i][0] + d*s*v[0], c[i][1] + d*s*v[1]}
	}
	return out
}

// blendScale returns the factor by which the in-plane offset of a point
// of a blended centreline is lengthened so that the wall is t thick
// normal to its midsurface: sqrt(1 + (n·∂b/∂φ / r)²), n the unit in-plane
// offset direction, ∂b/∂φ = df/dφ·(c − c_t) the centreline's change with
// the angle (c its convolution point, c_t its twin), r its radius; at a
// kink of f the mean of the two sides' factors weighted by the angles to
// the neighbouring columns, so that the trapezoid rule round the axis
// takes each side's own (results/export/REFERENCE.md §7).
func blendScale(col column, r float64, n, diff [2]float64) float64 {
	side := func(slope float64) float64 {
		tg := slope * (n[0]*diff[0] + n[1]*diff[1]) / r
		return math.Sqrt(1 + tg*tg)
	}
	if col.slopeL == col.slopeR {
		return side(col.slopeR)
	}
	return (side(col.slopeL)*col.dL + side(col.slopeR)*col.dR) / (col.dL + col.dR)
}

// spinedBellows meshes a revolved bellows with a spine and its blends
// (surrogate/REFERENCE.md §2.8, results/export/REFERENCE.md §7): at each
// column the centreline is the plain twin moved toward the convolution by
// the blend fraction f, offset ±t/2 in the meridian plane lengthened by
// blendScale.
func spinedBellows(g surrogate.Geometry, n int, collar float64, k, perPiece int) (Mesh, error) {
	mer := g.HalfMeridian()
	c, err := centreline(mer, n, g.Wall, collar, perPiece)
	if err != nil {
		return Mesh{}, err
	}
	half := twinPoints(mer, perPiece, g.Wall)
	q, rm := mer.Pitch(), g.MeanRadius()
	// the twins of the whole centreline, as it is built (wallAndPlain)
	tw := make([][2]float64, 0, len(c))
	if collar > 0 {
		tw = append(tw, c[0])
	}
	for kk := 0; kk < n; kk++ {
		z0 := float64(kk) * q
		for i, z := range half {
			if kk > 0 && i == 0 {
				continue
			}
			tw = append(tw, [2]float64{rm, z0 + z})
		}
		for i := len(half) - 2; i >= 0; i-- {
			tw = append(tw, [2]float64{rm, z0 + q - half[i]})
		}
	}
	if collar > 0 {
		tw = append(tw, c[len(c)-1])
	}
	cols := spineColumns(g, k)
	secs := make([]Section, len(cols))
	phis := make([]float64, len(cols))
	for j, col := range cols {
		b := make([][2]float64, len(c))
		for i := range c {
			b[i] = [2]float64{tw[i][0] + col.f*(c[i][0]-tw[i][0]), tw[i][1] + col.f*(c[i][1]-tw[i][1])}
		}
		sc := func(i int, nv [2]float64) float64 {
			return blendScale(col, b[i][0], nv, [2]float64{c[i][0] - tw[i][0], c[i][1] - tw[i][1]})
		}
		outer, inner := offsetScaled(b, g.Wall/2, sc), offsetScaled(b, -g.Wall/2, sc)
		secs[j], phis[j] = toSection(outer, inner, collar), col.phi
	}
	return revolveSections(secs, phis)
}
