package solid

import (
	"fmt"
	"math"
)

// Profile is the shape of the convolution's wall midline.
type Profile int

const (
	// Sinusoid: r(z) = Rm − (w/2)·cos(2πz/q).
	Sinusoid Profile = iota
	// UShape: root and crest quarter arcs of midline radius a, joined by a
	// radial flank at z = q/4, with axial flats where a < q/4.
	UShape
)

// String names the profile.
func (p Profile) String() string {
	switch p {
	case Sinusoid:
		return "sinusoid"
	case UShape:
		return "u"
	}
	return fmt.Sprintf("profile(%d)", int(p))
}

// Region is a part of the meridian.
type Region int

const (
	Root  Region = iota // the inner fold (smallest radius)
	Flank               // the radial flank of a U profile
	Crest               // the outer fold (largest radius)
)

// String names the region.
func (r Region) String() string {
	switch r {
	case Root:
		return "root"
	case Flank:
		return "flank"
	case Crest:
		return "crest"
	}
	return fmt.Sprintf("region(%d)", int(r))
}

// Convolution is one convolution of a bellows, in SI units. Its wall
// midline over half a convolution runs from the root apex (z = 0,
// r = Rm − w/2) to the crest apex (z = q/2, r = Rm + w/2); the wall is
// that curve offset by ±t/2 along its normal. The bellows repeats it
// mirrored about z = 0 and z = q/2.
//
// Sinusoid: r(z) = Rm − (w/2)·cos(2πz/q), 0 ≤ z ≤ q/2. The midline's
// radius of curvature at the apexes is ρ = q²/(2π²w).
//
// UShape, with a = CrestRadius and h = q/4 − a: a root flat
// r = Rm − w/2 for 0 ≤ z ≤ h; a quarter arc of radius a centred at
// (Rm − w/2 + a, h) to (Rm − w/2 + a, q/4); a radial flank at z = q/4 out
// to r = Rm + w/2 − a; a quarter arc centred at (Rm + w/2 − a, q/2 − h)
// to (Rm + w/2, q/2 − h); a crest flat r = Rm + w/2 up to z = q/2. Here
// ρ = a.
type Convolution struct {
	Profile     Profile
	MeanRadius  float64 // Rm, m
	Depth       float64 // w, crest-to-root radial depth of the midline, m
	Pitch       float64 // q, axial length of one convolution, m
	Wall        float64 // t, m
	CrestRadius float64 // a, U profile only, m (0 means q/4)
}

// FoldRadius returns ρ, the smallest radius of curvature of the midline
// (at the folds).
func (c Convolution) FoldRadius() float64 {
	if c.Profile == UShape {
		return c.crestRadius()
	}
	return c.Pitch * c.Pitch / (2 * math.Pi * math.Pi * c.Depth)
}

// FoldRatio returns t/(2ρ), the wall's half thickness over the fold
// radius: the curved-bar parameter of the folds (1/(R/c) in curved-beam
// tables).
func (c Convolution) FoldRatio() float64 { return c.Wall / (2 * c.FoldRadius()) }

func (c Convolution) crestRadius() float64 {
	if c.CrestRadius == 0 {
		return c.Pitch / 4
	}
	return c.CrestRadius
}

// Validate reports a geometry that cannot be meshed.
func (c Convolution) Validate() error {
	for _, v := range []struct {
		name string
		x    float64
	}{{"mean radius", c.MeanRadius}, {"depth", c.Depth}, {"pitch", c.Pitch}, {"wall", c.Wall}} {
		if !(v.x > 0) || math.IsInf(v.x, 0) {
			return fmt.Errorf("solid: %s %g m, want a positive finite value", v.name, v.x)
		}
	}
	switch c.Profile {
	case Sinusoid:
	case UShape:
		a := c.crestRadius()
		if !(a > 0) || a > c.Pitch/4*(1+1e-12) {
			return fmt.Errorf("solid: crest radius %g m, want 0 < a ≤ q/4 = %g m", a, c.Pitch/4)
		}
		if 2*a > c.Depth*(1+1e-12) {
			return fmt.Errorf("solid: crest radius %g m, want at most half the depth (%g m)", a, c.Depth/2)
		}
	default:
		return fmt.Errorf("solid: unknown %v", c.Profile)
	}
	if rho := c.FoldRadius(); c.Wall/2 >= rho {
		return fmt.Errorf("solid: wall %g m reaches the fold's centre of curvature (t/2ρ = %.3g, want < 1)", c.Wall, c.FoldRatio())
	}
	if ri := c.MeanRadius - c.Depth/2 - c.Wall/2; !(ri > 0) {
		return fmt.Errorf("solid: root inner radius Rm − w/2 − t/2 = %g m, want > 0", ri)
	}
	return nil
}

