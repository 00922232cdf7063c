package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// cantileverDesign is the straight measured cantilever the tests of
// cmd/plica and results/report share (its header gives the tip sag).
const cantileverDesign = "../../testdata/cantilever.toml"

// TestCheckJSONTaskPoints: a straight measured cantilever, EI = 1 N·m²,
// L = 0.3 m, m' = 0.05 kg/m, payload 20 g, gravity across it. A task point
// at its unloaded tip is missed on the loaded shape by the tip sag
// δ = m_p g L³/(3EI) + m' g L⁴/(8EI) = 2.2617 mm (Roark's Formulas for Stress
// and Strain, 7th ed., Table 8.1, cases 1a and 2a), minus the 1 mm
// tolerance; the same point with loaded = false is reached. check -json
// gives both in "task_points".
func TestCheckJSONTaskPoints(t *testing.T) {
	base, err := os.ReadFile(cantileverDesign)
	require.NoError(t, err)
	path := filepath.Join(t.TempDir(), "cantilever.toml")
	require.NoError(t, os.WriteFile(path, append(base, `
[[task_point]]
position_mm = [0, 0, 300]
tolerance_mm = 1.0

[[task_point]]
position_mm = [0, 0, 300]
tolerance_mm = 1.0
loaded = false
`...), 0o644))
	_, out, errOut := runCLI(t, "check", path, "-json")
	var o struct {
		TaskPoints []struct {
			Index      int        `json:"index"`
			Reached    bool       `json:"reached"`
			Distance   float64    `json:"distance_mm"`
			Miss       float64    `json:"miss_mm"`
			ClosestTip [3]float64 `json:"closest_tip_mm"`
			Angles     []float64  `json:"angles_deg"`
			Insertions []float64  `json:"insertions_mm"`
			Loaded     bool       `json:"loaded"`
		} `json:"task_points"`
		Scores map[string]any `json:"scores"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &o), errOut)
	require.Len(t, o.TaskPoints, 2)
	const delta = 2.2617 // mm, handbook formula above
	p := o.TaskPoints[0]
	assert.Equal(t, 1, p.Index)
	assert.True(t, p.Loaded)
	assert.False(t, p.Reached)
	assert.InEpsilon(t, delta, p.Distance, 5e-3)
	assert.InEpsilon(t, delta-1, p.Miss, 1e-2)
	assert.InEpsilon(t, -delta, p.ClosestTip[1], 5e-3)
	assert.Len(t, p.Angles, 1)
	assert.Len(t, p.Insertions, 1)
	q := o.TaskPoints[1]
	assert.False(t, q.Loaded)
	assert.True(t, q.Reached)
	assert.InDelta(t, 0, q.Distance, 1e-6)
	assert.InEpsilon(t, delta-1, o.Scores["task_miss_mm"], 1e-2)
}

// TestPoseLoadedCantilever: pose -loaded of the same straight cantilever
// puts the tip at −δ along gravity (y), δ = 2.2617 mm (Roark's Formulas for
// Stress and Strain, 7th ed., Table 8.1, cases 1a and 2a), and pose without
// -loaded keeps it on the axis.
func TestPoseLoadedCantilever(t *testing.T) {
	path := cantileverDesign
	for _, c := range []struct {
		args []string
		y    float64
	}{{[]string{"-loaded"}, -2.2617}, {nil, 0}} {
		args := append([]string{"pose", path, "-angles-deg", "0", "-json"}, c.args...)
		_, out, errOut := runCLI(t, args...)
		var o struct {
			Tip struct {
				Position [3]float64 `json:"position_mm"`
			} `json:"tip"`
		}
		require.NoError(t, json.Unmarshal([]byte(out), &o), errOut)
		assert.InDelta(t, c.y, o.Tip.Position[1], 0.005*2.2617, "tip y %v", c.args)
	}
}
