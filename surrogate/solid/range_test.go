package solid

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestValidatedRangeEdges solves the corners of the validated range
// (t/2ρ = 0.15 and 0.8; w/q = 0.25, 1 and 1.6 for the sinusoid, 1 and 1.6
// for the U) on the default mesh and on a mesh refined 2× along and 1.5×
// through, and checks: the default mesh is converged (stiffness within
// 0.5 %, peak strains within 3 %; derived, mesh convergence), and the
// axial peak sits on the concave surface of a fold, as curved-bar theory
// puts it (Winkler–Bach: the concave fibre carries the larger stress;
// Young & Budynas, Roark's Formulas for Stress and Strain, 7th ed., 2002,
// ch. 9, curved beams).
func TestValidatedRangeEdges(t *testing.T) {
	if testing.Short() {
		t.Skip("about 8 s")
	}
	const q = 0.004
	for _, g := range []struct {
		p      Profile
		wq, tr float64
	}{
		{Sinusoid, 0.25, 0.15}, {Sinusoid, 0.25, 0.8}, {Sinusoid, 1, 0.15}, {Sinusoid, 1, 0.8},
		{Sinusoid, 1.6, 0.15}, {Sinusoid, 1.6, 0.8},
		{UShape, 1, 0.15}, {UShape, 1, 0.8}, {UShape, 1.6, 0.15}, {UShape, 1.6, 0.8},
	} {
		c := Convolution{Profile: g.p, MeanRadius: 0.012, Depth: g.wq * q, Pitch: q}
		c.Wall = g.tr * 2 * c.FoldRadius()
		def := c.DefaultMesh()
		fine := MeshSize{Through: min(24, def.Through*3/2), Along: 2 * def.Along, Bias: def.Bias}
		r, err := Analyze(c, pla, def)
		if err != nil {
			t.Fatal(err)
		}
		f, err := Analyze(c, pla, fine)
		if err != nil {
			t.Fatal(err)
		}
		name := c.Profile.String()
		t.Logf("%-8s w/q %.2f t/2ρ %.2f mesh %v: k %+.3f %%, EI %+.3f %%, ε_axial %+.2f %% (%v %v), ε_bending %+.2f %% (%v %v); EI/beam analogy %.3f",
			name, g.wq, g.tr, def, 100*(r.AxialStiffness/f.AxialStiffness-1), 100*(r.BendingStiffness/f.BendingStiffness-1),
			100*(r.Axial.Max.Value/f.Axial.Max.Value-1), r.Axial.Max.Surface, r.Axial.Max.Region,
			100*(r.Bending.Max.Value/f.Bending.Max.Value-1), r.Bending.Max.Surface, r.Bending.Max.Region,
			r.BendingStiffness/r.BeamAnalogyEI(c))
		for _, x := range []struct {
			what      string
			got, want float64
			tol       float64
		}{
			{"k_conv", r.AxialStiffness, f.AxialStiffness, 5e-3},
			{"EI", r.BendingStiffness, f.BendingStiffness, 5e-3},
			{"axial strain", r.Axial.Max.Value, f.Axial.Max.Value, 0.03},
			{"bending strain", r.Bending.Max.Value, f.Bending.Max.Value, 0.03},
		} {
			if e := rel(x.got, x.want); e > x.tol {
				t.Errorf("%s w/q %g t/2ρ %g: %s %.6g on the default mesh, %.6g refined (%.2g off)", name, g.wq, g.tr, x.what, x.got, x.want, e)
			}
		}
		concave := (r.Axial.Max.Surface == Inner && r.Axial.Max.Region == Crest) || (r.Axial.Max.Surface == Outer && r.Axial.Max.Region == Root)
		if !concave {
			t.Errorf("%s w/q %g t/2ρ %g: axial peak on the %v surface at the %v, want the concave side of a fold", name, g.wq, g.tr, r.Axial.Max.Surface, r.Axial.Max.Region)
		}
	}
}

