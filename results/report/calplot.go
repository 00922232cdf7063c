package report

// The cantilever bench-fit figure of "plica calibrate -plot", drawn with
// gonum/plot like the run figures (plots.go).

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"plica/surrogate"

	"plica/results"
)

// CalibrationPanel is one bending axis of a cantilever bench fit to plot:
// the measured points, the fitted line per curve and its confidence band.
type CalibrationPanel struct {
	Title  string                 // e.g. "bending about x"
	Points []surrogate.BenchPoint // SI
	// Setups labels each setup (Points[i].Setup); with an intercept every
	// setup has its own offset and so its own line. Without, one line is
	// drawn per free length.
	Setups []string
	Fit    *surrogate.Fit
}

// Size of one panel and of the title strip above the panels.
const (
	panelW     = vg.Length(400) // points
	panelH     = vg.Length(330)
	titleH     = vg.Length(24)
	bandPoints = 41 // samples of each fitted line and band
)

// curveColors are the curve colours (one per free length or setup); the band
// of a curve is its colour at 25 % opacity.
var curveColors = []color.NRGBA{
	{R: 0x1f, G: 0x77, B: 0xb4, A: 0xff}, {R: 0xd6, G: 0x27, B: 0x28, A: 0xff},
	{R: 0x2c, G: 0xa0, B: 0x2c, A: 0xff}, {R: 0x94, G: 0x67, B: 0xbd, A: 0xff},
	{R: 0xff, G: 0x7f, B: 0x0e, A: 0xff}, {R: 0x8c, G: 0x56, B: 0x4b, A: 0xff},
	{R: 0x17, G: 0xbe, B: 0xcf, A: 0xff}, {R: 0x7f, G: 0x7f, B: 0x7f, A: 0xff},
}

// curve is one fitted line: a free length and, with an intercept, a
// setup.
type curve struct {
	label  string
	length float64
	setup  int
	pts    plotter.XYs // measured points, N and mm
}

func (p *CalibrationPanel) curves() []*curve {
	var cs []*curve
	index := map[[2]float64]*curve{}
	withOffsets := p.Fit.Offsets != nil
	for _, pt := range p.Points {
		key := [2]float64{pt.FreeLength, -1}
		label := "L = " + strconv.FormatFloat(pt.FreeLength*1e3, 'g', 6, 64) + " mm"
		if withOffsets {
			key[1] = float64(pt.Setup)
			if pt.Setup < len(p.Setups) {
				label = p.Setups[pt.Setup]
			}
		}
		c, ok := index[key]
		if !ok {
			c = &curve{label: label, length: pt.FreeLength, setup: pt.Setup}
			index[key] = c
			cs = append(cs, c)
		}
		c.pts = append(c.pts, plotter.XY{X: pt.Load, Y: pt.Deflection * 1e3})
	}
	return cs
}

