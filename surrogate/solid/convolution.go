package solid

import (
	"fmt"
	"math"
)

// Surface names where a node lies through the wall.
type Surface int

const (
	Outer    Surface = iota // the surface facing away from the bore
	Inner                   // the bore-side surface
	Interior                // inside the wall
)

// String names the surface.
func (s Surface) String() string {
	switch s {
	case Outer:
		return "outer"
	case Inner:
		return "inner"
	case Interior:
		return "interior"
	}
	return fmt.Sprintf("surface(%d)", int(s))
}

// Peak is the largest strain magnitude of a set of nodes and where it
// occurs. Value keeps its sign (positive in tension).
type Peak struct {
	Value   float64
	Surface Surface
	Region  Region
	S       float64 // midline arc length from the root apex, m
	R, Z    float64 // node position, m
	// Theta is the circumferential angle from the plane of bending at
	// which a bending peak occurs (0 on the side the wall is stretched
	// axially by the rotation); 0 for the axial case.
	Theta float64
}

// Response is the strain of one load case per unit load. The strain
// measure is the principal strain of largest magnitude of the full 3-D
// small-strain tensor (meridional, hoop, through-thickness and shear
// components together): it is frame-free, it bounds every normal strain
// component, and it is what maximum-strain failure criteria use.
// Meridional is the normal strain along the midline tangent on the two
// surfaces, the component a thin-shell model recovers, for comparison.
type Response struct {
	Max        Peak // anywhere in the wall (the through-thickness maximum)
	Inner      Peak // on the bore-side surface
	Outer      Peak // on the outer surface
	Meridional Peak // meridional strain, either surface
}

// Result is the response of one convolution of an infinitely repeated
// bellows, from half a convolution with mirror conditions.
type Result struct {
	// AxialStiffness is the axial force per axial extension of one
	// convolution, N/m (n = 0).
	AxialStiffness float64
	// BendingStiffness is EI = M·q/θ, N·m², with θ the rotation between
	// the end planes of one convolution under the moment M (n = 1).
	BendingStiffness float64
	// Axial is the strain per unit extension of one convolution, 1/m.
	Axial Response
	// Bending is the strain amplitude per unit curvature of the bellows
	// axis (θ/q), m.
	Bending Response
	Mesh    MeshSize
	Nodes   int
}

// BeamAnalogyEI returns k·q·Rm²/2, the bending stiffness that treats the
// convolution as a ring of axial springs (k·q·Dm²/8; common practice), to
// compare with BendingStiffness.
func (r Result) BeamAnalogyEI(c Convolution) float64 {
	return r.AxialStiffness * c.Pitch * c.MeanRadius * c.MeanRadius / 2
}

// Analyze solves half a convolution twice on the same mesh: axially
// (axisymmetric, n = 0) and in bending (harmonic 1).
//
// Mirror conditions, root plane z = 0 and crest plane z = q/2: the
// bellows is symmetric about both planes. Under an axial force the
// displacement is then even in r and odd in z about each plane, so on the
// plane uz is uniform and the shear traction vanishes: uz = 0 at the
// root, uz = δ at the crest, ur free. Under a bending moment the normal
// stress σzz is even about the planes too, so each plane stays plane and
// turns rigidly with zero shear traction: W = 0 at the root, W = β·r at
// the crest (uz = β·r·cos θ), U and V free, and U = 0 at one root node to
// remove the rigid sideways translation (its reaction is zero by
// statics). One convolution extends by 2δ and turns by 2β.
//
// A zero MeshSize means c.DefaultMesh().
func Analyze(c Convolution, mat Material, ms MeshSize) (Result, error) {
	if ms == (MeshSize{}) {
		ms = c.DefaultMesh()
	}
	wm, err := c.Mesh(ms)
	if err != nil {
		return Result{}, err
	}
	return wm.Analyze(mat)
}

