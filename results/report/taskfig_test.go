package report

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
)

// TestToleranceCircle: every drawn point lies at the tolerance radius from
// the task point and the outline closes (a circle is the set of points at
// one distance from its centre: elementary geometry); consecutive points
// are 2π/n apart in angle, so each chord is 2r·sin(π/n) long.
func TestToleranceCircle(t *testing.T) {
	const cx, cy, r, n = 12.5, -40, 2, 48
	pts := toleranceCircle(cx, cy, r, n)
	require.Len(t, pts, n+1)
	for k, p := range pts {
		assert.InDelta(t, r, math.Hypot(p.X-cx, p.Y-cy), 1e-12, "point %d on the circle", k)
	}
	assert.Equal(t, pts[0], pts[n], "closed outline")
	chord := 2 * r * math.Sin(math.Pi/n)
	for k := 1; k <= n; k++ {
		assert.InDelta(t, chord, math.Hypot(pts[k].X-pts[k-1].X, pts[k].Y-pts[k-1].Y), 1e-12, "chord %d", k)
	}
	assert.Equal(t, 1e-3, taskTolerance(objective.TaskPoint{}), "zero tolerance means 1 mm (objective.TaskPoint)")
}

// TestWorkspaceTaskFigure: the workspace figure with task points draws
// every sampled tip as before, each task point in both views with its
// tolerance outline, and labels the points; without task points it is the
// plain workspace figure.
func TestWorkspaceTaskFigure(t *testing.T) {
	d, sc := loadRobot(t, "boom-geometry.toml")
	robot, _, err := d.Robot()
	require.NoError(t, err)
	tasks := []objective.TaskPoint{
		{Position: [3]float64{-0.06, 0, 0.235}, Tolerance: 2e-3},
		{Position: [3]float64{0, 0.03, 0.24}},
	}
	fig, err := WorkspaceTaskFigure("workspace.svg", "Workspace", robot, sc.Workspace, tasks)
	require.NoError(t, err)
	tips, err := figureTips(robot, sc.Workspace, MaxWorkspacePoints)
	require.NoError(t, err)
	els := parseSVG(t, fig.SVG)
	assert.Equal(t, 2*len(tips), countGlyphs(els, workspaceColor), "every tip in both views")
	assert.Equal(t, 2*len(tasks), countGlyphs(els, taskColor), "every task point in both views")
	outlines := 0
	for _, segs := range polylines(els) {
		if segs == toleranceSegments {
			outlines++
		}
	}
	assert.Equal(t, 2*len(tasks), outlines, "a tolerance outline per task point and view")
	assert.Contains(t, texts(els), "task 1")
	assert.Contains(t, texts(els), "task 2")
	assert.Contains(t, fig.Caption, "2 task points")

	plain, err := WorkspaceTaskFigure("workspace.svg", "Workspace", robot, sc.Workspace, nil)
	require.NoError(t, err)
	ref, err := WorkspaceFigure("workspace.svg", "Workspace", robot, sc.Workspace)
	require.NoError(t, err)
	assert.Equal(t, ref.SVG, plain.SVG, "no task points: the plain workspace figure")
	assert.Zero(t, countGlyphs(parseSVG(t, plain.SVG), taskColor))
}