// plot builds the gonum plot of one panel: per curve the confidence band
// of the fitted mean (a filled polygon at 25 % opacity), the fitted line
// and the measured points (filled circles), load in N across and
// deflection in mm up.
func (p *CalibrationPanel) plot() (*plot.Plot, error) {
	f := p.Fit
	pl := plot.New()
	pl.Title.Text = fmt.Sprintf("%s\nEI = %s N·mm², 95 %% interval [%s, %s], R² = %.4f",
		p.Title, stiffnessText(f.EI*1e6), stiffnessText(f.CI[0]*1e6), stiffnessText(f.CI[1]*1e6), f.R2)
	pl.X.Label.Text = "tip load (N)"
	pl.Y.Label.Text = "tip deflection (mm)"
	pl.Add(plotter.NewGrid())
	pl.Legend.Top, pl.Legend.Left = true, true
	pMax := 0.0
	for _, pt := range p.Points {
		pMax = max(pMax, pt.Load)
	}
	if pMax == 0 {
		pMax = 1
	}
	pl.X.Min = 0
	for k, c := range p.curves() {
		col := curveColors[k%len(curveColors)]
		band := col
		band.A = 0x40
		line := make(plotter.XYs, bandPoints)
		upper := make(plotter.XYs, bandPoints)
		lower := make(plotter.XYs, bandPoints)
		for j := range bandPoints {
			load := pMax * float64(j) / (bandPoints - 1)
			mean, half := f.Band(load, c.length, c.setup)
			if math.IsNaN(mean) || math.IsNaN(half) {
				return nil, fmt.Errorf("calibration plot: %s: the fit has no coefficients", p.Title)
			}
			line[j] = plotter.XY{X: load, Y: mean * 1e3}
			upper[j] = plotter.XY{X: load, Y: (mean + half) * 1e3}
			lower[bandPoints-1-j] = plotter.XY{X: load, Y: (mean - half) * 1e3}
		}
		poly, err := plotter.NewPolygon(append(upper, lower...))
		if err != nil {
			return nil, err
		}
		poly.Color = band
		poly.LineStyle.Width = 0
		ln, err := plotter.NewLine(line)
		if err != nil {
			return nil, err
		}
		ln.Color = col
		ln.Width = vg.Points(1.5)
		sc, err := plotter.NewScatter(c.pts)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
		pl.Add(poly, ln, sc)
		pl.Legend.Add(c.label, ln)
	}
	return pl, nil
}

// CalibrationSVG draws the panels side by side under a title as one SVG
// document (gonum/plot's vgsvg canvas).
func CalibrationSVG(w io.Writer, title string, panels []CalibrationPanel) error {
	if len(panels) == 0 {
		return fmt.Errorf("calibration plot: no panels")
	}
	row := make([]*plot.Plot, len(panels))
	for i := range panels {
		if panels[i].Fit == nil || len(panels[i].Points) == 0 {
			return fmt.Errorf("calibration plot: panel %d has no fit or no points", i+1)
		}
		p, err := panels[i].plot()
		if err != nil {
			return err
		}
		row[i] = p
	}
	width, height := panelW*vg.Length(len(panels)), panelH+titleH
	c := vgsvg.New(width, height)
	dc := draw.New(c)
	ts := row[0].Title.TextStyle
	ts.XAlign, ts.YAlign = draw.XCenter, draw.YCenter
	ts.Font.Size = vg.Points(14)
	dc.FillText(ts, vg.Point{X: width / 2, Y: height - titleH/2}, title)
	body := draw.Crop(dc, 0, 0, 0, -titleH)
	tiles := draw.Tiles{Rows: 1, Cols: len(panels), PadX: vg.Points(12), PadTop: vg.Points(4), PadBottom: vg.Points(4),
		PadLeft: vg.Points(4), PadRight: vg.Points(8)}
	cs := plot.Align([][]*plot.Plot{row}, tiles, body)
	for i, p := range row {
		p.Draw(cs[0][i])
	}
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return fmt.Errorf("calibration plot: render svg: %w", err)
	}
	_, err := w.Write(b.Bytes())
	return err
}

// WriteCalibrationPlot writes CalibrationSVG to path atomically (a
// temporary file in the same directory, then a rename); nothing is
// written when the plot cannot be drawn.
func WriteCalibrationPlot(path, title string, panels []CalibrationPanel) error {
	var b bytes.Buffer
	if err := CalibrationSVG(&b, title, panels); err != nil {
		return err
	}
	return results.WriteAtomic(path, b.Bytes())
}

// stiffnessText prints a stiffness with at least five significant digits, "∞"
// for an interval the data leave open.
func stiffnessText(x float64) string {
	if math.IsInf(x, 1) {
		return "∞"
	}
	if a := math.Abs(x); a >= 1e5 && a < 1e12 {
		return strconv.FormatFloat(x, 'f', 0, 64)
	}
	return strconv.FormatFloat(x, 'g', 5, 64)
}
