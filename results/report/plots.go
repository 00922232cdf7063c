package report

// Figures of a run: drawn with gonum/plot, written as SVG into RUN/plots
// and inlined into the report. gonum/plot has no parallel-coordinates or
// pairs plotter; both are built here from plotter.Line, plotter.Scatter and
// plot.Align.

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"math"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"plica/objective"
	"plica/objective/kinematics"

	"plica/results"
)

// PlotsDir is the folder of the figures inside a run folder.
const PlotsDir = "plots"

// Figure is one plot of a run, rendered as SVG.
type Figure struct {
	Name    string // file name inside plots/, e.g. "front.svg"
	Title   string
	Caption string
	SVG     []byte
}

// Series colours. Each series of a figure has its own colour, so a reader
// (and a test) can tell them apart in the SVG.
var (
	frontColor     = color.RGBA{R: 0x1f, G: 0x77, B: 0xb4, A: 0xff} // front designs
	evaluatedColor = color.RGBA{R: 0xb4, G: 0xb4, B: 0xb4, A: 0xff} // feasible evaluations
	chosenColor    = color.RGBA{R: 0xd6, G: 0x27, B: 0x28, A: 0xff} // designs shown in the report
	axisColor      = color.RGBA{R: 0x60, G: 0x60, B: 0x60, A: 0xff} // parallel-coordinate axes
	workspaceColor = color.RGBA{R: 0x2c, G: 0xa0, B: 0x2c, A: 0xff} // workspace tip points
	historyColor   = color.RGBA{R: 0x94, G: 0x67, B: 0xbd, A: 0xff} // hypervolume history
	baseColor      = color.RGBA{R: 0x20, G: 0x20, B: 0x20, A: 0xff} // the base point
)

// BackboneRotations is the number of relative rotations, over a full
// turn, of the backbone figure.
const BackboneRotations = 12

// MaxWorkspacePoints caps the tip points of a workspace figure panel.
const MaxWorkspacePoints = 1024

// scoreAxis splits a score or variable key into a readable name and its
// unit, from the unit suffix every key carries ("reach_mm" → "reach",
// "mm"). A quantity without a unit suffix is a ratio: unit "1" (SI
// Brochure, 9th ed., 2019, section 2.3.3: the unit of a dimensionless quantity is
// one).
func scoreAxis(key string) (name, unit string) {
	suffixes := []struct{ suffix, unit string }{
		{"_mm2", "mm²"}, {"_mm3", "mm³"}, {"_mm", "mm"}, {"_deg", "deg"}, {"_g", "g"}, {"_per_m", "1/m"},
	}
	for _, s := range suffixes {
		if strings.HasSuffix(key, s.suffix) {
			return strings.ReplaceAll(strings.TrimSuffix(key, s.suffix), "_", " "), s.unit
		}
	}
	return strings.ReplaceAll(key, "_", " "), "1"
}

// objectiveLabel is the axis label of objective i: name, unit and goal.
func (r *Data) objectiveLabel(i int) string {
	o := r.Spec.Objectives[i]
	name, unit := scoreAxis(o.Score)
	if o.Quantile != 0 {
		name += fmt.Sprintf(", %g %% quantile", o.Quantile*100)
	}
	return fmt.Sprintf("%s (%s), %s", name, unit, o.Goal())
}

// newPlot is a plot with plica's common style.
func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.Add(plotter.NewGrid())
	return p
}

func finite(x, y float64) bool {
	return !math.IsNaN(x) && !math.IsInf(x, 0) && !math.IsNaN(y) && !math.IsInf(y, 0)
}

