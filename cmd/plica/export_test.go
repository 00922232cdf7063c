package main

import (
	"bytes"
	"encoding/binary"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"plica/problems"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestExportWritesClosedSTLAndJSON exports the shipped geometry design at a
// coarse resolution: every file is a binary STL of 84 + 50·count bytes
// (common practice), its height is the convolutions plus both collars,
// and a second export gives the same bytes.
func TestExportWritesClosedSTLAndJSON(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	for _, d := range []string{a, b} {
		code, _, errOut := runCLI(t, "export", examples+"boom-geometry.toml", "-o", d, "-segments", "24", "-collar-mm", "4")
		require.Equal(t, 0, code, errOut)
	}
	js, err := os.ReadFile(filepath.Join(a, "export.json"))
	require.NoError(t, err)
	var out exportOutput
	require.NoError(t, json.Unmarshal(js, &out))
	require.NotEmpty(t, out.Parts)
	for _, p := range out.Parts {
		x, err := os.ReadFile(filepath.Join(a, p.File))
		require.NoError(t, err)
		y, err := os.ReadFile(filepath.Join(b, p.File))
		require.NoError(t, err)
		assert.Equal(t, x, y, "deterministic bytes")
		require.Len(t, x, 84+50*p.Triangles)
		assert.Equal(t, uint32(p.Triangles), binary.LittleEndian.Uint32(x[80:84]))
		assert.InDelta(t, float64(p.Convolutions)*p.PitchMM+2*4, p.BoxMaxMM[2]-p.BoxMinMM[2], 1e-6)
		assert.InDelta(t, 0, p.BoxMinMM[2], 1e-9)
		assert.Greater(t, p.VolumeMM3, 0.0)
	}
}

// TestExportRefusesBadInput: status 2, one line, nothing written.
func TestExportRefusesBadInput(t *testing.T) {
	dir := t.TempDir()
	full := filepath.Join(dir, "full")
	require.NoError(t, os.MkdirAll(full, 0o755))
	require.NoError(t, os.WriteFile(filepath.Join(full, "x"), []byte("x"), 0o644))
	for name, args := range map[string][]string{
		"non-empty -o": {"export", examples + "boom-geometry.toml", "-o", full},
		"segments":     {"export", examples + "boom-geometry.toml", "-o", filepath.Join(dir, "s"), "-segments", "100000"},
		"collar":       {"export", examples + "boom-geometry.toml", "-o", filepath.Join(dir, "c"), "-collar-mm", "-1"},
		"no -o":        {"export", examples + "boom-geometry.toml"},
		"clearance":    {"export", examples + "boom-geometry.toml", "-o", filepath.Join(dir, "j"), "-jig-clearance-mm", "-1"},
		"filament":     {"export", examples + "boom-geometry.toml", "-o", filepath.Join(dir, "f"), "-filament-mm", "0"},
		"no rod left":  {"export", examples + "boom-geometry.toml", "-o", filepath.Join(dir, "k"), "-jig-clearance-mm", "7"},
		"missing file": {"export", filepath.Join(dir, "none.toml"), "-o", filepath.Join(dir, "m")},
	} {
		code, _, errOut := runCLI(t, args...)
		assert.Equal(t, 2, code, name)
		assert.Equal(t, 1, bytes.Count([]byte(errOut), []byte("\n")), "%s: one line, got %q", name, errOut)
	}
	ents, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, ents, 1, "only the pre-made folder remains")
}

