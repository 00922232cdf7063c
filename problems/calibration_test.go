package problems

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/surrogate"
)

// exampleCalibration fits the shipped demo bench file and compares it with
// bellows 2 of the shipped demo design.
func exampleCalibration(t *testing.T) *Calibration {
	t.Helper()
	b, err := LoadBench("examples/boom-bench.csv")
	require.NoError(t, err, "shipped bench file")
	var fits [2]*BenchFit
	for axis := range 2 {
		fits[axis], err = b.Fit(axis, TermAuto, TermAuto)
		require.NoError(t, err, "shipped bench file, axis %d", axis)
	}
	d, _, err := LoadDesign("examples/boom-geometry.toml")
	require.NoError(t, err)
	c, err := NewCalibration(d, 1, b, fits)
	require.NoError(t, err)
	c.Printer = "fff, 0.4 mm nozzle"
	c.Date = time.Date(2025, 3, 14, 0, 0, 0, 0, time.UTC)
	c.BenchFile, c.DesignFile = "boom-bench.csv", "boom-geometry.toml"
	return c
}

// TestCalibrationReproducesBench checks the point of the factor: with it
// applied, the stiffness a cantilever test sees in the surrogate equals the
// fitted EI (surrogate.CantileverEI and the calibration scaling,
// derived from surrogate/REFERENCE.md §2.8 and §4.1).
func TestCalibrationReproducesBench(t *testing.T) {
	c := exampleCalibration(t)
	d, _, err := LoadDesign("examples/boom-geometry.toml")
	require.NoError(t, err)
	m := *d.Bellows[1].Model
	m.Calibration = [2]float64{c.Factor[0].Value, c.Factor[1].Value}
	s, err := m.Section(d.Fidelity)
	require.NoError(t, err)
	got := surrogate.CantileverEI(s.EI)
	for axis := range 2 {
		assert.InEpsilon(t, c.FittedEI[axis], got[axis], 1e-12, "calibrated test-seen EI about %s equals the bench fit", AxisName(axis))
		assert.InEpsilon(t, c.FittedCI[axis][0]/c.PredictedEI[axis], c.Factor[axis].CI[0], 1e-12, "factor interval is the EI interval over the prediction")
	}
	assert.Equal(t, "petg", c.Material)
	assert.Equal(t, surrogate.Sinusoid, c.Profile)
	assert.Equal(t, 2, c.Bellows)
	assert.Equal(t, [2]int{8, 8}, c.Points, "10 rows per direction, 2 of them zero references that are not counted")
}

// TestCalibrationRoundTrip: format → parse gives the same values (six
// written digits) and parse → format is idempotent.
func TestCalibrationRoundTrip(t *testing.T) {
	c := exampleCalibration(t)
	text := c.Format()
	c2, err := ParseCalibration(text, "cal.toml")
	require.NoError(t, err, "parse of\n%s", text)
	assert.Equal(t, string(text), string(c2.Format()), "format → parse → format is idempotent")
	assert.Equal(t, c.Material, c2.Material)
	assert.Equal(t, c.Printer, c2.Printer)
	assert.Equal(t, c.Profile, c2.Profile)
	assert.Equal(t, c.Fidelity, c2.Fidelity)
	assert.Equal(t, "2025-03-14", c2.Date.Format(time.DateOnly))
	assert.Equal(t, c.BenchFile, c2.BenchFile)
	assert.Equal(t, c.Bellows, c2.Bellows)
	assert.Equal(t, c.Points, c2.Points)
	assert.Equal(t, c.Model, c2.Model)
	for axis := range 2 {
		assert.InEpsilon(t, c.Factor[axis].Value, c2.Factor[axis].Value, 1e-5, "factor %d, six digits", axis)
		assert.InEpsilon(t, c.Factor[axis].SE, c2.Factor[axis].SE, 1e-5, "factor SE %d", axis)
		assert.InEpsilon(t, c.FittedEI[axis], c2.FittedEI[axis], 1e-5, "fitted EI %d", axis)
		assert.InEpsilon(t, c.PredictedEI[axis], c2.PredictedEI[axis], 1e-5, "predicted EI %d", axis)
		assert.InEpsilon(t, c.FittedCI[axis][1], c2.FittedCI[axis][1], 1e-5, "EI interval %d", axis)
	}
	// Awkward strings survive the TOML quoting.
	c.Printer = "fff \"draft\" \\ 0.4\tmm"
	c3, err := ParseCalibration(c.Format(), "cal.toml")
	require.NoError(t, err)
	assert.Equal(t, c.Printer, c3.Printer, "quotes, backslash and tab in the printer label")
}

