package surrogate

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestGeneratedTablesRecompute recomputes a sample of the generated table
// entries with the shell model; they must match to 1e-6 relative (the
// file stores 7 significant digits). Source: the tables' own generator
// (internal/hoopgen, convolution.Shape.Factors, reached here through
// FactorTable.Point and ShapeFactors), so this guards against stale or
// hand-edited tables and against a generator whose axes disagree with
// Point.
func TestGeneratedTablesRecompute(t *testing.T) {
	for _, tb := range Tables() {
		require.NotNil(t, tb, "generated table missing: run go generate ./surrogate/")
		require.NoError(t, tb.Check(), "table %v", tb.Profile)
		size := len(tb.Hoop)
		idx := make([]int, len(tb.Axes))
		const samples = 12
		for s := 0; s < samples; s++ {
			k := (s*size)/samples + s*7%size // spread over the table, deterministic
			k %= size
			rem := k
			for d := len(tb.Axes) - 1; d >= 0; d-- {
				idx[d] = rem % len(tb.Axes[d])
				rem /= len(tb.Axes[d])
			}
			p := tb.Point(idx)
			h, sf, err := ShapeFactors(p, tb.Elements)
			if math.IsNaN(tb.Hoop[k]) {
				assert.True(t, errors.Is(err, ErrNoBore), "%v entry %d (%+v) is NaN only where there is no bore", tb.Profile, k, p)
				continue
			}
			require.NoError(t, err, "%v entry %d (%+v)", tb.Profile, k, p)
			assert.InEpsilon(t, tb.Hoop[k], h, 1e-6, "%v hoop entry %d (%+v)", tb.Profile, k, p)
			assert.InEpsilon(t, tb.Strain[k], sf, 1e-6, "%v strain entry %d (%+v)", tb.Profile, k, p)
			gh, gs, ok := tb.Lookup(p)
			require.True(t, ok, "%v lookup at grid point %+v", tb.Profile, p)
			assert.InEpsilon(t, tb.Hoop[k], gh, 1e-12, "%v lookup at grid point %+v", tb.Profile, p)
			assert.InEpsilon(t, tb.Strain[k], gs, 1e-12, "%v lookup at grid point %+v", tb.Profile, p)
		}
	}
}

func TestLookupOutsideGrid(t *testing.T) {
	cases := []struct {
		name string
		p    ShapePoint
	}{
		{"u C2 above 4", ShapePoint{Profile: UShape, C1: 0.5, C2: 5, Wall: 0.1, Poisson: 0.35}},
		{"u C1 below 0.1", ShapePoint{Profile: UShape, C1: 0.05, C2: 1, Wall: 0.1, Poisson: 0.35}},
		{"u t/rm above 2", ShapePoint{Profile: UShape, C1: 0.5, C2: 1, Wall: 2.5, Poisson: 0.35}},
		{"u nu below 0.30", ShapePoint{Profile: UShape, C1: 0.5, C2: 1, Wall: 0.1, Poisson: 0.25}},
		{"sinusoid w/q above 3", ShapePoint{Profile: Sinusoid, DepthRatio: 4, C2: 0.5, Wall: 0.1, Poisson: 0.35}},
		{"sinusoid C2q above 2", ShapePoint{Profile: Sinusoid, DepthRatio: 0.5, C2: 2.5, Wall: 0.1, Poisson: 0.35}},
		{"trapezoid C2q below 0.1", ShapePoint{Profile: Trapezoid, DepthRatio: 0.5, C2: 0.05, Wall: 0.1, Poisson: 0.35}},
	}
	for _, c := range cases {
		_, _, ok := tableFor(c.p.Profile).Lookup(c.p)
		assert.False(t, ok, "%s: %+v is outside the table", c.name, c.p)
	}
	_, _, ok := (*FactorTable)(nil).Lookup(ShapePoint{})
	assert.False(t, ok, "nil table")
}

