// Package export turns a bellows' wall into a triangle mesh and writes it
// as binary STL, for printing. It knows bellows only through the
// surrogate's own meridian (convolution.Meridian.Pieces), so the printed
// wall is the wall the models analysed.
package export

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"

	"plica/surrogate/convolution"
)

// Mesh is an indexed triangle mesh in mm.
type Mesh struct {
	V [][3]float64
	T [][3]int32
}

// Section is a closed polygon in the (r, z) half-plane, r > 0, in mm.
type Section [][2]float64

// signedArea returns the polygon's signed area (positive counter-clockwise
// with r to the right and z up).
func (s Section) signedArea() float64 {
	a := 0.0
	for i := range s {
		p, q := s[i], s[(i+1)%len(s)]
		a += p[0]*q[1] - q[0]*p[1]
	}
	return a / 2
}

// Revolve sweeps the closed section about the z axis with k sides. A
// polygon of k sides inscribed in a circle carries the area factor
// k·sin(2π/k)/(2π) (common practice), so the volume of the revolved solid
// falls short of the true solid of revolution by at most that factor.
func Revolve(s Section, k int) (Mesh, error) {
	if k < 3 {
		return Mesh{}, fmt.Errorf("revolve: %d sides, need at least 3", k)
	}
	secs, phis := make([]Section, k), make([]float64, k)
	for j := range secs {
		secs[j], phis[j] = s, 2*math.Pi*float64(j)/float64(k)
	}
	return revolveSections(secs, phis)
}

// revolveSections joins closed sections (same vertex count and order)
// standing in the meridian planes at the ascending angles phis, the last
// joined to the first round the axis.
func revolveSections(secs []Section, phis []float64) (Mesh, error) {
	k := len(secs)
	if k < 3 {
		return Mesh{}, fmt.Errorf("revolve: %d sides, need at least 3", k)
	}
	s := secs[0]
	if len(s) < 3 {
		return Mesh{}, fmt.Errorf("revolve: section of %d points, need at least 3", len(s))
	}
	for _, sec := range secs {
		if len(sec) != len(s) || (sec.signedArea() < 0) != (s.signedArea() < 0) {
			return Mesh{}, fmt.Errorf("revolve: the sections do not match")
		}
		for _, p := range sec {
			if !(p[0] > 0) {
				return Mesh{}, fmt.Errorf("revolve: section point at r = %g, need r > 0", p[0])
			}
		}
	}
	reverse := s.signedArea() < 0
	m := len(s)
	var out Mesh
	out.V = make([][3]float64, 0, m*k)
	for j := 0; j < k; j++ {
		c, sn := math.Cos(phis[j]), math.Sin(phis[j])
		sec := secs[j]
		for i := range sec {
			p := sec[i]
			if reverse {
				p = sec[m-1-i]
			}
			out.V = append(out.V, [3]float64{p[0] * c, p[0] * sn, p[1]})
		}
	}
	id := func(i, j int) int32 { return int32((j%k)*m + i%m) }
	out.T = make([][3]int32, 0, 2*m*k)
	for j := 0; j < k; j++ {
		for i := 0; i < m; i++ {
			a, b := id(i, j), id(i+1, j)
			c, d := id(i+1, j+1), id(i, j+1)
			// meridian × circumference points left of a counter-clockwise
			// section, i.e. inward: take the triangles the other way round.
			out.T = append(out.T, [3]int32{a, c, b}, [3]int32{a, d, c})
		}
	}
	return out, nil
}

// Volume returns the enclosed volume (divergence theorem, sum of signed
// tetrahedra about the origin).
func (m Mesh) Volume() float64 {
	v := 0.0
	for _, t := range m.T {
		a, b, c := m.V[t[0]], m.V[t[1]], m.V[t[2]]
		v += a[0]*(b[1]*c[2]-b[2]*c[1]) - a[1]*(b[0]*c[2]-b[2]*c[0]) + a[2]*(b[0]*c[1]-b[1]*c[0])
	}
	return v / 6
}

// Bounds returns the bounding box.
func (m Mesh) Bounds() (lo, hi [3]float64) {
	lo = [3]float64{math.Inf(1), math.Inf(1), math.Inf(1)}
	hi = [3]float64{math.Inf(-1), math.Inf(-1), math.Inf(-1)}
	for _, v := range m.V {
		for i := 0; i < 3; i++ {
			lo[i] = math.Min(lo[i], v[i])
			hi[i] = math.Max(hi[i], v[i])
		}
	}
	return
}

