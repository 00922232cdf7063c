package surrogate

import (
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// validBellows is a demo bellows (invented numbers): PETG-like sinusoid,
// OD 30 mm, depth 4 mm, pitch 6 mm, wall 0.6 mm.
func validBellows() Bellows {
	return Bellows{
		Geometry: Geometry{OuterDiameter: 30e-3, Depth: 4e-3, Pitch: 6e-3, Wall: 0.6e-3, Profile: Sinusoid},
		Material: Material{Name: "demo", ModulusAcross: 2.0e9, ModulusInLayer: 2.2e9, Poisson: 0.38, Density: 1270, AllowableStrain: 0.02},
	}
}

// TestValidateMessages checks the error text for impossible inputs
// (golden strings; the rules are stated on Geometry.Validate).
func TestValidateMessages(t *testing.T) {
	cases := []struct {
		name string
		edit func(b *Bellows)
		want string
	}{
		{"wall too thick", func(b *Bellows) { b.Wall, b.Depth, b.Pitch = 2.5e-3, 3e-3, 12e-3 },
			"wall_mm: 2.5 is too thick for depth_mm 3 (expected wall < depth/2)"},
		{"depth not below mean radius", func(b *Bellows) { b.OuterDiameter, b.Depth, b.Pitch = 20e-3, 7e-3, 8e-3 },
			"depth_mm: 7 is not smaller than the mean radius 6.2 mm for outer_diameter_mm 20 and wall_mm 0.6 (expected depth < (outer_diameter − wall − depth)/2)"},
		{"pitch below four walls", func(b *Bellows) { b.Profile, b.Pitch = Trapezoid, 2e-3 },
			"pitch_mm: 2 is too small for wall_mm 0.6 (expected pitch > 4·wall = 2.4)"},
		{"sinusoid crest folds", func(b *Bellows) { b.Pitch = 4e-3 },
			"pitch_mm: 4 is too small for depth_mm 4 and wall_mm 0.6 (expected pitch > π·sqrt(depth·wall) = 4.867, so the crest radius of curvature exceeds wall/2)"},
		{"u crest above pitch/4", func(b *Bellows) { b.Profile, b.CrestRadius = UShape, 2e-3 },
			"crest_radius_mm: 2 is larger than pitch_mm 6 / 4 (expected crest radius ≤ pitch/4 = 1.5)"},
		{"u crest below half wall", func(b *Bellows) { b.Profile, b.CrestRadius = UShape, 0.25e-3 },
			"crest_radius_mm: 0.25 is too small for wall_mm 0.6 (expected crest radius > wall/2 = 0.3)"},
		{"u default crest too large for depth", func(b *Bellows) { b.Profile, b.Pitch = UShape, 10e-3 },
			"crest_radius_mm: 2.5 (default pitch/4) is too large for depth_mm 4 (expected crest radius ≤ depth/2 = 2)"},
		{"flat fraction above one", func(b *Bellows) { b.Profile, b.FlatFraction = Trapezoid, 1.2 },
			"flat_fraction: 1.2 is outside [0, 1] (expected 0 ≤ flat_fraction ≤ 1)"},
		{"spine wider than circumference", func(b *Bellows) { b.SpineWidth = 100e-3 },
			"spine_width_mm: 100 is not smaller than the mean circumference 79.8 mm (expected spine width < π·Dm)"},
		{"negative spine", func(b *Bellows) { b.SpineWidth = -1e-3 },
			"spine_width_mm: -1 is not a finite number ≥ 0 (expected ≥ 0)"},
		{"wall NaN", func(b *Bellows) { b.Wall = math.NaN() },
			"wall_mm: NaN is not a positive finite number (expected > 0)"},
		{"negative outer diameter", func(b *Bellows) { b.OuterDiameter = -30e-3 },
			"outer_diameter_mm: -30 is not a positive finite number (expected > 0)"},
		{"zero depth", func(b *Bellows) { b.Depth = 0 },
			"depth_mm: 0 is not a positive finite number (expected > 0)"},
		{"infinite pitch", func(b *Bellows) { b.Pitch = math.Inf(1) },
			"pitch_mm: +Inf is not a positive finite number (expected > 0)"},
		{"outer diameter beyond 10 m", func(b *Bellows) { b.OuterDiameter = 1e3 },
			"outer_diameter_mm: 1e+06 is out of range (expected at most 10000 mm)"},
		{"depth beyond 10 m", func(b *Bellows) { b.Depth = 11 },
			"depth_mm: 1.1e+04 is out of range (expected at most 10000 mm)"},
		{"pitch beyond 10 m", func(b *Bellows) { b.Pitch = 1e300 },
			"pitch_mm: 1e+303 is out of range (expected at most 10000 mm)"},
		{"wall beyond 10 m", func(b *Bellows) { b.Wall = 20 },
			"wall_mm: 2e+04 is out of range (expected at most 10000 mm)"},
		{"unknown profile", func(b *Bellows) { b.Profile = 9 },
			"profile: 9 is not a profile (expected: sinusoid|u|trapezoid)"},
		{"poisson 0.5", func(b *Bellows) { b.Material.Poisson = 0.5 },
			"poisson_ratio: 0.5 is outside [0, 0.5) (expected 0 ≤ poisson_ratio < 0.5)"},
		{"zero modulus", func(b *Bellows) { b.Material.ModulusAcross = 0 },
			"modulus_across_layers_mpa: 0 is not a positive finite number (expected > 0)"},
		{"negative in-layer modulus", func(b *Bellows) { b.Material.ModulusInLayer = -2e9 },
			"modulus_in_layer_mpa: -2000 is not a positive finite number (expected > 0)"},
		{"negative density", func(b *Bellows) { b.Material.Density = -1 },
			"density_kg_per_m3: -1 is not a positive finite number (expected > 0)"},
		{"zero allowable strain", func(b *Bellows) { b.Material.AllowableStrain = 0 },
			"allowable_strain: 0 is not a positive finite number (expected > 0)"},
		{"negative calibration", func(b *Bellows) { b.Calibration = [2]float64{-1, 1} },
			"calibration_factor: [-1, 1] is out of range (expected [c_x, c_y], both finite and ≥ 0; 0 means 1)"},
		{"two cross-field errors joined", func(b *Bellows) { b.Profile, b.Wall, b.Depth, b.Pitch = Trapezoid, 2e-3, 3e-3, 6e-3 },
			"wall_mm: 2 is too thick for depth_mm 3 (expected wall < depth/2)\npitch_mm: 6 is too small for wall_mm 2 (expected pitch > 4·wall = 8)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := validBellows()
			c.edit(&b)
			err := b.Validate()
			require.Error(t, err, "%s: %+v", c.name, b)
			assert.Equal(t, c.want, err.Error(), "%s", c.name)
			var ie *InputError
			assert.True(t, errors.As(err, &ie), "%s: error is an *InputError", c.name)
			_, serr := b.Section(Strip)
			assert.Equal(t, c.want, serr.Error(), "%s: Section returns the validation error", c.name)
		})
	}
}

func TestValidateAcceptsDemo(t *testing.T) {
	b := validBellows()
	require.NoError(t, b.Validate(), "demo bellows")
	for _, p := range []Profile{Sinusoid, UShape, Trapezoid} {
		b.Profile = p
		assert.NoError(t, b.Validate(), "demo bellows as %v", p)
	}
}

func TestSectionRejectsUnknownFidelity(t *testing.T) {
	_, err := validBellows().Section(Fidelity(7))
	require.Error(t, err, "fidelity 7")
	assert.Equal(t, "fidelity: 7 is not a fidelity (expected: strip|shell)", err.Error())
}
