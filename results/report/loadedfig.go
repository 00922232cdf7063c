package report

import (
	"errors"
	"fmt"
	"image/color"
	"math"
	"strings"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"plica/objective"
	"plica/objective/kinematics"
)

// LoadedRotations is the number of relative rotations of bellows 1, over a
// full turn, of the loaded-backbone figure (each needs a solve of the
// exact rod model).
const LoadedRotations = 4

// loadedPair is one configuration's backbone without and with the load.
type loadedPair struct {
	AngleDeg         float64
	Unloaded, Loaded []kinematics.Pose
	// Sag is the tip displacement under the load, m.
	Sag float64
}

// loadedBackbones solves the backbone at rotations relative rotations of
// bellows 1 (the other bellows at 0, insertions at the lower end of their
// ranges, as BackboneFigure), unloaded and under ld with the exact rod
// model (objective.LoadedBackbone). Rotations the nesting rules forbid are
// left out.
func loadedBackbones(robot *kinematics.Robot, w objective.Workspace, ld objective.Load, rotations int) ([]loadedPair, error) {
	n := len(robot.Tubes)
	total := 0.0
	for _, t := range robot.Tubes {
		total = math.Max(total, t.Length())
	}
	step := total / 120
	var out []loadedPair
	for k := range rotations {
		a := kinematics.Actuation{Theta: make([]float64, n), Beta: objective.FixedInsertion(n, w)}
		a.Theta[0] = 2 * math.Pi * float64(k) / float64(rotations)
		links, err := robot.Links(a, nil)
		if err != nil {
			var ae *kinematics.ActuationError
			if errors.As(err, &ae) {
				continue
			}
			return nil, err
		}
		_, unloaded, err := robot.Backbone(a, step)
		if err != nil {
			return nil, err
		}
		tip, _, loaded, err := objective.LoadedBackbone(links, ld, step)
		if err != nil {
			return nil, fmt.Errorf("loaded shape at %g°: %w", 360*float64(k)/float64(rotations), err)
		}
		u := unloaded[len(unloaded)-1].P
		sag := math.Sqrt(sq(tip.P[0]-u[0]) + sq(tip.P[1]-u[1]) + sq(tip.P[2]-u[2]))
		out = append(out, loadedPair{AngleDeg: 360 * float64(k) / float64(rotations), Unloaded: unloaded, Loaded: loaded, Sag: sag})
	}
	if len(out) == 0 {
		return nil, errors.New("no relative rotation satisfies the nesting rules")
	}
	return out, nil
}

func sq(x float64) float64 { return x * x }

// LoadedBackboneFigure draws, for LoadedRotations relative rotations of
// bellows 1, the unloaded backbone (dashed) beside the backbone under the
// design's load (solid: self-weight, payload and tip loads, exact rod
// model), in a side view (x against z) and a top view (y against x), to
// scale, with the tip displacement of each in the caption.
func LoadedBackboneFigure(name, title string, robot *kinematics.Robot, w objective.Workspace, ld objective.Load) (Figure, error) {
	fig := Figure{Name: name, Title: title}
	pairs, err := loadedBackbones(robot, w, ld, LoadedRotations)
	if err != nil {
		return fig, err
	}
	side := newPlot("side view", "z (mm)", "x (mm)")
	top := newPlot("top view", "x (mm)", "y (mm)")
	var tips plotter.XYs
	var names, sags []string
	for k, pr := range pairs {
		c := hue(pr.AngleDeg / 360)
		for _, v := range []struct {
			poses  []kinematics.Pose
			dashed bool
		}{{pr.Unloaded, true}, {pr.Loaded, false}} {
			xz := make(plotter.XYs, len(v.poses))
			xy := make(plotter.XYs, len(v.poses))
			for i, q := range v.poses {
				xz[i] = plotter.XY{X: q.P[2] * 1e3, Y: q.P[0] * 1e3}
				xy[i] = plotter.XY{X: q.P[0] * 1e3, Y: q.P[1] * 1e3}
			}
			style := draw.LineStyle{Color: c, Width: vg.Points(1.2)}
			if v.dashed {
				style.Width = vg.Points(0.8)
				style.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
			} else {
				tips = append(tips, xy[len(xy)-1])
				names = append(names, fmt.Sprintf("%.0f°", pr.AngleDeg))
			}
			for _, s := range []struct {
				pts plotter.XYs
				top bool
			}{{xz, false}, {xy, true}} {
				l, err := plotter.NewLine(s.pts)
				if err != nil {
					return fig, err
				}
				l.LineStyle = style
				if s.top {
					top.Add(l)
				} else {
					side.Add(l)
				}
			}
		}
		sags = append(sags, fmt.Sprintf("%.0f°: %.3g mm", pairs[k].AngleDeg, pr.Sag*1e3))
	}
	if _, err := pointLabels(top, tips, names, color.Black); err != nil {
		return fig, err
	}
	fig.Caption = fmt.Sprintf("Backbone at %d relative rotations of bellows 1 (the other bellows at 0°): dashed unloaded, solid under the design's load (self-weight and payload, gravity as in [load]; exact rod model), to scale. Tip displacement under the load: %s.",
		len(pairs), strings.Join(sags, ", "))
	padRange(side)
	padRange(top)
	b, err := twoViews(side, top)
	fig.SVG = b
	return fig, err
}
