package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
)

const calExamples = "../../problems/examples/"

// TestCalibrateJSON checks the JSON contract of calibrate -json on the
// shipped demo bench test, and that -o and -plot write their files.
func TestCalibrateJSON(t *testing.T) {
	dir := t.TempDir()
	cal, plot := filepath.Join(dir, "cal.toml"), filepath.Join(dir, "fit.svg")
	code, out, errOut := runCLI(t, "calibrate", calExamples+"boom-bench.csv", "--design", calExamples+"boom-geometry.toml",
		"-bellows", "2", "-printer", "fff 0.4", "-o", cal, "-plot", plot, "--json")
	require.Equal(t, 0, code, "exit status (stderr %q)", errOut)
	var got struct {
		Fits []struct {
			Direction string     `json:"direction"`
			EI        *float64   `json:"ei_n_mm2"`
			SE        *float64   `json:"se_n_mm2"`
			CI        []*float64 `json:"ci95_n_mm2"`
			Points    *int       `json:"points"`
			Model     string     `json:"model"`
			Residuals []struct {
				Line int `json:"line"`
			} `json:"residuals"`
		} `json:"fits"`
		Calibration *struct {
			Material string `json:"material"`
			Factors  []struct {
				Direction string  `json:"direction"`
				Factor    float64 `json:"factor"`
			} `json:"factors"`
		} `json:"calibration"`
		Warnings []string `json:"warnings"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got), "JSON output:\n%s", out)
	require.Len(t, got.Fits, 2, "one fit per direction")
	for i, f := range got.Fits {
		assert.Equal(t, []string{"x", "y"}[i], f.Direction)
		require.NotNil(t, f.EI, "ei_n_mm2 present")
		require.NotNil(t, f.SE, "se_n_mm2 present")
		require.Len(t, f.CI, 2, "ci95_n_mm2 is [lo, hi]")
		require.NotNil(t, f.CI[0])
		require.NotNil(t, f.CI[1])
		assert.True(t, *f.CI[0] < *f.EI && *f.EI < *f.CI[1], "interval contains EI (%s)", f.Direction)
		assert.Positive(t, *f.SE)
		require.NotNil(t, f.Points)
		assert.Equal(t, 8, *f.Points, "10 rows, 2 zero references (%s)", f.Direction)
		assert.Equal(t, "through origin", f.Model)
		assert.Len(t, f.Residuals, 10, "a residual for every row")
	}
	require.NotNil(t, got.Calibration, "-design adds the calibration")
	assert.Equal(t, "petg", got.Calibration.Material)
	require.Len(t, got.Calibration.Factors, 2)
	assert.NotNil(t, got.Warnings, "warnings is a list, never null")
	assert.Contains(t, errOut, "wrote "+cal)
	assert.Contains(t, errOut, "wrote "+plot)

	c, err := problems.LoadCalibration(cal)
	require.NoError(t, err, "written calibration loads")
	assert.Equal(t, "fff 0.4", c.Printer)
	assert.Equal(t, "../../problems/examples/boom-bench.csv", relTo(t, dir, c.BenchFile), "bench file recorded relative to the calibration file")
	for i, f := range got.Calibration.Factors {
		assert.InEpsilon(t, c.Factor[i].Value, f.Factor, 1e-5, "JSON and file agree (%s)", f.Direction)
	}
	svg, err := os.ReadFile(plot)
	require.NoError(t, err)
	assert.True(t, strings.HasPrefix(string(svg), "<?xml"), "plot is an SVG document")
}

// relTo resolves a path recorded relative to dir back to one relative to
// the test's working directory.
func relTo(t *testing.T, dir, p string) string {
	t.Helper()
	wd, err := os.Getwd()
	require.NoError(t, err)
	r, err := filepath.Rel(wd, filepath.Join(dir, p))
	require.NoError(t, err)
	return filepath.ToSlash(r)
}

// TestCalibrateIntoCheck is the calibration round trip: calibrate writes a
// file, a design names it, and check and pose then report calibrated
// stiffness, EI scaled by the factors.
func TestCalibrateIntoCheck(t *testing.T) {
	dir := t.TempDir()
	cal := filepath.Join(dir, "petg-cal.toml")
	code, _, errOut := runCLI(t, "calibrate", calExamples+"boom-bench.csv", "-design", calExamples+"boom-geometry.toml", "-bellows", "2", "-o", cal)
	require.Equal(t, 0, code, "calibrate (stderr %q)", errOut)
	c, err := problems.LoadCalibration(cal)
	require.NoError(t, err)

	src, err := os.ReadFile(calExamples + "boom-geometry.toml")
	require.NoError(t, err)
	text := strings.ReplaceAll(string(src), "profile = \"sinusoid\"\n", "profile = \"sinusoid\"\ncalibration_file = \"petg-cal.toml\"\n")
	require.Equal(t, 2, strings.Count(text, "calibration_file"), "both bellows name the calibration")
	design := filepath.Join(dir, "boom.toml")
	require.NoError(t, os.WriteFile(design, []byte(text), 0o644))

	type checkJSON struct {
		Bellows []struct {
			EI     [2]float64 `json:"ei_n_mm2"`
			Source string     `json:"stiffness_source"`
		} `json:"bellows"`
		Models []string `json:"models"`
	}
	checkOf := func(path string) checkJSON {
		code, out, errOut := runCLI(t, "check", path, "-json")
		require.Contains(t, []int{0, 1}, code, "check %s runs (stderr %q)", path, errOut)
		var cj checkJSON
		require.NoError(t, json.Unmarshal([]byte(out), &cj), "check -json of %s", path)
		return cj
	}
	plain, calibrated := checkOf(calExamples+"boom-geometry.toml"), checkOf(design)
	require.Len(t, calibrated.Bellows, 2)
	for i, b := range calibrated.Bellows {
		assert.Equal(t, objective.SourceCalibrated.String(), b.Source, "bellows %d stiffness source", i+1)
		for axis := range 2 {
			assert.InEpsilon(t, c.Factor[axis].Value*plain.Bellows[i].EI[axis], b.EI[axis], 1e-5,
				"bellows %d EI about %s scaled by the factor (six-digit JSON)", i+1, problems.AxisName(axis))
		}
	}
	assert.Contains(t, strings.Join(calibrated.Models, "\n"), "calibrat", "check names the calibration among its models")

	code, out, errOut := runCLI(t, "check", design)
	require.Contains(t, []int{0, 1}, code, "check text (stderr %q)", errOut)
	assert.Contains(t, out, "calibrated", "check's table says calibrated")
	code, out, errOut = runCLI(t, "pose", design, "-angles-deg", "0,180")
	require.Equal(t, 0, code, "pose (stderr %q)", errOut)
	assert.Contains(t, out, "stiffness from calibrated, calibrated", "pose's sources line")
}

func TestCalibrateText(t *testing.T) {
	code, out, errOut := runCLI(t, "calibrate", calExamples+"boom-bench.csv", "-design", calExamples+"boom-geometry.toml", "-bellows", "2")
	require.Equal(t, 0, code, "stderr %q", errOut)
	for _, want := range []string{"direction  points", "95 % interval N·mm²", "through origin", "residual_mm",
		"calibration against bellows 2 of", "EI predicted N·mm²", "note: the fit assumes"} {
		assert.Contains(t, out, want)
	}
	assert.Empty(t, errOut, "no file written without -o")
}

// TestCalibrateExitCodes: bad input exits 2 with positioned messages and
// leaves no output file behind.
func TestCalibrateExitCodes(t *testing.T) {
	dir := t.TempDir()
	badCSV := filepath.Join(dir, "bad.csv")
	require.NoError(t, os.WriteFile(badCSV, []byte("load_n,deflection_mm,direction\n0.1,1,x\n"), 0o644))
	xOnly := filepath.Join(dir, "x-only.csv")
	require.NoError(t, os.WriteFile(xOnly, []byte("load_n,deflection_mm,free_length_mm,direction\n1,1,150,x\n2,2.1,150,x\n3,2.9,150,x\n"), 0o644))
	bench, design := calExamples+"boom-bench.csv", calExamples+"boom-geometry.toml"
	cases := []struct {
		name   string
		args   []string // -o FILE is appended
		code   int
		stderr string
	}{
		{"no file", []string{"calibrate", "-design", design}, 2, "expected one bench CSV file"},
		{"missing column", []string{"calibrate", badCSV, "-design", design, "-bellows", "2"}, 2, "bad.csv:1:1: free_length_mm: missing column"},
		{"no such file", []string{"calibrate", filepath.Join(dir, "none.csv"), "-design", design, "-bellows", "2"}, 2, "cannot read"},
		{"-o without -design", []string{"calibrate", bench}, 2, "-o: a calibration file needs -design"},
		{"bad mode", []string{"calibrate", bench, "-design", design, "-bellows", "2", "-intercept", "maybe"}, 2, `-intercept: "maybe" is not a mode (expected: auto|on|off)`},
		{"two bellows, no -bellows", []string{"calibrate", bench, "-design", design}, 2, "expected -bellows N with N one of 1, 2"},
		{"bellows out of range", []string{"calibrate", bench, "-design", design, "-bellows", "3"}, 2, "-bellows: 3 is out of range"},
		{"measured design", []string{"calibrate", bench, "-design", calExamples + "boom-measured.toml"}, 2, "no bellows with geometry"},
		{"one direction only", []string{"calibrate", xOnly, "-design", design, "-bellows", "1"}, 2, "no rows for direction y"},
		{"clamp needs lengths", []string{"calibrate", bench, "-design", design, "-bellows", "2", "-clamp", "on"}, 2, "boom-bench.csv:7:4: direction: direction x, clamp compliance fit"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(dir, "out-"+strings.ReplaceAll(c.name, " ", "-")+".toml")
			args := append(append([]string{}, c.args...), "-o", out)
			code, _, errOut := runCLI(t, args...)
			assert.Equal(t, c.code, code, "exit status of %v (stderr %q)", args, errOut)
			assert.Contains(t, errOut, c.stderr, "message of %v", args)
			for _, line := range strings.Split(strings.TrimSpace(errOut), "\n") {
				assert.True(t, strings.HasPrefix(line, "plica: "), "stderr line %q starts with plica:", line)
			}
			_, err := os.Stat(out)
			assert.True(t, os.IsNotExist(err), "%v must not write %s", args, out)
		})
	}
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	for _, e := range entries {
		assert.False(t, strings.HasSuffix(e.Name(), ".tmp"), "no temporary file left: %s", e.Name())
	}
}
