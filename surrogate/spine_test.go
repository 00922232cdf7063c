package surrogate

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestSpineNoSpineLimit: without a spine the torsion factor is exactly 1
// and GJ is exactly the shell-of-revolution value 2π·G·t·q/∫ds/r³
// (surrogate/REFERENCE.md §2.6, derived from the membrane shear flow of a shell of
// revolution, Timoshenko & Woinowsky-Krieger, Theory of Plates and Shells,
// 1959, from memory) for every profile, revolved and helical; with a
// spine only the revolved GJ is multiplied by the factor, and the helical
// formula (surrogate/REFERENCE.md §2.7) combines the result with the same unwinding term.
func TestSpineNoSpineLimit(t *testing.T) {
	for _, p := range []Profile{Sinusoid, UShape, Trapezoid} {
		for _, hel := range []bool{false, true} {
			b := validBellows()
			b.Profile, b.Helical = p, hel
			if p == Trapezoid {
				b.FlatFraction = 0.4
			}
			assert.Equal(t, 1.0, b.SpineTorsionFactor())
			assert.Equal(t, SpineFactors{GJ: 1, EA: 1, EIStretch: 1, EINeutral: 1}, b.SpineFactors(), "no spine: every factor exactly 1")
			s, err := b.Section(Strip)
			require.NoError(t, err)
			st := stripModel(&b.Geometry, b.Material.ModulusAcross, b.Material.Poisson)
			gm := b.Material.ModulusAcross / (2 * (1 + b.Material.Poisson))
			rev := 2 * math.Pi * gm * b.Wall * b.Pitch / st.mom.Am3
			dm := 2 * b.MeanRadius()
			ei0 := s.WallFactors.EI * s.AxialRatePerConvolution * b.Pitch * dm * dm / 8
			helGJ := func(gjRev float64) float64 {
				a := math.Atan(b.Pitch / (math.Pi * dm))
				return 1 / (math.Pow(math.Cos(2*a), 2)/gjRev + math.Pow(math.Sin(2*a), 2)/(2*ei0))
			}
			want := rev
			if hel {
				want = helGJ(rev)
			}
			assert.Equal(t, want, s.GJ, "%v helical=%v: no spine, GJ unchanged", p, hel)

			b.SpineWidth = 0.08 * math.Pi * dm
			f := b.SpineTorsionFactor()
			sp, err := b.Section(Strip)
			require.NoError(t, err)
			want = rev * f
			if hel {
				want = helGJ(rev * f)
			}
			assert.InEpsilon(t, want, sp.GJ, 1e-12, "%v helical=%v: spine factor on the revolved GJ", p, hel)
		}
	}
}

// TestSpineTableLookup: the lookup returns the generated entries at the
// grid nodes, is bilinear between them (checked at the cell centre
// against the mean of its four corners), takes the first spined column
// below it and clamps beyond the grid. The β = 0 column is 1. The same
// holds for each of the correction columns (EA, EI stretching the spine,
// EI with the spine on the neutral plane), read through LookupAll.
func TestSpineTableLookup(t *testing.T) {
	// plausible bounds: GJ between half and 1.1 times the unspined GJ;
	// the corrections of the closed form within ±30 %
	type bounded struct {
		tb     *SpineTable
		lo, hi float64
	}
	var tables []bounded
	for _, tb := range []*SpineTable{&spineSinusoid, &spineUShape} {
		tables = append(tables, bounded{tb, 0.5, 1.1})
		for _, col := range [][]float64{tb.Axial, tb.Stretch, tb.Neutral} {
			c := *tb
			c.Factor = col
			tables = append(tables, bounded{&c, 0.7, 1.3})
		}
		for _, wd := range tb.DepthDiam {
			for _, beta := range []float64{0.07, 0.12} {
				all := tb.LookupAll(beta, wd)
				for _, c := range []struct {
					col []float64
					got float64
				}{{tb.Factor, all.GJ}, {tb.Axial, all.EA}, {tb.Stretch, all.EIStretch}, {tb.Neutral, all.EINeutral}} {
					assert.Equal(t, tb.lookup(c.col, beta, wd), c.got)
				}
			}
		}
	}
	for _, bt := range tables {
		tb := bt.tb
		nb := len(tb.Beta)
		require.Equal(t, nb*len(tb.DepthDiam), len(tb.Factor))
		require.Equal(t, 0.0, tb.Beta[0])
		for j, wd := range tb.DepthDiam {
			assert.Equal(t, 1.0, tb.Factor[j*nb])
			assert.Equal(t, 1.0, tb.Lookup(0, wd))
			for i := 1; i < nb; i++ {
				assert.InDelta(t, tb.Factor[j*nb+i], tb.Lookup(tb.Beta[i], wd), 1e-12)
				assert.True(t, tb.Factor[j*nb+i] > bt.lo && tb.Factor[j*nb+i] < bt.hi, "%g", tb.Factor[j*nb+i])
			}
			assert.Equal(t, tb.Lookup(tb.Beta[1], wd), tb.Lookup(tb.Beta[1]/10, wd), "narrow spine takes the first spined column")
			assert.Equal(t, tb.Lookup(tb.Beta[nb-1], wd), tb.Lookup(2*tb.Beta[nb-1], wd), "clamped above")
		}
		b := (tb.Beta[1] + tb.Beta[2]) / 2
		w := (tb.DepthDiam[0] + tb.DepthDiam[1]) / 2
		mean := (tb.Factor[1] + tb.Factor[2] + tb.Factor[nb+1] + tb.Factor[nb+2]) / 4
		assert.InDelta(t, mean, tb.Lookup(b, w), 1e-12)
	}
}