func TestParseCalibrationErrors(t *testing.T) {
	good, err := os.ReadFile("testdata/calibration/petg-sinusoid.toml")
	require.NoError(t, err)
	edit := func(old, new string) string {
		require.Contains(t, string(good), old, "fixture has %q", old)
		return strings.Replace(string(good), old, new, 1)
	}
	line := func(text, key string) int {
		for i, l := range strings.Split(text, "\n") {
			if strings.HasPrefix(l, key+" ") || strings.HasPrefix(l, key+"=") {
				return i + 1
			}
		}
		return 1
	}
	cases := []struct {
		name, text, key, msg string
	}{
		{"missing factor_y", edit("factor_y = ", "# factor_y = "), "factor_y", "missing (expected a factor > 0)"},
		{"unknown key", edit("factor_x_se", "factor_x_sd"), "factor_x_sd", `unknown key "factor_x_sd" at top level (did you mean "factor_x_se"?)`},
		{"negative factor", edit("factor_x = ", "factor_x = -"), "factor_x", "out of range (expected a factor > 0, > 0)"},
		{"interval without value", edit("factor_y_ci95 = [", "factor_y_ci95 = [0.1, 0.2] # ["), "factor_y_ci95", "does not contain factor_y"},
		{"inconsistent factor", edit("ei_x_predicted_n_mm2 = ", "ei_x_predicted_n_mm2 = 1"), "factor_x", "differs from ei_x_fitted_n_mm2 / ei_x_predicted_n_mm2"},
		{"date as string", edit("date = 2025-03-14", `date = "yesterday"`), "date", `found string "yesterday" (expected a date such as 2025-01-31)`},
		{"bad profile", edit(`profile = "sinusoid"`, `profile = "bellows"`), "profile", `"bellows" is not allowed (expected one of: sinusoid|u|trapezoid)`},
		{"bad fit", edit(`fit_y = "through origin"`, `fit_y = "spline"`), "fit_y", `"spline" is not allowed`},
		{"points not whole", edit("points_x = 8", "points_x = 8.5"), "points_x", "expected a number of points >= 2"},
		{"empty material", edit(`material = "petg"`, `material = ""`), "material", "empty (expected a material name)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseCalibration([]byte(c.text), "cal.toml")
			var es Errors
			require.True(t, errors.As(err, &es), "%s: want Errors, got %v", c.name, err)
			found := false
			for _, e := range es {
				if e.Key == c.key && strings.Contains(e.Msg, c.msg) {
					found = true
					if c.name != "missing factor_y" {
						assert.Equal(t, line(c.text, c.key), e.Line, "%s: line of %s", c.name, c.key)
					}
				}
				assert.Equal(t, "cal.toml", e.File)
			}
			assert.True(t, found, "%s: no error with key %s and %q in\n%v", c.name, c.key, c.msg, err)
		})
	}
	_, err = ParseCalibration([]byte("material = \"petg\"\nfactor_x = [\n"), "cal.toml")
	var e *Error
	require.True(t, errors.As(err, &e), "syntax error: *Error, got %v", err)
	assert.Contains(t, e.Msg, "syntax error")
	assert.Positive(t, e.Line)
}

// writeCalibratedDesign writes the calibration fixture and a design that
// names it into a temporary directory.
func writeCalibratedDesign(t *testing.T, calText string) string {
	t.Helper()
	dir := t.TempDir()
	require.NoError(t, os.MkdirAll(filepath.Join(dir, "cal"), 0o755))
	require.NoError(t, os.WriteFile(filepath.Join(dir, "cal", "petg.toml"), []byte(calText), 0o644))
	design := `[[bellows]]
material = "petg"
outer_diameter_mm = 20.0
depth_mm = 2.4
pitch_mm = 8.0
wall_mm = 0.6
straight_length_mm = 150.0
curved_length_mm = 110.0
precurvature_per_m = 8.0
calibration_file = "cal/petg.toml"
`
	path := filepath.Join(dir, "design.toml")
	require.NoError(t, os.WriteFile(path, []byte(design), 0o644))
	return path
}