// scatter adds a scatter series of filled circles (skipping non-finite
// points) and returns it, or nil when no point is finite.
func scatter(p *plot.Plot, pts plotter.XYs, c color.Color, radius vg.Length) (*plotter.Scatter, error) {
	var keep plotter.XYs
	for _, q := range pts {
		if finite(q.X, q.Y) {
			keep = append(keep, q)
		}
	}
	if len(keep) == 0 {
		return nil, nil
	}
	s, err := plotter.NewScatter(keep)
	if err != nil {
		return nil, err
	}
	s.GlyphStyle = draw.GlyphStyle{Color: c, Radius: radius, Shape: draw.CircleGlyph{}}
	p.Add(s)
	return s, nil
}

// pointLabels adds text labels at points.
func pointLabels(p *plot.Plot, pts plotter.XYs, text []string, c color.Color) (*plotter.Labels, error) {
	l, err := plotter.NewLabels(plotter.XYLabels{XYs: pts, Labels: text})
	if err != nil {
		return nil, err
	}
	for i := range l.TextStyle {
		l.TextStyle[i].Color = c
		l.TextStyle[i].Font.Size = vg.Points(9)
	}
	l.Offset = vg.Point{X: vg.Points(4), Y: vg.Points(2)}
	p.Add(l)
	return l, nil
}

// render renders drawing callbacks on one SVG canvas.
func render(w, h vg.Length, paint func(draw.Canvas)) ([]byte, error) {
	c := vgsvg.New(w, h)
	paint(drawCanvas(c))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, fmt.Errorf("render svg: %w", err)
	}
	return b.Bytes(), nil
}

// equalAspect widens the x or the y range of p so that one data unit has
// the same length on both axes inside canvas c, keeping each range
// centred. Tick labels change with the ranges, so it repeats a few times.
func equalAspect(p *plot.Plot, c draw.Canvas) {
	for range 3 {
		da := p.DataCanvas(c)
		w, h := float64(da.Max.X-da.Min.X), float64(da.Max.Y-da.Min.Y)
		xs, ys := p.X.Max-p.X.Min, p.Y.Max-p.Y.Min
		if !(w > 0 && h > 0 && xs > 0 && ys > 0) {
			return
		}
		if xs/w > ys/h {
			mid, half := (p.Y.Max+p.Y.Min)/2, xs/w*h/2
			p.Y.Min, p.Y.Max = mid-half, mid+half
		} else {
			mid, half := (p.X.Max+p.X.Min)/2, ys/h*w/2
			p.X.Min, p.X.Max = mid-half, mid+half
		}
	}
}

// padRange makes sure a plot's ranges are not empty (a single point or a
// flat series), which gonum would draw as a degenerate axis.
func padRange(p *plot.Plot) {
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		if a.Max-a.Min <= 0 || math.IsInf(a.Min, 0) || math.IsInf(a.Max, 0) {
			d := math.Max(math.Abs(a.Min)*0.05, 1e-9)
			if math.IsInf(a.Min, 0) || math.IsInf(a.Max, 0) {
				a.Min, a.Max, d = 0, 0, 1
			}
			a.Min, a.Max = a.Min-d, a.Max+d
		}
	}
}

// frontPanel plots objective i against objective j: feasible evaluations
// (grey), the front (blue) and the chosen designs (red, labelled #id).
func (r *Data) frontPanel(i, j int, chosen []int, legend bool) (*plot.Plot, error) {
	p := newPlot("", r.objectiveLabel(i), r.objectiveLabel(j))
	var ev, fr, ch plotter.XYs
	var names []string
	for _, row := range r.Evaluated {
		ev = append(ev, plotter.XY{X: row.F[i], Y: row.F[j]})
	}
	for _, row := range r.Front {
		fr = append(fr, plotter.XY{X: row.F[i], Y: row.F[j]})
	}
	for _, id := range chosen {
		if row, ok := r.FrontRow(id); ok {
			ch = append(ch, plotter.XY{X: row.F[i], Y: row.F[j]})
			names = append(names, fmt.Sprintf("#%d", id))
		}
	}
	se, err := scatter(p, ev, evaluatedColor, vg.Points(1.5))
	if err != nil {
		return nil, err
	}
	if _, err := r.rangeBars(p, i, j); err != nil {
		return nil, err
	}
	sf, err := scatter(p, fr, frontColor, vg.Points(2.5))
	if err != nil {
		return nil, err
	}
	sc, err := scatter(p, ch, chosenColor, vg.Points(4))
	if err != nil {
		return nil, err
	}
	if sc != nil {
		if _, err := pointLabels(p, ch, names, chosenColor); err != nil {
			return nil, err
		}
	}
	if legend {
		if se != nil {
			p.Legend.Add("feasible evaluations", se)
		}
		if sf != nil {
			p.Legend.Add("front", sf)
		}
		if sc != nil {
			p.Legend.Add("shown below", sc)
		}
		p.Legend.Top = true
	}
	padRange(p)
	if legend {
		// headroom for the legend, top right
		p.Y.Max += 0.2 * (p.Y.Max - p.Y.Min)
	}
	return p, nil
}

