package report

import (
	"errors"
	"fmt"
	"path/filepath"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// IslandsFigure draws, for a merged run, the hypervolume of each merged
// run's own front at the merged reference point (run.json merged_from) as
// one bar per island, with the merged front's hypervolume as a line: how
// much each island found, and how much joining them added.
func (r *Data) IslandsFigure() (Figure, error) {
	fig := Figure{Name: "islands.svg", Title: "Hypervolume per island",
		Caption: fmt.Sprintf("Hypervolume of each merged run's own front (bars) and of the merged front (line), all at the merged run's reference point %s, in the objectives as minimised (maximised ones negated). The islands compare with each other and with the merged front; each island's own runs used their own reference points, so the values in their folders differ.",
			vector(r.Info.Reference))}
	ms := r.Info.MergedFrom
	if len(ms) == 0 {
		return fig, errors.New("run.json lists no merged run")
	}
	vals := make(plotter.Values, len(ms))
	names := make([]string, len(ms))
	for i, m := range ms {
		vals[i] = m.Hypervolume
		names[i] = fmt.Sprintf("%s (seed %d)", filepath.Base(m.Run), m.Seed)
	}
	p := newPlot("", "island", fmt.Sprintf("hypervolume (%s)", r.hypervolumeUnit()))
	bars, err := plotter.NewBarChart(vals, vg.Points(24))
	if err != nil {
		return fig, err
	}
	bars.Color = historyColor
	bars.LineStyle.Width = 0
	p.Add(bars)
	merged, err := plotter.NewLine(plotter.XYs{{X: -0.5, Y: r.Info.Hypervolume}, {X: float64(len(ms)) - 0.5, Y: r.Info.Hypervolume}})
	if err != nil {
		return fig, err
	}
	merged.LineStyle = draw.LineStyle{Color: frontColor, Width: vg.Points(1.5), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}
	p.Add(merged)
	p.Legend.Add("merged front", merged)
	p.Legend.Add("island's own front", bars)
	p.Legend.Top = false
	p.NominalX(names...)
	p.Y.Min = 0
	p.Y.Max = 1.1 * r.Info.Hypervolume
	for _, v := range vals {
		p.Y.Max = max(p.Y.Max, 1.1*v)
	}
	if !(p.Y.Max > 0) {
		p.Y.Max = 1
	}
	b, err := SVG(p, 6*vg.Inch, 3.5*vg.Inch)
	fig.SVG = b
	return fig, err
}
