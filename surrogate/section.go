package surrogate

import "math"

// Section returns the section properties of the bellows (SI) with the
// requested fidelity, after Validate.
//
// Axial rate per convolution k_conv:
//   - Strip: the r-weighted strip model (surrogate/REFERENCE.md §2.1) over the actual
//     meridian, times the hoop-stiffening factor H interpolated from the
//     generated tables (surrogate/REFERENCE.md §2.2) at the bellows' (C1, C2, t/rm, ν) for
//     U-profiles, (w/q, C2q, t/w, ν) for sinusoids and (flat fraction, w/q,
//     C2q, t/w, ν) for trapezoids; the strain is multiplied by the
//     generated strain factor likewise. The orthotropic wall enters the tables through an effective
//     C2 scaled by (ModulusInLayer/ModulusAcross)^(1/4). Outside a table
//     (grid, ν outside 0.30–0.49, a U-profile with rm < q/4) the shell
//     model runs instead and Section.Fidelity reports Shell.
//   - Shell: the axisymmetric shell model of half a convolution (surrogate/REFERENCE.md §2.3)
//     with DefaultShellElements elements per arc, flank or flat, meridional
//     modulus ModulusAcross, hoop modulus ModulusInLayer.
//
// From k_conv (surrogate/REFERENCE.md §2.5, §2.8, with k_a the axial stiffness per unit
// arc, k_a = k_conv·q/(π·Dm) on the convolutions and E_across·t on the
// spine, an axial strip of plain wall of arc width SpineWidth centred at
// SpineAngle that replaces the convolutions there):
//
//	EA = ∫ k_a Rm dφ                     (= k_conv·q without a spine)
//	(x̄, ȳ) = ∫ k_a (x, y) Rm dφ / EA      (neutral axis moves to the spine)
//	EI[0][0] = ∫ k_a (y−ȳ)² Rm dφ         resists u_x
//	EI[1][1] = ∫ k_a (x−x̄)² Rm dφ         resists u_y
//	EI[0][1] = EI[1][0] = −∫ k_a (x−x̄)(y−ȳ) Rm dφ
//
// The minus sign makes EI the tensor that maps curvature (u_x, u_y) to
// moment under the frame convention of objective/kinematics/REFERENCE.md §2 (u_y > 0 bends toward
// +x, so the strain at (x, y) is u_x·y − u_y·x) [derived]. A uniform bellows
// gives EI = k_conv·q·Dm²/8·I. Calibration then scales the tensor in the
// bellows' own axes: EI'[i][j] = sqrt(c_i·c_j)·EI[i][j] (c_i = 0 → 1), so
// c_x alone multiplies EI_x, c_y alone EI_y, and c_x = c_y = c multiplies
// the whole tensor. PrincipalEI and PrincipalAngle are those of EI'.
//
// GJ_rev = f_s·2π·G·t·q / ∫_pitch ds/r³ with G = E_across/(2(1+ν)) (surrogate/REFERENCE.md §2.6)
// and f_s the spine's torsion factor GJ(spine)/GJ(no spine), generated
// from the 3-D shell model (Geometry.SpineTorsionFactor, surrogate/REFERENCE.md §6.4; 1
// without a spine); for helical convolutions 1/GJ = cos²(2α)/GJ_rev +
// sin²(2α)/(2·EI_0), α = atan(q/(π·Dm)), EI_0 = k_conv·q·Dm²/8 (surrogate/REFERENCE.md §2.7),
// so the spine lowers the revolved (shear) part only.
//
// MassPerLength = ρ·t·((2π − Δφ)/q·∫_pitch r ds + Rm·Δφ), Δφ = SpineWidth/Rm
// (surrogate/REFERENCE.md §2.8). OpeningPerCurvature = q·(Dm/2 + |(x̄, ȳ)|), the opening of the
// convolution farthest from the neutral axis per unit curvature change
// (= q·Dm/2 without a spine, surrogate/REFERENCE.md §2.9). StrainPerCurvature is the peak
// meridional surface strain per unit curvature: the thin-shell strain
// (strip strain × generated strain factor, or shell recovery) per unit
// opening, times the solid model's bending factor, times that opening;
// StrainPerMovement the thin-shell strain per unit extension times the
// solid model's axial factor; the convolutions' share of EI is multiplied
// by the solid model's EI factor (WallFactors, surrogate/REFERENCE.md §6; Strip: the
// generated wall tables, Shell: the solid model solved directly;
// trapezoids keep the thin-shell wall). OutOfRange lists the limits of
// Validity the geometry lies outside.
func (b Bellows) Section(f Fidelity) (Section, error) {
	if f != Strip && f != Shell {
		return Section{}, inputErr("fidelity", "%d is not a fidelity (expected: strip|shell)", int(f))
	}
	if err := b.Validate(); err != nil {
		return Section{}, err
	}
	g, mtl := &b.Geometry, &b.Material
	st := stripModel(g, mtl.ModulusAcross, mtl.Poisson)

	var s Section
	s.Fidelity = Shell
	wf, wok := thinWall, false
	if f == Strip {
		if p, ok := b.shapePoint(); ok {
			if h, sf, ok := tableFor(g.Profile).Lookup(p); ok {
				if wf, wok = b.wallFromTable(); wok || g.Profile == Trapezoid {
					if !wok {
						wf = thinWall
					}
					s.Fidelity = Strip
					s.AxialRatePerConvolution = st.K * h
					s.HoopFactor = h
					s.StrainPerMovement = st.StrainPerMovement * sf
				}
			}
		}
	}
	if s.Fidelity == Shell {
		sh, err := shellModel(g, mtl, DefaultShellElements)
		if err != nil {
			return Section{}, err
		}
		s.AxialRatePerConvolution = sh.K
		s.HoopFactor = sh.K / st.K
		s.StrainPerMovement = sh.StrainPerMovement
		wf, wok = b.wallDirect()
	}
	s.ThickWall = wok
	s.WallFactors = wf
	// thin-shell axial strain per unit movement, before the corrections
	thin := s.StrainPerMovement
	s.StrainPerMovement = thin * wf.Axial
	s.StrainPerCurvature = thin * wf.Bending // per unit opening q·Rm; beam scales it
	s.OutOfRange = b.Geometry.OutOfRange()
	b.beam(&s, &st)
	return s, nil
}