type segKind uint8

const (
	segLine segKind = iota
	segArc
	segSine
)

// segment is one smooth piece of the half-convolution midline.
//
//	line: (r0, z0) → (r1, z1)
//	arc:  (rc + rad·cos α, zc + rad·sin α), α from a0 to a1
//	sine: (rc − rad·cos φ, zk·φ), φ from a0 to a1
type segment struct {
	kind           segKind
	region         Region
	r0, z0, r1, z1 float64
	rc, zc, rad    float64
	zk, a0, a1     float64
	length, turn   float64   // arc length and turning angle of the tangent
	sTab, psiTab   []float64 // their cumulative values at uniform parameter steps
}

// at returns the point and unit tangent (toward the crest) at parameter
// u ∈ [0, 1] (uniform in length for lines and arcs, in φ for sines).
func (s *segment) at(u float64) (r, z, tr, tz float64) {
	switch s.kind {
	case segLine:
		l := math.Hypot(s.r1-s.r0, s.z1-s.z0)
		return s.r0 + u*(s.r1-s.r0), s.z0 + u*(s.z1-s.z0), (s.r1 - s.r0) / l, (s.z1 - s.z0) / l
	case segArc:
		a := s.a0 + u*(s.a1-s.a0)
		sn, cs := math.Sincos(a)
		sg := math.Copysign(1, s.a1-s.a0)
		return s.rc + s.rad*cs, s.zc + s.rad*sn, -sg * sn, sg * cs
	}
	p := s.a0 + u*(s.a1-s.a0)
	sn, cs := math.Sincos(p)
	dr, dz := s.rad*sn, s.zk
	l := math.Hypot(dr, dz)
	return s.rc - s.rad*cs, s.zk * p, dr / l, dz / l
}

const tableSteps = 512

// measure tabulates the segment's cumulative length and turning angle of
// the tangent at tableSteps uniform steps of its parameter (Simpson's
// rule for the length of a sine; exact for lines and arcs).
func (s *segment) measure() {
	s.sTab = make([]float64, tableSteps+1)
	s.psiTab = make([]float64, tableSteps+1)
	_, _, tr0, tz0 := s.at(0)
	a0 := math.Atan2(tz0, tr0)
	h := 1.0 / tableSteps
	speed := func(u float64) float64 {
		switch s.kind {
		case segLine:
			return math.Hypot(s.r1-s.r0, s.z1-s.z0)
		case segArc:
			return s.rad * math.Abs(s.a1-s.a0)
		}
		p := s.a0 + u*(s.a1-s.a0)
		return math.Hypot(s.rad*math.Sin(p), s.zk) * math.Abs(s.a1-s.a0)
	}
	for i := range tableSteps {
		u := float64(i) * h
		s.sTab[i+1] = s.sTab[i] + h/6*(speed(u)+4*speed(u+h/2)+speed(u+h))
		_, _, tr, tz := s.at(u + h)
		s.psiTab[i+1] = math.Abs(math.Atan2(tz, tr) - a0)
	}
	s.length = s.sTab[tableSteps]
	s.turn = s.psiTab[tableSteps]
}

// alongGrading is the weight of the turning angle in the meridional node
// spacing: nodes are equidistributed in (1 − g)·s/L + g·ψ/Ψ, arc length
// s and turning angle ψ of the tangent, so the folds get elements in
// proportion to how sharply they turn.
const alongGrading = 0.5

// measureAt returns the combined spacing measure at table index i.
func (s *segment) measureAt(i int, length, turn float64) float64 {
	m := (1 - alongGrading) * s.sTab[i] / length
	if turn > 0 {
		m += alongGrading * s.psiTab[i] / turn
	}
	return m
}