// FrontFigure plots the objectives of the front over the feasible
// evaluations: one scatter for two objectives, the pairs (lower triangle)
// for three or more, and for one objective the objective against the
// evaluation index.
func (r *Data) FrontFigure(chosen []int) (Figure, error) {
	m := len(r.Spec.Objectives)
	fig := Figure{Name: "front.svg", Title: "Front"}
	switch {
	case m == 1:
		fig.Caption = "Objective of every feasible evaluation (grey) against the evaluation index; the best design in blue, the designs shown below in red."
		p := newPlot("", "evaluation index (count)", r.objectiveLabel(0))
		var ev, fr, ch plotter.XYs
		var names []string
		for _, row := range r.Evaluated {
			ev = append(ev, plotter.XY{X: float64(row.Index), Y: row.F[0]})
		}
		for _, row := range r.Front {
			fr = append(fr, plotter.XY{X: float64(row.Index), Y: row.F[0]})
		}
		for _, id := range chosen {
			if row, ok := r.FrontRow(id); ok {
				ch = append(ch, plotter.XY{X: float64(row.Index), Y: row.F[0]})
				names = append(names, fmt.Sprintf("#%d", id))
			}
		}
		if _, err := r.rangeBars(p, 0, -1); err != nil {
			return fig, err
		}
		fig.Caption += r.rangeCaption()
		for _, s := range []struct {
			pts plotter.XYs
			c   color.Color
			rad vg.Length
		}{{ev, evaluatedColor, 1.5}, {fr, frontColor, 2.5}, {ch, chosenColor, 4}} {
			if _, err := scatter(p, s.pts, s.c, s.rad); err != nil {
				return fig, err
			}
		}
		if len(ch) > 0 {
			if _, err := pointLabels(p, ch, names, chosenColor); err != nil {
				return fig, err
			}
		}
		padRange(p)
		b, err := SVG(p, 6*vg.Inch, 4*vg.Inch)
		fig.SVG = b
		return fig, err
	case m == 2:
		fig.Caption = "Front designs (blue) over the feasible evaluations (grey); the designs shown below in red, labelled with their front id." + r.rangeCaption()
		p, err := r.frontPanel(0, 1, chosen, true)
		if err != nil {
			return fig, err
		}
		b, err := SVG(p, 6*vg.Inch, 4.5*vg.Inch)
		fig.SVG = b
		return fig, err
	}
	fig.Caption = "Pairs of objectives: front designs (blue) over the feasible evaluations (grey); the designs shown below in red, labelled with their front id." + r.rangeCaption()
	rows := make([][]*plot.Plot, m-1)
	for a := range m - 1 {
		rows[a] = make([]*plot.Plot, m-1)
		j := a + 1
		for i := 0; i < j; i++ {
			p, err := r.frontPanel(i, j, chosen, false)
			if err != nil {
				return fig, err
			}
			rows[a][i] = p
		}
	}
	// the legend gets the empty top-right tile
	key := plot.New()
	key.HideAxes()
	key.Legend.Top = true
	key.Legend.Left = true
	for _, e := range []struct {
		name string
		c    color.Color
		rad  vg.Length
	}{{"feasible evaluations", evaluatedColor, 1.5}, {"front", frontColor, 2.5}, {"shown below", chosenColor, 4}} {
		s, err := plotter.NewScatter(plotter.XYs{{}})
		if err != nil {
			return fig, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: e.c, Radius: e.rad, Shape: draw.CircleGlyph{}}
		key.Legend.Add(e.name, s)
	}
	rows[0][m-2] = key
	size := vg.Length(m-1) * 3 * vg.Inch
	b, err := render(size, size, func(dc draw.Canvas) {
		tiles := draw.Tiles{Rows: m - 1, Cols: m - 1, PadX: vg.Points(6), PadY: vg.Points(6)}
		cs := plot.Align(rows, tiles, dc)
		for a := range rows {
			for i, p := range rows[a] {
				if p != nil {
					p.Draw(cs[a][i])
				}
			}
		}
	})
	fig.SVG = b
	return fig, err
}

