package report

import (
	"fmt"
	"image/color"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"

	"plica/results"

	"plica/search/front"
)

// OverlayPlot draws the fronts of several runs of one problem in one
// scatter plot of the first two objectives, in the scores' own signs and
// units, one colour and glyph per run, with the union front as a grey
// staircase line. With one objective, the runs are drawn on separate rows.
func OverlayPlot(fronts []*results.RunFront) (*plot.Plot, error) {
	if len(fronts) == 0 {
		return nil, fmt.Errorf("no runs to plot")
	}
	spec := fronts[0].Spec
	p := plot.New()
	labels := results.ObjectiveLabels(spec)
	m := len(labels)
	p.X.Label.Text = labels[0]
	if m >= 2 {
		p.Y.Label.Text = labels[1]
		p.Title.Text = fmt.Sprintf("fronts of %d runs", len(fronts))
		if m > 2 {
			p.Title.Text += fmt.Sprintf(" (first 2 of %d objectives)", m)
		}
	} else {
		p.Y.Label.Text = "run"
		p.Title.Text = fmt.Sprintf("fronts of %d runs (one objective)", len(fronts))
	}
	var all [][]float64
	for r, f := range fronts {
		xy := make(plotter.XYs, len(f.F))
		for i := range f.F {
			s := f.Scores(i)
			xy[i].X = s[0]
			if m >= 2 {
				xy[i].Y = s[1]
			} else {
				xy[i].Y = float64(r + 1)
			}
			all = append(all, f.F[i])
		}
		if len(xy) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle.Color = plotutil.Color(r)
		sc.GlyphStyle.Shape = plotutil.Shape(r)
		sc.GlyphStyle.Radius = vg.Points(3)
		p.Add(sc)
		p.Legend.Add(fmt.Sprintf("%s (%d)", f.Dir, len(xy)), sc)
	}
	if m == 2 {
		idx := front.NonDominated(all)
		if len(idx) > 1 {
			pts := make([][]float64, len(idx))
			for i, k := range idx {
				pts[i] = all[k]
			}
			slices.SortFunc(pts, func(a, b []float64) int { return slices.Compare(a, b) })
			// staircase of the minimised front, drawn in score signs
			var line plotter.XYs
			for i, q := range pts {
				line = append(line, plotter.XY{X: spec.Objectives[0].Natural(q[0]), Y: spec.Objectives[1].Natural(q[1])})
				if i+1 < len(pts) {
					line = append(line, plotter.XY{X: spec.Objectives[0].Natural(pts[i+1][0]), Y: spec.Objectives[1].Natural(q[1])})
				}
			}
			l, err := plotter.NewLine(line)
			if err != nil {
				return nil, err
			}
			l.LineStyle.Color = color.Gray{Y: 160}
			l.LineStyle.Width = vg.Points(0.8)
			p.Add(l)
			p.Legend.Add(fmt.Sprintf("union front (%d)", len(pts)), l)
		}
	}
	p.Add(plotter.NewGrid())
	p.Legend.Top = true
	return p, nil
}

// WriteOverlaySVG draws OverlayPlot and writes it as SVG atomically.
func WriteOverlaySVG(path string, fronts []*results.RunFront) error {
	p, err := OverlayPlot(fronts)
	if err != nil {
		return err
	}
	return SaveSVG(p, 16*vg.Centimeter, 12*vg.Centimeter, path)
}
