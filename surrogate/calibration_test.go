package surrogate

import (
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// TestCalibrationFitVector98 checks the fit through the origin against the
// exact numbers of surrogate/REFERENCE.md §5.4 (derived from §4.2). Tolerance 1e-4
// relative where the reference gives 5–7 digits, 5e-4 where it gives four
// (surrogate/REFERENCE.md §5.1).
func TestCalibrationFitVector98(t *testing.T) {
	f, err := FitCantilever(calibrationVector(), FitOptions{})
	require.NoError(t, err, "surrogate/REFERENCE.md §5.4 vector")
	l3 := 0.100 * 0.100 * 0.100 / 3   // L³/3, m³
	cHat := l3 * f.Flexibility * 1e3  // ĉ = L³/(3EI), mm/N
	seC := l3 * f.FlexibilitySE * 1e3 // SE(ĉ), mm/N
	assert.InEpsilon(t, 8.113333, cHat, 1e-6, "ĉ, mm/N (surrogate/REFERENCE.md §5.4)")
	assert.InEpsilon(t, 0.012065, f.S*1e3, 1e-4, "s, mm (surrogate/REFERENCE.md §5.4)")
	assert.InEpsilon(t, 0.044054, seC, 1e-4, "SE(ĉ), mm/N (surrogate/REFERENCE.md §5.4)")
	// EI itself is verifyCalibration of verification.go.
	assert.InEpsilon(t, 223.1, f.SE*1e6, 5e-4, "SE(EI), N·mm² (surrogate/REFERENCE.md §5.4)")
	assert.InEpsilon(t, 0.0054, f.SE/f.EI, 1e-2, "relative SE 0.54 % (surrogate/REFERENCE.md §5.4, two digits)")
	assert.InEpsilon(t, 3.182, f.T, 2e-4, "t_{0.975,3} (surrogate/REFERENCE.md §5.4; Student t table value 3.182)")
	assert.InEpsilon(t, 40387, f.CI[0]*1e6, 1e-4, "95 %% interval low, N·mm² (surrogate/REFERENCE.md §5.4)")
	assert.InEpsilon(t, 41807, f.CI[1]*1e6, 1e-4, "95 %% interval high, N·mm² (surrogate/REFERENCE.md §5.4)")
	assert.Equal(t, 3, f.DOF, "n − 1 for one parameter (surrogate/REFERENCE.md §4.2)")
	assert.Equal(t, 4, f.Points)
	assert.Len(t, f.Residuals, 4)
	// Residuals by hand from ĉ: δ_i − ĉ·P_i [derived].
	for i, p := range calibrationVector() {
		assert.InDelta(t, p.Deflection-cHat*1e-3*p.Load, f.Residuals[i], 1e-12, "residual %d", i+1)
	}
	assert.Greater(t, f.R2, 0.999, "R² of a near-perfect line")
	assert.Empty(t, f.Warnings, "δ/L ≤ 0.0162 is well inside the small-deflection range")
}

// TestCalibrationStudentT checks the quantile against gonum's StudentsT as
// the reference library and the tabulated t_{0.975,3} = 3.182 (standard
// Student t tables, e.g. NIST/SEMATECH e-Handbook of Statistical Methods,
// section 1.3.6.7.2, from memory).
func TestCalibrationStudentT(t *testing.T) {
	ref := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: 3}.Quantile(0.975)
	assert.InDelta(t, 3.182, ref, 5e-4, "gonum t_{0.975,3}")
	f, err := FitCantilever(calibrationVector(), FitOptions{})
	require.NoError(t, err)
	assert.Equal(t, ref, f.T, "fit uses t_{0.975,n−p}")
	f90, err := FitCantilever(calibrationVector(), FitOptions{Level: 0.90})
	require.NoError(t, err)
	assert.InDelta(t, distuv.StudentsT{Mu: 0, Sigma: 1, Nu: 3}.Quantile(0.95), f90.T, 0, "90 %% level uses t_{0.95,3}")
	assert.Less(t, f90.CI[1]-f90.CI[0], f.CI[1]-f.CI[0], "90 %% interval is narrower")
}

