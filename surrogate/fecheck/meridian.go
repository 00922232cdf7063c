package fecheck

import (
	"math"

	"plica/surrogate"
	"plica/surrogate/convolution"
)

// piece is one smooth piece of a wall centreline in the (r, z) half-plane:
// a straight line from (r0, z0) to (r1, z1), a circular arc of radius rad
// about (rc, zc) from angle a0 to a1, or a sinusoid r = rc − rad·cos θ,
// z = zc + lam·θ for θ from a0 to a1.
type piece struct {
	kind           int // pieceLine, pieceArc, pieceSine
	r0, z0, r1, z1 float64
	rc, zc, rad    float64
	lam            float64
	a0, a1         float64
}

const (
	pieceLine = iota
	pieceArc
	pieceSine
)

// at returns the centreline point and the unit tangent (dr, dz) at
// parameter u ∈ [0, 1] of the piece.
func (p *piece) at(u float64) (r, z, tr, tz float64) {
	switch p.kind {
	case pieceLine:
		l := math.Hypot(p.r1-p.r0, p.z1-p.z0)
		return p.r0 + u*(p.r1-p.r0), p.z0 + u*(p.z1-p.z0), (p.r1 - p.r0) / l, (p.z1 - p.z0) / l
	case pieceArc:
		a := p.a0 + u*(p.a1-p.a0)
		s, c := math.Sincos(a)
		d := math.Copysign(1, p.a1-p.a0)
		return p.rc + p.rad*c, p.zc + p.rad*s, -s * d, c * d
	}
	th := p.a0 + u*(p.a1-p.a0)
	s, c := math.Sincos(th)
	d := math.Copysign(1, p.a1-p.a0)
	dr, dz := p.rad*s*d, p.lam*d
	l := math.Hypot(dr, dz)
	return p.rc - p.rad*c, p.zc + p.lam*th, dr / l, dz / l
}

// length returns the arc length of the piece (the sinusoid by the
// composite Simpson rule on 200 intervals, ample for meshing).
func (p *piece) length() float64 {
	switch p.kind {
	case pieceLine:
		return math.Hypot(p.r1-p.r0, p.z1-p.z0)
	case pieceArc:
		return p.rad * math.Abs(p.a1-p.a0)
	}
	const n = 200
	f := func(th float64) float64 { return math.Hypot(p.rad*math.Sin(th), p.lam) }
	h := (p.a1 - p.a0) / n
	s := f(p.a0) + f(p.a1)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		s += w * f(p.a0+float64(i)*h)
	}
	return math.Abs(s * h / 3)
}

// wall is the centreline of one pitch of a wall of revolution, from z = 0
// to z = pitch, with r(0) = r(pitch); the pieces join continuously.
type wall struct {
	pieces []piece
	pitch  float64
	rMean  float64 // radius of a plain (spine) wall, m
}

// halfPieces returns the centreline of half a convolution, root apex at
// z = 0 to crown apex at z = q/2: the surrogate's own meridian
// (surrogate.Geometry.HalfMeridian), so the FE model meshes exactly the
// wall the surrogate integrates.
func halfPieces(g surrogate.Geometry) []piece {
	m := g.HalfMeridian()
	var ps []piece
	for _, c := range m.Pieces() {
		p := piece{r0: c.R0, z0: c.Z0, r1: c.R1, z1: c.Z1, rc: c.Rc, zc: c.Zc, rad: c.Rad, a0: c.A0, a1: c.A1}
		switch c.Kind {
		case convolution.Line:
			p.kind = pieceLine
		case convolution.Arc:
			p.kind = pieceArc
		case convolution.Sine:
			// convolution's z = Zc·θ is this piece's z = zc + lam·θ with zc = 0.
			p.kind, p.lam, p.zc = pieceSine, c.Zc, 0
		}
		ps = append(ps, p)
	}
	return ps
}

