package fecheck

import (
	"math"
)

// wallMaterial is the wall as the FE models see it: meridional and
// through-thickness modulus Es (across the print layers), hoop modulus Et
// (in the layer plane), one Poisson ratio, thickness t.
type wallMaterial struct{ Es, Et, nu, t float64 }

// shellSpec describes a 3-D shell model of a wall of revolution.
type shellSpec struct {
	wall       wall
	mat        wallMaterial
	helical    bool    // single-start helix of lead = pitch
	spineWidth float64 // arc width of the plain-wall spine at rMean, m (0: none)
	spineAngle float64 // centre of the spine from +x, rad
	// arc width (at rMean) over which the wall blends from the spine to
	// the convolutions on each side, m
	spineBlendWidth float64
	pitches         int // convolutions modelled
	around          int // quadratic elements around the circumference
	// edges, when not nil, are the angles of the element edges around the
	// circumference from the first grid column (edges[0] = 0, ascending,
	// edges[around] = 2π; see gradedEdges); nil spaces them uniformly.
	// The first grid column lies at angle start from +x.
	edges       []float64
	start       float64
	perPitch    int // quadratic elements per pitch along the meridian
	ringA, ring int // measuring rings (root apexes) at pitch ringA and ringA+ring
}

// shellNode is one node of the shell grid.
type shellNode struct {
	id      int
	x, y, z float64
	t       [3]float64 // unit meridional tangent
	n       [3]float64 // unit outward normal
	row     int        // grid row J (2·perPitch rows per pitch)
	col     int        // grid column I (2·around columns)
}

// shellMesh is the S8R mesh of a shellSpec.
type shellMesh struct {
	spec       shellSpec
	nodes      []shellNode // used nodes, by ascending id
	byID       map[int]int // id → index in nodes
	elems      [][8]int
	end1, end2 []int // node ids of the end rings
	ringA      []int // node ids of the measuring rings
	ringB      []int
	refA, rotA int // reference and rotation nodes of end 1 (fixed)
	refB, rotB int // of end 2 (loaded)
	rowA, rowB int // grid rows of the measuring rings
	// weight is the arc of each grid column, as a fraction of the
	// circumference: half the angle between its two neighbours (equal on
	// a uniform grid); the ring fits weight their nodes by it.
	weight []float64
}

// spineBlend returns the blend factor f ∈ [0, 1] at angle phi: 0 on the
// spine (plain wall), 1 on the convolutions, linear across an arc
// s.spineBlendWidth (at rMean) beyond each edge of the spine.
func (s *shellSpec) spineBlend(phi float64) float64 {
	if s.spineWidth <= 0 {
		return 1
	}
	h := s.spineWidth / s.wall.rMean / 2
	dphi := s.spineBlendWidth / s.wall.rMean
	d := math.Abs(math.Remainder(phi-s.spineAngle, 2*math.Pi))
	switch {
	case d <= h:
		return 0
	case d >= h+dphi:
		return 1
	}
	return (d - h) / dphi
}

// columns returns the angle from +x of each grid column (2·around: the
// element edges and, between them, the mid-side nodes).
func (s *shellSpec) columns() []float64 {
	cols := 2 * s.around
	phi := make([]float64, cols)
	for i := range phi {
		if s.edges == nil {
			phi[i] = s.start + float64(i)/float64(cols)*2*math.Pi
			continue
		}
		e := i / 2
		a := s.edges[e]
		if i%2 == 1 {
			a = (s.edges[e] + s.edges[e+1]) / 2
		}
		phi[i] = s.start + a
	}
	return phi
}

