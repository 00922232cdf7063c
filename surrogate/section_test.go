package surrogate

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestUniformBellowsIsotropic checks EI_xx = EI_yy = f_EI·k_conv·q·Dm²/8 (f_EI the harmonic-1 correction),
// EI_xy = 0, EA = k_conv·q and opening q·Dm/2 for a bellows without a
// spine (surrogate/REFERENCE.md §2.5, §2.8, §2.9; derived).
func TestUniformBellowsIsotropic(t *testing.T) {
	for _, f := range []Fidelity{Strip, Shell} {
		for _, p := range []Profile{Sinusoid, UShape, Trapezoid} {
			b := validBellows()
			b.Profile, b.FlatFraction = p, 0.3
			s, err := b.Section(f)
			require.NoError(t, err, "%v %v", f, p)
			dm := 2 * b.MeanRadius()
			ei := s.WallFactors.EI * s.AxialRatePerConvolution * b.Pitch * dm * dm / 8
			name := f.String() + " " + p.String()
			assert.InEpsilon(t, ei, s.EI[0][0], 1e-12, "%s: EI_xx", name)
			assert.InEpsilon(t, ei, s.EI[1][1], 1e-12, "%s: EI_yy", name)
			assert.Zero(t, s.EI[0][1], "%s: EI_xy", name)
			assert.Zero(t, s.EI[1][0], "%s: EI_yx", name)
			assert.InEpsilon(t, ei, s.PrincipalEI[0], 1e-12, "%s: principal EI", name)
			assert.InEpsilon(t, ei, s.PrincipalEI[1], 1e-12, "%s: principal EI", name)
			assert.Zero(t, s.PrincipalAngle, "%s: principal angle", name)
			assert.InEpsilon(t, s.AxialRatePerConvolution*b.Pitch, s.EA, 1e-12, "%s: EA", name)
			assert.InEpsilon(t, b.Pitch*dm/2, s.OpeningPerCurvature, 1e-12, "%s: opening", name)
			assert.Greater(t, s.StrainPerCurvature, 0.0, "%s: strain per curvature", name)
			assert.Greater(t, s.HoopFactor, 0.0, "%s: hoop factor", name)
		}
	}
}

// spineTensor integrates the surrogate/REFERENCE.md §2.8 integrals numerically (midpoint rule,
// 200 000 points around the circumference): an independent check of the
// closed forms and the blend quadrature in beam(). The convolutions carry
// k_a = kb axially and fEI·kb in bending (the harmonic-1 EI correction);
// the spine ks in both; across a blend of arc `blend` beside each edge of
// the spine the compliance runs as 1/ks + f²·(1/k − 1/ks), f the blend
// fraction (§2.8); the bending moments are taken about the neutral axis of
// the axial stiffness.
func spineTensor(kb, fEI, ks, rm, width, blend, angle float64) (ea float64, ei [2][2]float64, cx, cy float64) {
	const n = 200000
	h := width / rm / 2
	db := blend / rm
	var sx, sy float64
	type pt struct{ x, y, kb float64 }
	pts := make([]pt, n)
	da := rm * 2 * math.Pi / n
	for i := 0; i < n; i++ {
		phi := (float64(i) + 0.5) * 2 * math.Pi / n
		k, kbend := kb, fEI*kb
		if d := math.Abs(math.Remainder(phi-angle, 2*math.Pi)); d < h {
			k, kbend = ks, ks
		} else if d < h+db {
			f := (d - h) / db
			k = 1 / (1/ks + f*f*(1/kb-1/ks))
			kbend = 1 / (1/ks + f*f*(1/(fEI*kb)-1/ks))
		}
		x, y := rm*math.Cos(phi), rm*math.Sin(phi)
		ea += k * da
		sx += k * x * da
		sy += k * y * da
		pts[i] = pt{x, y, kbend}
	}
	cx, cy = sx/ea, sy/ea
	var ixx, iyy, ixy float64
	for _, p := range pts {
		ixx += p.kb * (p.x - cx) * (p.x - cx) * da
		iyy += p.kb * (p.y - cy) * (p.y - cy) * da
		ixy += p.kb * (p.x - cx) * (p.y - cy) * da
	}
	return ea, [2][2]float64{{iyy, -ixy}, {-ixy, ixx}}, cx, cy
}