// Check reports the first defect: an edge not in exactly two triangles,
// an edge used twice in the same direction (inconsistent orientation) or
// a degenerate triangle.
func (m Mesh) Check() error {
	type edge struct{ a, b int32 }
	dir := make(map[edge]int, 3*len(m.T))
	for n, t := range m.T {
		a, b, c := m.V[t[0]], m.V[t[1]], m.V[t[2]]
		if area2(a, b, c) <= 1e-18 {
			return fmt.Errorf("triangle %d is degenerate", n)
		}
		for e := 0; e < 3; e++ {
			dir[edge{t[e], t[(e+1)%3]}]++
		}
	}
	for e, n := range dir {
		if n != 1 {
			return fmt.Errorf("edge %d→%d used %d times in one direction", e.a, e.b, n)
		}
		if dir[edge{e.b, e.a}] != 1 {
			return fmt.Errorf("edge %d→%d has no opposite", e.a, e.b)
		}
	}
	return nil
}

// Euler returns V − E + F.
func (m Mesh) Euler() int {
	return len(m.V) - 3*len(m.T)/2 + len(m.T)
}

func area2(a, b, c [3]float64) float64 {
	u := [3]float64{b[0] - a[0], b[1] - a[1], b[2] - a[2]}
	w := [3]float64{c[0] - a[0], c[1] - a[1], c[2] - a[2]}
	x := u[1]*w[2] - u[2]*w[1]
	y := u[2]*w[0] - u[0]*w[2]
	z := u[0]*w[1] - u[1]*w[0]
	return math.Sqrt(x*x + y*y + z*z)
}

// WriteSTL writes the mesh as binary STL: an 80-byte header, a
// little-endian uint32 triangle count and 50 bytes a triangle (normal,
// three vertices as float32, a zero uint16 attribute). The bytes depend on
// the mesh only.
func (m Mesh) WriteSTL(w io.Writer, header string) error {
	buf := make([]byte, 84+50*len(m.T))
	copy(buf[:80], header)
	binary.LittleEndian.PutUint32(buf[80:], uint32(len(m.T)))
	o := 84
	put := func(f float64) {
		binary.LittleEndian.PutUint32(buf[o:], math.Float32bits(float32(f)))
		o += 4
	}
	for _, t := range m.T {
		a, b, c := m.V[t[0]], m.V[t[1]], m.V[t[2]]
		u := [3]float64{b[0] - a[0], b[1] - a[1], b[2] - a[2]}
		v := [3]float64{c[0] - a[0], c[1] - a[1], c[2] - a[2]}
		n := [3]float64{u[1]*v[2] - u[2]*v[1], u[2]*v[0] - u[0]*v[2], u[0]*v[1] - u[1]*v[0]}
		l := math.Sqrt(n[0]*n[0] + n[1]*n[1] + n[2]*n[2])
		for i := 0; i < 3; i++ {
			put(n[i] / l)
		}
		for _, p := range [][3]float64{a, b, c} {
			put(p[0])
			put(p[1])
			put(p[2])
		}
		o += 2
	}
	_, err := w.Write(buf)
	return err
}

// Wall builds the wall section of a revolved bellows: n convolutions of the
// meridian (centreline in m, SI), the wall offset by ±t/2 along the
// normal, plain collars of length collar (m) at root radius at both ends,
// with perPiece points on each meridian piece. Output in mm.
func Wall(mer convolution.Meridian, n int, t, collar float64, perPiece int) (Section, error) {
	c, err := centreline(mer, n, t, collar, perPiece)
	if err != nil {
		return nil, err
	}
	outer := offset(c, +t/2)
	inner := offset(c, -t/2)
	return toSection(outer, inner, collar), nil
}

// toSection closes the outer and inner lines (m, the bottom collar end at
// z = −collar) into a section in mm standing on z = 0.
func toSection(outer, inner [][2]float64, collar float64) Section {
	shift := 0.0
	if collar > 0 {
		shift = collar
	}
	var s Section
	for _, p := range outer {
		s = append(s, [2]float64{p[0] * 1e3, (p[1] + shift) * 1e3})
	}
	for i := len(inner) - 1; i >= 0; i-- {
		s = append(s, [2]float64{inner[i][0] * 1e3, (inner[i][1] + shift) * 1e3})
	}
	return s
}