// TestExportBenchPlan: bench.csv is read by the calibrate reader (every
// deflection_mm empty: nothing measured yet), holds five loads per bellows
// and direction, and its predictions are the linear cantilever deflection
// δ = PL³/(3EI) (Roark, Formulas for Stress and Strain, Table 8.1 case 1a)
// with the design's own EI and the printed convolution length; with a
// [scatter] table the 5–95 % band brackets the nominal value.
func TestExportBenchPlan(t *testing.T) {
	dir := t.TempDir()
	src, err := os.ReadFile(examples + "boom-geometry.toml")
	require.NoError(t, err)
	scattered := filepath.Join(dir, "scattered.toml")
	require.NoError(t, os.WriteFile(scattered, append(src, []byte("\n[scatter]\nmodulus_pct = 5\nwall_pct = 3\nsamples = 200\n")...), 0o644))
	d, _, err := problems.LoadDesign(examples + "boom-geometry.toml")
	require.NoError(t, err)
	st, err := d.Stiffness()
	require.NoError(t, err)
	for _, c := range []struct {
		design string
		banded bool
	}{{examples + "boom-geometry.toml", false}, {scattered, true}} {
		out := filepath.Join(dir, fmt.Sprintf("out-%v", c.banded))
		code, _, errOut := runCLI(t, "export", c.design, "-o", out, "-segments", "12")
		require.Equal(t, 0, code, errOut)
		data, err := os.ReadFile(filepath.Join(out, "bench.csv"))
		require.NoError(t, err)
		_, err = problems.ParseBench(data, "bench.csv")
		require.ErrorContains(t, err, "no measurements: every deflection_mm cell is empty", "the reader takes the plan")
		cr := csv.NewReader(bytes.NewReader(data))
		cr.Comment = '#'
		recs, err := cr.ReadAll()
		require.NoError(t, err)
		head := recs[0]
		require.Equal(t, []string{"specimen", "direction", "free_length_mm", "load_g", "deflection_mm", "predicted_deflection_mm"}, head[:6])
		if c.banded {
			require.Equal(t, []string{"predicted_p5_mm", "predicted_p95_mm"}, head[6:])
		} else {
			require.Len(t, head, 6)
		}
		require.Len(t, recs, 1+len(d.Bellows)*2*5)
		for _, r := range recs[1:] {
			var i, axis int
			_, err := fmt.Sscanf(r[0], "bellows-%d", &i)
			require.NoError(t, err)
			if r[1] == "y" {
				axis = 1
			}
			l, _ := strconv.ParseFloat(r[2], 64)
			g, _ := strconv.ParseFloat(r[3], 64)
			pred, _ := strconv.ParseFloat(r[5], 64)
			b := d.Bellows[i-1]
			assert.InDelta(t, math.Round((b.StraightLength+b.CurvedLength)/b.Model.Pitch)*b.Model.Pitch*1e3, l, 1e-9, "free length: the printed convolutions")
			ei := st[i-1].EI[axis][axis] * 1e6 // N·mm²
			want := g * 9.80665e-3 * l * l * l / (3 * ei)
			if g == 0 {
				assert.Zero(t, pred, "row %v: no load, no deflection", r)
			} else {
				assert.InEpsilon(t, want, pred, 1e-5, "row %v: δ = PL³/(3EI)", r) // 6 printed digits
			}
			assert.LessOrEqual(t, pred, 0.1*l*(1+1e-5), "row %v: small-deflection range", r)
			assert.Empty(t, r[4], "measured column left empty")
			if c.banded && g > 0 {
				lo, _ := strconv.ParseFloat(r[6], 64)
				hi, _ := strconv.ParseFloat(r[7], 64)
				assert.Less(t, lo, pred, "row %v: 5 %% below nominal", r)
				assert.Greater(t, hi, pred, "row %v: 95 %% above nominal", r)
			}
		}
	}
}

// TestExportJig: each pre-curved bellows gets a heat-setting rod whose
// centreline radius is 1/(κ0·setting_overbend) and whose arc covers the
// curved length; the rod is the bore less twice the clearance, and its
// volume is Pappus' (area × centreline length: the cylinder on the
// straight parts, the torus section on the arc) within the k-gon and chord
// factors (results/export/REFERENCE.md §1, §4).
func TestExportJig(t *testing.T) {
	dir := t.TempDir()
	design := boomVariant(t, dir, "overbent.toml", "precurvature_per_m = 4.0", "precurvature_per_m = 4.0\nsetting_overbend = 1.25")
	out := filepath.Join(dir, "o")
	code, _, errOut := runCLI(t, "export", design, "-o", out, "-segments", "32", "-collar-mm", "5", "-jig-clearance-mm", "0.25")
	require.Equal(t, 0, code, errOut)
	js, err := os.ReadFile(filepath.Join(out, "export.json"))
	require.NoError(t, err)
	var res exportOutput
	require.NoError(t, json.Unmarshal(js, &res))
	require.Len(t, res.Parts, 2)
	for i, want := range []struct{ radius, overbend, od, depth, wall float64 }{{200, 1.25, 20, 3, 0.5}, {1000 / 1.3, 1, 30, 3, 0.6}} {
		j := res.Parts[i].Jig
		require.NotNil(t, j, "bellows %d is pre-curved", i+1)
		assert.InEpsilon(t, want.radius, j.RadiusMM, 1e-12, "bellows %d: 1/(κ0·overbend)", i+1)
		assert.Equal(t, want.overbend, j.SettingOverbend)
		assert.InEpsilon(t, 100/want.radius*180/math.Pi, j.ArcDeg, 1e-12, "bellows %d: arc over the curved length", i+1)
		assert.InDelta(t, want.od-2*want.depth-2*want.wall-0.5, j.RodDiameterMM, 0.01, "bellows %d: bore less 2 × clearance", i+1) // the mesh bore: a few µm of miter at the root vertex (TestBore)
		assert.InDelta(t, 40+5+150, j.HandleMM, 1e-9, "grip + collar + straight length")
		x, err := os.ReadFile(filepath.Join(out, j.File))
		require.NoError(t, err)
		require.Len(t, x, 84+50*j.Triangles, "binary STL layout")
		a := j.RodDiameterMM / 2
		pappus := math.Pi * a * a * (j.HandleMM + 100 + 5)
		assert.InDelta(t, 1, j.VolumeMM3/pappus, 1-math.Pow(math.Sin(2*math.Pi/32)/(2*math.Pi/32), 2), "bellows %d: Pappus", i+1)
	}
}