// gradedEdges returns the element edges around a spined wall (see
// shellSpec.edges), from the first edge of the spine: the spine (half
// angle h) in nSpine equal elements, each blend (angle d) in nBlend equal
// elements, and the convolutions between the blends in elements that
// grow from the blend's element by the factor growth each up to the
// coarse angle dc, symmetric about the middle, the side opposite the
// spine. No element is wider than dc. The spine edges and the outer edges
// of the blends, where the wall's blend factor has kinks, are element
// edges.
func gradedEdges(h, d, dc float64, nSpine, nBlend int, growth float64) []float64 {
	nS := max(nSpine, int(math.Ceil(2*h/dc-1e-9)))
	half := math.Pi - h // from the spine edge to the opposite side
	var sizes []float64 // from the spine edge to the opposite side
	if half <= d {
		// the blends meet opposite the spine
		nB := max(nBlend, int(math.Ceil(half/dc-1e-9)))
		for range nB {
			sizes = append(sizes, half/float64(nB))
		}
	} else {
		nB := max(nBlend, int(math.Ceil(d/dc-1e-9)))
		for range nB {
			sizes = append(sizes, d/float64(nB))
		}
		rest := half - d
		var grow []float64
		size, sum := d/float64(nB), 0.0
		for sum < rest*(1-1e-12) {
			size = math.Min(size*growth, dc)
			grow = append(grow, size)
			sum += size
		}
		// the last element overshoots the rest: scale all down to fit (no
		// element grows past dc, neighbours keep their ratio)
		for _, g := range grow {
			sizes = append(sizes, g*rest/sum)
		}
	}
	edges := []float64{0}
	for k := 1; k <= nS; k++ {
		edges = append(edges, 2*h*float64(k)/float64(nS))
	}
	a := 2 * h
	for _, sz := range sizes {
		a += sz
		edges = append(edges, a)
	}
	// mirror: the other half from the opposite side back to the spine
	for k := len(sizes) - 1; k >= 0; k-- {
		a += sizes[k]
		edges = append(edges, a)
	}
	edges[len(edges)-1] = 2 * math.Pi
	return edges
}

// build generates the mesh.
func (s *shellSpec) build() *shellMesh {
	m := &shellMesh{spec: *s, byID: map[int]int{}}
	cols := 2 * s.around
	mp := s.wall.points(s.perPitch)
	rowsPer := len(mp) - 1 // points() may add elements (one per piece at least)
	rows := rowsPer*s.pitches + 1
	id := func(i, j int) int { return j*cols + i + 1 }
	// wrap maps a column index at or past the seam to the grid.
	wrap := func(i, j int) (int, int) {
		if i >= cols {
			i -= cols
			if s.helical {
				j += rowsPer
			}
		}
		return i, j
	}
	used := map[int]bool{}
	for ej := 0; 2*ej+2 < rows; ej++ {
		for ei := 0; ei < s.around; ei++ {
			i0, j0 := 2*ei, 2*ej
			var c [8][2]int
			c[0] = [2]int{i0, j0}
			c[1] = [2]int{i0 + 2, j0}
			c[2] = [2]int{i0 + 2, j0 + 2}
			c[3] = [2]int{i0, j0 + 2}
			c[4] = [2]int{i0 + 1, j0}
			c[5] = [2]int{i0 + 2, j0 + 1}
			c[6] = [2]int{i0 + 1, j0 + 2}
			c[7] = [2]int{i0, j0 + 1}
			var e [8]int
			ok := true
			for k, ij := range c {
				i, j := wrap(ij[0], ij[1])
				if j >= rows {
					ok = false
					break
				}
				e[k] = id(i, j)
			}
			if !ok {
				continue
			}
			for _, n := range e {
				used[n] = true
			}
			m.elems = append(m.elems, e)
		}
	}
	// Nodes.
	colPhi := s.columns()
	m.weight = make([]float64, cols)
	for i := range cols {
		prev, next := colPhi[(i+cols-1)%cols], colPhi[(i+1)%cols]
		if i == 0 {
			prev -= 2 * math.Pi
		}
		if i == cols-1 {
			next += 2 * math.Pi
		}
		m.weight[i] = (next - prev) / (4 * math.Pi)
	}
	for j := 0; j < rows; j++ {
		k, jj := j/rowsPer, j%rowsPer
		p := mp[jj]
		for i := 0; i < cols; i++ {
			n := id(i, j)
			if !used[n] {
				continue
			}
			phi := colPhi[i]
			f := s.spineBlend(phi)
			zPlain := float64(jj) / float64(rowsPer) * s.wall.pitch
			r := s.wall.rMean + f*(p.r-s.wall.rMean)
			z := zPlain + f*(p.z-zPlain) + float64(k)*s.wall.pitch
			tr, tz := f*p.tr, f*p.tz+(1-f)*1
			if l := math.Hypot(tr, tz); l > 0 {
				tr, tz = tr/l, tz/l
			}
			if s.helical {
				z += s.wall.pitch * phi / (2 * math.Pi)
			}
			sn, cs := math.Sincos(phi)
			// ccx 2.20 builds inverted expanded elements where a
			// coordinate is a tiny negative number (round-off of cos φ at
			// φ = 3π/2), so snap round-off to zero.
			if math.Abs(cs) < 1e-14 {
				cs = 0
			}
			if math.Abs(sn) < 1e-14 {
				sn = 0
			}
			nd := shellNode{id: n, x: r * cs, y: r * sn, z: z, row: j, col: i}
			nd.t = [3]float64{tr * cs, tr * sn, tz}
			// outward normal in the meridian plane (the helix lead tilts
			// the true normal by O(q/(2πr)); it only orders the surfaces).
			nd.n = [3]float64{tz * cs, tz * sn, -tr}
			m.byID[n] = len(m.nodes)
			m.nodes = append(m.nodes, nd)
		}
	}
	// End rings and measuring rings.
	for i := 0; i < cols; i++ {
		if used[id(i, 0)] {
			m.end1 = append(m.end1, id(i, 0))
		}
		if used[id(i, rows-1)] {
			m.end2 = append(m.end2, id(i, rows-1))
		}
	}
	if s.helical {
		// the free seam edges of the first and last turn belong to the rings
		for j := 1; j <= rowsPer; j++ {
			if n := id(0, j); used[n] {
				m.end1 = append(m.end1, n)
			}
			if n := id(cols-2, rows-1-j); used[n] {
				m.end2 = append(m.end2, n)
			}
		}
	}
	m.rowA = s.ringA * rowsPer
	m.rowB = (s.ringA + s.ring) * rowsPer
	for i := 0; i < cols; i++ {
		if n := id(i, m.rowA); used[n] {
			m.ringA = append(m.ringA, n)
		}
		if n := id(i, m.rowB); used[n] {
			m.ringB = append(m.ringB, n)
		}
	}
	last := cols*rows + 1
	m.refA, m.rotA, m.refB, m.rotB = last+1, last+2, last+3, last+4
	return m
}

