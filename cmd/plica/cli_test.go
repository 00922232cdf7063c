package main

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/")

const examples = "../../problems/examples/"

func runCLI(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var o, e bytes.Buffer
	code = run(context.Background(), args, &o, &e)
	return code, o.String(), e.String()
}

// refused runs plica with args and checks that it refuses them as bad
// input: exit status 2, and want on standard error.
func refused(t *testing.T, want string, args ...string) {
	t.Helper()
	code, out, errOut := runCLI(t, args...)
	assert.Equal(t, exitUsage, code, "exit status of plica %s (stdout %q, stderr %q)", strings.Join(args, " "), out, errOut)
	assert.Contains(t, errOut, want, "stderr of plica %s", strings.Join(args, " "))
}

// TestREADMEExamples runs the commands the README shows and compares their
// output with the goldens in the top-level testdata/ (rewrite with -update).
func TestREADMEExamples(t *testing.T) {
	cases := []struct {
		golden string
		args   []string
		code   int
	}{
		{"pose-boom.golden", []string{"pose", examples + "boom-geometry.toml", "-angles-deg", "0,180"}, 0},
		{"check-boom.golden", []string{"check", examples + "boom-geometry.toml"}, 0},
		{"check-overbent.golden", []string{"check", examples + "boom-overbent.toml"}, 1},
	}
	for _, c := range cases {
		t.Run(c.golden, func(t *testing.T) {
			code, out, errOut := runCLI(t, c.args...)
			require.Equal(t, c.code, code, "exit status of plica %s (stderr %q)", strings.Join(c.args, " "), errOut)
			path := filepath.Join("../../testdata", c.golden)
			if *update {
				require.NoError(t, os.WriteFile(path, []byte(out), 0o644))
			}
			want, err := os.ReadFile(path)
			require.NoError(t, err, "golden %s (run go test ./cmd/plica -update)", path)
			assert.Equal(t, string(want), out, "output of plica %s", strings.Join(c.args, " "))
		})
	}
}

// TestPoseJSONContract checks the fixed JSON shape of pose -json on both
// shipped designs and a hand-checkable property: the measured example is a
// balanced pair (EI1·κ1 = EI2·κ2, objective/kinematics/REFERENCE.md §3.5), so at 180° relative
// rotation the whole backbone is straight and the tip sits on the axis at
// the full length (450 mm).
func TestPoseJSONContract(t *testing.T) {
	for _, f := range []string{"boom-geometry.toml", "boom-measured.toml"} {
		code, out, errOut := runCLI(t, "pose", examples+f, "-angles-deg", "0,180", "-json")
		require.Equal(t, 0, code, "pose %s: %s", f, errOut)
		var raw map[string]any
		require.NoError(t, json.Unmarshal([]byte(out), &raw), "pose %s prints JSON", f)
		tip := raw["tip"].(map[string]any)
		assert.Len(t, tip["position_mm"], 3, "%s: tip.position_mm", f)
		assert.Len(t, tip["rotation"], 3, "%s: tip.rotation rows", f)
		links := raw["links"].([]any)
		require.NotEmpty(t, links, "%s: links", f)
		for _, l := range links {
			m := l.(map[string]any)
			for _, k := range []string{"start_mm", "end_mm", "curvature_per_m"} {
				assert.Contains(t, m, k, "%s: link key", f)
			}
		}
		assert.NotEmpty(t, raw["backbone_mm"], "%s: backbone_mm", f)
	}
	_, out, _ := runCLI(t, "pose", examples+"boom-measured.toml", "-angles-deg", "0,180", "-json")
	var p poseOutput
	require.NoError(t, json.Unmarshal([]byte(out), &p))
	assert.InDelta(t, 0, p.Tip.Position[0], 1e-9, "balanced pair is straight: x")
	assert.InDelta(t, 450, p.Tip.Position[2], 1e-9, "balanced pair is straight: z = L")
	_, out, _ = runCLI(t, "pose", examples+"boom-measured.toml", "-angles-deg", "0,0", "-json")
	require.NoError(t, json.Unmarshal([]byte(out), &p))
	// aligned: both curved parts overlap over 100 mm with u = (k1κ1 + k2κ2)/(k1 + k2) = 20/3 /m
	// (objective/kinematics/REFERENCE.md §3.5, isotropic pair); the tip of a 350 mm straight part plus a 100 mm arc.
	k, l := 20.0/3, 0.1
	assert.InDelta(t, (1-math.Cos(k*l))/k*1e3, p.Tip.Position[0], 1e-9, "aligned pair: lateral tip offset")
	assert.InDelta(t, (0.35+math.Sin(k*l)/k)*1e3, p.Tip.Position[2], 1e-9, "aligned pair: axial tip position")
}