// TestSpineValidity: a spined bellows reports the spine limits of
// Validity at their edges (arc fraction, q/Dm and w/q of the generated
// factor), a spined trapezoid always; an unspined one none of them.
func TestSpineValidity(t *testing.T) {
	quantities := func(g Geometry) map[string]bool {
		m := map[string]bool{}
		for _, n := range g.OutOfRange() {
			m[n.Quantity] = true
		}
		return m
	}
	// sinusoid, Dm = 27 mm, w/Dm 0.14, w/q 0.5
	dm := 0.027
	g := Geometry{Depth: 0.14 * dm, Wall: 0.0004, Profile: Sinusoid}
	g.OuterDiameter = dm + g.Depth + g.Wall
	g.Pitch = g.Depth / 0.5
	assert.NotContains(t, quantities(g), QuantitySpine)
	for _, c := range []struct {
		beta float64
		out  bool
	}{{spineBetaMin * 0.99, true}, {spineBetaMin * 1.01, false}, {spineBetaMax * 0.99, false}, {spineBetaMax * 1.01, true}} {
		g.SpineWidth = c.beta * math.Pi * dm
		assert.Equal(t, c.out, quantities(g)[QuantitySpine], "β %g", c.beta)
	}
	g.SpineWidth = 0.1 * math.Pi * dm
	for _, c := range []struct {
		wq  float64
		out bool
	}{{spineSineWQ[0] * 0.99, true}, {spineSineWQ[0] * 1.01, false}, {spineSineWQ[1] * 0.99, false}, {spineSineWQ[1] * 1.01, true}} {
		g.Pitch = g.Depth / c.wq
		assert.Equal(t, c.out, quantities(g)[QuantitySpineDepthPitch], "w/q %g", c.wq)
	}
	g.Pitch = g.Depth / 0.5
	lo, hi := spinePitchDiam(Sinusoid)
	require.InDelta(t, 0.16, lo, 1e-12)
	require.InDelta(t, 0.4, hi, 1e-12)
	for _, c := range []struct {
		qd  float64
		out bool
	}{{lo * 0.99, true}, {lo * 1.01, false}, {hi * 0.99, false}, {hi * 1.01, true}} {
		g.Pitch = c.qd * dm
		g.Depth = 0.5 * g.Pitch
		g.OuterDiameter = dm + g.Depth + g.Wall
		assert.Equal(t, c.out, quantities(g)[QuantitySpinePitchDiam], "q/Dm %g", c.qd)
	}
	ulo, uhi := spinePitchDiam(UShape)
	require.Equal(t, []float64{ulo, uhi}, []float64{0.08 / 0.75, 0.2 / 0.75}, "Validity names the U table's range")
	tr := g
	tr.Profile, tr.FlatFraction = Trapezoid, 0.4
	assert.True(t, quantities(tr)[QuantitySpine], "a spined trapezoid has no spine factor")
}