// cantilever returns the exact tip deflection of a cantilever with a tip
// load and a rotational clamp spring: δ = P·L³/(3EI) + P·L²/k_θ
// [published: Roark's Formulas for Stress and Strain, Table 8.1 case 1a at
// a = 0; Gere & Timoshenko, Mechanics of Materials, App. G, Table G-1 case
// 4 (δ_B = PL³/(3EI)); the clamp term is the rigid-body rotation P·L/k_θ
// times L, derived].
func cantilever(p, l, ei, kTheta float64) float64 {
	d := p * l * l * l / (3 * ei)
	if kTheta > 0 {
		d += p * l * l / kTheta
	}
	return d
}

// TestCalibrationNoiseless checks that noiseless data (the textbook
// cantilever formula, see cantilever) give back EI, the clamp stiffness and
// the offsets exactly, with zero uncertainty.
func TestCalibrationNoiseless(t *testing.T) {
	const ei = 0.0547 // N·m², a demo value
	loads := []float64{0, 0.49, 0.98, 1.96, 2.94}
	cases := []struct {
		name    string
		opts    FitOptions
		lengths []float64
		kTheta  float64   // N·m/rad, 0 = rigid clamp
		offsets []float64 // per setup, m
	}{
		{"through origin, one length", FitOptions{}, []float64{0.15}, 0, nil},
		{"through origin, two lengths", FitOptions{}, []float64{0.10, 0.15}, 0, nil},
		{"intercept, one setup", FitOptions{Intercept: true}, []float64{0.15}, 0, []float64{0.35e-3}},
		{"intercept, two setups", FitOptions{Intercept: true}, []float64{0.10, 0.15}, 0, []float64{-0.2e-3, 0.6e-3}},
		{"clamp compliance", FitOptions{ClampCompliance: true}, []float64{0.08, 0.12, 0.16}, 25, nil},
		{"clamp and intercept", FitOptions{ClampCompliance: true, Intercept: true}, []float64{0.08, 0.16}, 40, []float64{0.1e-3, 0.25e-3}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var pts []BenchPoint
			for k, l := range c.lengths {
				for _, p := range loads {
					d := cantilever(p, l, ei, c.kTheta)
					if c.offsets != nil {
						d += c.offsets[k]
					}
					pts = append(pts, BenchPoint{Load: p, Deflection: d, FreeLength: l, Setup: k})
				}
			}
			f, err := FitCantilever(pts, c.opts)
			require.NoError(t, err, c.name)
			assert.InEpsilon(t, ei, f.EI, 1e-10, "%s: EI", c.name)
			assert.InDelta(t, 0, f.SE/f.EI, 1e-8, "%s: relative SE of noiseless data", c.name)
			assert.InEpsilon(t, ei, f.CI[0], 1e-7, "%s: interval collapses", c.name)
			assert.InEpsilon(t, ei, f.CI[1], 1e-7, "%s: interval collapses", c.name)
			assert.InDelta(t, 1, f.R2, 1e-12, "%s: R²", c.name)
			for i, r := range f.Residuals {
				assert.InDelta(t, 0, r, 1e-15, "%s: residual %d", c.name, i+1)
			}
			if c.kTheta > 0 {
				assert.InEpsilon(t, 1/c.kTheta, f.ClampCompliance, 1e-8, "%s: 1/k_θ", c.name)
			} else {
				assert.Zero(t, f.ClampCompliance, "%s: no clamp term fitted", c.name)
			}
			if c.offsets != nil {
				require.Len(t, f.Offsets, len(c.offsets), c.name)
				for k, a := range c.offsets {
					assert.InDelta(t, a, f.Offsets[k], 1e-15, "%s: offset of setup %d", c.name, k)
				}
			} else {
				assert.Nil(t, f.Offsets, "%s: no offsets fitted", c.name)
			}
		})
	}
}