// normalised maps variable j of x to [0, 1] over its range (category
// indices over the option list); a fixed range maps to 0.5.
func (r *Data) normalised(j int, x float64) float64 {
	v := r.Spec.Variables[j]
	lo, hi := v.Lower, v.Upper
	if v.Options != nil {
		lo, hi = 0, float64(len(v.Options)-1)
	}
	if !(hi > lo) {
		return 0.5
	}
	return (x - lo) / (hi - lo)
}

// variableTick is the label of variable j under its axis: key, bellows
// and range with unit (options for a category).
func (r *Data) variableTick(j int) string {
	v := r.Spec.Variables[j]
	if v.Options != nil {
		return fmt.Sprintf("%s\nbellows %d\n%s", v.Key, v.Table+1, strings.Join(v.Options, "|"))
	}
	_, unit := scoreAxis(v.Key)
	if v.Unit != "" {
		unit = v.Unit
	}
	return fmt.Sprintf("%s\nbellows %d\n%.4g to %.4g %s", v.Key, v.Table+1, v.Lower, v.Upper, unit)
}

// mix interpolates between two colours, t in [0, 1].
func mix(a, b color.RGBA, t float64) color.RGBA {
	t = math.Max(0, math.Min(1, t))
	f := func(x, y uint8) uint8 { return uint8(math.Round(float64(x) + t*(float64(y)-float64(x)))) }
	return color.RGBA{R: f(a.R, b.R), G: f(a.G, b.G), B: f(a.B, b.B), A: 0xff}
}

