package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
	"plica/surrogate/fecheck"
)

// Tests of plica fe. The ones named TestFE… run CalculiX (ccx) and are
// their own CI step (go test -run '^TestFE'); the main step skips them
// (go test -skip '^TestFE'). The TestFeVerb… tests need no ccx.

// needCCX skips a test when ccx is not on PATH, or fails it when
// PLICA_REQUIRE_CCX=1; -short skips it too.
func needCCX(t *testing.T) {
	t.Helper()
	if testing.Short() {
		t.Skip("runs CalculiX; skipped with -short")
	}
	if !fecheck.HaveCCX("") {
		if os.Getenv("PLICA_REQUIRE_CCX") == "1" {
			t.Fatal("ccx is not on PATH and PLICA_REQUIRE_CCX=1: install the Debian package " + fecheck.Package)
		}
		t.Skip("ccx is not on PATH (Debian package " + fecheck.Package + "); set PLICA_REQUIRE_CCX=1 to make this a failure")
	}
}

// feMixedDesign has a measured inner bellows (nothing to model) and an
// outer bellows given by geometry; a demo scenario, numbers invented.
const feMixedDesign = `name = "fe test pair"
[[bellows]]
straight_length_mm = 150.0
curved_length_mm = 100.0
precurvature_per_m = 4.0
bending_stiffness_n_mm2 = [1.0e5, 1.0e5]
torsional_stiffness_n_mm2 = 1.0e6
linear_density_kg_per_m = 0.02

[[bellows]]
material = "petg"
outer_diameter_mm = 30.0
depth_mm = 3.0
pitch_mm = 10.0
wall_mm = 0.6
profile = "sinusoid"
straight_length_mm = 150.0
curved_length_mm = 100.0
precurvature_per_m = 1.3
`

