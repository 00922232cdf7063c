package export

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// needTool skips a test when the Debian tool is not on PATH, or fails it
// when PLICA_REQUIRE_MESHTOOLS=1 (.ci/run installs admesh and
// prusa-slicer).
func needTool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("PLICA_REQUIRE_MESHTOOLS") == "1" {
			t.Fatalf("%s is required (PLICA_REQUIRE_MESHTOOLS=1) but not on PATH", name)
		}
		t.Skipf("%s not on PATH", name)
	}
	return p
}

func smallBellowsSTL(t *testing.T) (string, Mesh) {
	g := surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 4.5e-3, Wall: 0.45e-3, Profile: surrogate.Sinusoid}
	m, _, err := Bellows(g, 9e-3, 3e-3, 64)
	require.NoError(t, err)
	return writeSTL(t, m), m
}

func smallJigSTL(t *testing.T) (string, Mesh) {
	m, err := Jig(JigPath{Handle: 0.03, Radius: 0.05, Arc: 0.06, Tip: 0.005}, 0.01, 48)
	require.NoError(t, err)
	return writeSTL(t, m), m
}

func writeSTL(t *testing.T, m Mesh) string {
	var buf bytes.Buffer
	require.NoError(t, m.WriteSTL(&buf, "plica test"))
	f := filepath.Join(t.TempDir(), "b.stl")
	require.NoError(t, os.WriteFile(f, buf.Bytes(), 0o644))
	return f
}

// admesh, a general-purpose STL checker (Debian package admesh), finds
// no disconnected facets and the same volume (float32 vertices: 1e-5), for
// a bellows and a heat-setting jig.
func TestAdmeshAgrees(t *testing.T) {
	tool := needTool(t, "admesh")
	f, m := smallBellowsSTL(t)
	admeshAgrees(t, tool, f, m)
	f, m = smallJigSTL(t)
	admeshAgrees(t, tool, f, m)
	g := surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 4.5e-3, Wall: 0.45e-3, Profile: surrogate.Sinusoid, SpineWidth: 5e-3}
	m, _, err := Bellows(g, 9e-3, 3e-3, 64)
	require.NoError(t, err)
	admeshAgrees(t, tool, writeSTL(t, m), m)
}

func admeshAgrees(t *testing.T, tool, f string, m Mesh) {
	out, err := exec.Command(tool, f).CombinedOutput()
	require.NoError(t, err, string(out))
	dis := regexp.MustCompile(`Total disconnected facets\s*:\s*(\d+)`).FindSubmatch(out)
	require.NotNil(t, dis, string(out))
	assert.Equal(t, "0", string(dis[1]))
	vol := regexp.MustCompile(`Volume\s*:\s*([0-9.eE+-]+)`).FindSubmatch(out)
	require.NotNil(t, vol, string(out))
	v, err := strconv.ParseFloat(string(vol[1]), 64)
	require.NoError(t, err)
	assert.InEpsilon(t, m.Volume(), v, 1e-5)
}

// prusa-slicer (Debian package prusa-slicer) slices the exported bellows
// without error, and for a solid slice (a thick plain tube at 100 %
// rectilinear infill, no skirt) its filament volume agrees with the mesh
// volume within 5 %: extrusion widths and the first-layer squish make the
// slicer's figure an estimate, not an integral of the mesh.
func TestPrusaSlicerSlices(t *testing.T) {
	if testing.Short() {
		t.Skip("slicing takes seconds; not in -short")
	}
	tool := needTool(t, "prusa-slicer")
	slice := func(f string) float64 {
		g := filepath.Join(t.TempDir(), "out.gcode")
		out, err := exec.Command(tool, "--export-gcode", "--fill-density", "100%", "--fill-pattern", "rectilinear",
			"--skirts", "0", "--output", g, f).CombinedOutput()
		require.NoError(t, err, string(out))
		gc, err := os.ReadFile(g)
		require.NoError(t, err)
		mm := regexp.MustCompile(`; filament used \[cm3\] = ([0-9.]+)`).FindSubmatch(gc)
		require.NotNil(t, mm)
		v, err := strconv.ParseFloat(string(mm[1]), 64)
		require.NoError(t, err)
		return v * 1e3
	}
	f, _ := smallBellowsSTL(t)
	assert.Greater(t, slice(f), 0.0)
	f, _ = smallJigSTL(t)
	assert.Greater(t, slice(f), 0.0, "the jig slices too")
	tube, err := Revolve(Section{{8, 0}, {11, 0}, {11, 10}, {8, 10}}, 128)
	require.NoError(t, err)
	var buf bytes.Buffer
	require.NoError(t, tube.WriteSTL(&buf, "plica tube"))
	tf := filepath.Join(t.TempDir(), "tube.stl")
	require.NoError(t, os.WriteFile(tf, buf.Bytes(), 0o644))
	sv := slice(tf)
	t.Logf("tube: mesh %.1f mm³, slicer %.1f mm³", tube.Volume(), sv)
	assert.InEpsilon(t, tube.Volume(), sv, 0.05)
}