// VariablesFigure draws parallel coordinates of the front's variables:
// one vertical axis per variable, normalised to its range, and one line
// per front design, coloured from blue (best first objective) to orange
// (worst); the designs shown in the report are drawn thick in red.
func (r *Data) VariablesFigure(chosen []int) (Figure, error) {
	n := len(r.Spec.Variables)
	fig := Figure{Name: "variables.svg", Title: "Design variables of the front",
		Caption: fmt.Sprintf("Parallel coordinates: one line per front design over the %d variables, each axis spanning its range (0 = lower bound, 1 = upper bound). Colour runs from blue (best %s) to orange (worst); the designs shown below are red.",
			n, r.Spec.Objectives[0].Score)}
	p := newPlot("", "", "position in range (1)")
	p.Y.Min, p.Y.Max = -0.05, 1.05
	p.X.Min, p.X.Max = -0.3, float64(n-1)+0.3+0.15*float64(len(chosen))
	if n == 1 {
		p.X.Min, p.X.Max = -1, 1
	}
	var ticks []plot.Tick
	for j := range n {
		ticks = append(ticks, plot.Tick{Value: float64(j), Label: r.variableTick(j)})
		ax, err := plotter.NewLine(plotter.XYs{{X: float64(j), Y: 0}, {X: float64(j), Y: 1}})
		if err != nil {
			return fig, err
		}
		ax.LineStyle = draw.LineStyle{Color: axisColor, Width: vg.Points(1)}
		p.Add(ax)
	}
	p.X.Tick.Marker = plot.ConstantTicks(ticks)
	p.X.Tick.Label.Font.Size = vg.Points(8)
	// colour by the rank of the first (minimised) objective
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, row := range r.Front {
		f := r.Minimised(row)[0]
		lo, hi = math.Min(lo, f), math.Max(hi, f)
	}
	blue, orange := frontColor, color.RGBA{R: 0xff, G: 0x7f, B: 0x0e, A: 0xff}
	line := func(row Row, c color.Color, width vg.Length) error {
		pts := make(plotter.XYs, n)
		for j := range n {
			pts[j] = plotter.XY{X: float64(j), Y: r.normalised(j, row.X[j])}
		}
		l, err := plotter.NewLine(pts)
		if err != nil {
			return err
		}
		l.LineStyle = draw.LineStyle{Color: c, Width: width}
		p.Add(l)
		return nil
	}
	for _, row := range r.Front {
		t := 0.5
		if hi > lo {
			t = (r.Minimised(row)[0] - lo) / (hi - lo)
		}
		if err := line(row, mix(blue, orange, t), vg.Points(1)); err != nil {
			return fig, err
		}
	}
	var ends plotter.XYs
	var names []string
	for _, id := range chosen {
		row, ok := r.FrontRow(id)
		if !ok {
			continue
		}
		if err := line(row, chosenColor, vg.Points(2.5)); err != nil {
			return fig, err
		}
		ends = append(ends, plotter.XY{X: float64(n - 1), Y: r.normalised(n-1, row.X[n-1])})
		names = append(names, fmt.Sprintf("#%d", id))
	}
	for k := range ends {
		// side by side, so labels of lines ending together stay legible
		l, err := pointLabels(p, ends[k:k+1], names[k:k+1], chosenColor)
		if err != nil {
			return fig, err
		}
		l.Offset.X += vg.Points(18 * float64(k))
	}
	w := vg.Length(math.Max(6, 0.9*float64(n))) * vg.Inch
	b, err := SVG(p, w, 4.5*vg.Inch)
	fig.SVG = b
	return fig, err
}

// hypervolumeUnit is the unit of the hypervolume: the product of the
// objective units.
func (r *Data) hypervolumeUnit() string {
	var units []string
	for _, o := range r.Spec.Objectives {
		_, u := scoreAxis(o.Score)
		units = append(units, u)
	}
	return strings.Join(units, "·")
}

// HypervolumeFigure plots the archive hypervolume against evaluations
// from history.csv.
func (r *Data) HypervolumeFigure() (Figure, error) {
	fig := Figure{Name: "hypervolume.svg", Title: "Hypervolume against evaluations",
		Caption: fmt.Sprintf("Hypervolume of the archive after every generation, in the objectives as minimised (maximised ones negated), at the reference point %s. The reference point is set from the first feasible designs and kept for the run, so values are comparable within this run only.",
			vector(r.Info.Reference))}
	if len(r.History) == 0 {
		return fig, errors.New("history.csv holds no generation")
	}
	p := newPlot("", "evaluations (count)", fmt.Sprintf("hypervolume (%s)", r.hypervolumeUnit()))
	pts := make(plotter.XYs, len(r.History))
	for k, s := range r.History {
		pts[k] = plotter.XY{X: float64(s.Evaluations), Y: s.Hypervolume}
	}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return fig, err
	}
	l.LineStyle = draw.LineStyle{Color: historyColor, Width: vg.Points(1.5)}
	p.Add(l)
	if _, err := scatter(p, pts, historyColor, vg.Points(2)); err != nil {
		return fig, err
	}
	padRange(p)
	b, err := SVG(p, 6*vg.Inch, 3.5*vg.Inch)
	fig.SVG = b
	return fig, err
}

