package report

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"plica/objective"
	"plica/objective/kinematics"
)

// SagBands is the number of colour bands of the tip-sag map.
const SagBands = 5

// sagPoint is one sampled tip and its sag (m).
type sagPoint struct {
	Tip [3]float64
	Sag float64
}

// sagBand is the band (0 … bands−1) of sag s over [lo, hi], equal widths;
// hi itself falls in the last band.
func sagBand(s, lo, hi float64, bands int) int {
	if !(hi > lo) {
		return 0
	}
	return min(bands-1, max(0, int(float64(bands)*(s-lo)/(hi-lo))))
}

// TipSagFigure maps the sag along gravity over the workspace: every tip the
// workspace scores use (objective.WorkspaceSags, the samples of
// objective.WorkspaceTips, thinned evenly to MaxWorkspacePoints) coloured
// by the linear-estimate sag of its configuration under self-weight and
// payload in SagBands equal bands, in a side view (x against z) and a top
// view (y against x), to scale.
func TipSagFigure(name, title string, robot *kinematics.Robot, w objective.Workspace, ld objective.Load) (Figure, error) {
	fig := Figure{Name: name, Title: title}
	tips, sags, err := objective.WorkspaceSags(robot, w, ld)
	if err != nil {
		return fig, err
	}
	pts := make([]sagPoint, len(tips))
	for i := range tips {
		pts[i] = sagPoint{tips[i], sags[i]}
	}
	pts = thin(pts, MaxWorkspacePoints)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range pts {
		lo, hi = math.Min(lo, p.Sag), math.Max(hi, p.Sag)
	}
	side := newPlot("side view", "z (mm)", "x (mm)")
	top := newPlot("top view", "x (mm)", "y (mm)")
	xz := make([]plotter.XYs, SagBands)
	xy := make([]plotter.XYs, SagBands)
	for _, p := range pts {
		b := sagBand(p.Sag, lo, hi, SagBands)
		xz[b] = append(xz[b], plotter.XY{X: p.Tip[2] * 1e3, Y: p.Tip[0] * 1e3})
		xy[b] = append(xy[b], plotter.XY{X: p.Tip[0] * 1e3, Y: p.Tip[1] * 1e3})
	}
	if _, err := scatter(side, plotter.XYs{{}}, baseColor, vg.Points(3)); err != nil {
		return fig, err
	}
	width := (hi - lo) / SagBands
	for b := range SagBands {
		if len(xz[b]) == 0 {
			continue
		}
		c := sagColor(b)
		if _, err := scatter(side, xz[b], c, vg.Points(1.4)); err != nil {
			return fig, err
		}
		s, err := scatter(top, xy[b], c, vg.Points(1.4))
		if err != nil {
			return fig, err
		}
		label := fmt.Sprintf("%.3g mm", lo*1e3)
		if hi > lo {
			d := sagDigits(hi, width)
			label = fmt.Sprintf("%.*g–%.*g mm", d, (lo+float64(b)*width)*1e3, d, (lo+float64(b+1)*width)*1e3)
		}
		side.Legend.Add(label, s) // the side view has room above the arm
	}
	side.Legend.Top, side.Legend.Left = true, true
	side.Legend.XOffs = vg.Points(30)
	fig.Caption = fmt.Sprintf("Sag along gravity over the workspace: the %d sampled tips of the workspace figure, each coloured by the tip displacement along gravity of its configuration under self-weight and payload (linear compliance estimate; the tip_sag check re-solves the worst one with the exact rod model), from %.3g mm (blue) to %.3g mm (red), to scale. Unloaded tip positions.",
		len(pts), lo*1e3, hi*1e3)
	padRange(side)
	padRange(top)
	b, err := twoViews(side, top)
	fig.SVG = b
	return fig, err
}

// sagColor is band b's colour: blue (smallest sag) to red (largest).
func sagColor(b int) color.RGBA {
	return hue(0.66 * (1 - float64(b)/float64(SagBands-1)))
}

// sagDigits is the number of significant digits that tells band edges of
// width apart up to hi: at least 3.
func sagDigits(hi, width float64) int {
	if !(width > 0) || !(hi > 0) {
		return 3
	}
	return max(3, int(math.Ceil(math.Log10(hi/width)))+1)
}