// entries lists the names in dir.
func entries(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	require.NoError(t, err)
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	return names
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// TestFEVerb runs plica fe with CalculiX on a design with one bellows to
// model and one measured, with -json and -calibration, and follows the
// calibration into plica check.
func TestFEVerb(t *testing.T) {
	needCCX(t)
	dir := t.TempDir()
	design := filepath.Join(dir, "pair.toml")
	require.NoError(t, os.WriteFile(design, []byte(feMixedDesign), 0o644))
	run := filepath.Join(dir, "run")
	cal := filepath.Join(dir, "cal.toml")
	code, out, errOut := runCLI(t, "fe", design, "-o", run, "-json", "-calibration", cal)
	require.Equal(t, 0, code, "stderr:\n%s", errOut)

	// JSON contract: fixed keys, units in the names.
	var raw map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &raw), "fe -json prints JSON:\n%s", out)
	for _, k := range []string{"design_file", "design_name", "dir", "mesh", "convergence_mesh", "surrogate_fidelity", "run_time_s", "bellows", "skipped", "calibration", "caution"} {
		assert.Contains(t, raw, k)
	}
	assert.Equal(t, "coarse", raw["mesh"])
	assert.Equal(t, "draft", raw["convergence_mesh"])
	assert.Equal(t, run, raw["dir"])
	assert.Equal(t, []any{map[string]any{"bellows": 1.0, "reason": "measured stiffness: no geometry to model"}}, raw["skipped"])
	bs := raw["bellows"].([]any)
	require.Len(t, bs, 1)
	b := bs[0].(map[string]any)
	assert.Equal(t, 2.0, b["bellows"])
	assert.Equal(t, "petg", b["material"])
	assert.Equal(t, "sinusoid", b["profile"])
	assert.Equal(t, "revolved", b["winding"])
	assert.Positive(t, b["run_time_s"])
	mesh := b["mesh"].(map[string]any)
	assert.Equal(t, "coarse", mesh["name"])
	assert.Equal(t, "draft", mesh["convergence_mesh"])
	for _, k := range []string{"shell_s8r_elements", "shell_nodes", "solid_cax8_elements", "solid_elements_through_wall", "shell_run_time_s", "solid_run_time_s"} {
		assert.Positive(t, mesh[k], "mesh.%s", k)
	}
	assert.Equal(t, 8.0, mesh["shell_convolutions"])
	assert.Equal(t, 4.0, mesh["shell_measured_convolutions"])
	qs := b["quantities"].(map[string]any)
	names := []string{"ei_x_n_mm2", "ei_y_n_mm2", "gj_n_mm2", "axial_rate_per_convolution_n_per_mm", "strain_per_curvature_m",
		"solid_axial_rate_per_convolution_n_per_mm", "solid_strain_per_extension_per_mm"}
	assert.Len(t, qs, len(names))
	for _, n := range names {
		q := qs[n].(map[string]any)
		fe, sur := q["fe"].(float64), q["surrogate"].(float64)
		assert.Positive(t, fe, n)
		assert.InDelta(t, sur/fe-1, q["rel_diff"].(float64), 1e-5, "%s: rel_diff = surrogate/fe − 1", n)
		assert.Less(t, abs(q["mesh_change_rel"].(float64)), 0.1, "%s: two-mesh change", n)
	}
	// Units: the surrogate's own values as plica check prints them, and
	// the FE stiffness within the ±5 % band the surrogate documents where
	// it claims validity (fecheck's tests hold the FE to it on more
	// geometries).
	_, plainOut, _ := runCLI(t, "check", design, "-json")
	var plain struct {
		Bellows []struct {
			EI   [2]float64 `json:"ei_n_mm2"`
			GJ   float64    `json:"gj_n_mm2"`
			Rate float64    `json:"axial_rate_per_convolution_n_per_mm"`
		} `json:"bellows"`
	}
	require.NoError(t, json.Unmarshal([]byte(plainOut), &plain))
	q := func(n, k string) float64 { return qs[n].(map[string]any)[k].(float64) }
	assert.InEpsilon(t, plain.Bellows[1].EI[0], q("ei_x_n_mm2", "surrogate"), 1e-5)
	assert.InEpsilon(t, plain.Bellows[1].GJ, q("gj_n_mm2", "surrogate"), 1e-5)
	assert.InEpsilon(t, plain.Bellows[1].Rate, q("axial_rate_per_convolution_n_per_mm", "surrogate"), 1e-5)
	for _, n := range []string{"ei_x_n_mm2", "ei_y_n_mm2", "gj_n_mm2", "axial_rate_per_convolution_n_per_mm"} {
		assert.InDelta(t, 0, q(n, "rel_diff"), 0.05, n)
	}

	// The run folder: the record, the decks and ccx's results of both
	// meshes, and nothing left of the staging folder.
	rec, err := os.ReadFile(filepath.Join(run, "fe.json"))
	require.NoError(t, err)
	assert.Equal(t, out, string(rec), "fe.json holds the -json output")
	for _, f := range []string{"fe.txt", "bellows-2/coarse/shell.inp", "bellows-2/coarse/shell.dat", "bellows-2/coarse/solid.frd", "bellows-2/draft/shell.dat"} {
		assert.FileExists(t, filepath.Join(run, f))
	}
	assert.ElementsMatch(t, []string{"pair.toml", "run", "cal.toml"}, entries(t, dir))
	text, err := os.ReadFile(filepath.Join(run, "fe.txt"))
	require.NoError(t, err)
	for _, s := range []string{"bellows 2: petg, sinusoid, revolved", "EI_x N·mm²", "peak strain per curvature m (shell)", "bellows 1: not modelled", "caution: "} {
		assert.Contains(t, string(text), s)
	}
	// Progress: each model of both meshes, with the load cases it solves.
	for _, s := range []string{"bellows 2 (1 of 1): coarse mesh, shell model (4 load cases): running ccx",
		"bellows 2 (1 of 1): coarse mesh, shell model: solving axial, torsion, bending_x, bending_y",
		"bellows 2 (1 of 1): draft mesh, solid model: solving axial extension", "plica: wrote " + run, "plica: wrote " + cal} {
		assert.Contains(t, errOut, s)
	}

	// The calibration file: source fe, the FE EI over the prediction.
	c, err := problems.LoadCalibration(cal)
	require.NoError(t, err)
	assert.Equal(t, problems.SourceFE, c.Source)
	assert.Equal(t, "run", c.FEDir, "relative to the calibration file")
	assert.Equal(t, "pair.toml", c.DesignFile)
	assert.Equal(t, 2, c.Bellows)
	fac := raw["calibration"].(map[string]any)["factors"].([]any)
	axisQ := []string{"ei_x_n_mm2", "ei_y_n_mm2"}
	for axis := range 2 {
		f := fac[axis].(map[string]any)
		assert.InEpsilon(t, f["factor"].(float64), c.Factor[axis].Value, 1e-5)
		// a revolved bellows has no coupling: the cantilever EI is EI_x
		assert.InEpsilon(t, q(axisQ[axis], "fe"), c.FittedEI[axis]*1e6, 1e-5)
	}

	// Round trip: a design naming the FE calibration gets calibrated
	// stiffness, and the calibrated surrogate reproduces the FE EI.
	calibrated := strings.Replace(feMixedDesign, "profile = \"sinusoid\"\n", "profile = \"sinusoid\"\ncalibration_file = \"cal.toml\"\n", 1)
	design2 := filepath.Join(dir, "pair-calibrated.toml")
	require.NoError(t, os.WriteFile(design2, []byte(calibrated), 0o644))
	code, calOut, errOut := runCLI(t, "check", design2, "-json")
	require.NotEqual(t, 2, code, "check of the calibrated design: %s", errOut)
	var got struct {
		Bellows []struct {
			EI     [2]float64 `json:"ei_n_mm2"`
			Source string     `json:"stiffness_source"`
		} `json:"bellows"`
	}
	require.NoError(t, json.Unmarshal([]byte(calOut), &got))
	assert.Equal(t, "measured", got.Bellows[0].Source)
	assert.Equal(t, "calibrated", got.Bellows[1].Source)
	for axis := range 2 {
		assert.InEpsilon(t, c.Factor[axis].Value*plain.Bellows[1].EI[axis], got.Bellows[1].EI[axis], 1e-5, "EI scaled by the FE factor")
		assert.InEpsilon(t, q(axisQ[axis], "fe"), got.Bellows[1].EI[axis], 1e-5, "calibrated EI equals the FE EI")
	}
	_, textOut, _ := runCLI(t, "check", design2)
	assert.Contains(t, textOut, "stiffness per bellows: measured, calibrated")
}