// param returns the parameter u and the arc length from the segment's
// start at the fraction f of the segment's spacing measure.
func (s *segment) param(f, length, turn float64) (u, sl float64) {
	total := s.measureAt(tableSteps, length, turn)
	target := f * total
	i := 0
	for i < tableSteps-1 && s.measureAt(i+1, length, turn) < target {
		i++
	}
	m0, m1 := s.measureAt(i, length, turn), s.measureAt(i+1, length, turn)
	x := 0.0
	if m1 > m0 {
		x = (target - m0) / (m1 - m0)
	}
	return (float64(i) + x) / tableSteps, s.sTab[i] + x*(s.sTab[i+1]-s.sTab[i])
}

// midline returns the segments of the half-convolution midline, root
// apex first. The geometry must be valid.
func (c Convolution) midline() []segment {
	rm, w, q := c.MeanRadius, c.Depth, c.Pitch
	rRoot, rCrest := rm-w/2, rm+w/2
	var segs []segment
	switch c.Profile {
	case Sinusoid:
		zk := q / (2 * math.Pi)
		segs = []segment{
			{kind: segSine, region: Root, rc: rm, rad: w / 2, zk: zk, a0: 0, a1: math.Pi / 2},
			{kind: segSine, region: Crest, rc: rm, rad: w / 2, zk: zk, a0: math.Pi / 2, a1: math.Pi},
		}
	case UShape:
		a := c.crestRadius()
		h := q/4 - a
		tiny := 1e-9 * q
		if h > tiny {
			segs = append(segs, segment{kind: segLine, region: Root, r0: rRoot, z0: 0, r1: rRoot, z1: h})
		} else {
			h = 0
		}
		segs = append(segs, segment{kind: segArc, region: Root, rc: rRoot + a, zc: h, rad: a, a0: math.Pi, a1: math.Pi / 2})
		if rCrest-a-(rRoot+a) > tiny {
			segs = append(segs, segment{kind: segLine, region: Flank, r0: rRoot + a, z0: q / 4, r1: rCrest - a, z1: q / 4})
		}
		segs = append(segs, segment{kind: segArc, region: Crest, rc: rCrest - a, zc: q/2 - h, rad: a, a0: -math.Pi / 2, a1: 0})
		if h > 0 {
			segs = append(segs, segment{kind: segLine, region: Crest, r0: rCrest, z0: q/2 - h, r1: rCrest, z1: q / 2})
		}
	}
	for i := range segs {
		segs[i].measure()
	}
	return segs
}

// MeshSize is the element count of a half-convolution wall mesh.
type MeshSize struct {
	Through int // elements through the wall thickness
	Along   int // elements along the half meridian (root apex to crest apex)
	// Bias clusters the elements through the wall toward both surfaces,
	// where the strain peaks: corner positions η = sin(Bias·π/2·v)/sin(Bias·π/2),
	// v uniform in [−1, 1]; 0 is uniform, 1 the Chebyshev spacing.
	Bias float64
}

// DefaultMesh returns the mesh chosen by the convergence study in
// CONVERGENCE.md: elements through the wall grow with t/(2ρ), from 6 at
// 0.15 to 16 at 0.8, clustered toward both surfaces (Bias 0.8); along
// the half meridian at least 96 elements and no element longer than half
// the wall thickness.
func (c Convolution) DefaultMesh() MeshSize {
	through := min(16, max(4, 4+int(math.Round(15*c.FoldRatio()))))
	var length float64
	for _, s := range c.midline() {
		length += s.length
	}
	along := max(96, int(math.Ceil(2*length/c.Wall)))
	return MeshSize{Through: through, Along: min(along, 2000), Bias: 0.8}
}

func (ms MeshSize) validate() error {
	if ms.Through < 1 || ms.Through > 48 {
		return fmt.Errorf("solid: %d elements through the wall, want 1 to 48", ms.Through)
	}
	if ms.Along < 2 || ms.Along > 2000 {
		return fmt.Errorf("solid: %d elements along the meridian, want 2 to 2000", ms.Along)
	}
	if !(ms.Bias >= 0 && ms.Bias <= 1) {
		return fmt.Errorf("solid: through-thickness bias %g, want 0 to 1", ms.Bias)
	}
	return nil
}

// WallMesh is the Q8 mesh of the wall of half a convolution: grid rows k
// run along the meridian from the root apex (Start, the plane z = 0) to
// the crest apex (End, z = q/2); grid columns j run through the wall
// from the outer surface (Low, j = 0) to the bore-side surface (High).
type WallMesh struct {
	*Grid
	Conv Convolution
	Size MeshSize
	// Per grid row k: midline arc length from the root apex (m), region,
	// and unit tangent (toward the crest).
	S       []float64
	Region  []Region
	Tangent [][2]float64
}