// TestSpineAnisotropy checks the EI tensor of a bellows with an axial
// spine against a numerical quadrature of surrogate/REFERENCE.md §2.8
// (times the generated corrections of §6.4 in the spine's frame) and the expected
// orientation [derived]: the spine stiffens bending about the axis
// perpendicular to its position (a spine on +x raises EI_y, which resists
// u_y, and the first principal axis is at SpineAngle + 90°), and turning
// the spine by 90° swaps EI_x and EI_y.
func TestSpineAnisotropy(t *testing.T) {
	base := validBellows()
	base.SpineWidth = 3e-3
	rm := base.MeanRadius()
	cases := []struct {
		name      string
		angle     float64
		principal float64
	}{
		{"spine on +x", 0, math.Pi / 2},
		{"spine on +y", math.Pi / 2, 0},
		{"spine at 30°", math.Pi / 6, -math.Pi / 3},
		{"spine at 135°", 3 * math.Pi / 4, math.Pi / 4},
		{"spine at −90°", -math.Pi / 2, 0},
	}
	for _, c := range cases {
		b := base
		b.SpineAngle = c.angle
		s, err := b.Section(Strip)
		require.NoError(t, err, c.name)
		kb := s.AxialRatePerConvolution * b.Pitch / (math.Pi * 2 * rm)
		ea, ei, cx, cy := spineTensor(kb, s.WallFactors.EI, b.Material.ModulusAcross*b.Wall, rm, b.SpineWidth, b.Depth, c.angle)
		// the generated corrections (§6.4) act in the spine's frame: the
		// quadrature with the spine on +x, scaled, turned to the angle
		_, el, _, _ := spineTensor(kb, s.WallFactors.EI, b.Material.ModulusAcross*b.Wall, rm, b.SpineWidth, b.Depth, 0)
		sf := b.SpineFactors()
		e0, e1 := el[0][0]*sf.EINeutral, el[1][1]*sf.EIStretch
		sn, cs := math.Sincos(c.angle)
		ei = [2][2]float64{{cs*cs*e0 + sn*sn*e1, cs * sn * (e0 - e1)}, {cs * sn * (e0 - e1), sn*sn*e0 + cs*cs*e1}}
		// Midpoint quadrature with a discontinuous integrand: error ~ 1/n.
		assert.InEpsilon(t, ea*sf.EA, s.EA, 1e-4, "%s: EA", c.name)
		for i := 0; i < 2; i++ {
			for j := 0; j < 2; j++ {
				assert.InDelta(t, ei[i][j], s.EI[i][j], 1e-4*ei[0][0]+1e-4*ei[1][1], "%s: EI[%d][%d]", c.name, i, j)
			}
		}
		assert.InEpsilon(t, b.Pitch*(rm+math.Hypot(cx, cy)), s.OpeningPerCurvature, 1e-4, "%s: opening", c.name)
		assert.Greater(t, s.PrincipalEI[0], 1.5*s.PrincipalEI[1], "%s: the spine makes EI anisotropic", c.name)
		d := math.Remainder(s.PrincipalAngle-c.principal, math.Pi)
		assert.InDelta(t, 0, d, 1e-9, "%s: principal angle %g, want %g", c.name, s.PrincipalAngle, c.principal)
		// Neutral axis moves toward the spine.
		assert.Greater(t, cx*math.Cos(c.angle)+cy*math.Sin(c.angle), 0.0, "%s: neutral axis toward the spine", c.name)
	}
	b0, b90 := base, base
	b90.SpineAngle = math.Pi / 2
	s0, err := b0.Section(Strip)
	require.NoError(t, err)
	s90, err := b90.Section(Strip)
	require.NoError(t, err)
	assert.Greater(t, s0.EI[1][1], s0.EI[0][0], "spine on +x: EI_y > EI_x")
	assert.InEpsilon(t, s0.EI[0][0], s90.EI[1][1], 1e-12, "rotating the spine by 90° swaps EI_x and EI_y")
	assert.InEpsilon(t, s0.EI[1][1], s90.EI[0][0], 1e-12, "rotating the spine by 90° swaps EI_x and EI_y")
	assert.InEpsilon(t, s0.PrincipalEI[0], s90.PrincipalEI[0], 1e-12, "principal values do not depend on the spine angle")
}