func TestDesignCalibrationFile(t *testing.T) {
	calText, err := os.ReadFile("testdata/calibration/petg-sinusoid.toml")
	require.NoError(t, err)
	cal, err := ParseCalibration(calText, "fixture")
	require.NoError(t, err)
	path := writeCalibratedDesign(t, string(calText))
	d, _, err := LoadDesign(path)
	require.NoError(t, err, "design naming a calibration file")
	m := d.Bellows[0].Model
	require.NotNil(t, m)
	assert.Equal(t, [2]float64{cal.Factor[0].Value, cal.Factor[1].Value}, m.Calibration, "factors from the file")
	st, err := d.Stiffness()
	require.NoError(t, err)
	assert.Equal(t, objective.SourceCalibrated, st[0].Source)
	plain := *m
	plain.Calibration = [2]float64{}
	s0, err := plain.Section(d.Fidelity)
	require.NoError(t, err)
	assert.InEpsilon(t, cal.Factor[0].Value*s0.EI[0][0], st[0].EI[0][0], 1e-12, "EI_x scaled by factor_x")
	assert.InEpsilon(t, cal.Factor[1].Value*s0.EI[1][1], st[0].EI[1][1], 1e-12, "EI_y scaled by factor_y")

	// A broken calibration file: its own positions, plus the design key.
	broken := strings.Replace(string(calText), "factor_x = ", "factor_x = -", 1)
	path = writeCalibratedDesign(t, broken)
	_, _, err = LoadDesign(path)
	var es Errors
	require.True(t, errors.As(err, &es), "want Errors, got %v", err)
	var inCal, atKey bool
	for _, e := range es {
		if strings.HasSuffix(e.File, filepath.Join("cal", "petg.toml")) && e.Key == "factor_x" && e.Line > 0 {
			inCal = true
		}
		if e.File == path && e.Key == "bellows[1].calibration_file" && e.Line == 10 {
			atKey = true
		}
	}
	assert.True(t, inCal, "error inside the calibration file with its position:\n%v", err)
	assert.True(t, atKey, "error at the design key:\n%v", err)
}

func TestNewCalibrationErrors(t *testing.T) {
	b, err := ParseBench([]byte("load_n,deflection_mm,free_length_mm,direction\n1,1,100,x\n2,2.1,100,x\n3,2.9,100,x\n1,1,100,y\n2,5,100,y\n"), "b.csv")
	require.NoError(t, err)
	fx, err := b.Fit(0, TermAuto, TermAuto)
	require.NoError(t, err)
	fy, err := b.Fit(1, TermAuto, TermAuto)
	require.NoError(t, err)
	require.Greater(t, fy.Fit.T*fy.Fit.FlexibilitySE, fy.Fit.Flexibility, "y data constructed to leave EI unbounded above")
	d, _, err := LoadDesign("examples/boom-geometry.toml")
	require.NoError(t, err)
	m, _, err := LoadDesign("examples/boom-measured.toml")
	require.NoError(t, err)
	cases := []struct {
		name string
		run  func() error
		msg  string
	}{
		{"no y fit", func() error { _, err := NewCalibration(d, 0, b, [2]*BenchFit{fx, nil}); return err }, "no rows for direction y"},
		{"unbounded", func() error { _, err := NewCalibration(d, 0, b, [2]*BenchFit{fx, fy}); return err }, "has no upper bound"},
		{"measured", func() error { _, err := NewCalibration(m, 0, b, [2]*BenchFit{fx, fx}); return err }, "measured stiffness"},
		{"index", func() error { _, err := NewCalibration(d, 5, b, [2]*BenchFit{fx, fx}); return err }, "does not exist"},
	}
	for _, c := range cases {
		err := c.run()
		require.Error(t, err, c.name)
		assert.Contains(t, err.Error(), c.msg, c.name)
	}
}

// TestShippedCalibration keeps the shipped example honest: the calibrated
// design loads with calibrated stiffness, and the shipped calibration file
// holds what calibrate computes today from the shipped bench file and
// design. After a deliberate change to boom-geometry.toml or
// boom-bench.csv, regenerate it with the command in boom-calibrated.toml.
func TestShippedCalibration(t *testing.T) {
	d, _, err := LoadDesign("examples/boom-calibrated.toml")
	require.NoError(t, err)
	st, err := d.Stiffness()
	require.NoError(t, err)
	for i, s := range st {
		assert.Equal(t, objective.SourceCalibrated, s.Source, "bellows %d", i+1)
	}
	shipped, err := LoadCalibration("examples/boom-calibration.toml")
	require.NoError(t, err)
	now := exampleCalibration(t)
	for axis := range 2 {
		assert.InEpsilon(t, now.Factor[axis].Value, shipped.Factor[axis].Value, 1e-5,
			"examples/boom-calibration.toml factor_%s is stale (regenerate: see boom-calibrated.toml)", AxisName(axis))
		assert.InEpsilon(t, now.PredictedEI[axis], shipped.PredictedEI[axis], 1e-5, "predicted EI %s", AxisName(axis))
	}
}