// vector prints a vector with %.6g.
func vector(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = fmt.Sprintf("%.6g", x)
	}
	return "(" + strings.Join(parts, ", ") + ")"
}

// hue is a colour on the hue circle (HSV with full saturation, value
// 0.8), t in [0, 1).
func hue(t float64) color.RGBA {
	h := math.Mod(t, 1) * 6
	x := 1 - math.Abs(math.Mod(h, 2)-1)
	var r, g, b float64
	switch int(h) {
	case 0:
		r, g = 1, x
	case 1:
		r, g = x, 1
	case 2:
		g, b = 1, x
	case 3:
		g, b = x, 1
	case 4:
		r, b = x, 1
	default:
		r, b = 1, x
	}
	c := func(v float64) uint8 { return uint8(math.Round(0.8 * 255 * v)) }
	return color.RGBA{R: c(r), G: c(g), B: c(b), A: 0xff}
}

// BackboneFigure draws the backbone of a design for BackboneRotations
// relative rotations of the innermost bellows over a full turn (the other
// bellows held at 0, insertions at the lower end of their ranges): a side
// view (x against z, z along the base axis) and a top view (y against x,
// looking down the base axis), both to scale. Rotations the nesting rules
// forbid are left out.
func BackboneFigure(name, title string, robot *kinematics.Robot, w objective.Workspace) (Figure, error) {
	fig := Figure{Name: name, Title: title}
	n := len(robot.Tubes)
	total := 0.0
	for _, t := range robot.Tubes {
		total = math.Max(total, t.Length())
	}
	side := newPlot("side view", "z (mm)", "x (mm)")
	top := newPlot("top view", "x (mm)", "y (mm)")
	var tips plotter.XYs
	var names []string
	drawn := 0
	for k := range BackboneRotations {
		a := kinematics.Actuation{Theta: make([]float64, n), Beta: objective.FixedInsertion(n, w)}
		a.Theta[0] = 2 * math.Pi * float64(k) / BackboneRotations
		_, poses, err := robot.Backbone(a, total/120)
		if err != nil {
			var ae *kinematics.ActuationError
			if errors.As(err, &ae) {
				continue
			}
			return fig, err
		}
		xz := make(plotter.XYs, len(poses))
		xy := make(plotter.XYs, len(poses))
		for i, q := range poses {
			xz[i] = plotter.XY{X: q.P[2] * 1e3, Y: q.P[0] * 1e3}
			xy[i] = plotter.XY{X: q.P[0] * 1e3, Y: q.P[1] * 1e3}
		}
		c := hue(float64(k) / BackboneRotations)
		for _, s := range []struct {
			p   *plot.Plot
			pts plotter.XYs
		}{{side, xz}, {top, xy}} {
			l, err := plotter.NewLine(s.pts)
			if err != nil {
				return fig, err
			}
			l.LineStyle = draw.LineStyle{Color: c, Width: vg.Points(1.2)}
			s.p.Add(l)
		}
		tips = append(tips, xy[len(xy)-1])
		names = append(names, fmt.Sprintf("%d°", 360*k/BackboneRotations))
		drawn++
	}
	if drawn == 0 {
		return fig, errors.New("no relative rotation satisfies the nesting rules")
	}
	if _, err := pointLabels(top, tips, names, color.Black); err != nil {
		return fig, err
	}
	fig.Caption = fmt.Sprintf("Backbone at %d relative rotations of bellows 1 (every %d°, labelled at the tip in the top view; the other bellows at 0°), to scale. Unloaded shape: the loaded-backbone figure draws the shape under gravity and payload.",
		drawn, 360/BackboneRotations)
	if drawn < BackboneRotations {
		fig.Caption += fmt.Sprintf(" %d rotations break the nesting rules and are left out.", BackboneRotations-drawn)
	}
	padRange(side)
	padRange(top)
	b, err := twoViews(side, top)
	fig.SVG = b
	return fig, err
}