// beam fills EA, EI, GJ, mass and the opening from k_conv (see Section).
func (b *Bellows) beam(s *Section, st *stripResult) {
	g, mtl := &b.Geometry, &b.Material
	rm := g.MeanRadius()
	dm := 2 * rm
	q, t := g.Pitch, g.Wall
	k := s.AxialRatePerConvolution

	// EI tensor (surrogate/REFERENCE.md §2.8), closed-form integrals over the spine arc.
	kb := k * q / (math.Pi * dm)
	ks := mtl.ModulusAcross * t
	fEI := s.WallFactors.EI
	if fEI == 0 {
		fEI = 1
	}
	h := g.SpineWidth / rm / 2 // half the spine angle
	r3 := rm * rm * rm
	ea := kb * rm * 2 * math.Pi
	// ∫k x², ∫k y², ∫k xy with the convolutions' bending stiffness
	// k_a·fEI (harmonic-1 EI over the beam analogy of the convolution)
	cxx, cyy, cxy := fEI*kb*r3*math.Pi, fEI*kb*r3*math.Pi, 0.0
	var xb, yb float64
	if h > 0 {
		dk := ks - kb
		sn, cs := math.Sincos(g.SpineAngle)
		s2, c2 := math.Sincos(2 * g.SpineAngle)
		ea += dk * rm * 2 * h
		sx := dk * rm * rm * 2 * math.Sin(h) * cs
		sy := dk * rm * rm * 2 * math.Sin(h) * sn
		xb, yb = sx/ea, sy/ea
		sin2h := math.Sin(2 * h)
		// bending weights: the spine replaces convolutions of fEI·k_a;
		// second moments about the neutral axis (x̄, ȳ) of the axial
		// stiffness: ∫k_b (x−x̄)² = ∫k_b x² − 2x̄∫k_b x + x̄²∫k_b
		db := ks - fEI*kb
		eb := fEI*kb*rm*2*math.Pi + db*rm*2*h
		bx := db * rm * rm * 2 * math.Sin(h) * cs
		by := db * rm * rm * 2 * math.Sin(h) * sn
		cxx += db * r3 * (h + c2*sin2h/2)
		cyy += db * r3 * (h - c2*sin2h/2)
		cxy += db * r3 * s2 * sin2h / 2
		cxx += -2*xb*bx + eb*xb*xb
		cyy += -2*yb*by + eb*yb*yb
		cxy += -xb*by - yb*bx + eb*xb*yb
	}
	s.EA = ea
	ei := [2][2]float64{{cyy, -cxy}, {-cxy, cxx}}
	var c [2]float64
	for i, v := range b.Calibration {
		c[i] = v
		if v == 0 {
			c[i] = 1
		}
	}
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			ei[i][j] *= math.Sqrt(c[i] * c[j])
		}
	}
	ei[0][1] = (ei[0][1] + ei[1][0]) / 2
	ei[1][0] = ei[0][1]
	s.EI = ei
	s.PrincipalEI, s.PrincipalAngle = principal(ei)

	// Torsion (surrogate/REFERENCE.md §2.6, §2.7).
	gm := mtl.ModulusAcross / (2 * (1 + mtl.Poisson))
	gj := 2 * math.Pi * gm * t * q / st.mom.Am3
	// the spine's torsion factor acts on the revolved wall; the helical
	// formula then adds unwinding in series (surrogate/REFERENCE.md §6.4)
	gj *= g.SpineTorsionFactor()
	if g.Helical {
		a := math.Atan(q / (math.Pi * dm))
		s2, c2 := math.Sincos(2 * a)
		ei0 := fEI * k * q * dm * dm / 8
		gj = 1 / (c2*c2/gj + s2*s2/(2*ei0))
	}
	s.GJ = gj

	// Mass (surrogate/REFERENCE.md §2.8) and opening (§2.9).
	s.MassPerLength = mtl.Density * t * ((2*math.Pi-2*h)/q*st.mom.A2 + rm*2*h)
	s.OpeningPerCurvature = q * (rm + math.Hypot(xb, yb))
	s.StrainPerCurvature *= s.OpeningPerCurvature
}

// principal returns the eigenvalues (max first) of a symmetric 2×2 tensor
// and the angle of the first eigenvector from x, in (−π/2, π/2]; 0 for an
// isotropic tensor.
func principal(a [2][2]float64) ([2]float64, float64) {
	m := (a[0][0] + a[1][1]) / 2
	d := (a[0][0] - a[1][1]) / 2
	r := math.Hypot(d, a[0][1])
	if r <= 1e-14*math.Abs(m) {
		return [2]float64{m, m}, 0
	}
	th := 0.5 * math.Atan2(a[0][1], d)
	if th <= -math.Pi/2 {
		th += math.Pi
	}
	return [2]float64{m + r, m - r}, th
}