// ExampleBench_Fit reads a bench file with the surrogate/REFERENCE.md §5.4 vector and fits
// EI through the origin.
func ExampleBench_Fit() {
	b, err := LoadBench("testdata/bench/vector98.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	f, err := b.Fit(0, TermAuto, TermAuto)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("direction %s, %s, %d points: EI = %.6g N·mm², 95 %% interval [%.5g, %.5g] N·mm²\n",
		AxisName(f.Axis), f.Model(), f.Fit.Points, f.Fit.EI*1e6, f.Fit.CI[0]*1e6, f.Fit.CI[1]*1e6)
	// Output:
	// direction x, through origin, 4 points: EI = 41084.6 N·mm², 95 % interval [40387, 41807] N·mm²
}

func TestDesignCalibrationFileNotRegular(t *testing.T) {
	dir := t.TempDir()
	design := filepath.Join(dir, "d.toml")
	text := "[[bellows]]\nmaterial = \"petg\"\nouter_diameter_mm = 20.0\ndepth_mm = 2.4\npitch_mm = 8.0\nwall_mm = 0.6\nstraight_length_mm = 150.0\ncurved_length_mm = 110.0\ncalibration_file = \".\"\n"
	require.NoError(t, os.WriteFile(design, []byte(text), 0o644))
	_, _, err := LoadDesign(design)
	require.Error(t, err, "a directory is no calibration file")
	assert.Contains(t, err.Error(), "not a regular file")
}

func TestCalibrationFiles(t *testing.T) {
	data, err := os.ReadFile("examples/boom-calibrated.toml")
	require.NoError(t, err)
	got, err := CalibrationFiles(data, "examples/boom-calibrated.toml")
	require.NoError(t, err)
	assert.Equal(t, []string{"boom-calibration.toml"}, got, "both bellows name the same file: listed once")
	data, err = os.ReadFile("examples/boom-geometry.toml")
	require.NoError(t, err)
	got, err = CalibrationFiles(data, "examples/boom-geometry.toml")
	require.NoError(t, err)
	assert.Empty(t, got, "an uncalibrated design names none")
	_, err = CalibrationFiles([]byte("[[bellows]\n"), "x.toml")
	assert.True(t, IsInputError(err), "syntax error is an input error: %v", err)
}

// TestCalibrationFileReadPerParse: a design loaded again after its
// calibration file was rewritten reads the new file.
func TestCalibrationFileReadPerParse(t *testing.T) {
	calText, err := os.ReadFile("testdata/calibration/petg-sinusoid.toml")
	require.NoError(t, err)
	path := writeCalibratedDesign(t, string(calText))
	d1, _, err := LoadDesign(path)
	require.NoError(t, err)
	d2, _, err := LoadDesign(path)
	require.NoError(t, err)
	assert.Equal(t, d1.Bellows[0].Model.Calibration, d2.Bellows[0].Model.Calibration, "same file, same factors")

	// Halve the fitted EI (so the factors halve too).
	c, err := ParseCalibration(calText, "fixture")
	require.NoError(t, err)
	for axis := range 2 {
		c.FittedEI[axis] /= 2
		c.FittedSE[axis] /= 2
		c.FittedCI[axis] = [2]float64{c.FittedCI[axis][0] / 2, c.FittedCI[axis][1] / 2}
		f := &c.Factor[axis]
		f.Value, f.SE, f.CI = f.Value/2, f.SE/2, [2]float64{f.CI[0] / 2, f.CI[1] / 2}
	}
	calPath := filepath.Join(filepath.Dir(path), "cal", "petg.toml")
	require.NoError(t, os.MkdirAll(filepath.Dir(calPath), 0o755))
	require.NoError(t, os.WriteFile(calPath, c.Format(), 0o644))
	d3, _, err := LoadDesign(path)
	require.NoError(t, err)
	assert.InEpsilon(t, d1.Bellows[0].Model.Calibration[0]/2, d3.Bellows[0].Model.Calibration[0], 1e-5, "the rewritten file is read again")
}

func BenchmarkLoadCalibratedDesign(b *testing.B) {
	for b.Loop() {
		if _, _, err := LoadDesign("examples/boom-calibrated.toml"); err != nil {
			b.Fatal(err)
		}
	}
}
