package fecheck

import (
	"context"
	"fmt"
	"math"
	"os"
	"sync"

	"plica/surrogate"
	"plica/surrogate/solid"
)

// VerificationCase is a value this package's CalculiX models (or the
// surrogate models they check) must reproduce. plica verify -fe prints
// it (package results/verify gathers it; it runs only where ccx is on
// PATH). Unlike the cases of the other model packages its tolerance may
// be asymmetric, and Compute takes a context that stops ccx.
type VerificationCase struct {
	Area      string // the heading plica verify lists it under
	Name      string
	Unit      string
	Published float64
	// Tolerance is the allowed deviation above Published, and below it
	// too unless Below is set; relative to |Published| when Relative.
	Tolerance float64
	Below     float64
	Relative  bool
	Source    string // where Published comes from: author, title, year, equation or table
	Compute   func(ctx context.Context) (float64, error)
}

// ringGeometry is a periodic convolution given by its dimensionless
// shape at Dm = 20 mm: w/q, t/(2ρ), w/Dm.
type ringGeometry struct {
	name          string
	p             surrogate.Profile
	wq, fold, wdm float64
}

func (r ringGeometry) geometry() surrogate.Geometry {
	const dm = 0.020
	w := r.wdm * dm
	q := w / r.wq
	rho := q * q / (2 * math.Pi * math.Pi * w)
	if r.p == surrogate.UShape {
		rho = q / 4
	}
	t := 2 * rho * r.fold
	return surrogate.Geometry{OuterDiameter: dm + w + t, Depth: w, Pitch: q, Wall: t, Profile: r.p}
}

// spec is the C3D20 ring model of the convolution in material m: 12
// elements around, 32 along half a convolution, 3 + round(6·t/2ρ)
// through the wall (see ringGeometries).
func (r ringGeometry) spec(m surrogate.Material) ringSpec {
	g := r.geometry()
	conv := solid.Convolution{Profile: solid.Sinusoid, MeanRadius: g.MeanRadius(), Depth: g.Depth, Pitch: g.Pitch, Wall: g.Wall}
	if r.p == surrogate.UShape {
		conv.Profile = solid.UShape
	}
	return ringSpec{conv: conv, e: m.ModulusAcross, nu: m.Poisson, around: 12,
		mesh: solid.MeshSize{Through: 3 + int(math.Round(6*r.fold)), Along: 32, Bias: 0.8}}
}

// ringMaterial is the isotropic wall of the ring comparisons (a generic
// resin).
var ringMaterial = surrogate.Material{Name: "iso", ModulusAcross: 1.5e9, ModulusInLayer: 1.5e9, Poisson: 0.38, Density: 1100, AllowableStrain: 0.02}

// ringGeometries span the validated range: w/q 0.15–1.6, t/2ρ 0.07–0.8,
// w/Dm 0.1–0.25, sinusoid and U, and t/w up to 0.49. The 3-D mesh has
// 3 + round(6·t/2ρ) bricks through the wall (8 at t/2ρ = 0.8, where the
// concave surface has a radius of 0.25·t); its strain converges from
// below, by about 4 % from 8 to the limit there (two-mesh extrapolation,
// 5 and 8 through: sinusoid w/q 1, t/2ρ 0.8).
var ringGeometries = []ringGeometry{
	{"sine-shallow-thin", surrogate.Sinusoid, 0.15, 0.067, 0.1},
	{"sine-0.25-0.3", surrogate.Sinusoid, 0.25, 0.3, 0.25},
	{"sine-0.6-0.5", surrogate.Sinusoid, 0.6, 0.5, 0.15},
	{"sine-1.0-0.8", surrogate.Sinusoid, 1.0, 0.8, 0.2},
	{"sine-1.6-0.3", surrogate.Sinusoid, 1.6, 0.3, 0.1},
	{"u-0.6-0.3", surrogate.UShape, 0.6, 0.3, 0.15},
	{"u-1.0-0.15", surrogate.UShape, 1.0, 0.15, 0.1},
	{"u-1.6-0.45", surrogate.UShape, 1.6, 0.45, 0.25},
}

// verifyRings names the ring geometries plica verify -fe runs: a U and a
// thick-fold sinusoid, about 4 and 9 s of ccx on one core.
var verifyRings = []string{"u-1.0-0.15", "sine-0.6-0.5"}

// spineVerify is the spined bellows plica verify -fe runs (not a grid
// point of the generated spine factor): a sinusoid, OD 30 mm, w 3 mm,
// q 6 mm, t 0.4 mm, a 5 mm spine (β 0.06), the geometry of
// TestFEWindingSpineMaterial's resin-spine case; about 8 s of ccx on
// one core (graded mesh, 5 280 elements).
func spineVerify() surrogate.Bellows {
	g := surrogate.Geometry{OuterDiameter: 0.030, Depth: 0.003, Pitch: 0.006, Wall: 0.0004, Profile: surrogate.Sinusoid,
		SpineWidth: 0.005}
	return surrogate.Bellows{Geometry: g, Material: ringMaterial}
}