// TestStripFallsBackToShell checks that Strip fidelity runs the shell
// model outside the generated tables and reports it.
func TestStripFallsBackToShell(t *testing.T) {
	cases := []struct {
		name string
		edit func(b *Bellows)
	}{
		{"poisson 0.25 below the tables", func(b *Bellows) { b.Material.Poisson = 0.25 }},
		{"u with rm < q/4 (flats)", func(b *Bellows) { b.Profile, b.Pitch, b.Depth, b.CrestRadius = UShape, 4e-3, 4e-3, 0.8e-3 }},
	}
	for _, c := range cases {
		b := validBellows()
		c.edit(&b)
		s, err := b.Section(Strip)
		require.NoError(t, err, c.name)
		assert.Equal(t, Shell, s.Fidelity, "%s: reported fidelity", c.name)
		sh, err := b.Section(Shell)
		require.NoError(t, err, c.name)
		assert.Equal(t, sh, s, "%s: fallback equals the shell section", c.name)
	}
	b := validBellows()
	s, err := b.Section(Strip)
	require.NoError(t, err, "demo")
	assert.Equal(t, Strip, s.Fidelity, "demo bellows lies inside the sinusoid table")
}

// TestStripTracksShell compares Strip (r-weighted strip × interpolated
// factors) with the shell model on random valid designs (fixed seed) inside the
// tables. Derived: a regression bound on the interpolation and on the
// orthotropic C2 scaling, measured when the tables were made (isotropic
// rms 0.4–1.4 %, worst 3–8 %; E_in/E_across = 1.25: rms ≤ 1.9 %, worst
// ≤ 11 %).
func TestStripTracksShell(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, prof := range []Profile{UShape, Sinusoid, Trapezoid} {
		for _, ortho := range []float64{1, 1.25} {
			var sumK, sumE, worstK float64
			n := 0
			for n < 60 {
				dm := 10e-3 + 40e-3*rng.Float64()
				th := dm * (0.005 + 0.045*rng.Float64())
				g := Geometry{Wall: th, Profile: prof}
				if prof == UShape {
					rmc := th * (0.6 + 4*rng.Float64())
					g.Pitch, g.Depth = 4*rmc, 2*rmc/(0.1+0.8*rng.Float64())
				} else {
					g.Pitch = th * (4.5 + 10*rng.Float64())
					g.Depth = g.Pitch * (0.1 + 1.5*rng.Float64())
					g.FlatFraction = rng.Float64()
				}
				g.OuterDiameter = dm + g.Depth + th
				b := Bellows{Geometry: g, Material: Material{ModulusAcross: 1e9, ModulusInLayer: ortho * 1e9,
					Poisson: 0.3 + 0.19*rng.Float64(), Density: 1000, AllowableStrain: 0.01}}
				if b.Validate() != nil {
					continue
				}
				s1, err := b.Section(Strip)
				require.NoError(t, err, "%+v", b)
				if s1.Fidelity != Strip {
					continue
				}
				n++
				// the thin-shell parts (the solid model's corrections on top
				// are checked in wall_test.go)
				s2, err := shellModel(&b.Geometry, &b.Material, DefaultShellElements)
				require.NoError(t, err, "%+v", b)
				ek := s1.AxialRatePerConvolution/s2.K - 1
				ee := s1.StrainPerMovement/s1.WallFactors.Axial/s2.StrainPerMovement - 1
				sumK += ek * ek
				sumE += ee * ee
				worstK = math.Max(worstK, math.Abs(ek))
			}
			rmsK, rmsE := math.Sqrt(sumK/float64(n)), math.Sqrt(sumE/float64(n))
			t.Logf("%v E_in/E_across = %g: k rms %.4f worst %.4f, strain rms %.4f", prof, ortho, rmsK, worstK, rmsE)
			assert.Less(t, rmsK, 0.02, "%v E_in/E_across = %g: rms k_conv error strip vs shell", prof, ortho)
			assert.Less(t, worstK, 0.12, "%v E_in/E_across = %g: worst k_conv error strip vs shell", prof, ortho)
			assert.Less(t, rmsE, 0.03, "%v E_in/E_across = %g: rms strain error strip vs shell", prof, ortho)
		}
	}
}
