package problems

import (
	"errors"
	"flag"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

var update = flag.Bool("update", false, "rewrite the .golden files")

// TestDesignErrorsGolden checks the exact message for every malformed design
// in testdata/design-errors: each names file, line, column, key and what
// was expected. Rewrite the goldens with -update after a deliberate change.
func TestDesignErrorsGolden(t *testing.T) {
	goldenErrors(t, "testdata/design-errors/*.toml", func(f string) error { _, _, err := LoadDesign(f); return err })
}

// TestProblemErrorsGolden does the same for malformed problem files.
func TestProblemErrorsGolden(t *testing.T) {
	goldenErrors(t, "testdata/problem-errors/*.toml", func(f string) error { _, err := LoadProblem(f); return err })
}

// goldenErrors loads every file matching pattern, expects an input error,
// and compares its text with the .golden file beside it (rewrite with
// -update); every line must name file:line:col.
func goldenErrors(t *testing.T, pattern string, load func(string) error) {
	files, err := filepath.Glob(pattern)
	require.NoError(t, err)
	require.NotEmpty(t, files)
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			err := load(f)
			require.Error(t, err, "design %s must be rejected", f)
			assert.True(t, IsInputError(err), "design %s: error must be an input error, got %T", f, err)
			got := err.Error() + "\n"
			golden := strings.TrimSuffix(f, filepath.Ext(f)) + ".golden"
			if *update {
				require.NoError(t, os.WriteFile(golden, []byte(got), 0o644))
			}
			want, err := os.ReadFile(golden)
			require.NoError(t, err, "missing golden for %s (run go test ./problems -update)", f)
			assert.Equal(t, string(want), got, "error message for %s", f)
			for _, line := range strings.Split(strings.TrimSpace(got), "\n") {
				assert.Regexp(t, `^`+regexp.QuoteMeta(filepath.Dir(f))+`/[a-z0-9-]+\.[a-z]+:\d+:\d+: `, line, "every line names file:line:col (%s)", f)
			}
		})
	}
}

func TestShippedDesignsLoad(t *testing.T) {
	for _, f := range []string{"examples/boom-geometry.toml", "examples/boom-measured.toml"} {
		d, _, err := LoadDesign(f)
		require.NoError(t, err, "shipped design %s", f)
		require.Len(t, d.Bellows, 2, "shipped design %s", f)
		_, st, err := d.Robot()
		require.NoError(t, err, "shipped design %s", f)
		for i, s := range st {
			assert.Greater(t, s.EI[0][0], 0.0, "%s bellows %d EI_x", f, i+1)
			assert.Greater(t, s.GJ, 0.0, "%s bellows %d GJ", f, i+1)
		}
	}
}

// TestMeasuredUnits checks the unit conversion of the measured form: the
// keys the test harnesses depend on, converted to SI.
func TestMeasuredUnits(t *testing.T) {
	d, _, err := LoadDesign("examples/boom-measured.toml")
	require.NoError(t, err)
	b := d.Bellows[0]
	require.NotNil(t, b.Measured)
	assert.InDelta(t, 0.350, b.StraightLength, 1e-12, "straight_length_mm = 350")
	assert.InDelta(t, 0.100, b.CurvedLength, 1e-12, "curved_length_mm = 100")
	assert.Equal(t, [2]float64{0, 10}, b.Precurvature, "precurvature_per_m = 10 bends toward own +x: u* = (0, κ)")
	assert.InDelta(t, 1.0, b.Measured.EI[0], 1e-12, "1e6 N·mm² = 1 N·m²")
	assert.InDelta(t, 50.0, b.Measured.GJ, 1e-9, "5e7 N·mm² = 50 N·m²")
	assert.InDelta(t, 0.05, b.Measured.LinearDensity, 1e-15, "kg/m unchanged")
}

func TestGeometryUnits(t *testing.T) {
	d, _, err := LoadDesign("examples/boom-geometry.toml")
	require.NoError(t, err)
	m := d.Bellows[1].Model
	require.NotNil(t, m)
	assert.InDelta(t, 0.030, m.OuterDiameter, 1e-12, "outer_diameter_mm")
	assert.InDelta(t, 0.0006, m.Wall, 1e-12, "wall_mm")
	assert.Equal(t, surrogate.Sinusoid, m.Profile)
	want, ok := surrogate.LookupMaterial("petg")
	require.True(t, ok)
	assert.Equal(t, want, m.Material)
}

func TestErrorsAreCollected(t *testing.T) {
	_, _, err := LoadDesign("testdata/design-errors/many-errors.toml")
	var es Errors
	require.True(t, errors.As(err, &es), "many-errors.toml gives an Errors list, got %T", err)
	assert.GreaterOrEqual(t, len(es), 3, "every problem reported at once")
}

func TestLocator(t *testing.T) {
	text := "name = \"x\"\n[[bellows]]\n  wall_mm = 1\n[[bellows]]\nwall_mm = 2 # c\nlim = { min = 1, max = 2 }\n[load]\npayload_g = 3\n"
	l := newLocator(text)
	assert.Equal(t, position{1, 1}, l.find("name"))
	assert.Equal(t, position{3, 3}, l.find("bellows[1].wall_mm"))
	assert.Equal(t, position{5, 1}, l.find("bellows[2].wall_mm"))
	assert.Equal(t, position{6, 18}, l.find("bellows[2].lim.max"))
	assert.Equal(t, position{8, 1}, l.find("load.payload_g"))
	assert.Equal(t, position{7, 1}, l.find("load.missing"), "falls back to the table header")
}

// TestPhysicsErrorWording: a kinematics failure that belongs to no single
// bellows is reported at the bellows header in the files' words, without
// a package prefix.
func TestPhysicsErrorWording(t *testing.T) {
	r := &reader{file: "d.toml", loc: newLocator("[[bellows]]\nwall_mm = 1.0\n")}
	err := r.physicsError(errors.New("tube 1 (innermost): torsional stiffness GJ 0 N·m² (expected finite, > 0)"))
	assert.EqualError(t, err, "d.toml:1:1: bellows: bellows 1 (innermost): torsional stiffness GJ 0 N·m² (expected finite, > 0)")
}
