package export

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
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

func smallHelicalSTL(t *testing.T) (string, Mesh) {
	g := surrogate.Geometry{OuterDiameter: 20e-3, Depth: 3e-3, Pitch: 4.5e-3, Wall: 0.45e-3, Profile: surrogate.Sinusoid, Helical: true}
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
// a bellows, a heat-setting jig, a spined bellows and helical bellows with
// and without a spine.
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
	f, m = smallHelicalSTL(t)
	admeshAgrees(t, tool, f, m)
	g.Helical = true
	m, _, err = Bellows(g, 9e-3, 3e-3, 64)
	require.NoError(t, err)
	admeshAgrees(t, tool, writeSTL(t, m), m)
	u := surrogate.Geometry{OuterDiameter: 24e-3, Depth: 4e-3, Pitch: 8e-3, Wall: 0.6e-3, Profile: surrogate.UShape, CrestRadius: 2e-3, Helical: true}
	m, _, err = Bellows(u, 16e-3, 3e-3, 64)
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

// sliceGcode runs prusa-slicer's command-line G-code export on the file
// with the extra settings (no skirt) and returns the G-code.
func sliceGcode(t *testing.T, tool, f string, args ...string) []byte {
	t.Helper()
	g := filepath.Join(t.TempDir(), "out.gcode")
	cmd := append([]string{"--export-gcode", "--skirts", "0"}, args...)
	out, err := exec.Command(tool, append(cmd, "--output", g, f)...).CombinedOutput()
	require.NoError(t, err, string(out))
	gc, err := os.ReadFile(g)
	require.NoError(t, err)
	return gc
}

// prusa-slicer (Debian package prusa-slicer) slices the exported bellows,
// revolved and helical, and the jig without error, and for a solid slice
// (100 % rectilinear infill, no skirt) of a thick plain tube and of the
// jig's rod its extruded filament volume agrees with the mesh volume
// within 5 %: extrusion widths and the first-layer squish make the
// slicer's figure an estimate, not an integral of the mesh (it came out
// +4.5 % for the tube, +1.4 % for the rod; the rod lies on the bed on a
// line, and its lower half prints over air without support, which a
// slicer still extrudes).
func TestPrusaSlicerSlices(t *testing.T) {
	if testing.Short() {
		t.Skip("slicing takes seconds; not in -short")
	}
	tool := needTool(t, "prusa-slicer")
	solid := []string{"--fill-density", "100%", "--fill-pattern", "rectilinear"}
	f, _ := smallBellowsSTL(t)
	assert.Greater(t, parseGcode(sliceGcode(t, tool, f, solid...)).filament, 0.0)
	f, _ = smallHelicalSTL(t)
	assert.Greater(t, parseGcode(sliceGcode(t, tool, f, solid...)).filament, 0.0, "the helical bellows slices")
	f, jig := smallJigSTL(t)
	jv := parseGcode(sliceGcode(t, tool, f, solid...)).filament
	t.Logf("jig: mesh %.1f mm³, slicer %.1f mm³", jig.Volume(), jv)
	assert.InEpsilon(t, jig.Volume(), jv, 0.05, "the jig's rod, solid")
	tube, err := Revolve(Section{{8, 0}, {11, 0}, {11, 10}, {8, 10}}, 128)
	require.NoError(t, err)
	sv := parseGcode(sliceGcode(t, tool, writeSTL(t, tube), solid...)).filament
	t.Logf("tube: mesh %.1f mm³, slicer %.1f mm³", tube.Volume(), sv)
	assert.InEpsilon(t, tube.Volume(), sv, 0.05)
}

// TestPrusaSlicerThinWall explains why the slicer's filament volume for a
// thin wall falls about 10 % short of the mesh volume at its default
// settings. The slicer extrudes a line of width w and height h with the
// cross-section of a rectangle with semicircular sides, (w − h)·h +
// π·h²/4 (from memory: the slicer's flow model; the test checks it on the
// G-code it writes, which gives each extrusion's ;WIDTH and ;HEIGHT, to
// 0.5 %). Lines side by side are spaced by that area over h, so a region
// of horizontal width W gets (W − h·(1 − π/4))·h of plastic, whatever the
// number of lines [derived]: each contour of a layer loses a strip of
// h·(1 − π/4)/2. Over the part that is h·(1 − π/4)/2 times ∫P(z) dz, the
// contour length integrated over the height, which is the wall's area
// times the horizontal part of its unit normal (Σ over the triangles).
// For a wall of one line width that is h·(1 − π/4)/t of the volume, 14 %
// for 0.45 mm at 0.3 mm layers. The prediction V − h·(1 − π/4)/2·∫P dz
// holds the slicer's figure within 3 % (it came out within 1.2 %) for a
// thin plain tube and thin revolved and helical bellows, at the default
// 0.3 mm layers and at 0.2 mm; the shortfall against the mesh is more
// than 5 % at the defaults (9 to 15 %) and less at 0.2 mm. The first layer (0.35 mm at the defaults, wider lines) is
// taken at the layer height of the rest: part of the 3 %.
func TestPrusaSlicerThinWall(t *testing.T) {
	if testing.Short() {
		t.Skip("slicing takes seconds; not in -short")
	}
	tool := needTool(t, "prusa-slicer")
	tube, err := Revolve(Section{{9.55, 0}, {10, 0}, {10, 10}, {9.55, 10}}, 128)
	require.NoError(t, err)
	_, bellows := smallBellowsSTL(t)
	_, helix := smallHelicalSTL(t)
	for _, c := range []struct {
		name string
		m    Mesh
	}{{"thin tube", tube}, {"bellows", bellows}, {"helical bellows", helix}} {
		var prev float64
		for _, args := range [][]string{nil, {"--layer-height", "0.2", "--first-layer-height", "0.2"}} {
			gc := sliceGcode(t, tool, writeSTL(t, c.m), args...)
			s := parseGcode(gc)
			h := 0.3
			if args != nil {
				h = 0.2
			}
			require.Contains(t, string(gc), fmt.Sprintf("; layer_height = %g\n", h))
			assert.InEpsilon(t, s.rounded, s.filament, 5e-3, "%s, h = %g: the flow model", c.name, h)
			pred := c.m.Volume() - h*(1-math.Pi/4)/2*horizontalArea(c.m)
			t.Logf("%s, h = %g mm: mesh %.1f mm³, slicer %.1f mm³ (%+.1f %%), predicted %.1f mm³ (slicer %+.1f %%)",
				c.name, h, c.m.Volume(), s.filament, 100*(s.filament/c.m.Volume()-1), pred, 100*(s.filament/pred-1))
			assert.InEpsilon(t, pred, s.filament, 0.03, "%s, h = %g: the slicer against the prediction", c.name, h)
			short := 1 - s.filament/c.m.Volume()
			if args == nil {
				assert.Greater(t, short, 0.05, "%s: more than 5 %% short of the mesh at the defaults", c.name)
			} else {
				assert.Less(t, short, prev, "%s: less short at thinner layers", c.name)
			}
			prev = short
		}
	}
}

// horizontalArea is Σ over the triangles of area × |horizontal part of the
// unit normal|, mm²: ∫P(z) dz, the contour length of the horizontal
// slices integrated over the height.
func horizontalArea(m Mesh) float64 {
	s := 0.0
	for _, t := range m.T {
		a, b, c := m.V[t[0]], m.V[t[1]], m.V[t[2]]
		u := [3]float64{b[0] - a[0], b[1] - a[1], b[2] - a[2]}
		w := [3]float64{c[0] - a[0], c[1] - a[1], c[2] - a[2]}
		s += math.Hypot(u[1]*w[2]-u[2]*w[1], u[2]*w[0]-u[0]*w[2]) / 2
	}
	return s
}

// gcodeSums are the slicer's extrusions read back from its G-code.
type gcodeSums struct {
	filament float64 // extruded filament volume, mm³ (ΔE × filament area)
	rounded  float64 // Σ path length × (w·h − h²(1 − π/4)), mm³
	rect     float64 // Σ path length × w·h, mm³
	length   float64 // extruded path length, mm
	fil      float64 // the filament length the slicer reports, mm
}

// parseGcode sums the extruding moves of a G-code file in absolute E
// (M82, G92 E0 resets) with the ;WIDTH and ;HEIGHT the slicer writes for
// each extrusion. Retractions and their undoing move E without moving in
// x–y and cancel; wipes retract while moving and are left out.
func parseGcode(data []byte) gcodeSums {
	var s gcodeSums
	var x, y, e, w, h, dia float64
	for _, line := range strings.Split(string(data), "\n") {
		switch {
		case strings.HasPrefix(line, ";WIDTH:"):
			w, _ = strconv.ParseFloat(line[7:], 64)
		case strings.HasPrefix(line, ";HEIGHT:"):
			h, _ = strconv.ParseFloat(line[8:], 64)
		case strings.HasPrefix(line, "; filament_diameter = "):
			dia, _ = strconv.ParseFloat(strings.TrimSpace(line[22:]), 64)
		case strings.HasPrefix(line, "; filament used [mm] = "):
			s.fil, _ = strconv.ParseFloat(strings.TrimSpace(line[23:]), 64)
		case strings.HasPrefix(line, "G92"):
			for _, f := range strings.Fields(line)[1:] {
				if f[0] == 'E' {
					e, _ = strconv.ParseFloat(f[1:], 64)
				}
			}
		case strings.HasPrefix(line, "G1 "):
			nx, ny, ne := x, y, e
			code := line
			if i := strings.IndexByte(code, ';'); i >= 0 {
				code = code[:i]
			}
			for _, f := range strings.Fields(code)[1:] {
				v, _ := strconv.ParseFloat(f[1:], 64)
				switch f[0] {
				case 'X':
					nx = v
				case 'Y':
					ny = v
				case 'E':
					ne = v
				}
			}
			l := math.Hypot(nx-x, ny-y)
			if de := ne - e; de > 0 && l > 0 {
				s.filament += de
				s.length += l
				s.rounded += l * (w*h - h*h*(1-math.Pi/4))
				s.rect += l * w * h
			}
			x, y, e = nx, ny, ne
		}
	}
	a := math.Pi * dia * dia / 4
	s.filament *= a
	return s
}
