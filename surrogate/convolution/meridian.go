package convolution

import "math"

type segKind uint8

const (
	segLine segKind = iota
	segArc
	segSine
)

// segment is one smooth piece of the wall centreline of half a
// convolution, from the root apex (z = 0) toward the crown apex (z = q/2).
//
//	line: (r0, z0) → (r1, z1)
//	arc:  (rc + rad·cos a, zc + rad·sin a), a from a0 to a1
//	sine: r = rc − rad·cos θ, z = zc·θ (zc = q/(2π)), θ from a0 to a1
type segment struct {
	kind           segKind
	r0, z0, r1, z1 float64
	rc, zc, rad    float64
	a0, a1         float64
}

// Meridian is the wall centreline of half a convolution (at most five
// pieces), from the root apex at z = 0 to the crown apex at z = q/2, about
// the mean radius Rm: root centreline at Rm − w/2, crown at Rm + w/2.
type Meridian struct {
	seg                 [5]segment
	n                   int
	rMean, depth, pitch float64
	profile             profileKind
	crest               float64 // U: crest radius rm
}

// profileKind is the family a meridian belongs to.
type profileKind uint8

const (
	sinusoidProfile profileKind = iota
	uProfile
	trapezoidProfile
)

func (m *Meridian) add(s segment) { m.seg[m.n] = s; m.n++ }

// MeanRadius returns Rm.
func (m *Meridian) MeanRadius() float64 { return m.rMean }

// Depth returns the convolution height w (root to crown centreline).
func (m *Meridian) Depth() float64 { return m.depth }

// Pitch returns the convolution pitch q.
func (m *Meridian) Pitch() float64 { return m.pitch }

const tiny = 1e-12

// Sinusoid returns the meridian r(z) = Rm − (w/2)·cos(2πz/q).
func Sinusoid(rMean, depth, pitch float64) Meridian {
	m := Meridian{rMean: rMean, depth: depth, pitch: pitch, profile: sinusoidProfile}
	w, q := depth, pitch
	rRoot, rCrown := rMean-w/2, rMean+w/2
	m.add(segment{kind: segSine, rc: rMean, rad: w / 2, zc: q / (2 * math.Pi), a0: 0, a1: math.Pi,
		r0: rRoot, z0: 0, r1: rCrown, z1: q / 2})
	return m
}

// UShape returns the meridian of a U-convolution with crown and root arcs
// of radius rm joined by straight radial flanks. With rm < q/4 the crown
// and root are two quarter arcs joined by an axial flat of length
// q/2 − 2·rm, so the flanks stay radial.
func UShape(rMean, depth, pitch, rm float64) Meridian {
	m := Meridian{rMean: rMean, depth: depth, pitch: pitch, profile: uProfile, crest: rm}
	w, q := depth, pitch
	rRoot, rCrown := rMean-w/2, rMean+w/2
	h := q/4 - rm
	if h < tiny*q {
		h = 0
	}
	if h > 0 {
		m.add(segment{kind: segLine, r0: rRoot, z0: 0, r1: rRoot, z1: h})
	}
	m.add(segment{kind: segArc, rc: rRoot + rm, zc: h, rad: rm, a0: math.Pi, a1: math.Pi / 2,
		r0: rRoot, z0: h, r1: rRoot + rm, z1: h + rm})
	if rCrown-rm-(rRoot+rm) > tiny*w {
		m.add(segment{kind: segLine, r0: rRoot + rm, z0: h + rm, r1: rCrown - rm, z1: h + rm})
	}
	m.add(segment{kind: segArc, rc: rCrown - rm, zc: q/2 - h, rad: rm, a0: -math.Pi / 2, a1: 0,
		r0: rCrown - rm, z0: q/2 - h - rm, r1: rCrown, z1: q/2 - h})
	if h > 0 {
		m.add(segment{kind: segLine, r0: rCrown, z0: q/2 - h, r1: rCrown, z1: q / 2})
	}
	return m
}