// TestSpineZoneBlendIntegral checks the blend quadrature of spineZone
// against the closed form ∫₀¹ df/(1/ks + f²·(1/kc − 1/ks)) =
// ks·atan(√ρ)/√ρ, ρ = ks/kc − 1 (standard integral of 1/(1 + ρf²), e.g.
// Abramowitz & Stegun, Handbook of Mathematical Functions, 1964, 3.3.21,
// from memory), for stiffness ratios ks/kc from 1.5 to 10⁴, and the
// degenerate cases: no blend gives the plain spine's closed form, equal
// stiffnesses give no change at all. (The cos ψ moments are checked
// against a midpoint rule in TestSpineAnisotropy.)
func TestSpineZoneBlendIntegral(t *testing.T) {
	const h, d = 0.1, 0.2
	for _, ratio := range []float64{1.5, 10, 300, 1e4} {
		ks, kc := 1.0, 1/ratio
		rho := ks/kc - 1
		z := spineZone(ks, kc, h, d)
		want := (ks-kc)*2*h + 2*d*(ks*math.Atan(math.Sqrt(rho))/math.Sqrt(rho)-kc)
		assert.InEpsilon(t, want, z.m0, 1e-6, "ks/kc %g", ratio)
	}
	z := spineZone(2, 1, h, 0)
	assert.Equal(t, zoneMoments{m0: 2 * h, mc: 2 * math.Sin(h), mcc: h + math.Sin(2*h)/2, mss: h - math.Sin(2*h)/2}, z)
	assert.Equal(t, zoneMoments{}, spineZone(1, 1, h, d))
}

// TestSpineStrainUnvalidated: the peak wall strain of a spined bellows has
// no validated model (against CalculiX's 3-D shell model of the wall with
// its spine and blends the surrogate reads −75 … +35 %, the FE peak on the
// blend's kink at the spine's edge; surrogate/REFERENCE.md §6.4), so every
// spined bellows — even one inside the range of the spine's stiffness
// factors — lies outside the wall strain's limit, named in its note (a
// spine of 5 % or more at the largest excess); an unspined one does not, and the stiffness limits
// still report only their own edges.
func TestSpineStrainUnvalidated(t *testing.T) {
	dm := 0.027
	g := Geometry{Depth: 0.14 * dm, Wall: 0.0004, Profile: Sinusoid}
	g.OuterDiameter = dm + g.Depth + g.Wall
	g.Pitch = g.Depth / 0.55
	assert.Empty(t, g.OutOfRange(), "an unspined sinusoid inside every limit")
	for _, p := range []Profile{Sinusoid, UShape} {
		for _, beta := range []float64{0.001, 1.01 * spineBetaMin, 0.1, 0.99 * spineBetaMax, 0.3} {
			s := g
			s.Profile = p
			if p == UShape {
				s.Pitch = s.Depth / 0.8
				s.CrestRadius = s.Pitch / 4
			}
			s.SpineWidth = beta * math.Pi * dm
			notes := s.OutOfRange()
			var strain []RangeNote
			var others []string
			for _, n := range notes {
				if n.Quantity == QuantitySpineStrain {
					strain = append(strain, n)
				} else {
					others = append(others, n.Quantity)
				}
			}
			require.Len(t, strain, 1, "%s β %g: the wall strain's spine limit", p, beta)
			n := strain[0]
			assert.InDelta(t, beta, n.Value, 1e-12)
			assert.Contains(t, n.String(), "wall strain of a spined bellows")
			assert.Contains(t, n.String(), "is above 0")
			assert.Greater(t, n.Excess(), 0.0, "%s β %g: outside", p, beta)
			if beta >= spineBetaMin {
				assert.Equal(t, 10.0, n.Excess(), "%s β %g: the largest excess (an edge at 0 measured in 10⁻³)", p, beta)
			}
			inside := beta >= spineBetaMin && beta <= spineBetaMax
			if inside {
				assert.Empty(t, others, "%s β %g: inside the spine factors' own range", p, beta)
			} else {
				assert.Equal(t, []string{QuantitySpine}, others, "%s β %g: outside the spine factors' arc fraction", p, beta)
			}
		}
	}
}
