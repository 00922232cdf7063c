package problems

import (
	"errors"
	"fmt"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// feCalibration builds an FE calibration of bellows 2 of the shipped demo
// design from an FE tensor that is the surrogate's own, scaled by 1.03
// about x and 0.98 about y with no coupling; the expected factors are then
// exactly 1.03 and 0.98 (surrogate.CantileverEI of a diagonal tensor is its
// diagonal; derived).
func feCalibration(t *testing.T) *Calibration {
	t.Helper()
	d, _, err := LoadDesign("examples/boom-geometry.toml")
	require.NoError(t, err)
	s, err := d.Bellows[1].Model.Section(d.Fidelity)
	require.NoError(t, err)
	require.Zero(t, s.EI[0][1], "the demo bellows is revolved: no coupling")
	fe := [2][2]float64{{1.03 * s.EI[0][0], 0}, {0, 0.98 * s.EI[1][1]}}
	c, err := NewFECalibration(d, 1, fe, [2]float64{0.004, -0.002}, "coarse")
	require.NoError(t, err)
	c.Date = time.Date(2026, 1, 5, 0, 0, 0, 0, time.UTC)
	c.FEDir, c.DesignFile = "boom-geometry-fe", "boom-geometry.toml"
	return c
}

func TestCalibrationFromFE(t *testing.T) {
	c := feCalibration(t)
	assert.Equal(t, SourceFE, c.Source)
	assert.InEpsilon(t, 1.03, c.Factor[0].Value, 1e-12)
	assert.InEpsilon(t, 0.98, c.Factor[1].Value, 1e-12)
	// the two-mesh change is the standard error; the interval ±2 of them
	assert.InEpsilon(t, 0.004*1.03, c.Factor[0].SE, 1e-12)
	assert.InEpsilon(t, 0.002*0.98, c.Factor[1].SE, 1e-12)
	assert.InEpsilon(t, 0.98*(1-2*0.002), c.Factor[1].CI[0], 1e-12)
	assert.InEpsilon(t, 1.03*(1+2*0.004), c.Factor[0].CI[1], 1e-12)
	assert.Equal(t, "petg", c.Material)
	assert.Equal(t, surrogate.Sinusoid, c.Profile)
	assert.Equal(t, 2, c.Bellows)

	d, _, err := LoadDesign("examples/boom-geometry.toml")
	require.NoError(t, err)
	for _, tc := range []struct {
		name   string
		fe     [2][2]float64
		change [2]float64
		mesh   string
		msg    string
	}{
		{"not converged", [2][2]float64{{1, 0}, {0, 1}}, [2]float64{0, 0.15}, "coarse", "changed by 15 %"},
		{"not positive", [2][2]float64{{1, 2}, {2, 1}}, [2]float64{}, "coarse", "not positive definite"},
		{"mesh", [2][2]float64{{1, 0}, {0, 1}}, [2]float64{}, "draft", "is not one of coarse|fine"},
	} {
		_, err := NewFECalibration(d, 1, tc.fe, tc.change, tc.mesh)
		require.Error(t, err, tc.name)
		assert.Contains(t, err.Error(), tc.msg, tc.name)
	}
	m, _, err := LoadDesign("examples/boom-measured.toml")
	require.NoError(t, err)
	_, err = NewFECalibration(m, 0, [2][2]float64{{1, 0}, {0, 1}}, [2]float64{}, "coarse")
	assert.ErrorContains(t, err, "measured stiffness")
}

// TestCalibrationFERoundTrip: format → parse gives the same values (six
// written digits), parse → format is idempotent, and a design that names
// the file gets the FE factors exactly as from a bench calibration.
func TestCalibrationFERoundTrip(t *testing.T) {
	c := feCalibration(t)
	text := c.Format()
	assert.Contains(t, string(text), "source = \"fe\"\n")
	assert.NotContains(t, string(text), "bench_file")
	c2, err := ParseCalibration(text, "cal.toml")
	require.NoError(t, err, "parse of\n%s", text)
	assert.Equal(t, string(text), string(c2.Format()), "format → parse → format is idempotent")
	assert.Equal(t, SourceFE, c2.Source)
	assert.Equal(t, c.FEDir, c2.FEDir)
	assert.Equal(t, MeshCoarse, c2.FEMesh)
	assert.Equal(t, c.DesignFile, c2.DesignFile)
	for axis := range 2 {
		assert.InEpsilon(t, c.Factor[axis].Value, c2.Factor[axis].Value, 1e-5)
		assert.InEpsilon(t, c.Factor[axis].SE, c2.Factor[axis].SE, 1e-5)
		assert.InEpsilon(t, c.FittedEI[axis], c2.FittedEI[axis], 1e-5)
		assert.InEpsilon(t, c.FEChange[axis], c2.FEChange[axis], 1e-5)
	}

	// the fixture (a seed of the calibration fuzzer) is such a file
	fixture, err := LoadCalibration("testdata/calibration/fe-petg-sinusoid.toml")
	require.NoError(t, err)
	assert.Equal(t, SourceFE, fixture.Source)

	path := writeCalibratedDesign(t, string(text))
	d, _, err := LoadDesign(path)
	require.NoError(t, err, "design naming an FE calibration file")
	m := d.Bellows[0].Model
	assert.Equal(t, [2]float64{c2.Factor[0].Value, c2.Factor[1].Value}, m.Calibration, "factors from the file")
	st, err := d.Stiffness()
	require.NoError(t, err)
	assert.Equal(t, "calibrated", fmt.Sprint(st[0].Source))
}

// TestCalibrationSource: a file without a source key is a bench
// calibration (the files written before FE calibrations existed), and the
// key set follows the source.
func TestCalibrationSource(t *testing.T) {
	bench := exampleCalibration(t)
	text := string(bench.Format())
	require.NotContains(t, text, "source", "bench files are written as before")
	c, err := ParseCalibration([]byte(text), "cal.toml")
	require.NoError(t, err)
	assert.Equal(t, SourceBench, c.Source)
	c, err = ParseCalibration([]byte("source = \"bench\"\n"+text), "cal.toml")
	require.NoError(t, err)
	assert.Equal(t, SourceBench, c.Source)

	errorsOf := func(text string) Errors {
		t.Helper()
		_, err := ParseCalibration([]byte(text), "cal.toml")
		var es Errors
		require.True(t, errors.As(err, &es), "want Errors, got %v", err)
		return es
	}
	has := func(es Errors, key, msg string) bool {
		for _, e := range es {
			if e.Key == key && strings.Contains(e.Msg, msg) && e.Line > 0 {
				return true
			}
		}
		return false
	}
	es := errorsOf("source = \"lab\"\n" + text)
	assert.True(t, has(es, "source", `"lab" is not allowed (expected one of: bench|fe)`), "%v", es)
	// a bench file that claims to be FE: its bench keys are unknown and
	// the FE keys missing
	es = errorsOf("source = \"fe\"\n" + text)
	assert.True(t, has(es, "bench_file", "unknown key"), "%v", es)
	assert.True(t, has(es, "fit_x", "unknown key"), "%v", es)
	for _, k := range []string{"fe_dir", "fe_mesh", "ei_x_fe_n_mm2", "ei_y_fe_mesh_change"} {
		found := false
		for _, e := range es {
			found = found || (e.Key == k && strings.Contains(e.Msg, "missing"))
		}
		assert.True(t, found, "missing %s reported: %v", k, es)
	}

	fe := string(feCalibration(t).Format())
	for _, tc := range []struct{ old, new, key, msg string }{
		{"ei_x_fe_mesh_change = 0.004", "ei_x_fe_mesh_change = 0.2", "ei_x_fe_mesh_change", "0.2 is out of range"},
		{"fe_mesh = \"coarse\"", "fe_mesh = \"draft\"", "fe_mesh", "expected one of: coarse|fine"},
		{"factor_y = 0.98\n", "factor_y = 0.9\n", "factor_y", "expected the factor to be FE over predicted EI"},
		{"ei_y_fe_mesh_change = -0.002", "ei_y_fe_mesh_change = \"small\"", "ei_y_fe_mesh_change", "expected a relative change"},
	} {
		require.Contains(t, fe, tc.old)
		es := errorsOf(strings.Replace(fe, tc.old, tc.new, 1))
		assert.True(t, has(es, tc.key, tc.msg), "%s: %v", tc.key, es)
	}
}