// TestCalibrationIntervalCoverage checks the meaning of the interval by
// simulation: with Gaussian noise on δ the 95 % interval of EI contains
// the true EI in 95 % of repeated experiments (standard regression
// theory; the interval of 1/EI is exact and EI ↦ 1/EI is monotone
// [derived]). 4000 seeded experiments: binomial 3σ = 1.0 %.
func TestCalibrationIntervalCoverage(t *testing.T) {
	const ei, l, sigma, trials = 0.04, 0.1, 0.02e-3, 4000
	rng := rand.New(rand.NewPCG(1, 98))
	for _, opts := range []FitOptions{{}, {Intercept: true}} {
		hit := 0
		for range trials {
			var pts []BenchPoint
			for _, p := range []float64{0.05, 0.10, 0.15, 0.20, 0.25} {
				pts = append(pts, BenchPoint{Load: p, Deflection: cantilever(p, l, ei, 0) + 0.1e-3*b2f(opts.Intercept) + sigma*rng.NormFloat64(), FreeLength: l})
			}
			f, err := FitCantilever(pts, opts)
			require.NoError(t, err)
			if f.CI[0] <= ei && ei <= f.CI[1] {
				hit++
			}
		}
		cover := float64(hit) / trials
		assert.InDelta(t, 0.95, cover, 3*math.Sqrt(0.95*0.05/trials), "coverage of the 95 %% interval, intercept=%v", opts.Intercept)
	}
}

func b2f(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

// TestCalibrationBand checks the confidence band: for the fit through the
// origin the mean deflection at load P and length L is x·b with
// x = P·L³/3, and its half width is t·x·SE(b) [derived, standard
// regression].
func TestCalibrationBand(t *testing.T) {
	f, err := FitCantilever(calibrationVector(), FitOptions{})
	require.NoError(t, err)
	for _, p := range []float64{0, 0.1, 0.3} {
		x := p * 0.1 * 0.1 * 0.1 / 3
		mean, half := f.Band(p, 0.1, 0)
		assert.InDelta(t, x*f.Flexibility, mean, 1e-15, "mean at P=%g", p)
		assert.InDelta(t, f.T*x*f.FlexibilitySE, half, 1e-15, "half width at P=%g", p)
	}
	for i, pt := range calibrationVector() {
		mean, _ := f.Band(pt.Load, pt.FreeLength, pt.Setup)
		assert.InDelta(t, f.Fitted[i], mean, 1e-15, "band mean at point %d is the fitted value", i+1)
	}
}

func TestCalibrationErrors(t *testing.T) {
	good := calibrationVector()
	with := func(i int, edit func(*BenchPoint)) []BenchPoint {
		pts := append([]BenchPoint(nil), good...)
		edit(&pts[i])
		return pts
	}
	cases := []struct {
		name string
		pts  []BenchPoint
		opts FitOptions
		key  string
		msg  string
	}{
		{"negative load", with(1, func(p *BenchPoint) { p.Load = -0.1 }), FitOptions{}, "point 2", "expected a finite load >= 0"},
		{"NaN deflection", with(2, func(p *BenchPoint) { p.Deflection = math.NaN() }), FitOptions{}, "point 3", "not finite"},
		{"zero length", with(0, func(p *BenchPoint) { p.FreeLength = 0 }), FitOptions{}, "point 1", "expected > 0"},
		{"negative setup", with(0, func(p *BenchPoint) { p.Setup = -1 }), FitOptions{}, "point 1", "setup"},
		{"one point", good[:1], FitOptions{}, "points", "expected at least 2 points"},
		{"intercept, two points", good[:2], FitOptions{Intercept: true}, "points", "expected at least 3 points"},
		{"all loads zero", []BenchPoint{{0, 2e-5, 0.1, 0}, {0, 1e-5, 0.1, 0}}, FitOptions{}, "points", "every load is zero"},
		{"clamp with one length", good, FitOptions{ClampCompliance: true}, "points", "two or more different free lengths"},
		{"intercept with one load", []BenchPoint{{0.1, 1e-3, 0.1, 0}, {0.1, 1.1e-3, 0.1, 0}, {0.1, 0.9e-3, 0.1, 0}}, FitOptions{Intercept: true}, "points", "cannot separate"},
		{"deflection falls with load", []BenchPoint{{0.1, 1e-3, 0.1, 0}, {0.2, -1e-3, 0.1, 0}, {0.3, -2e-3, 0.1, 0}}, FitOptions{}, "points", "does not grow with load"},
		{"bad level", good, FitOptions{Level: 1.5}, "level", "expected a confidence level"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := FitCantilever(c.pts, c.opts)
			var ie *InputError
			require.True(t, errors.As(err, &ie), "%s: want *InputError, got %v", c.name, err)
			assert.Equal(t, c.key, ie.Key, c.name)
			assert.Contains(t, ie.Msg, c.msg, c.name)
		})
	}
}