// TestExportPrintSheet: print.txt names every part with its filament
// length volume/(π d²/4) for the -filament-mm diameter (cylinder volume,
// common practice), the design's printer settings and the evaluator's
// printability checks, and the cautions.
func TestExportPrintSheet(t *testing.T) {
	out := filepath.Join(t.TempDir(), "o")
	code, _, errOut := runCLI(t, "export", examples+"boom-geometry.toml", "-o", out, "-segments", "16", "-filament-mm", "2.85")
	require.Equal(t, 0, code, errOut)
	txt, err := os.ReadFile(filepath.Join(out, "print.txt"))
	require.NoError(t, err)
	js, err := os.ReadFile(filepath.Join(out, "export.json"))
	require.NoError(t, err)
	var res exportOutput
	require.NoError(t, json.Unmarshal(js, &res))
	sheet := string(txt)
	assert.Contains(t, res.Files, "print.txt")
	for _, p := range res.Parts {
		for _, f := range []struct {
			file string
			vol  float64
		}{{p.File, p.VolumeMM3}, {p.Jig.File, p.Jig.VolumeMM3}} {
			metres := f.vol / (math.Pi * 2.85 * 2.85 / 4) / 1000
			assert.Regexp(t, regexp.MustCompile(regexp.QuoteMeta(f.file)+`\s+`+fmt.Sprintf("%.1f", f.vol)+`\s+[0-9.]+\s+`+fmt.Sprintf("%.3f", metres)), sheet, "%s: volume and filament", f.file)
		}
	}
	for _, want := range []string{"line width      0.45 mm", "layer height    0.2 mm", "overhang limit  45°", "filament        2.85 mm",
		"overhang[1]", "wall[2]", "layer_height", "qualified person", "model estimate"} {
		assert.Contains(t, sheet, want)
	}
}

// TestExportHelicalWithSpine: a helical bellows with a spine is meshed
// (the surrogate models the combination, surrogate/REFERENCE.md §2.7),
// 2·collar + (n+2)·pitch high with its two run-out turns, and export.json
// gives the thread and the spine with units in the key names; the spine's
// arc is its width over the mean radius (surrogate/REFERENCE.md §2.8);
// the jig's tip and handle also cover the run-outs.
func TestExportHelicalWithSpine(t *testing.T) {
	dir := t.TempDir()
	design := boomVariant(t, dir, "helical.toml", "wall_mm = 0.5\n", "wall_mm = 0.5\nwinding = \"helical\"\nspine_width_mm = 4\nspine_angle_deg = 90\n")
	out := filepath.Join(dir, "o")
	code, _, errOut := runCLI(t, "export", design, "-o", out, "-segments", "24", "-collar-mm", "4")
	require.Equal(t, 0, code, errOut)
	js, err := os.ReadFile(filepath.Join(out, "export.json"))
	require.NoError(t, err)
	var res exportOutput
	require.NoError(t, json.Unmarshal(js, &res))
	require.Len(t, res.Parts, 2)
	h := res.Parts[0]
	assert.Equal(t, "helical", h.Winding)
	require.NotNil(t, h.Helix)
	assert.Equal(t, 10.0, h.Helix.LeadMM, "lead = pitch")
	assert.Equal(t, 10.0, h.Helix.RunoutMM)
	assert.Equal(t, 25, h.Helix.FullTurns)
	assert.InDelta(t, 2*4+27*10, h.BoxMaxMM[2]-h.BoxMinMM[2], 1e-6)
	assert.InDelta(t, h.Helix.HeightMM, h.BoxMaxMM[2], 1e-6)
	require.NotNil(t, h.Spine)
	rm := (20 - 0.5 - 3) / 2.0 // mean radius, mm (surrogate.Geometry.MeanRadius)
	assert.InDelta(t, 4, h.Spine.WidthMM, 1e-12)
	assert.InDelta(t, 90, h.Spine.AngleDeg, 1e-12)
	assert.InDelta(t, rm, h.Spine.RadiusMM, 1e-12)
	assert.InDelta(t, 4/rm*180/math.Pi, h.Spine.ArcDeg, 1e-9)
	assert.InDelta(t, 0.5, h.Spine.WallMM, 1e-12)
	assert.Equal(t, "revolved", res.Parts[1].Winding, "the outer bellows is unchanged")
	assert.Nil(t, res.Parts[1].Helix)
	assert.Nil(t, res.Parts[1].Spine)
	assert.InDelta(t, 40+4+10+150, h.Jig.HandleMM, 1e-9, "grip + collar + run-out + straight length")
	x, err := os.ReadFile(filepath.Join(out, h.File))
	require.NoError(t, err)
	require.Len(t, x, 84+50*h.Triangles, "binary STL layout")
	bench, err := os.ReadFile(filepath.Join(out, "bench.csv"))
	require.NoError(t, err)
	assert.Contains(t, string(bench), "run-out", "the bench plan says what its free length leaves out")
}

// boomVariant writes the shipped geometry design with its first old
// replaced by new as dir/name and returns the path.
func boomVariant(t *testing.T, dir, name, old, new string) string {
	t.Helper()
	src, err := os.ReadFile(examples + "boom-geometry.toml")
	require.NoError(t, err)
	text := strings.Replace(string(src), old, new, 1)
	require.NotEqual(t, string(src), text)
	design := filepath.Join(dir, name)
	require.NoError(t, os.WriteFile(design, []byte(text), 0o644))
	return design
}