// TestFeVerbNoCCX: without ccx the decks are written into the new folder,
// the message says how to run them and names the package, exit status 1.
func TestFeVerbNoCCX(t *testing.T) {
	t.Setenv("PATH", "")
	dir := t.TempDir()
	run := filepath.Join(dir, "run")
	cal := filepath.Join(dir, "cal.toml")
	code, out, errOut := runCLI(t, "fe", examples+"boom-geometry.toml", "-o", run)
	assert.Equal(t, 1, code, "stderr %q", errOut)
	assert.Empty(t, out)
	assert.Contains(t, errOut, "plica: fe: CalculiX (ccx) is not on PATH: install the Debian package calculix-ccx\n")
	assert.Contains(t, errOut, "`ccx -i shell` and `ccx -i solid` in "+filepath.Join(run, "bellows-1", "coarse")+" and in "+filepath.Join(run, "bellows-2", "coarse"))
	for _, b := range []string{"bellows-1", "bellows-2"} {
		for _, f := range []string{"shell.inp", "solid.inp"} {
			deck, err := os.ReadFile(filepath.Join(run, b, "coarse", f))
			require.NoError(t, err)
			assert.Contains(t, string(deck), "*STEP")
		}
	}
	assert.ElementsMatch(t, []string{"run"}, entries(t, dir), "no staging folder left")

	// -fine writes the fine decks; no calibration is written
	code, _, errOut = runCLI(t, "fe", examples+"boom-geometry.toml", "-o", filepath.Join(dir, "fine"), "-fine", "-bellows", "1", "-calibration", cal)
	assert.Equal(t, 1, code)
	assert.FileExists(t, filepath.Join(dir, "fine", "bellows-1", "fine", "shell.inp"))
	assert.NoDirExists(t, filepath.Join(dir, "fine", "bellows-2"))
	assert.Contains(t, errOut, "no calibration written")
	assert.NoFileExists(t, cal)

	// the default folder is new: runs/DESIGN-fe, then numbered
	design, err := filepath.Abs(examples + "boom-geometry.toml")
	require.NoError(t, err)
	t.Chdir(dir)
	for _, want := range []string{"boom-geometry-fe", "boom-geometry-fe-2"} {
		code, _, errOut = runCLI(t, "fe", design, "-bellows", "2")
		assert.Equal(t, 1, code)
		assert.Contains(t, errOut, "to "+filepath.Join("runs", want)+";")
		assert.FileExists(t, filepath.Join("runs", want, "bellows-2", "coarse", "shell.inp"))
	}
}