// mirror returns the piece reflected in the plane z = q/2 and reversed, so
// that the second half of a pitch runs from the crown apex to the next
// root apex.
func (p piece) mirror(q float64) piece {
	m := p
	switch p.kind {
	case pieceLine:
		m.r0, m.z0, m.r1, m.z1 = p.r1, q-p.z1, p.r0, q-p.z0
	case pieceArc:
		// (rc + R cos a, q − zc − R sin a) = (rc + R cos(−a), zc' + R sin(−a)).
		m.zc = q - p.zc
		m.a0, m.a1 = -p.a1, -p.a0
	case pieceSine:
		// r = rc − R cos θ, z = q − lam θ; with θ' = 2π − θ: z = lam θ' + (q − 2π lam) = lam θ'.
		m.a0, m.a1 = 2*math.Pi-p.a1, 2*math.Pi-p.a0
		m.zc = q - 2*math.Pi*p.lam
	}
	return m
}

// bellowsWall returns one full pitch of the bellows' wall centreline.
func bellowsWall(g surrogate.Geometry) wall {
	h := halfPieces(g)
	ps := append([]piece(nil), h...)
	for i := len(h) - 1; i >= 0; i-- {
		ps = append(ps, h[i].mirror(g.Pitch))
	}
	return wall{pieces: ps, pitch: g.Pitch, rMean: g.MeanRadius()}
}

// cylinderWall returns one "pitch" of a plain cylinder of radius r: a
// straight axial line of length pitch.
func cylinderWall(r, pitch float64) wall {
	return wall{pieces: []piece{{kind: pieceLine, r0: r, z0: 0, r1: r, z1: pitch}}, pitch: pitch, rMean: r}
}

// mpoint is one meridian mesh point: position, unit tangent and the
// factor by which a wall offset along the normal is lengthened there (1
// except at a kink, where the tangent is the mean of the two sides and the
// factor 1/cos of half the kink angle keeps the wall thickness).
type mpoint struct{ r, z, tr, tz, scale float64 }

// points returns 2n+1 points of one pitch (corner and mid-side nodes of n
// quadratic elements, the last equal to the first shifted by one pitch).
// Elements are shared among the pieces in proportion to their length
// (sinusoid pieces are sampled uniformly in θ, which refines the crests),
// at least one per piece, so that kinks fall on element boundaries.
func (w *wall) points(n int) []mpoint {
	np := len(w.pieces)
	if n < np {
		n = np
	}
	lens := make([]float64, np)
	var total float64
	for i := range w.pieces {
		lens[i] = w.pieces[i].length()
		total += lens[i]
	}
	// Largest-remainder apportionment with a minimum of one per piece.
	cnt := make([]int, np)
	left := n
	for i := range cnt {
		cnt[i] = 1
		left--
	}
	for left > 0 {
		best, bi := -math.MaxFloat64, 0
		for i := range cnt {
			if d := lens[i]/total*float64(n) - float64(cnt[i]); d > best {
				best, bi = d, i
			}
		}
		cnt[bi]++
		left--
	}
	out := make([]mpoint, 0, 2*n+1)
	for i := range w.pieces {
		p := &w.pieces[i]
		m := 2 * cnt[i]
		for j := 0; j < m; j++ {
			r, z, tr, tz := p.at(float64(j) / float64(m))
			pt := mpoint{r, z, tr, tz, 1}
			if j == 0 {
				prev := &w.pieces[(i+np-1)%np]
				_, _, pr, pz := prev.at(1)
				if c := pr*tr + pz*tz; c < 1-1e-12 {
					ar, az := pr+tr, pz+tz
					l := math.Hypot(ar, az)
					pt.tr, pt.tz = ar/l, az/l
					pt.scale = 1 / (pt.tr*tr + pt.tz*tz)
				}
			}
			out = append(out, pt)
		}
	}
	f := out[0]
	f.z += w.pitch
	out = append(out, f)
	return out
}