// Trapezoid returns the meridian of a trapezoidal convolution: flats of
// length f·q/2 at crown and root (f the flat fraction of the pitch),
// straight flanks.
func Trapezoid(rMean, depth, pitch, flatFraction float64) Meridian {
	m := Meridian{rMean: rMean, depth: depth, pitch: pitch, profile: trapezoidProfile}
	w, q := depth, pitch
	rRoot, rCrown := rMean-w/2, rMean+w/2
	h := flatFraction * q / 4
	if h > tiny*q {
		m.add(segment{kind: segLine, r0: rRoot, z0: 0, r1: rRoot, z1: h})
	} else {
		h = 0
	}
	m.add(segment{kind: segLine, r0: rRoot, z0: h, r1: rCrown, z1: q/2 - h})
	if h > 0 {
		m.add(segment{kind: segLine, r0: rCrown, z0: q/2 - h, r1: rCrown, z1: q / 2})
	}
	return m
}

// PieceKind is the shape of one piece of a meridian.
type PieceKind uint8

// The piece shapes.
const (
	Line PieceKind = PieceKind(segLine) // straight from (R0, Z0) to (R1, Z1)
	Arc  PieceKind = PieceKind(segArc)  // (Rc + Rad·cos a, Zc + Rad·sin a), a from A0 to A1
	Sine PieceKind = PieceKind(segSine) // r = Rc − Rad·cos θ, z = Zc·θ, θ from A0 to A1
)

// Piece is one smooth piece of a meridian, for models that mesh the same
// centreline in their own way (package fecheck).
type Piece struct {
	Kind           PieceKind
	R0, Z0, R1, Z1 float64
	Rc, Zc, Rad    float64
	A0, A1         float64
}

// Pieces returns the meridian's pieces from the root apex to the crown apex.
func (m *Meridian) Pieces() []Piece {
	out := make([]Piece, m.n)
	for i := range out {
		s := m.seg[i]
		out[i] = Piece{Kind: PieceKind(s.kind), R0: s.r0, Z0: s.z0, R1: s.r1, Z1: s.z1,
			Rc: s.rc, Zc: s.zc, Rad: s.rad, A0: s.a0, A1: s.a1}
	}
	return out
}

// point returns the centreline point at parameter u ∈ [0, 1] of the
// segment (uniform in length for lines, angle for arcs, θ for sines).
func (s *segment) point(u float64) (r, z float64) {
	switch s.kind {
	case segLine:
		return s.r0 + u*(s.r1-s.r0), s.z0 + u*(s.z1-s.z0)
	case segArc:
		a := s.a0 + u*(s.a1-s.a0)
		return s.rc + s.rad*math.Cos(a), s.zc + s.rad*math.Sin(a)
	default:
		th := s.a0 + u*(s.a1-s.a0)
		return s.rc - s.rad*math.Cos(th), s.zc * th
	}
}

// Moments holds integrals over a meridian, with ζ = r − Rm:
// A2 = ∫r ds, A1 = ∫ds, B0 = ∫ds/r, B1 = ∫ζ/r ds, B2 = ∫ζ²/r ds,
// Am3 = ∫ds/r³. Working with ζ avoids the cancellation of
// ∫r ds − (∫ds)²/∫ds/r when w ≪ Rm.
type Moments struct{ A2, A1, B0, B1, B2, Am3 float64 }

func (a *Moments) addTo(b Moments) {
	a.A2 += b.A2
	a.A1 += b.A1
	a.B0 += b.B0
	a.B1 += b.B1
	a.B2 += b.B2
	a.Am3 += b.Am3
}

func (a *Moments) scale(f float64) {
	a.A2 *= f
	a.A1 *= f
	a.B0 *= f
	a.B1 *= f
	a.B2 *= f
	a.Am3 *= f
}