// centreline returns the wall's centreline (m): the bottom collar's end
// at z = −collar when collar > 0, then root→crown→root for each of the n
// convolutions, then the top collar's end.
func centreline(mer convolution.Meridian, n int, t, collar float64, perPiece int) ([][2]float64, error) {
	if n < 1 || perPiece < 2 {
		return nil, fmt.Errorf("wall: %d convolutions, %d points a piece", n, perPiece)
	}
	q := mer.Pitch()
	half := halfPoints(mer, perPiece, t)
	var c [][2]float64
	rRoot := half[0][0]
	if collar > 0 {
		c = append(c, [2]float64{rRoot, -collar})
	}
	for k := 0; k < n; k++ {
		z0 := float64(k) * q
		for i, p := range half {
			if k > 0 && i == 0 {
				continue
			}
			c = append(c, [2]float64{p[0], z0 + p[1]})
		}
		for i := len(half) - 2; i >= 0; i-- {
			c = append(c, [2]float64{half[i][0], z0 + q - half[i][1]})
		}
	}
	if collar > 0 {
		c = append(c, [2]float64{rRoot, float64(n)*q + collar})
	}
	return c, nil
}

// offset moves each point of a polyline in (r, z) by d along the unit
// normal (dz, −dr)/|…| (outward for a line climbing in z), averaging the
// normals of the two edges at interior points, scaled so that the offset
// edges stay parallel at distance d (miter). The end points move along r
// only, so the ends stay square to the axis.
func offset(c [][2]float64, d float64) [][2]float64 {
	nrm := func(a, b [2]float64) [2]float64 {
		dr, dz := b[0]-a[0], b[1]-a[1]
		l := math.Hypot(dr, dz)
		return [2]float64{dz / l, -dr / l}
	}
	out := make([][2]float64, len(c))
	for i := range c {
		var n [2]float64
		switch {
		case i == 0 || i == len(c)-1:
			// the ends are cut square to the axis: move along r onto the
			// offset of the end edge.
			a := nrm(c[0], c[1])
			if i > 0 {
				a = nrm(c[i-1], c[i])
			}
			n = [2]float64{1 / a[0], 0}
		default:
			a, b := nrm(c[i-1], c[i]), nrm(c[i], c[i+1])
			m := [2]float64{a[0] + b[0], a[1] + b[1]}
			l := math.Hypot(m[0], m[1])
			m = [2]float64{m[0] / l, m[1] / l}
			cos := m[0]*a[0] + m[1]*a[1]
			n = [2]float64{m[0] / cos, m[1] / cos}
		}
		out[i] = [2]float64{c[i][0] + d*n[0], c[i][1] + d*n[1]}
	}
	return out
}

// halfPoints samples the half meridian (root to crown, m) with perPiece
// points on each curved piece, the joints shared. A straight piece gets
// segments no shorter than the wall t (and at most perPiece − 1): the
// miter offset moves a corner of turn θ by t/2·tan(θ/2) along each edge,
// so shorter edges at a sharp corner (a trapezoid's) would fold the
// offset wall; t is enough for turns up to 2·atan 2 ≈ 127°.
func halfPoints(mer convolution.Meridian, perPiece int, t float64) [][2]float64 {
	var half [][2]float64
	for _, p := range mer.Pieces() {
		np := piecePoints(p, perPiece, t)
		for i := 0; i < np; i++ {
			if len(half) > 0 && i == 0 {
				continue
			}
			u := float64(i) / float64(np-1)
			half = append(half, piecePoint(p, u))
		}
	}
	return half
}

// piecePoints is the number of points halfPoints (and twinPoints) take on
// one meridian piece, its ends included: perPiece on an arc or a sinusoid,
// on a line one per wall thickness of length, at least 2 and at most
// perPiece.
func piecePoints(p convolution.Piece, perPiece int, t float64) int {
	if p.Kind != convolution.Line {
		return perPiece
	}
	l := math.Hypot(p.R1-p.R0, p.Z1-p.Z0)
	return 1 + max(1, min(perPiece-1, int(l/t)))
}

func piecePoint(p convolution.Piece, u float64) [2]float64 {
	switch p.Kind {
	case convolution.Line:
		return [2]float64{p.R0 + u*(p.R1-p.R0), p.Z0 + u*(p.Z1-p.Z0)}
	case convolution.Arc:
		a := p.A0 + u*(p.A1-p.A0)
		return [2]float64{p.Rc + p.Rad*math.Cos(a), p.Zc + p.Rad*math.Sin(a)}
	default:
		th := p.A0 + u*(p.A1-p.A0)
		return [2]float64{p.Rc - p.Rad*math.Cos(th), p.Zc * th}
	}
}