// TestCalibration checks EI'_ij = sqrt(c_i c_j)·EI_ij (Section doc).
func TestCalibration(t *testing.T) {
	b := validBellows()
	b.SpineWidth, b.SpineAngle = 3e-3, math.Pi/6
	raw, err := b.Section(Strip)
	require.NoError(t, err)
	cases := []struct {
		name string
		c    [2]float64
	}{
		{"x only", [2]float64{2, 0}},
		{"both equal", [2]float64{0.8, 0.8}},
		{"different", [2]float64{1.3, 0.6}},
	}
	for _, cc := range cases {
		b.Calibration = cc.c
		s, err := b.Section(Strip)
		require.NoError(t, err, cc.name)
		c := cc.c
		for i := range c {
			if c[i] == 0 {
				c[i] = 1
			}
		}
		for i := 0; i < 2; i++ {
			for j := 0; j < 2; j++ {
				assert.InEpsilon(t, math.Sqrt(c[i]*c[j])*raw.EI[i][j], s.EI[i][j], 1e-12, "%s: EI[%d][%d]", cc.name, i, j)
			}
		}
		assert.Equal(t, raw.GJ, s.GJ, "%s: GJ is not calibrated", cc.name)
		assert.Equal(t, raw.EA, s.EA, "%s: EA is not calibrated", cc.name)
		tr := s.EI[0][0] + s.EI[1][1]
		assert.InEpsilon(t, tr, s.PrincipalEI[0]+s.PrincipalEI[1], 1e-12, "%s: principal values keep the trace", cc.name)
	}
}

// TestPlainTubeTorsion checks GJ against the straight-tube value
// 2π·G·t·R³ as the depth goes to zero (surrogate/REFERENCE.md §2.6) and against G times
// the polar moment π(OD⁴ − ID⁴)/32 of a hollow circular section (common
// practice), which differs from the thin-wall value by (t/R)²/4 [derived].
func TestPlainTubeTorsion(t *testing.T) {
	const th, od = 0.5e-3, 30e-3
	mat := validBellows().Material
	gm := mat.ModulusAcross / (2 * (1 + mat.Poisson))
	for _, w := range []float64{1e-6, 1e-8} {
		g := Geometry{Profile: Sinusoid, OuterDiameter: od, Depth: w, Pitch: 5e-3, Wall: th}
		rm := g.MeanRadius()
		st := stripModel(&g, mat.ModulusAcross, mat.Poisson)
		b := Bellows{Geometry: g, Material: mat}
		s := Section{AxialRatePerConvolution: st.K}
		b.beam(&s, &st, true)
		want := 2 * math.Pi * gm * th * rm * rm * rm
		// GJ ∝ 1/∫ds/r³ changes by O((w/R)²) from the tube value.
		assert.InEpsilon(t, want, s.GJ, 1e-6, "GJ at depth %g m", w)
		ro, ri := rm+th/2, rm-th/2
		j := math.Pi * (math.Pow(2*ro, 4) - math.Pow(2*ri, 4)) / 32
		assert.InEpsilon(t, gm*j, s.GJ, 0.5*(th/rm)*(th/rm), "GJ vs G·π(OD⁴−ID⁴)/32 at depth %g m", w)
		// Mass of a plain tube: ρ·t·2π·Rm.
		assert.InEpsilon(t, mat.Density*th*2*math.Pi*rm, s.MassPerLength, 1e-6, "mass per length at depth %g m", w)
	}
}

// TestBellowsTorsionAndMass checks GJ and mass of real bellows against
// the rules of surrogate/REFERENCE.md §2.6/§2.8: U-profile flanks give
// ∫ds/r³ = 1/r_a² − 1/r_b² (radial lines, exact) plus the arcs; mass
// m' ≈ ρ t π Dm s_dev/q with s_dev = 2w + (2π − 4)·rm [derived].
func TestBellowsTorsionAndMass(t *testing.T) {
	b := validBellows()
	b.Profile, b.Pitch = UShape, 6e-3
	s, err := b.Section(Strip)
	require.NoError(t, err)
	rm, w, q, th := b.MeanRadius(), b.Depth, b.Pitch, b.Wall
	rc := q / 4
	mat := b.Material
	gm := mat.ModulusAcross / (2 * (1 + mat.Poisson))
	// Arcs by a fine midpoint rule; flanks in closed form.
	ra, rb := rm-w/2+rc, rm+w/2-rc
	integral := 1/(ra*ra) - 1/(rb*rb)
	const n = 100000
	for i := 0; i < n; i++ {
		a := (float64(i) + 0.5) * math.Pi / n // a full semicircle each
		root := rm - w/2 + rc - rc*math.Sin(a)
		crown := rm + w/2 - rc + rc*math.Sin(a)
		ds := rc * math.Pi / n
		integral += ds/(root*root*root) + ds/(crown*crown*crown)
	}
	assert.InEpsilon(t, 2*math.Pi*gm*th*q/integral, s.GJ, 1e-6, "U GJ")
	sdev := 2*w + (2*math.Pi-4)*rc
	assert.InEpsilon(t, mat.Density*th*math.Pi*2*rm*sdev/q, s.MassPerLength, 1e-9, "U mass (∫r ds = Rm·s_dev by symmetry)")
	// Rule of thumb GJ_bellows ≈ GJ_tube·(q/s_dev)·(0.8–0.9) [derived,
	// surrogate/REFERENCE.md §2.6]; loose bounds.
	tube := 2 * math.Pi * gm * th * rm * rm * rm
	ratio := s.GJ / (tube * q / sdev)
	assert.Greater(t, ratio, 0.6, "GJ vs rule of thumb")
	assert.Less(t, ratio, 1.0, "GJ vs rule of thumb")
}

