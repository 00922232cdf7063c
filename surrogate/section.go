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
// SpineAngle that replaces the convolutions there, blending into them over
// an arc of one depth w each side, where 1/k_a = 1/(E_across·t) +
// f²·(1/k_conv-arc − 1/(E_across·t)), f the blend fraction 0…1):
//
//	EA = c_EA·∫ k_a Rm dφ                (= k_conv·q without a spine)
//	(x̄, ȳ) = ∫ k_a (x, y) Rm dφ / ∫ k_a Rm dφ  (neutral axis moves to the spine)
//	EI[0][0] = ∫ k_a (y−ȳ)² Rm dφ         resists u_x
//	EI[1][1] = ∫ k_a (x−x̄)² Rm dφ         resists u_y
//	EI[0][1] = EI[1][0] = −∫ k_a (x−x̄)(y−ȳ) Rm dφ
//
// where the tensor is first formed in the spine's frame (spine on +x',
// diagonal by symmetry), its two entries multiplied by the generated
// corrections c_stretch (bending that stretches the spine) and
// c_neutral (spine on the neutral plane), and then turned to SpineAngle;
// c_EA, c_stretch, c_neutral come from the 3-D shell model
// (Geometry.SpineFactors, surrogate/REFERENCE.md §6.4; 1 without a spine).
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
// MassPerLength = ρ·t·(midsurface area per length): 2π·∫_pitch r ds/q
// without a spine; with one, the convolutions, the plain strip and the
// blends' area by quadrature (Geometry.SpineArcs, SpineBlend, SpineTwins;
// surrogate/REFERENCE.md §2.8). OpeningPerCurvature = q·(Dm/2 + |(x̄, ȳ)|), the opening of the
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
	return b.section(f, true)
}

// section is Section, with the generated spine corrections of §6.4
// applied or not (corrected).
func (b Bellows) section(f Fidelity, corrected bool) (Section, error) {
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
	b.beam(&s, &st, corrected)
	return s, nil
}