// TestFeVerbBadInput: bad files and arguments exit with status 2 and a
// positioned message, before anything is written.
func TestFeVerbBadInput(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.toml")
	require.NoError(t, os.WriteFile(bad, []byte("[[bellows]]\nmaterial = \"petg\"\nouter_diameter_mm = \"wide\"\n"), 0o644))
	taken := filepath.Join(dir, "taken")
	require.NoError(t, os.Mkdir(taken, 0o755))
	geo := examples + "boom-geometry.toml"
	cases := []struct {
		args []string
		msg  string
	}{
		{[]string{}, "expected one design file, got 0"},
		{[]string{geo, geo}, "expected one design file, got 2"},
		{[]string{filepath.Join(dir, "missing.toml")}, "missing.toml"},
		{[]string{bad}, bad + ":3:"},
		{[]string{examples + "boom-measured.toml"}, "no bellows has geometry"},
		{[]string{geo, "-bellows", "5"}, "-bellows: 5 is out of range"},
		{[]string{examples + "boom-measured.toml", "-bellows", "1"}, "bellows 1 has measured stiffness"},
		{[]string{geo, "-calibration", filepath.Join(dir, "cal.toml")}, "-calibration: -bellows: the design has 2 bellows with geometry"},
		{[]string{geo, "-bellows", "1", "-calibration", filepath.Join(dir, "no", "cal.toml")}, "-calibration: the folder of"},
		{[]string{geo, "-o", taken}, "already exists"},
		{[]string{geo, "-mesh", "fine"}, "flag provided but not defined: -mesh"},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			before := snapshot(t, dir)
			code, out, errOut := runCLI(t, append([]string{"fe"}, c.args...)...)
			assert.Equal(t, 2, code, "stderr %q", errOut)
			assert.Empty(t, out)
			assert.Contains(t, errOut, c.msg)
			assert.Equal(t, before, snapshot(t, dir), "nothing written")
			assert.ElementsMatch(t, []string{"bad.toml", "taken"}, entries(t, dir))
		})
	}
}

// fakeCCX puts an executable script named ccx first on PATH.
func fakeCCX(t *testing.T, script string) {
	t.Helper()
	bin := t.TempDir()
	require.NoError(t, os.WriteFile(filepath.Join(bin, "ccx"), []byte("#!/bin/sh\n"+script), 0o755))
	t.Setenv("PATH", bin+string(os.PathListSeparator)+os.Getenv("PATH"))
}

// TestFeVerbCCXFails: a ccx that fails gives one line with its reason,
// exit status 1, and no run folder.
func TestFeVerbCCXFails(t *testing.T) {
	fakeCCX(t, "echo ' STEP            1'\necho ' *ERROR in e_c3d: nonpositive jacobian'\necho '   determinant in element 7'\nexit 0\n")
	dir := t.TempDir()
	code, out, errOut := runCLI(t, "fe", examples+"boom-geometry.toml", "-o", filepath.Join(dir, "run"), "-json")
	assert.Equal(t, 1, code)
	assert.Empty(t, out)
	var errs []string
	for _, l := range strings.Split(strings.TrimSuffix(errOut, "\n"), "\n") {
		if !strings.HasPrefix(l, "plica fe: ") {
			errs = append(errs, l)
		}
	}
	assert.Equal(t, []string{"plica: fe: bellows 1: ccx shell failed: *ERROR in e_c3d: nonpositive jacobian determinant in element 7 (nothing written)"}, errs)
	assert.Contains(t, errOut, "plica fe: bellows 1 (1 of 2): coarse mesh, shell model: solving axial, torsion, bending_x, bending_y\n", "progress before the failure")
	assert.Empty(t, entries(t, dir), "no run folder, no staging folder")

	// with the default folder, not even runs/ is left
	design, err := filepath.Abs(examples + "boom-geometry.toml")
	require.NoError(t, err)
	t.Chdir(dir)
	code, _, _ = runCLI(t, "fe", design)
	assert.Equal(t, 1, code)
	assert.Empty(t, entries(t, dir), "no runs/ folder")
}

