package report

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"plica/objective"
)

// taskColor marks the task points and their tolerance circles.
var taskColor = color.RGBA{R: 0xff, G: 0x7f, B: 0x0e, A: 0xff}

// toleranceSegments is the number of chords of a drawn tolerance circle.
const toleranceSegments = 48

// toleranceCircle is the closed polyline of a circle of radius r about
// (cx, cy), n chords (n+1 points, the first repeated at the end).
func toleranceCircle(cx, cy, r float64, n int) plotter.XYs {
	pts := make(plotter.XYs, n+1)
	for k := range pts {
		s, c := math.Sincos(2 * math.Pi * float64(k%n) / float64(n))
		pts[k] = plotter.XY{X: cx + r*c, Y: cy + r*s}
	}
	return pts
}

// taskTolerance is the position tolerance a task point is checked with
// (m): objective.TaskPoint's zero means 1 mm.
func taskTolerance(t objective.TaskPoint) float64 {
	if t.Tolerance > 0 {
		return t.Tolerance
	}
	return 1e-3
}

// addTaskPoints draws each task point in the side view (x against z) and
// the top view (y against x), with its tolerance sphere's outline (a circle
// of the tolerance radius about the point: the projection of a sphere on a
// plane), to scale, labelled "task N" in the top view.
func addTaskPoints(side, top *plot.Plot, tasks []objective.TaskPoint) error {
	if len(tasks) == 0 {
		return nil
	}
	var xz, xy plotter.XYs
	var names []string
	for i, t := range tasks {
		p := t.Position
		r := taskTolerance(t) * 1e3
		a := plotter.XY{X: p[2] * 1e3, Y: p[0] * 1e3}
		b := plotter.XY{X: p[0] * 1e3, Y: p[1] * 1e3}
		xz, xy = append(xz, a), append(xy, b)
		names = append(names, fmt.Sprintf("task %d", i+1))
		for _, v := range []struct {
			p *plot.Plot
			c plotter.XY
		}{{side, a}, {top, b}} {
			l, err := plotter.NewLine(toleranceCircle(v.c.X, v.c.Y, r, toleranceSegments))
			if err != nil {
				return err
			}
			l.LineStyle = draw.LineStyle{Color: taskColor, Width: vg.Points(1)}
			v.p.Add(l)
		}
	}
	if _, err := scatter(side, xz, taskColor, vg.Points(2.5)); err != nil {
		return err
	}
	if _, err := scatter(top, xy, taskColor, vg.Points(2.5)); err != nil {
		return err
	}
	_, err := pointLabels(top, xy, names, taskColor)
	return err
}

// taskCaption says what the task-point marks are.
func taskCaption(tasks []objective.TaskPoint) string {
	if len(tasks) == 0 {
		return ""
	}
	return fmt.Sprintf(" Orange: the %d task points, each with a circle of its position tolerance (to scale).", len(tasks))
}