// acc adds one quadrature point at radius r with weight ds.
func (a *Moments) acc(r, ds, rMean float64) {
	z := r - rMean
	a.A2 += r * ds
	a.A1 += ds
	a.B0 += ds / r
	a.B1 += z * ds / r
	a.B2 += z * z * ds / r
	a.Am3 += ds / (r * r * r)
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

// moments integrates the segment: 16-point Gauss–Legendre for lines and
// arcs (smooth rational integrands, error far below 1e-12 for r1/r0 ≤ 3),
// the trapezoidal rule in θ for sines (the integrands are smooth, even
// and 2π-periodic, so the rule on [0, π] converges geometrically:
// Trefethen & Weideman, The exponentially convergent trapezoidal rule,
// SIAM Review 56, 2014, from memory).
func (s *segment) moments(rMean float64) Moments {
	var m Moments
	switch s.kind {
	case segLine:
		l := math.Hypot(s.r1-s.r0, s.z1-s.z0)
		for i := range gl16x {
			for _, sg := range [2]float64{-1, 1} {
				u := (1 + sg*gl16x[i]) / 2
				m.acc(s.r0+u*(s.r1-s.r0), gl16w[i]*l/2, rMean)
			}
		}
	case segArc:
		mid, half := (s.a0+s.a1)/2, (s.a1-s.a0)/2
		f := s.rad * math.Abs(half)
		for i := range gl16x {
			for _, sg := range [2]float64{-1, 1} {
				m.acc(s.rc+s.rad*math.Cos(mid+sg*half*gl16x[i]), gl16w[i]*f, rMean)
			}
		}
	default:
		// θ ∈ [0, π], r = Rm − (w/2)cos θ, ds = (q/2π)·sqrt(1 + (πw/q)² sin²θ) dθ.
		a := s.rad / s.zc // πw/q = (w/2)/(q/2π)
		n := 24
		if a > 0 {
			// error ~ exp(−2n·asinh(1/a)) (nearest singularity of the
			// integrand): aim at 1e-15.
			if k := int(math.Ceil(17 / math.Asinh(1/a))); k > n {
				n = k
			}
		}
		h := math.Pi / float64(n)
		for i := 0; i <= n; i++ {
			sn, cs := math.Sincos(float64(i) * h)
			wt := h
			if i == 0 || i == n {
				wt = h / 2
			}
			m.acc(s.rc-s.rad*cs, s.zc*math.Sqrt(1+a*a*sn*sn)*wt, rMean)
		}
	}
	return m
}

// PitchMoments integrates over one pitch (twice half a convolution).
func (m *Meridian) PitchMoments() Moments {
	var a Moments
	for i := 0; i < m.n; i++ {
		a.addTo(m.seg[i].moments(m.rMean))
	}
	a.scale(2)
	return a
}

// length returns the arc length of a segment.
func (s *segment) length() float64 {
	switch s.kind {
	case segLine:
		return math.Hypot(s.r1-s.r0, s.z1-s.z0)
	case segArc:
		return s.rad * math.Abs(s.a1-s.a0)
	}
	m := s.moments(s.rc)
	return m.A1
}

// Nodes returns the shell mesh nodes of half a convolution: perSeg
// elements on every arc (uniform in angle), 5·perSeg on a half sinusoid
// (uniform in θ, i.e. in z, which refines the crests of steep profiles),
// and on straight pieces perSeg·(length/longest piece) rounded up, at
// least one and at most perSeg (so the flank of a U or trapezoid gets
// perSeg, and a short flat is not cut into slivers much thinner than the
// wall, which would make the stiffness matrix ill-conditioned).
func (m *Meridian) Nodes(perSeg int) (r, z []float64) {
	var longest float64
	for i := 0; i < m.n; i++ {
		longest = math.Max(longest, m.seg[i].length())
	}
	r = make([]float64, 0, 5*perSeg+1)
	z = make([]float64, 0, 5*perSeg+1)
	r0, z0 := m.seg[0].point(0)
	r, z = append(r, r0), append(z, z0)
	for i := 0; i < m.n; i++ {
		s := &m.seg[i]
		n := perSeg
		switch s.kind {
		case segSine:
			n = 5 * perSeg
		case segLine:
			n = max(1, min(perSeg, int(math.Ceil(float64(perSeg)*s.length()/longest-1e-9))))
		}
		for j := 1; j <= n; j++ {
			ri, zi := s.point(float64(j) / float64(n))
			r, z = append(r, ri), append(z, zi)
		}
	}
	return r, z
}

// PieceLengths returns the arc length of each piece of the meridian
// (Pieces order). A spine's plain twin of a point at parameter u of piece
// i lies at z = (q/2)·(L_0 + … + L_{i−1} + u·L_i)/(L_0 + … + L_{n−1}): the
// pitch shared among the pieces in proportion to their length
// (surrogate/REFERENCE.md §2.8).
func (m *Meridian) PieceLengths() []float64 {
	out := make([]float64, m.n)
	for i := range out {
		out[i] = m.seg[i].length()
	}
	return out
}