// TestCalibrationSmallDeflectionWarning checks the δ/L > 0.1 warning
// (surrogate/REFERENCE.md §4.1, limit from memory).
func TestCalibrationSmallDeflectionWarning(t *testing.T) {
	pts := []BenchPoint{
		{Load: 1, Deflection: 5e-3, FreeLength: 0.1},
		{Load: 2, Deflection: 10e-3, FreeLength: 0.1},
		{Load: 3, Deflection: 15.5e-3, FreeLength: 0.1}, // δ/L = 0.155
	}
	f, err := FitCantilever(pts, FitOptions{})
	require.NoError(t, err)
	require.Len(t, f.Warnings, 1, "one point beyond δ/L = 0.1")
	assert.Contains(t, f.Warnings[0], "point 3", "warning names the point")
	assert.InDelta(t, 0.155, f.MaxDeflectionRatio, 1e-12)

	pts[2].Deflection = 10e-3 // δ/L = 0.1 exactly is still inside
	f, err = FitCantilever(pts, FitOptions{})
	require.NoError(t, err)
	assert.Empty(t, f.Warnings, "δ/L = 0.1 is the limit itself")
}

func TestCalibrationNegativeClampWarning(t *testing.T) {
	// The short length deflects less than the L³ scaling of the long one
	// allows for any clamp: the clamp term comes out negative.
	var pts []BenchPoint
	for _, l := range []float64{0.08, 0.16} {
		for _, p := range []float64{0.05, 0.1, 0.15} {
			d := cantilever(p, l, 0.05, 0)
			if l < 0.1 {
				d *= 0.9
			}
			pts = append(pts, BenchPoint{Load: p, Deflection: d, FreeLength: l})
		}
	}
	f, err := FitCantilever(pts, FitOptions{ClampCompliance: true})
	require.NoError(t, err)
	assert.Negative(t, f.ClampCompliance, "constructed to give a negative compliance")
	require.NotEmpty(t, f.Warnings)
	assert.Contains(t, f.Warnings[0], "clamp compliance is negative")
}

func TestCalibrationFactor(t *testing.T) {
	f, err := FitCantilever(calibrationVector(), FitOptions{})
	require.NoError(t, err)
	const pred = 0.05
	c, err := CalibrationFactor(f, pred)
	require.NoError(t, err)
	assert.InEpsilon(t, f.EI/pred, c.Value, 1e-15, "factor = fitted/predicted")
	assert.InEpsilon(t, f.SE/pred, c.SE, 1e-15, "SE scales with 1/predicted")
	assert.InEpsilon(t, f.CI[0]/pred, c.CI[0], 1e-15, "interval scales with 1/predicted")
	assert.InEpsilon(t, f.CI[1]/pred, c.CI[1], 1e-15, "interval scales with 1/predicted")
	for _, bad := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		_, err := CalibrationFactor(f, bad)
		assert.Error(t, err, "predicted EI %g", bad)
	}
	_, err = CalibrationFactor(Fit{}, pred)
	assert.Error(t, err, "an empty fit")
}