// Analyze solves the mesh's convolution; see the function Analyze.
func (wm *WallMesh) Analyze(mat Material) (Result, error) {
	res := Result{Mesh: wm.Size, Nodes: len(wm.X)}
	q := wm.Conv.Pitch
	start, end := wm.Nodes(Start), wm.Nodes(End)

	// axial, n = 0
	delta := 1e-3 * q
	ax := &Model{Mesh: &wm.Mesh, Mode: Axisymmetric, Material: mat}
	var l Loads
	for _, n := range start {
		l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofY})
	}
	for _, n := range end {
		l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofY, Value: delta})
	}
	sol, err := ax.Solve(l)
	if err != nil {
		return res, err
	}
	var force float64
	for _, n := range end {
		force += sol.ReactionAt(n, DofY)
	}
	res.AxialStiffness = force / (2 * delta)
	eps, err := sol.NodalStrains()
	if err != nil {
		return res, err
	}
	res.Axial = wm.response(eps, 1/(2*delta), false)

	// bending, n = 1
	beta := 1e-3
	bm := &Model{Mesh: &wm.Mesh, Mode: Harmonic1, Material: mat}
	l = Loads{}
	for _, n := range start {
		l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofY})
	}
	for _, n := range end {
		l.Fixed = append(l.Fixed, Fixed{Node: n, Dof: DofY, Value: beta * wm.X[n]})
	}
	l.Fixed = append(l.Fixed, Fixed{Node: start[wm.Through], Dof: DofX})
	sol, err = bm.Solve(l)
	if err != nil {
		return res, err
	}
	var moment float64
	for _, n := range end {
		moment += sol.ReactionAt(n, DofY) * wm.X[n]
	}
	res.BendingStiffness = moment * q / (2 * beta)
	if eps, err = sol.NodalStrains(); err != nil {
		return res, err
	}
	// curvature of the axis: 2β per convolution of length q
	res.Bending = wm.response(eps, q/(2*beta), true)
	return res, nil
}

func (wm *WallMesh) surface(j int) Surface {
	switch j {
	case 0:
		return Outer
	case 2 * wm.Through:
		return Inner
	}
	return Interior
}

// response finds the peaks of the nodal strains scaled by scale. In
// harmonic 1 the strains are amplitudes and the peak is sought over the
// circumference.
func (wm *WallMesh) response(eps []Strain, scale float64, harmonic bool) Response {
	var r Response
	better := func(p *Peak, v float64) bool { return math.Abs(v) > math.Abs(p.Value) }
	for k := 0; k <= 2*wm.Along; k++ {
		for j := 0; j <= 2*wm.Through; j++ {
			n := wm.Node(k, j)
			if n < 0 {
				continue
			}
			e := eps[n]
			for i := range e {
				e[i] *= scale
			}
			v, theta := e.MaxPrincipal(), 0.0
			if harmonic {
				v, theta = peakOverCircumference(e)
			}
			surf := wm.surface(j)
			at := Peak{Value: v, Surface: surf, Region: wm.Region[k], S: wm.S[k], R: wm.X[n], Z: wm.Y[n], Theta: theta}
			if better(&r.Max, v) {
				r.Max = at
			}
			if surf == Interior {
				continue
			}
			p := &r.Outer
			if surf == Inner {
				p = &r.Inner
			}
			if better(p, v) {
				*p = at
			}
			// the meridional strain has no sin θ part: its peak is at θ = 0
			t := wm.Tangent[k]
			if m := e.Along(t[0], t[1]); better(&r.Meridional, m) {
				r.Meridional = at
				r.Meridional.Value, r.Meridional.Theta = m, 0
			}
		}
	}
	return r
}

// peakOverCircumference returns the principal strain of largest
// magnitude of harmonic-1 amplitudes e over θ ∈ [0, π) (the strain at
// θ + π is the negative), and its angle: a 5° scan refined by golden
// section.
func peakOverCircumference(e Strain) (float64, float64) {
	f := func(th float64) float64 { return math.Abs(e.Harmonic1(th).MaxPrincipal()) }
	const steps = 36
	best, bv := 0, f(0)
	for i := 1; i < steps; i++ {
		if v := f(math.Pi * float64(i) / steps); v > bv {
			best, bv = i, v
		}
	}
	h := math.Pi / steps
	a, b := float64(best-1)*h, float64(best+1)*h
	g := (math.Sqrt(5) - 1) / 2
	x1, x2 := b-g*(b-a), a+g*(b-a)
	f1, f2 := f(x1), f(x2)
	for range 40 {
		if f1 > f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - g*(b-a)
			f1 = f(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + g*(b-a)
			f2 = f(x2)
		}
	}
	th := (a + b) / 2
	if f(th) < bv {
		th = float64(best) * h
	}
	th = math.Mod(th+math.Pi, math.Pi)
	return e.Harmonic1(th).MaxPrincipal(), th
}