// twoViews draws a side view (wide, left) and a top view (right), each to
// scale.
func twoViews(side, top *plot.Plot) ([]byte, error) {
	w, h := 9*vg.Inch, 3.6*vg.Inch
	return render(w, h, func(dc draw.Canvas) {
		left := draw.Crop(dc, 0, -0.4*w, 0, 0)
		right := draw.Crop(dc, 0.6*w, 0, 0, 0)
		equalAspect(side, left)
		equalAspect(top, right)
		side.Draw(left)
		top.Draw(right)
	})
}

// figureTips returns the tips the workspace figure draws: the tips the
// workspace scores use (objective.WorkspaceTips), thinned evenly to at most
// maxPoints (first and last kept).
func figureTips(robot *kinematics.Robot, w objective.Workspace, maxPoints int) ([][3]float64, error) {
	tips, err := objective.WorkspaceTips(robot, w)
	if err != nil {
		return nil, err
	}
	return thin(tips, maxPoints), nil
}

// WorkspaceFigure draws the tip point cloud the workspace scores use
// (objective.WorkspaceTips, thinned evenly to MaxWorkspacePoints) projected
// on the x–z plane (side view) and the x–y plane (top view), to scale.
func WorkspaceFigure(name, title string, robot *kinematics.Robot, w objective.Workspace) (Figure, error) {
	return WorkspaceTaskFigure(name, title, robot, w, nil)
}

// WorkspaceTaskFigure is WorkspaceFigure with the task points drawn over
// the tips, each with its tolerance.
func WorkspaceTaskFigure(name, title string, robot *kinematics.Robot, w objective.Workspace, tasks []objective.TaskPoint) (Figure, error) {
	fig := Figure{Name: name, Title: title}
	tips, err := figureTips(robot, w, MaxWorkspacePoints)
	if err != nil {
		return fig, err
	}
	side := newPlot("side view", "z (mm)", "x (mm)")
	top := newPlot("top view", "x (mm)", "y (mm)")
	xz := make(plotter.XYs, len(tips))
	xy := make(plotter.XYs, len(tips))
	for i, p := range tips {
		xz[i] = plotter.XY{X: p[2] * 1e3, Y: p[0] * 1e3}
		xy[i] = plotter.XY{X: p[0] * 1e3, Y: p[1] * 1e3}
	}
	// the base, for scale
	if _, err := scatter(side, plotter.XYs{{}}, baseColor, vg.Points(3)); err != nil {
		return fig, err
	}
	if _, err := scatter(side, xz, workspaceColor, vg.Points(1.2)); err != nil {
		return fig, err
	}
	if _, err := scatter(top, xy, workspaceColor, vg.Points(1.2)); err != nil {
		return fig, err
	}
	if err := addTaskPoints(side, top, tasks); err != nil {
		return fig, err
	}
	fig.Caption = fmt.Sprintf("Tip positions over %d sampled actuations (relative rotations and insertion ranges on a grid, each turned by the common rotation), projected on the x–z plane (side view; the black dot is the base) and the x–y plane (top view), to scale. Unloaded shapes.", len(tips)) + taskCaption(tasks)
	padRange(side)
	padRange(top)
	b, err := twoViews(side, top)
	fig.SVG = b
	return fig, err
}

// WritePlots writes figures into RUN/plots, each file atomically.
func WritePlots(f *results.Folder, figs []Figure) error {
	dir := f.Path(PlotsDir)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("cannot create %s: %w", dir, err)
	}
	for _, fig := range figs {
		if err := results.WriteAtomic(filepath.Join(dir, fig.Name), fig.SVG); err != nil {
			return err
		}
	}
	return nil
}