// TestHelicalTorsion checks 1/GJ_hel = cos²(2α)/GJ_rev + sin²(2α)/(2·EI),
// α = atan(q/(π Dm)) (surrogate/REFERENCE.md §2.7).
func TestHelicalTorsion(t *testing.T) {
	b := validBellows()
	rev, err := b.Section(Strip)
	require.NoError(t, err)
	b.Helical = true
	hel, err := b.Section(Strip)
	require.NoError(t, err)
	dm := 2 * b.MeanRadius()
	a := math.Atan(b.Pitch / (math.Pi * dm))
	ei := rev.WallFactors.EI * rev.AxialRatePerConvolution * b.Pitch * dm * dm / 8 // harmonic-1 EI
	want := 1 / (math.Pow(math.Cos(2*a), 2)/rev.GJ + math.Pow(math.Sin(2*a), 2)/(2*ei))
	assert.InEpsilon(t, want, hel.GJ, 1e-12, "helical GJ")
	assert.Less(t, hel.GJ, rev.GJ, "helical convolutions are torsionally softer")
	assert.Equal(t, rev.EI, hel.EI, "EI unchanged to O(α²)")
}

// TestStrainPerCurvature checks the straightening strain: the peak
// meridional strain for e = OpeningPerCurvature (surrogate/REFERENCE.md §2.9) equals the
// strip formula ε = 1.5·t·e/(w²·Cf_strip) for a thin U-bellows with little
// hoop stiffening (C2 ≈ 0.3) within the strain factor (a few percent)
// once the solid model's bending correction (Section.WallFactors.Bending,
// checked against the solid model in wall_test.go) is applied, and Strip
// and Shell agree.
func TestStrainPerCurvature(t *testing.T) {
	b := Bellows{Geometry: Geometry{Profile: UShape, OuterDiameter: 200e-3, Depth: 8e-3, Pitch: 4e-3, Wall: 0.2e-3},
		Material: validBellows().Material}
	dm := 2 * b.MeanRadius()
	c1, c2 := EJMAShapeFactors(b.Pitch/4, b.Depth, dm, b.Wall)
	require.Less(t, c2, 0.4, "small hoop stiffening (C2 = %g)", c2)
	strip, err := b.Section(Strip)
	require.NoError(t, err)
	shell, err := b.Section(Shell)
	require.NoError(t, err)
	e := b.Pitch * dm / 2
	want := 1.5 * b.Wall * e / (b.Depth * b.Depth * UCfStrip(c1))
	require.True(t, strip.ThickWall)
	assert.InEpsilon(t, want*strip.WallFactors.Bending, strip.StrainPerCurvature, 0.05, "strip strain per curvature vs closed form")
	assert.InEpsilon(t, shell.StrainPerCurvature, strip.StrainPerCurvature, 0.02, "strip vs shell strain per curvature")
	assert.InEpsilon(t, shell.AxialRatePerConvolution, strip.AxialRatePerConvolution, 0.01, "strip vs shell k_conv")
}

// TestSectionDeterministic: same input, same output.
func TestSectionDeterministic(t *testing.T) {
	b := validBellows()
	b.SpineWidth = 2e-3
	for _, f := range []Fidelity{Strip, Shell} {
		s1, err := b.Section(f)
		require.NoError(t, err)
		s2, err := b.Section(f)
		require.NoError(t, err)
		assert.Equal(t, s1, s2, "%v twice", f)
	}
}