// spineSource is the source of the spine comparison.
const spineSource = "CalculiX S8R 3-D shell model of the wall with its spine and blends (surrogate/fecheck/REFERENCE.md); spine factors surrogate/REFERENCE.md §2.8, §6.4"

// The thin cylinder of the shell-path case: mean radius R, wall t,
// modulus E, Poisson ν; 8 "pitches" of 5 mm.
const (
	cylR, cylT, cylE, cylNu, cylPitch = 0.01, 0.0002, 1e9, 0.3, 0.005
)

// cylinderSource is the source of the thin-cylinder closed forms.
const cylinderSource = "Timoshenko & Gere, Mechanics of Materials, thin-walled circular tube I = πR³t, J = 2πR³t, A = 2πRt (from memory); CalculiX S8R shell model, surrogate/fecheck/REFERENCE.md"

// ringSource is the source of the ring comparisons: the reference is the
// CalculiX value, so Published is a ratio of 1.
const ringSource = "CalculiX C3D20 3-D solid of the periodic convolution (surrogate/fecheck/REFERENCE.md); the harmonic method is exact for a cos θ load on an axisymmetric body (Zienkiewicz & Taylor, The Finite Element Method, vol. 1, axisymmetric solids under non-symmetric loads; from memory)"

// memo computes a value once per VerificationCases list; an interrupted
// computation is not kept, so a later call runs it again.
type memo[T any] struct {
	mu   sync.Mutex
	done bool
	v    T
	err  error
	f    func(ctx context.Context) (T, error)
}

func (m *memo[T]) get(ctx context.Context) (T, error) {
	m.mu.Lock()
	defer m.mu.Unlock()
	if !m.done {
		v, err := m.f(ctx)
		if ctx.Err() != nil {
			return v, err
		}
		m.v, m.err, m.done = v, err, true
	}
	return m.v, m.err
}

// scratch runs f in a private temporary directory, removed afterwards.
func scratch[T any](f func(dir string) (T, error)) (T, error) {
	dir, err := os.MkdirTemp("", "plica-verify-fe-")
	if err != nil {
		var zero T
		return zero, err
	}
	defer os.RemoveAll(dir)
	return f(dir)
}

// ringOutcome is one ring geometry: the 3-D CalculiX model, the
// axisymmetric solid model (harmonic 1) and the surrogate's strip section.
type ringOutcome struct {
	fe  *RingResult
	sr  solid.Result
	sec surrogate.Section
}

