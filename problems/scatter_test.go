package problems

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
)

// withScatter writes a copy of an example design with a [scatter] table
// next to the examples (so calibration files resolve) and loads it.
func withScatter(t *testing.T, example, scatter string) (*objective.Design, *objective.Scenario) {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("examples", example))
	require.NoError(t, err)
	f, err := os.CreateTemp("examples", "scatter-test-*.toml")
	require.NoError(t, err)
	t.Cleanup(func() { os.Remove(f.Name()) })
	_, err = f.WriteString(string(data) + "\n[scatter]\n" + scatter + "\n")
	require.NoError(t, err)
	require.NoError(t, f.Close())
	d, sc, err := LoadDesign(f.Name())
	require.NoError(t, err)
	return d, sc
}

func TestScatterTable(t *testing.T) {
	_, sc := withScatter(t, "boom-measured.toml", "stiffness_pct = 12\nprecurvature_pct = 4\nsamples = 300\nseed = 42\ncorrelated = true")
	require.NotNil(t, sc.Scatter)
	assert.Equal(t, objective.Scatter{StiffnessPct: 12, PrecurvaturePct: 4, Samples: 300, Seed: 42, Correlated: true}, *sc.Scatter)
	_, sc, err := LoadDesign("examples/boom-measured.toml")
	require.NoError(t, err)
	assert.Nil(t, sc.Scatter, "no table, no scatter")
}

// TestCalibrationSEChangesOdds: a calibrated bellows scatters its EI by
// its calibration's own relative standard error SE(c)/c instead of by
// modulus_pct, so modulus_pct leaves the draws unchanged, while a larger
// calibration error widens the sag distribution.
func TestCalibrationSEChangesOdds(t *testing.T) {
	cal, err := LoadCalibration("examples/boom-calibration.toml")
	require.NoError(t, err)
	d, sc := withScatter(t, "boom-calibrated.toml", "samples = 40\nseed = 2")
	require.NotEmpty(t, sc.Scatter.CalibrationSE)
	for i, se := range sc.Scatter.CalibrationSE {
		if d.Bellows[i].Model != nil && d.Bellows[i].Model.Calibration[0] != 0 {
			assert.InDelta(t, cal.Factor[0].SE/cal.Factor[0].Value, se[0], 1e-15)
			assert.InDelta(t, cal.Factor[1].SE/cal.Factor[1].Value, se[1], 1e-15)
		}
	}
	require.True(t, sc.Scatter.Active(), "a calibration error alone is scatter")
	ctx := context.Background()
	base, err := objective.MonteCarlo(ctx, d, sc, sc.Scatter, 2)
	require.NoError(t, err)
	withModulus := *sc.Scatter
	withModulus.ModulusPct = 20
	m, err := objective.MonteCarlo(ctx, d, sc, &withModulus, 2)
	require.NoError(t, err)
	assert.Equal(t, base.Scores["tip_sag_mm"], m.Scores["tip_sag_mm"], "modulus_pct does not act on a calibrated bellows")
	wider := *sc.Scatter
	wider.CalibrationSE = nil
	for _, se := range sc.Scatter.CalibrationSE {
		wider.CalibrationSE = append(wider.CalibrationSE, [2]float64{3 * se[0], 3 * se[1]})
	}
	w, err := objective.MonteCarlo(ctx, d, sc, &wider, 2)
	require.NoError(t, err)
	a, b := base.Scores["tip_sag_mm"].SD, w.Scores["tip_sag_mm"].SD
	require.Greater(t, a, 0.0)
	assert.InEpsilon(t, 3*a, b, 0.15, "sag sd grows with the calibration error (about linearly for small errors)")
}