// TestFeVerbInterrupt: Ctrl-C while ccx runs stops ccx, removes the
// staging folder and exits with status 130.
func TestFeVerbInterrupt(t *testing.T) {
	pidFile := filepath.Join(t.TempDir(), "pid")
	t.Setenv("PLICA_TEST_PIDFILE", pidFile)
	fakeCCX(t, "echo $$ > \"$PLICA_TEST_PIDFILE\"\nexec sleep 60\n")
	dir := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	go func() {
		// cancel once ccx is running (or after 5 s, to fail rather than hang)
		for range 500 {
			if b, err := os.ReadFile(pidFile); err == nil && len(b) > 0 {
				break
			}
			time.Sleep(10 * time.Millisecond)
		}
		cancel()
	}()
	var o, e bytes.Buffer
	done := make(chan int, 1)
	go func() {
		done <- run(ctx, []string{"fe", examples + "boom-geometry.toml", "-o", filepath.Join(dir, "run")}, &o, &e)
	}()
	select {
	case code := <-done:
		assert.Equal(t, exitInterrupt, code, "stderr %q", e.String())
	case <-time.After(time.Minute):
		t.Fatal("fe did not stop after its context was cancelled")
	}
	assert.Empty(t, o.String())
	assert.Contains(t, e.String(), "plica: fe interrupted, ccx stopped, nothing written: context canceled\n")
	assert.Empty(t, entries(t, dir), "no run folder, no staging folder")
	b, err := os.ReadFile(pidFile)
	require.NoError(t, err, "ccx was started")
	pid, err := strconv.Atoi(strings.TrimSpace(string(b)))
	require.NoError(t, err)
	assert.True(t, errors.Is(syscall.Kill(pid, 0), syscall.ESRCH), "ccx (pid %d) is gone", pid)
}

// TestFeTextFromJSON renders the tables from the JSON record of a run:
// the text and the -json output are one record.
func TestFeTextFromJSON(t *testing.T) {
	o := &feOutput{DesignFile: "d.toml", Design: "demo", Dir: "runs/d-fe", Mesh: "coarse", ConvergenceMesh: "draft", Fidelity: "strip",
		RunTime: 12.5, Skipped: []feSkipped{{Bellows: 1, Reason: "measured stiffness: no geometry to model"}}, Caution: feCaution,
		Bellows: []feBellowsOutput{{Bellows: 2, Material: "petg", Profile: "sinusoid", Winding: "revolved", RunTime: 12.4,
			Mesh:       feMesh{Name: "coarse", ConvergenceMesh: "draft", ShellElements: 3200, ShellNodes: 9640, Convolutions: 8, Measured: 4, SolidElements: 1280, ThroughWall: 8},
			Quantities: feQuantities{EIx: feRow{FE: 542495, Surrogate: 546169, RelDiff: 0.00677262, MeshChange: -0.00082}}}}}
	js, err := json.Marshal(o)
	require.NoError(t, err)
	var back feOutput
	require.NoError(t, json.Unmarshal(js, &back))
	var text bytes.Buffer
	writeFE(&text, &back)
	s := text.String()
	assert.Contains(t, s, "FE cross-check of demo (d.toml) with CalculiX\n")
	assert.Contains(t, s, "shell: 3200 S8R elements, 9640 nodes, 8 convolutions (4 measured)")
	assert.Regexp(t, `EI_x N·mm²\s+542495\s+546169\s+\+0\.68 %\s+-0\.08 %`, s)
	assert.Contains(t, s, "bellows 1: not modelled (measured stiffness: no geometry to model)")
	assert.Contains(t, s, "total run time 12.5 s")
}
