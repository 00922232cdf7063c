package report

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
)

// TestSagBand: equal bands over [lo, hi], the ends in the first and last.
func TestSagBand(t *testing.T) {
	for _, c := range []struct {
		s    float64
		want int
	}{{0, 0}, {0.99, 0}, {1, 1}, {4.99, 4}, {5, 4}, {-1, 0}, {7, 4}} {
		assert.Equal(t, c.want, sagBand(c.s, 0, 5, 5), "band of %g over [0, 5]", c.s)
	}
	assert.Equal(t, 0, sagBand(3, 3, 3, 5), "a single value: one band")
	// band edges 1.27, 1.272, ... need 4 digits; wide bands keep 3
	assert.Equal(t, 4, sagDigits(1.28e-3, 0.002e-3))
	assert.Equal(t, 3, sagDigits(5e-3, 1e-3))
	assert.Equal(t, 3, sagDigits(0, 0))
}

// TestTipSagFigure: on the shipped geometry every tip the workspace figure
// draws is drawn once per view, in one of the bands' colours; on the
// straight cantilever the map's range is the handbook sag δ = 2.2617 mm
// (Roark's Formulas for Stress and Strain, 7th ed., Table 8.1, cases 1a and
// 2a; the linear estimate is that formula), at every tip.
func TestTipSagFigure(t *testing.T) {
	d, sc := loadRobot(t, "boom-geometry.toml")
	robot, _, err := d.Robot()
	require.NoError(t, err)
	fig, err := TipSagFigure("sag.svg", "Sag", robot, sc.Workspace, sc.Load)
	require.NoError(t, err)
	tips, err := figureTips(robot, sc.Workspace, MaxWorkspacePoints)
	require.NoError(t, err)
	els := parseSVG(t, fig.SVG)
	n, used := 0, 0
	for b := range SagBands {
		if c := countGlyphs(els, sagColor(b)); c > 0 {
			n += c
			used++ // its legend entry draws one glyph more
		}
	}
	assert.Greater(t, used, 1, "a curved pair sags differently over its workspace")
	assert.Equal(t, 2*len(tips), n-used, "every tip of the workspace figure in both views")
	assert.Equal(t, 1, countGlyphs(els, baseColor), "the base")

	cd, csc, err := problems.LoadDesign(cantileverDesign)
	require.NoError(t, err)
	crobot, _, err := cd.Robot()
	require.NoError(t, err)
	_, sags, err := objective.WorkspaceSags(crobot, csc.Workspace, csc.Load)
	require.NoError(t, err)
	for _, s := range sags {
		assert.InEpsilon(t, 2.2617e-3, s, 2e-3, "cantilever sag (handbook)")
	}
	cfig, err := TipSagFigure("sag.svg", "Sag", crobot, csc.Workspace, csc.Load)
	require.NoError(t, err)
	assert.Contains(t, cfig.Caption, "from 2.26 mm (blue) to 2.26 mm (red)")
}
