package convolution

import (
	"errors"
	"fmt"
	"math"

	"plica/surrogate/shell"
	"plica/surrogate/solid"
)

// ErrNoSolid is returned by Meridian.Solid for a trapezoid: its meridian
// has kinks (zero fold radius), where a wall offset along the normal is
// not defined and the solid model's concave-surface strain is singular.
var ErrNoSolid = errors.New("convolution: the trapezoid's kinked meridian has no solid wall model")

// Solid returns the solid model's convolution of the meridian with wall
// t: the same midline (package solid's sinusoid and U profiles are the
// curves of Sinusoid and UShape, root apex at z = 0, crest apex at
// z = q/2, about the same mean radius).
func (m *Meridian) Solid(t float64) (solid.Convolution, error) {
	c := solid.Convolution{MeanRadius: m.rMean, Depth: m.depth, Pitch: m.pitch, Wall: t}
	switch m.profile {
	case sinusoidProfile:
		c.Profile = solid.Sinusoid
	case uProfile:
		c.Profile = solid.UShape
		c.CrestRadius = m.crest
	default:
		return c, ErrNoSolid
	}
	return c, nil
}

// WallFactors are the solid model's corrections to the thin-shell wall of
// one convolution (isotropic wall, same geometry), the entries of package
// surrogate's generated wall tables.
type WallFactors struct {
	// Axial is ε_solid/ε_shell: the solid's peak meridional surface strain
	// per unit extension of one convolution over the shell model's
	// (thick-wall correction of the axial strain).
	Axial float64
	// Bending is ε_solid,bend/(ε_shell·q·Rm): the solid's peak meridional
	// surface strain per unit curvature of the bellows axis (harmonic 1)
	// over the shell model's axial strain at the opening q·Rm that the
	// beam analogy gives the convolution farthest from the axis.
	Bending float64
	// EI is EI_solid/(k_shell·q·Rm²/2): the solid's bending stiffness of
	// one convolution (harmonic 1) over the beam analogy of the shell
	// model's axial stiffness, so that k_shell·q·Rm²/2·EI is the solid's
	// EI (it corrects both the beam analogy and the thin-shell stiffness
	// of a thick wall).
	EI float64
}

// TableMesh is the solid mesh of the generated wall tables: coarser than
// solid's DefaultMesh (which the shell fidelity uses), 4 + round(8·t/2ρ)
// elements through the wall and max(48, L/t) along the half meridian of
// length L, at most 200. Against DefaultMesh it reads the peak strain at
// most about 1.5 % low at t/2ρ = 0.8 and within 0.3 % below 0.5, the
// stiffness within 0.1 % [derived: surrogate's wall-table tests].
func TableMesh(c solid.Convolution) solid.MeshSize {
	through := 4 + int(math.Round(8*c.FoldRatio()))
	def := c.DefaultMesh()
	// DefaultMesh's along count is max(96, 2·L/t): L/t is half its excess
	along := max(48, min(200, def.Along/2))
	return solid.MeshSize{Through: min(through, def.Through), Along: along, Bias: def.Bias}
}

// Wall runs the solid model (isotropic, E = 1, Poisson ratio nu) and the
// isotropic shell model (DefaultElements) on the convolution of meridian
// m with wall t and returns the factors. A zero mesh means solid's
// DefaultMesh. Trapezoids return ErrNoSolid; geometries the solid model
// cannot mesh (t/2ρ ≥ 1, walls crossing the mirror planes) its error.
func Wall(m *Meridian, t, nu float64, ms solid.MeshSize) (WallFactors, error) {
	c, err := m.Solid(t)
	if err != nil {
		return WallFactors{}, err
	}
	sh, err := Shell(m, shell.Wall{Es: 1, Et: 1, Nu: nu, T: t}, DefaultElements)
	if err != nil {
		return WallFactors{}, err
	}
	r, err := solid.Analyze(c, solid.Material{E: 1, Nu: nu}, ms)
	if err != nil {
		return WallFactors{}, err
	}
	rm, q := m.rMean, m.pitch
	f := WallFactors{
		Axial:   math.Abs(r.Axial.Meridional.Value) / sh.StrainPerMovement,
		Bending: math.Abs(r.Bending.Meridional.Value) / (sh.StrainPerMovement * q * rm),
		EI:      r.BendingStiffness / (sh.K * q * rm * rm / 2),
	}
	if !(f.Axial > 0 && f.Bending > 0 && f.EI > 0) || math.IsInf(f.Axial+f.Bending+f.EI, 0) {
		return WallFactors{}, fmt.Errorf("convolution: solid model gave non-positive factors %+v", f)
	}
	return f, nil
}

// WallPoint is a point of the wall-factor grids, at Dm = 1 with an
// isotropic wall: the profile (solid.Sinusoid or solid.UShape with
// rm = q/4), w/q, the fold ratio t/(2ρ) (ρ the fold radius of the
// midline: q²/(2π²w) for the sinusoid, rm = q/4 for the U), w/Dm and ν.
type WallPoint struct {
	Profile                                  solid.Profile
	DepthRatio, FoldRatio, DepthDiameter, Nu float64
}

// Meridian returns the meridian and wall thickness of the point:
// w = w/Dm, q = w/(w/q), t = 2ρ·t/(2ρ), Rm = 1/2.
func (p WallPoint) Meridian() (Meridian, float64, error) {
	if !(p.DepthRatio > 0 && p.FoldRatio > 0 && p.DepthDiameter > 0) {
		return Meridian{}, 0, fmt.Errorf("convolution: wall point needs positive w/q, t/2ρ, w/Dm (got %g, %g, %g)", p.DepthRatio, p.FoldRatio, p.DepthDiameter)
	}
	const dm = 1.0
	w := p.DepthDiameter * dm
	q := w / p.DepthRatio
	rm := dm / 2
	switch p.Profile {
	case solid.Sinusoid:
		rho := q * q / (2 * math.Pi * math.Pi * w)
		return Sinusoid(rm, w, q), 2 * rho * p.FoldRatio, nil
	case solid.UShape:
		return UShape(rm, w, q, q/4), 2 * (q / 4) * p.FoldRatio, nil
	}
	return Meridian{}, 0, fmt.Errorf("convolution: wall point of unknown %v", p.Profile)
}

// Factors computes the wall factors of the point on TableMesh.
func (p WallPoint) Factors() (WallFactors, error) {
	m, t, err := p.Meridian()
	if err != nil {
		return WallFactors{}, err
	}
	c, err := m.Solid(t)
	if err != nil {
		return WallFactors{}, err
	}
	if err := c.Validate(); err != nil {
		return WallFactors{}, err
	}
	return Wall(&m, t, p.Nu, TableMesh(c))
}