// TestCantileverEI checks the test-seen stiffness against gonum's matrix
// inverse (reference library) and the scaling property the calibration
// factor relies on, on a bellows whose spine couples the axes.
func TestCalibrationCantileverEI(t *testing.T) {
	cases := []struct {
		name string
		ei   [2][2]float64
	}{
		{"isotropic", [2][2]float64{{0.5, 0}, {0, 0.5}}},
		{"orthotropic", [2][2]float64{{0.8, 0}, {0, 0.3}}},
		{"coupled", [2][2]float64{{0.8, -0.2}, {-0.2, 0.4}}},
	}
	for _, c := range cases {
		var inv mat.Dense
		require.NoError(t, inv.Inverse(mat.NewDense(2, 2, []float64{c.ei[0][0], c.ei[0][1], c.ei[1][0], c.ei[1][1]})), c.name)
		got := CantileverEI(c.ei)
		assert.InEpsilon(t, 1/inv.At(0, 0), got[0], 1e-12, "%s: about x", c.name)
		assert.InEpsilon(t, 1/inv.At(1, 1), got[1], 1e-12, "%s: about y", c.name)
	}
	nan := CantileverEI([2][2]float64{{1, 2}, {2, 1}})
	assert.True(t, math.IsNaN(nan[0]) && math.IsNaN(nan[1]), "indefinite tensor gives NaN")

	petg, ok := LookupMaterial("petg")
	require.True(t, ok)
	b := Bellows{Geometry: Geometry{OuterDiameter: 30e-3, Depth: 3e-3, Pitch: 10e-3, Wall: 0.6e-3,
		SpineWidth: 4e-3, SpineAngle: math.Pi / 6}, Material: petg}
	s0, err := b.Section(Strip)
	require.NoError(t, err)
	require.NotZero(t, s0.EI[0][1], "the spine at 30° couples the axes")
	b.Calibration = [2]float64{0.8, 1.3}
	s1, err := b.Section(Strip)
	require.NoError(t, err)
	e0, e1 := CantileverEI(s0.EI), CantileverEI(s1.EI)
	assert.InEpsilon(t, 0.8, e1[0]/e0[0], 1e-12, "test-seen EI about x scales by c_x alone [derived]")
	assert.InEpsilon(t, 1.3, e1[1]/e0[1], 1e-12, "test-seen EI about y scales by c_y alone [derived]")
}

func BenchmarkFitCantilever(b *testing.B) {
	for _, n := range []int{8, 64} {
		b.Run("points="+strconv.Itoa(n), func(b *testing.B) {
			rng := rand.New(rand.NewPCG(1, 1))
			pts := make([]BenchPoint, n)
			for i := range pts {
				p := 0.05 * float64(i%8+1)
				l := []float64{0.08, 0.12}[i%2]
				pts[i] = BenchPoint{Load: p, Deflection: cantilever(p, l, 0.04, 30) + 1e-5*rng.NormFloat64(), FreeLength: l, Setup: i % 2}
			}
			for b.Loop() {
				if _, err := FitCantilever(pts, FitOptions{ClampCompliance: true, Intercept: true}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/point")
		})
	}
}

// TestCalibrationZeroReference checks that a zero-load point reading zero
// is the zero reference, not a measurement: the surrogate/REFERENCE.md §5.4 fit is unchanged
// (same n − 1 = 3 degrees of freedom, surrogate/REFERENCE.md §4.2), while a zero-load
// point with a reading is a measurement with a residual.
func TestCalibrationZeroReference(t *testing.T) {
	ref, err := FitCantilever(calibrationVector(), FitOptions{})
	require.NoError(t, err)
	pts := append([]BenchPoint{{Load: 0, Deflection: 0, FreeLength: 0.1}}, calibrationVector()...)
	f, err := FitCantilever(pts, FitOptions{})
	require.NoError(t, err)
	assert.Equal(t, ref.DOF, f.DOF, "zero reference adds no degree of freedom")
	assert.Equal(t, 4, f.Points, "zero reference is not counted")
	assert.InEpsilon(t, ref.SE, f.SE, 1e-12, "same SE with the zero reference")
	assert.Len(t, f.Residuals, 5, "residuals for every input point")
	assert.Zero(t, f.Residuals[0], "the zero reference sits on the line")

	pts[0].Deflection = 0.01e-3
	f, err = FitCantilever(pts, FitOptions{})
	require.NoError(t, err)
	assert.Equal(t, 4, f.DOF, "a zero-load reading is a measurement")
	assert.InDelta(t, 0.01e-3, f.Residuals[0], 1e-18, "its residual is the reading")
}