// beam fills EA, EI, GJ, mass and the opening from k_conv (see Section).
func (b *Bellows) beam(s *Section, st *stripResult, corrected bool) {
	g, mtl := &b.Geometry, &b.Material
	rm := g.MeanRadius()
	dm := 2 * rm
	q, t := g.Pitch, g.Wall
	k := s.AxialRatePerConvolution

	// EI tensor (surrogate/REFERENCE.md §2.8): the no-spine integrals in
	// closed form plus the spine and its blends (spineZone), in the spine's
	// frame (spine on +x'), times the generated corrections (§6.4), then
	// turned to the spine angle.
	fEI := s.WallFactors.EI
	if fEI == 0 {
		fEI = 1
	}
	sb := b.spineBeam(k, fEI)
	sf := SpineFactors{GJ: 1, EA: 1, EIStretch: 1, EINeutral: 1}
	if corrected {
		sf = g.SpineFactors()
	}
	sn, cs := math.Sincos(g.SpineAngle)
	s.EA = sb.EA * sf.EA
	xb, yb := sb.Offset*cs, sb.Offset*sn
	// local tensor diag(EI resisting u_x', EI resisting u_y'), turned:
	// EI = R·EI'·Rᵀ
	e0, e1 := sb.EINeutral*sf.EINeutral, sb.EIStretch*sf.EIStretch
	ei := [2][2]float64{{cs*cs*e0 + sn*sn*e1, cs * sn * (e0 - e1)}, {cs * sn * (e0 - e1), sn*sn*e0 + cs*cs*e1}}
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
	gj *= sf.GJ
	if g.Helical {
		a := math.Atan(q / (math.Pi * dm))
		s2, c2 := math.Sincos(2 * a)
		ei0 := fEI * k * q * dm * dm / 8
		gj = 1 / (c2*c2/gj + s2*s2/(2*ei0))
	}
	s.GJ = gj

	// Mass (surrogate/REFERENCE.md §2.8) and opening (§2.9).
	s.MassPerLength = mtl.Density * t * g.wallAreaPerLength(st.mom.A2)
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

// SpineBeam is the closed form of §2.8 (surrogate/REFERENCE.md) of a
// bellows' beam stiffness with its spine and blends, before the generated
// corrections of §6.4, in the spine's frame.
type SpineBeam struct {
	EA        float64 // N
	EIStretch float64 // N·m², bending that stretches and compresses the spine
	EINeutral float64 // N·m², bending with the spine on the neutral plane
	Offset    float64 // m, of the neutral axis from the bellows' axis toward the spine
}

// SpineClosedForm returns the closed form of §2.8 of the bellows with the
// requested fidelity, without the generated spine corrections of §6.4
// (the spine table's generator divides the FE stiffness by it).
func (b Bellows) SpineClosedForm(f Fidelity) (SpineBeam, error) {
	s, err := b.section(f, false)
	if err != nil {
		return SpineBeam{}, err
	}
	fEI := s.WallFactors.EI
	if fEI == 0 {
		fEI = 1
	}
	return b.spineBeam(s.AxialRatePerConvolution, fEI), nil
}

// spineBeam integrates §2.8 in the spine's frame from the axial rate per
// convolution k and the convolutions' EI factor fEI.
func (b *Bellows) spineBeam(k, fEI float64) SpineBeam {
	g := &b.Geometry
	rm := g.MeanRadius()
	kb := k * g.Pitch / (2 * math.Pi * rm)
	r3 := rm * rm * rm
	ea := kb * rm * 2 * math.Pi
	// ∫k x'², ∫k y'² with the convolutions' bending stiffness k_a·fEI
	// (harmonic-1 EI over the beam analogy of the convolution)
	cxx, cyy := fEI*kb*r3*math.Pi, fEI*kb*r3*math.Pi
	var xb float64
	if g.SpineWidth > 0 {
		ks := b.Material.ModulusAcross * g.Wall
		h := g.SpineWidth / rm / 2 // half the spine angle
		d := g.Depth / rm          // blend angle each side
		za := spineZone(ks, kb, h, d)
		zb := spineZone(ks, fEI*kb, h, d)
		ea += za.m0 * rm
		xb = za.mc * rm * rm / ea
		// second moments about the neutral axis x̄' of the axial
		// stiffness: ∫k_b (x'−x̄')² = ∫k_b x'² − 2x̄'∫k_b x' + x̄'²∫k_b
		eb := fEI*kb*rm*2*math.Pi + zb.m0*rm
		cxx += zb.mcc*r3 - 2*xb*zb.mc*rm*rm + eb*xb*xb
		cyy += zb.mss * r3
	}
	return SpineBeam{EA: ea, EIStretch: cxx, EINeutral: cyy, Offset: xb}
}

// zoneMoments are the integrals over the spine and its blends of the
// change of the axial stiffness per unit arc from the convolutions' value,
// Δk(ψ) = k(ψ) − k_c, times 1, cos ψ, sin ψ, cos²ψ, sin²ψ, cos ψ sin ψ
// dψ, ψ measured from the spine's centre.
type zoneMoments struct{ m0, mc, ms, mcc, mss, mcs float64 }

// spineZone integrates the spine of half angle h (plain wall, stiffness
// ks per unit arc) and the blends of angle d beside it, over which the
// wall's offset from the plain strip grows linearly from 0 to the full
// convolution (blend fraction f = (|ψ|−h)/d), into convolutions of
// stiffness kc per unit arc (surrogate/REFERENCE.md §2.8). Across a blend
// the compliance is that of the plain strip plus the convolution's
// bending compliance scaled by f², the square of the offset (the bending
// moment of a corrugated strip under an axial force is the force times
// the offset, so its bending compliance grows with the offset squared):
//
//	1/k(f) = 1/ks + f²·(1/kc − 1/ks)
//
// The blend integral is taken in θ = atan(f·√ρ), ρ = (1/kc − 1/ks)·ks,
// where k(f)·df = ks/√ρ·dθ is smooth, by the composite Simpson rule
// (24 intervals); the convolutions' kc it replaces in f. Blends that
// would reach past ψ = π stop there.
func spineZone(ks, kc, h, d float64) zoneMoments {
	var z zoneMoments
	h = math.Min(h, math.Pi)
	// the spine, ψ ∈ [−h, h], in closed form
	dk := ks - kc
	z.m0 += dk * 2 * h
	z.mc += dk * 2 * math.Sin(h)
	z.mcc += dk * (h + math.Sin(2*h)/2)
	if d > 0 && h < math.Pi {
		fMax := math.Min(1, (math.Pi-h)/d)
		rho := (1/kc - 1/ks) * ks
		const n = 24 // Simpson intervals, even
		var th float64
		if rho > 1e-12 {
			th = math.Atan(fMax * math.Sqrt(rho))
		}
		// the blends at ±ψ: sin ψ and cos ψ sin ψ cancel, the rest doubles
		add := func(w, psi float64) {
			c := math.Cos(psi)
			z.m0 += 2 * w
			z.mc += 2 * w * c
			z.mcc += 2 * w * c * c
		}
		for i := 0; i <= n; i++ {
			wSimp := 2.0
			if i == 0 || i == n {
				wSimp = 1
			} else if i%2 == 1 {
				wSimp = 4
			}
			wSimp /= 3 * n
			// the blend's stiffness, k(f)·df = ks/√ρ·dθ, at the θ nodes
			f := fMax * float64(i) / n
			w := fMax / (1/ks + f*f*(1/kc-1/ks)) // in f where ρ ≤ 0 (kc ≥ ks)
			if rho > 1e-12 {
				a := th * float64(i) / n
				f, w = math.Tan(a)/math.Sqrt(rho), ks/math.Sqrt(rho)*th
			}
			add(wSimp*w*d, h+f*d)
			// less the convolutions it replaces, kc·df, at the f nodes
			add(-wSimp*kc*fMax*d, h+fMax*float64(i)/n*d)
		}
	}
	z.mss = z.m0 - z.mcc
	return z
}