// node returns the node of that id.
func (m *shellMesh) node(id int) *shellNode { return &m.nodes[m.byID[id]] }

// axiSpec describes the axisymmetric solid model of one pitch.
type axiSpec struct {
	wall    wall
	mat     wallMaterial
	perPt   int // quadratic elements along the pitch
	through int // quadratic elements through the wall
}

// axiNode is one CAX8 node: radius, axial position, meridian index and
// through-thickness index, unit tangent of the centreline there.
type axiNode struct {
	id     int
	r, z   float64
	j, k   int
	tr, tz float64
}

type axiMesh struct {
	spec     axiSpec
	nodes    []axiNode
	elems    [][8]int
	bot, top []int
	rows     int // meridian points (2·perPt + 1)
	layers   int // through-thickness points (2·through + 1)
}

// build generates the structured CAX8 mesh: centreline points offset
// along the normal by ±t/2. At kinks of the centreline (trapezoid) the
// offset runs along the mean normal, lengthened by 1/cos of half the
// kink angle so the wall keeps its thickness.
func (s *axiSpec) build() *axiMesh {
	mp := s.wall.points(s.perPt)
	rows := len(mp)
	layers := 2*s.through + 1
	m := &axiMesh{spec: *s, rows: rows, layers: layers}
	id := func(j, k int) int { return j*layers + k + 1 }
	for j, p := range mp {
		// normal (tz, −tr) points outward for an axial centreline; at a
		// kink between pieces average the two tangents.
		tr, tz := p.tr, p.tz
		nr, nz := tz, -tr
		for k := 0; k < layers; k++ {
			off := (float64(k)/float64(layers-1) - 0.5) * s.mat.t * p.scale
			m.nodes = append(m.nodes, axiNode{id: id(j, k), r: p.r + off*nr, z: p.z + off*nz, j: j, k: k, tr: tr, tz: tz})
		}
	}
	for ej := 0; 2*ej+2 < rows; ej++ {
		for ek := 0; ek < s.through; ek++ {
			j0, k0 := 2*ej, 2*ek
			// counter-clockwise in (r, z): k runs outward (+r on an axial
			// wall), j runs +z.
			e := [8]int{id(j0, k0), id(j0, k0+2), id(j0+2, k0+2), id(j0+2, k0),
				id(j0, k0+1), id(j0+1, k0+2), id(j0+2, k0+1), id(j0+1, k0)}
			m.elems = append(m.elems, e)
		}
	}
	for k := 0; k < layers; k++ {
		m.bot = append(m.bot, id(0, k))
		m.top = append(m.top, id(rows-1, k))
	}
	return m
}