// Mesh builds the wall mesh of half a convolution. Along the meridian
// the nodes are equidistributed in an equal mix of arc length and
// turning angle of the midline (so the folds, where the strain peaks, are
// finer); every change of curvature of a U profile falls on an element
// boundary (each piece gets at least one element).
func (c Convolution) Mesh(ms MeshSize) (*WallMesh, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	if err := ms.validate(); err != nil {
		return nil, err
	}
	segs := c.midline()
	if len(segs) > ms.Along {
		return nil, fmt.Errorf("solid: %d elements along cannot cover the %d pieces of the %v midline", ms.Along, len(segs), c.Profile)
	}
	var length, turn float64
	for _, sg := range segs {
		length += sg.length
		turn += sg.turn
	}
	weights := make([]float64, len(segs))
	for i := range segs {
		weights[i] = segs[i].measureAt(tableSteps, length, turn)
	}
	counts := share(weights, ms.Along)
	rows := 2*ms.Along + 1
	wm := &WallMesh{Conv: c, Size: ms, S: make([]float64, rows), Region: make([]Region, rows), Tangent: make([][2]float64, rows)}
	pr := make([]float64, rows)
	pz := make([]float64, rows)
	k := 0
	var s0 float64
	for i := range segs {
		sg := &segs[i]
		n := 2 * counts[i]
		first := 0
		if i > 0 {
			first = 1 // the joint row belongs to the previous piece
		}
		for m := first; m <= n; m++ {
			u, sl := sg.param(float64(m)/float64(n), length, turn)
			r, z, tr, tz := sg.at(u)
			pr[k], pz[k] = r, z
			wm.S[k] = s0 + sl
			wm.Region[k] = sg.region
			wm.Tangent[k] = [2]float64{tr, tz}
			k++
		}
		s0 += sg.length
	}
	// exact apexes: the symmetry planes are z = 0 and z = q/2
	pz[0], pz[rows-1] = 0, c.Pitch/2
	wm.Tangent[0], wm.Tangent[rows-1] = [2]float64{0, 1}, [2]float64{0, 1}
	eta := throughPositions(ms.Through, ms.Bias)
	half := c.Wall / 2
	g, err := NewGrid(ms.Along, ms.Through, func(k, j int) (float64, float64) {
		t := wm.Tangent[k]
		return pr[k] - eta[j]*half*t[1], pz[k] + eta[j]*half*t[0]
	})
	if err != nil {
		return nil, fmt.Errorf("%w (wall too thick for the fold?)", err)
	}
	wm.Grid = g
	tol := 1e-9 * c.Pitch
	for i := range g.Y {
		if g.Y[i] < -tol || g.Y[i] > c.Pitch/2+tol {
			return nil, fmt.Errorf("solid: the wall crosses its mirror plane at r = %g m, z = %g m: walls of neighbouring convolutions overlap", g.X[i], g.Y[i])
		}
	}
	return wm, nil
}

// share divides n elements in proportion to the weights, at least one
// each (largest remainders).
func share(weights []float64, n int) []int {
	var total float64
	for _, w := range weights {
		total += w
	}
	counts := make([]int, len(weights))
	rest := make([]float64, len(weights))
	used := 0
	for i, w := range weights {
		x := float64(n-len(weights)) * w / total
		counts[i] = 1 + int(x)
		rest[i] = x - float64(int(x))
		used += counts[i]
	}
	for ; used < n; used++ {
		best := 0
		for i := range rest {
			if rest[i] > rest[best] {
				best = i
			}
		}
		counts[best]++
		rest[best] = -1
	}
	return counts
}

// throughPositions returns η ∈ [−1, 1] at grid columns j = 0 … 2n:
// corners by the bias map, midside nodes halfway between their corners.
func throughPositions(n int, bias float64) []float64 {
	eta := make([]float64, 2*n+1)
	for l := 0; l <= n; l++ {
		v := 2*float64(l)/float64(n) - 1
		if bias > 0 {
			a := bias * math.Pi / 2
			v = math.Sin(a*v) / math.Sin(a)
		}
		eta[2*l] = v
	}
	for l := range n {
		eta[2*l+1] = (eta[2*l] + eta[2*l+2]) / 2
	}
	return eta
}