// TestBeamAnalogyLimit: for a shallow fold on a large radius every
// meridian acts as an axial spring at radius Rm, so EI → k·q·Rm²/2
// (the beam analogy EI = k·q·Dm²/8; common practice) and the bending
// strain per curvature → the axial strain per extension times q·Rm.
func TestBeamAnalogyLimit(t *testing.T) {
	for _, c := range []struct{ rmOverW, tol float64 }{{50, 1e-3}, {150, 2e-4}} {
		conv := Convolution{Profile: Sinusoid, Depth: 0.002, Pitch: 0.004, Wall: 0.0003}
		conv.MeanRadius = c.rmOverW * conv.Depth
		r, err := Analyze(conv, pla, MeshSize{Through: 6, Along: 64, Bias: 0.8})
		if err != nil {
			t.Fatal(err)
		}
		if e := rel(r.BendingStiffness, r.BeamAnalogyEI(conv)); e > c.tol {
			t.Errorf("Rm/w = %g: EI %.6g, beam analogy %.6g (%.2g off)", c.rmOverW, r.BendingStiffness, r.BeamAnalogyEI(conv), e)
		}
		ax := math.Abs(r.Axial.Max.Value) * conv.Pitch * conv.MeanRadius
		if e := rel(math.Abs(r.Bending.Max.Value), ax); e > 5*c.tol+2e-3 {
			t.Errorf("Rm/w = %g: bending strain %.6g per curvature, axial ×q·Rm %.6g (%.2g off)", c.rmOverW, r.Bending.Max.Value, ax, e)
		}
	}
}

// TestPrincipal compares the closed-form principal strains with gonum's
// symmetric eigensolver (mat.EigenSym).
func TestPrincipal(t *testing.T) {
	for _, e := range []Strain{
		{1e-3, -2e-4, 3e-4, 5e-4, -1e-4, 2e-4},
		{2e-3, 2e-3, 2e-3, 0, 0, 0},
		{1, 0, 0, 0, 0, 0},
		{-3e-4, 1e-4, 0, 0, 7e-4, 0},
	} {
		a := mat.NewSymDense(3, []float64{
			e[0], e[3] / 2, e[4] / 2,
			e[3] / 2, e[1], e[5] / 2,
			e[4] / 2, e[5] / 2, e[2],
		})
		var es mat.EigenSym
		if !es.Factorize(a, false) {
			t.Fatal("EigenSym failed")
		}
		v := es.Values(nil) // ascending
		p := e.Principal()
		scale := math.Max(math.Abs(v[0]), math.Abs(v[2]))
		for i := range 3 {
			if d := math.Abs(p[i]-v[2-i]) / scale; d > 1e-9 {
				t.Errorf("%v: principal %v, EigenSym %v", e, p, v)
				break
			}
		}
	}
}

// TestBadGeometry: geometries that cannot be meshed are refused with a
// reason.
func TestBadGeometry(t *testing.T) {
	ok := Convolution{Profile: Sinusoid, MeanRadius: 0.01, Depth: 0.004, Pitch: 0.004, Wall: 0.0002}
	for name, c := range map[string]Convolution{
		"zero wall":        {Profile: Sinusoid, MeanRadius: 0.01, Depth: 0.004, Pitch: 0.004},
		"wall past fold":   {Profile: Sinusoid, MeanRadius: 0.01, Depth: 0.004, Pitch: 0.004, Wall: 2.1 * ok.FoldRadius()},
		"root at the axis": {Profile: Sinusoid, MeanRadius: 0.002, Depth: 0.004, Pitch: 0.004, Wall: 0.0002},
		"U radius > q/4":   {Profile: UShape, MeanRadius: 0.01, Depth: 0.004, Pitch: 0.004, Wall: 0.0002, CrestRadius: 0.0011},
		"U radius > w/2":   {Profile: UShape, MeanRadius: 0.01, Depth: 0.0015, Pitch: 0.004, Wall: 0.0002, CrestRadius: 0.001},
		"unknown profile":  {Profile: Profile(7), MeanRadius: 0.01, Depth: 0.004, Pitch: 0.004, Wall: 0.0002},
	} {
		if _, err := Analyze(c, pla, MeshSize{}); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, err := Analyze(ok, Material{E: 1e9, Nu: 0.5}, MeshSize{}); err == nil {
		t.Error("ν = 0.5 accepted")
	}
	if _, err := Analyze(ok, pla, MeshSize{Through: 0, Along: 10}); err == nil {
		t.Error("zero elements through accepted")
	}
}