func TestCheckJSONContract(t *testing.T) {
	code, out, _ := runCLI(t, "check", "-json", examples+"boom-geometry.toml")
	require.Equal(t, 0, code)
	var raw map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &raw))
	assert.Equal(t, true, raw["pass"])
	scores := raw["scores"].(map[string]any)
	for _, k := range []string{"tip_sag_mm", "reach_mm", "bend_angle_range_deg", "residual_curvature_per_m",
		"straight_tip_offset_mm", "peak_strain", "stability_margin", "mass_g", "payload_to_weight", "task_coverage"} {
		assert.Contains(t, scores, k, "scores key")
	}
	bellows := raw["bellows"].([]any)
	require.Len(t, bellows, 2)
	for _, b := range bellows {
		m := b.(map[string]any)
		for _, k := range []string{"ei_n_mm2", "gj_n_mm2", "ea_n", "axial_rate_per_convolution_n_per_mm", "linear_density_kg_per_m", "stiffness_source"} {
			assert.Contains(t, m, k, "bellows key")
		}
		assert.Equal(t, "strip", m["stiffness_source"])
	}
	for _, c := range raw["checks"].([]any) {
		m := c.(map[string]any)
		for _, k := range []string{"name", "value", "limit", "unit", "pass"} {
			assert.Contains(t, m, k, "checks key")
		}
	}
	code, out, _ = runCLI(t, "check", "-json", examples+"boom-overbent.toml")
	assert.Equal(t, 1, code, "a failing design exits 1")
	require.NoError(t, json.Unmarshal([]byte(out), &raw))
	assert.Equal(t, false, raw["pass"])
}

func TestExitCodes(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code int
		err  string
	}{
		{"no verb", nil, 2, ""},
		{"unknown verb", []string{"fly"}, 2, `unknown verb "fly"`},
		{"help", []string{"help"}, 0, ""},
		{"verb help", []string{"pose", "-h"}, 0, ""},
		{"missing angles", []string{"pose", examples + "boom-geometry.toml"}, 2, "-angles-deg: 0 values for 2 bellows"},
		{"bad angle", []string{"pose", examples + "boom-geometry.toml", "-angles-deg", "0,x"}, 2, `"x" is not a number`},
		{"bad file", []string{"check", "../../problems/testdata/design-errors/negative-wall.toml"}, 2, "wall_mm: -0.6 is out of range"},
		{"missing file", []string{"check", "nope.toml"}, 2, "nope.toml: cannot read"},
		{"nesting", []string{"pose", examples + "boom-geometry.toml", "-angles-deg", "0,0", "-insert-mm", "0,-20"}, 2, "bellows 1 (innermost) starts at 0 mm but bellows 2 (outermost) around it at -20 mm"},
		{"tiny backbone step", []string{"pose", examples + "boom-geometry.toml", "-angles-deg", "0,0", "-step-mm", "1e-9"}, 2, "-step-mm: 1e-09 gives"},
		{"version", []string{"version"}, 0, ""},
		{"huge angle", []string{"pose", examples + "boom-geometry.toml", "-angles-deg", "1e308,0"}, 2, "-angles-deg: 1e+308 is out of range (expected angles in degrees of at most 3.6e+08 in magnitude)"},
		{"angle beyond float", []string{"pose", examples + "boom-geometry.toml", "-angles-deg", "1e400,0"}, 2, `-angles-deg: "1e400" is out of the finite range`},
		{"NaN angle", []string{"pose", examples + "boom-geometry.toml", "-angles-deg", "nan,0"}, 2, `-angles-deg: "nan" is not a finite number`},
		{"empty design name", []string{"check", ""}, 2, "check: argument 1 is an empty name (expected a path)"},
		{"empty run name", []string{"resume", ""}, 2, "resume: argument 1 is an empty name (expected a path)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, errOut := runCLI(t, c.args...)
			assert.Equal(t, c.code, code, "exit status of plica %v (stderr %q)", c.args, errOut)
			assert.Contains(t, errOut, c.err, "stderr of plica %v", c.args)
			if c.code == 2 && c.err != "" {
				assert.Equal(t, 1, strings.Count(strings.TrimSpace(errOut), "\n")+1, "one-line error for %v: %q", c.args, errOut)
			}
		})
	}
}

// TestUnknownFlag: an unknown flag prints the error once and where the
// verb's flags are listed, not the whole usage.
func TestUnknownFlag(t *testing.T) {
	for _, verb := range []string{"init", "refine", "check"} {
		code, out, errOut := runCLI(t, verb, "-bogus", "x")
		assert.Equal(t, 2, code, verb)
		assert.Empty(t, out, verb)
		assert.Equal(t, "plica: flag provided but not defined: -bogus\nplica: run \"plica help "+verb+"\" for its flags\n", errOut, verb)
	}
}

// TestHelpShowsFlags: help VERB prints the verb's flags for every verb.
func TestHelpShowsFlags(t *testing.T) {
	for name := range commands {
		code, out, errOut := runCLI(t, "help", name)
		assert.Equal(t, 0, code, "help %s (%s)", name, errOut)
		assert.Contains(t, out, "usage: plica "+name, "help %s", name)
	}
	_, out, _ := runCLI(t, "help", "search")
	assert.Contains(t, out, "-seed")
	assert.Contains(t, out, "-workers")
}
