package export

import (
	"bytes"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestFilamentLength: a metre of 1.75 mm filament holds π·0.875²·1000 =
// 2405.28 mm³ (cylinder volume, common practice), and of 2.85 mm filament
// 6379.40 mm³.
func TestFilamentLength(t *testing.T) {
	assert.InDelta(t, 1, FilamentLength(2405.28e-9, 1.75e-3), 1e-5) // volumes rounded to 0.01 mm³
	assert.InDelta(t, 1, FilamentLength(6379.40e-9, 2.85e-3), 1e-5)
	assert.InDelta(t, 2*FilamentLength(1e-6, 1.75e-3), FilamentLength(2e-6, 1.75e-3), 1e-15, "linear in the volume")
}

func TestPerimeters(t *testing.T) {
	for _, c := range []struct {
		wall, line float64
		n          int
	}{{0.45, 0.45, 1}, {0.5, 0.45, 1}, {0.9, 0.45, 2}, {0.2, 0.45, 1}, {1.2, 0.4, 3}} {
		n, lw := Perimeters(c.wall, c.line)
		assert.Equal(t, c.n, n, "wall %g, line %g", c.wall, c.line)
		assert.InDelta(t, c.wall, float64(n)*lw, 1e-15, "the lines make the wall")
	}
}

// TestPrintSheet: the sheet carries the settings, the filament length per
// part from FilamentLength, a failed check and the cautions; a wall off a
// whole number of lines by more than PerimeterTolerance is warned about.
func TestPrintSheet(t *testing.T) {
	s := PrintSheet{Design: "d.toml", Process: "fff", NozzleMM: 0.4, LineWidthMM: 0.45, LayerHeightMM: 0.2,
		OverhangDeg: 45, MinWallMM: 0.45, FilamentMM: 1.75,
		Parts: []PrintPart{{File: "bellows-1.stl", VolumeMM3: 2405.28, MassG: 3, Orientation: "upright", WallMM: 0.7},
			{File: "jig-1.stl", VolumeMM3: 4810.56, MassG: 6, Orientation: "flat"}},
		Checks: []PrintCheck{{Name: "overhang[1]", Value: 50, Limit: 45, Unit: "deg", Max: true, Pass: false, Note: "wall angle from vertical"}}}
	var buf bytes.Buffer
	require.NoError(t, s.Write(&buf))
	out := buf.String()
	for _, want := range []string{"line width      0.45 mm", "1.000", "2.000", "overhang[1]  FAIL  50 deg <= 45 deg",
		"wall 0.7 mm = 1.56 line widths: 2 perimeter(s)", "set the line width to 0.35 mm", "qualified person"} {
		assert.Contains(t, out, want)
	}
	assert.False(t, math.IsNaN(FilamentLength(0, 1.75e-3)))
}
