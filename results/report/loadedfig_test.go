package report

import (
	"regexp"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/problems"
)

// dashPattern matches a dashed stroke in an SVG style.
var dashPattern = regexp.MustCompile(`stroke-dasharray:\s*[0-9.]`)

// cantileverDesign is the straight measured cantilever the tests of
// cmd/plica and results/report share: EI = 1 N·m², L = 0.3 m,
// m' = 0.05 kg/m, payload 20 g, gravity across it.
const cantileverDesign = "../../testdata/cantilever.toml"

// TestLoadedBackboneFigure: for the straight cantilever every rotation
// sags by δ = m_p g L³/(3EI) + m' g L⁴/(8EI) = 2.2617 mm (Roark's Formulas
// for Stress and Strain, 7th ed., Table 8.1, cases 1a and 2a; the small
// deflection formula, δ/L < 1 %, so the exact rod model agrees within
// 0.5 %, the tolerance pose -loaded is tested with), and the figure draws
// a dashed unloaded and a solid loaded backbone in both views for each,
// with the sag in its caption. Without gravity or payload, nothing sags.
func TestLoadedBackboneFigure(t *testing.T) {
	d, sc, err := problems.LoadDesign(cantileverDesign)
	require.NoError(t, err)
	robot, _, err := d.Robot()
	require.NoError(t, err)
	const delta = 2.2617e-3 // m, handbook formula above
	pairs, err := loadedBackbones(robot, sc.Workspace, sc.Load, LoadedRotations)
	require.NoError(t, err)
	require.Len(t, pairs, LoadedRotations, "a single bellows: every rotation allowed")
	for _, p := range pairs {
		assert.InEpsilon(t, delta, p.Sag, 0.005, "tip sag at %g°", p.AngleDeg)
		tip := p.Loaded[len(p.Loaded)-1].P
		assert.InEpsilon(t, -delta, tip[1], 0.005, "the tip drops along gravity (−y) at %g°", p.AngleDeg)
	}
	fig, err := LoadedBackboneFigure("loaded.svg", "Loaded", robot, sc.Workspace, sc.Load)
	require.NoError(t, err)
	assert.Contains(t, fig.Caption, "0°: 2.26 mm", "sag in the caption")
	els := parseSVG(t, fig.SVG)
	dashed := 0
	for _, e := range els {
		if e.Name == "path" && dashPattern.MatchString(e.Style) {
			dashed++
		}
	}
	assert.Equal(t, 2*LoadedRotations, dashed, "a dashed unloaded backbone per rotation and view")

	none := objective.Load{NoGravity: true}
	pairs, err = loadedBackbones(robot, sc.Workspace, none, 1)
	require.NoError(t, err)
	assert.InDelta(t, 0, pairs[0].Sag, 1e-9, "no load, no sag")
}