// VerificationCases returns the package's verification cases: the thin
// cylinder through the shell path (EI, GJ, EA against the closed forms)
// and, on the geometries of verifyRings, the solid model and the
// surrogate against the CalculiX 3-D solid with the accuracy targets of
// TestFESolidVsCalculiX, and the surrogate's GJ, axial rate EA/q, EI_x
// and EI_y of a spined bellows (spineVerify) against the 3-D shell model
// within ±5 %. Each call gives a fresh list whose cases share
// their ccx runs (one per model).
func VerificationCases() []VerificationCase {
	cyl := &memo[*ShellResult]{f: func(ctx context.Context) (*ShellResult, error) {
		return scratch(func(dir string) (*ShellResult, error) {
			s := shellSpec{wall: cylinderWall(cylR, cylPitch), mat: wallMaterial{Es: cylE, Et: cylE, nu: cylNu, t: cylT},
				pitches: 8, around: 32, perPitch: 4, ringA: 2, ring: 4}
			return solveShell(ctx, dir, &s, "verification: thin cylinder", Options{})
		})
	}}
	gm := cylE / (2 * (1 + cylNu))
	cylCase := func(what, unit string, published float64, v func(*ShellResult) float64) VerificationCase {
		return VerificationCase{Area: "fe", Name: "thin cylinder (R 10 mm, t 0.2 mm), S8R shells in CalculiX: " + what, Unit: unit,
			Published: published, Tolerance: 1e-3, Relative: true, Source: cylinderSource,
			Compute: func(ctx context.Context) (float64, error) {
				r, err := cyl.get(ctx)
				if err != nil {
					return math.NaN(), err
				}
				return v(r), nil
			}}
	}
	cases := []VerificationCase{
		cylCase("EI = E·π·R³·t", "N·m²", cylE*math.Pi*cylR*cylR*cylR*cylT, func(r *ShellResult) float64 { return r.EIxNm2 }),
		cylCase("GJ = G·2π·R³·t", "N·m²", gm*2*math.Pi*cylR*cylR*cylR*cylT, func(r *ShellResult) float64 { return r.GJNm2 }),
		cylCase("EA = E·2π·R·t", "N", cylE*2*math.Pi*cylR*cylT, func(r *ShellResult) float64 { return r.EAN }),
	}
	for _, name := range verifyRings {
		var rg ringGeometry
		for _, c := range ringGeometries {
			if c.name == name {
				rg = c
			}
		}
		ring := &memo[ringOutcome]{f: func(ctx context.Context) (ringOutcome, error) {
			var o ringOutcome
			g := rg.geometry()
			b := surrogate.Bellows{Geometry: g, Material: ringMaterial}
			var err error
			if o.sec, err = b.Section(surrogate.Strip); err != nil {
				return o, err
			}
			spec := rg.spec(ringMaterial)
			if o.sr, err = solid.Analyze(spec.conv, solid.Material{E: ringMaterial.ModulusAcross, Nu: ringMaterial.Poisson}, solid.MeshSize{}); err != nil {
				return o, err
			}
			o.fe, err = scratch(func(dir string) (*RingResult, error) {
				return solveRing(ctx, dir, &spec, "verification: "+rg.name, Options{})
			})
			return o, err
		}}
		g := rg.geometry()
		label := fmt.Sprintf("%s w/q %.2g, t/2ρ %.2g, w/Dm %.2g", rg.p, g.Depth/g.Pitch, g.FoldRatio(), g.Depth/(2*g.MeanRadius()))
		ratio := func(what string, below, above float64, v func(o ringOutcome) float64) VerificationCase {
			return VerificationCase{Area: "fe", Name: label + ": " + what + " ÷ CalculiX 3-D", Unit: "ratio",
				Published: 1, Tolerance: above, Below: below, Relative: true, Source: ringSource,
				Compute: func(ctx context.Context) (float64, error) {
					o, err := ring.get(ctx)
					if err != nil {
						return math.NaN(), err
					}
					return v(o), nil
				}}
		}
		// the accuracy targets of TestFESolidVsCalculiX: strain −5 % … +10 %, EI and GJ ±5 %
		cases = append(cases,
			ratio("solid model peak strain per curvature", 0.05, 0.10, func(o ringOutcome) float64 {
				return math.Abs(o.sr.Bending.Meridional.Value) / o.fe.StrainPerCurvatureM
			}),
			ratio("surrogate (strip) peak strain per curvature", 0.05, 0.10, func(o ringOutcome) float64 {
				return o.sec.StrainPerCurvature / o.fe.StrainPerCurvatureM
			}),
			ratio("solid model EI", 0, 0.05, func(o ringOutcome) float64 { return o.sr.BendingStiffness / o.fe.EINm2 }),
			ratio("surrogate (strip) GJ", 0, 0.05, func(o ringOutcome) float64 { return o.sec.GJ / o.fe.GJNm2 }),
		)
	}
	type spineOutcome struct {
		sec surrogate.Section
		fe  *ShellResult
	}
	spine := &memo[spineOutcome]{f: func(ctx context.Context) (spineOutcome, error) {
		b := spineVerify()
		sec, err := b.Section(surrogate.Strip)
		if err != nil {
			return spineOutcome{}, err
		}
		r, err := Run(ctx, b, Options{Shell: true})
		if err != nil {
			return spineOutcome{}, err
		}
		return spineOutcome{sec, r.Shell}, nil
	}}
	for _, c := range []struct {
		what string
		v    func(o spineOutcome) float64
	}{
		{"GJ with the spine factor", func(o spineOutcome) float64 { return o.sec.GJ / o.fe.GJNm2 }},
		{"axial rate EA/q with the spine, its blends and the EA correction", func(o spineOutcome) float64 { return o.sec.EA / o.fe.PitchM / o.fe.AxialRateNPerM }},
		{"EI_x (spine on the neutral plane) with its blends and correction", func(o spineOutcome) float64 { return o.sec.EI[0][0] / o.fe.EIxNm2 }},
		{"EI_y (bending that stretches the spine) with its blends and correction", func(o spineOutcome) float64 { return o.sec.EI[1][1] / o.fe.EIyNm2 }},
	} {
		cases = append(cases, VerificationCase{Area: "fe", Name: "sinusoid w/q 0.5, w/Dm 0.11, spine β 0.06: surrogate (strip) " + c.what + " ÷ CalculiX 3-D shell",
			Unit: "ratio", Published: 1, Tolerance: 0.05, Relative: true, Source: spineSource,
			Compute: func(ctx context.Context) (float64, error) {
				o, err := spine.get(ctx)
				if err != nil {
					return math.NaN(), err
				}
				return c.v(o), nil
			}})
	}
	return cases
}
