// Package results writes what plica computes to files people read: run
// folders, reports and plots.
//
// Quantities arrive in SI (metres, newtons); plots label their axes with
// the unit they print in (mm, N).
package results

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"

	"plica/surrogate"
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

// svg geometry, px
const (
	panelW, panelH = 460.0, 380.0
	marginL        = 70.0
	marginR        = 20.0
	marginT        = 50.0
	marginB        = 55.0
	legendH        = 16.0
	bandSamples    = 41
)

var palette = []string{"#1f77b4", "#d62728", "#2ca02c", "#9467bd", "#ff7f0e", "#8c564b", "#17becf", "#7f7f7f"}

// curve is one fitted line: a free length and, with an intercept, a setup.
type curve struct {
	label  string
	length float64
	setup  int
}

func (p *CalibrationPanel) curves() ([]curve, []int) {
	var cs []curve
	index := map[[2]float64]int{}
	of := make([]int, len(p.Points))
	withOffsets := p.Fit != nil && p.Fit.Offsets != nil
	for i, pt := range p.Points {
		key := [2]float64{pt.FreeLength, -1}
		label := "L = " + strconv.FormatFloat(pt.FreeLength*1e3, 'g', 6, 64) + " mm"
		if withOffsets {
			key[1] = float64(pt.Setup)
			if pt.Setup < len(p.Setups) {
				label = p.Setups[pt.Setup]
			}
		}
		k, ok := index[key]
		if !ok {
			k = len(cs)
			index[key] = k
			cs = append(cs, curve{label: label, length: pt.FreeLength, setup: pt.Setup})
		}
		of[i] = k
	}
	return cs, of
}

// CalibrationSVG draws the panels side by side as a standalone SVG: points
// as circles (class "point"), the fitted deflection as a polyline (class
// "fit") and the confidence band of the fitted mean as a polygon (class
// "band") per curve, with load in N across and deflection in mm up.
func CalibrationSVG(w io.Writer, title string, panels []CalibrationPanel) error {
	if len(panels) == 0 {
		return fmt.Errorf("calibration plot: no panels")
	}
	for i := range panels {
		if panels[i].Fit == nil || len(panels[i].Points) == 0 {
			return fmt.Errorf("calibration plot: panel %d has no fit or no points", i+1)
		}
	}
	var b bytes.Buffer
	width, height := panelW*float64(len(panels)), panelH+30
	fmt.Fprintf(&b, `<?xml version="1.0" encoding="UTF-8"?>`+"\n")
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" width="%g" height="%g" viewBox="0 0 %g %g" font-family="sans-serif" font-size="12">`+"\n", width, height, width, height)
	fmt.Fprintf(&b, "<title>%s</title>\n", esc(title))
	fmt.Fprintf(&b, `<rect x="0" y="0" width="%g" height="%g" fill="white"/>`+"\n", width, height)
	fmt.Fprintf(&b, `<text x="%g" y="20" text-anchor="middle" font-size="14">%s</text>`+"\n", width/2, esc(title))
	for i := range panels {
		if err := panels[i].draw(&b, float64(i)*panelW, 30); err != nil {
			return err
		}
	}
	b.WriteString("</svg>\n")
	_, err := w.Write(b.Bytes())
	return err
}

func (p *CalibrationPanel) draw(b *bytes.Buffer, x0, y0 float64) error {
	f := p.Fit
	cs, of := p.curves()
	// Data ranges: loads from 0, deflections including band and zero.
	pMax, dMin, dMax := 0.0, 0.0, 0.0
	for _, pt := range p.Points {
		pMax = max(pMax, pt.Load)
		dMin, dMax = min(dMin, pt.Deflection), max(dMax, pt.Deflection)
	}
	if pMax == 0 {
		pMax = 1
	}
	type sample struct{ p, mean, half float64 }
	bands := make([][]sample, len(cs))
	for k, c := range cs {
		for j := range bandSamples {
			load := pMax * float64(j) / (bandSamples - 1)
			mean, half := f.Band(load, c.length, c.setup)
			if math.IsNaN(mean) || math.IsNaN(half) {
				return fmt.Errorf("calibration plot: %s: fit has no coefficients", p.Title)
			}
			bands[k] = append(bands[k], sample{load, mean, half})
			dMin, dMax = min(dMin, mean-half), max(dMax, mean+half)
		}
	}
	xTicks := niceTicks(0, pMax)
	yTicks := niceTicks(dMin*1e3, dMax*1e3)
	xLo, xHi := xTicks[0], xTicks[len(xTicks)-1]
	yLo, yHi := yTicks[0], yTicks[len(yTicks)-1]
	left, right := x0+marginL, x0+panelW-marginR
	top, bottom := y0+marginT, y0+panelH-marginB
	px := func(load float64) float64 { return left + (load-xLo)/(xHi-xLo)*(right-left) }
	py := func(defl float64) float64 { return bottom - (defl*1e3-yLo)/(yHi-yLo)*(bottom-top) }

	fmt.Fprintf(b, `<g class="panel">`+"\n")
	fmt.Fprintf(b, `<text x="%.2f" y="%.2f" text-anchor="middle" font-size="13">%s</text>`+"\n", (left+right)/2, y0+18, esc(p.Title))
	fmt.Fprintf(b, `<text x="%.2f" y="%.2f" text-anchor="middle" font-size="11">EI = %s N·mm², 95 %% interval [%s, %s], R² = %s</text>`+"\n",
		(left+right)/2, y0+34, g4(f.EI*1e6), g4(f.CI[0]*1e6), g4(f.CI[1]*1e6), strconv.FormatFloat(f.R2, 'f', 4, 64))
	// grid and ticks
	for _, t := range xTicks {
		x := left + (t-xLo)/(xHi-xLo)*(right-left)
		fmt.Fprintf(b, `<line class="grid" x1="%.2f" y1="%.2f" x2="%.2f" y2="%.2f" stroke="#e0e0e0"/>`+"\n", x, top, x, bottom)
		fmt.Fprintf(b, `<text x="%.2f" y="%.2f" text-anchor="middle">%s</text>`+"\n", x, bottom+16, g4(t))
	}
	for _, t := range yTicks {
		y := bottom - (t-yLo)/(yHi-yLo)*(bottom-top)
		fmt.Fprintf(b, `<line class="grid" x1="%.2f" y1="%.2f" x2="%.2f" y2="%.2f" stroke="#e0e0e0"/>`+"\n", left, y, right, y)
		fmt.Fprintf(b, `<text x="%.2f" y="%.2f" text-anchor="end" dominant-baseline="middle">%s</text>`+"\n", left-6, y, g4(t))
	}
	fmt.Fprintf(b, `<rect class="frame" x="%.2f" y="%.2f" width="%.2f" height="%.2f" fill="none" stroke="black"/>`+"\n", left, top, right-left, bottom-top)
	fmt.Fprintf(b, `<text class="xlabel" x="%.2f" y="%.2f" text-anchor="middle">tip load (N)</text>`+"\n", (left+right)/2, bottom+36)
	fmt.Fprintf(b, `<text class="ylabel" x="%.2f" y="%.2f" text-anchor="middle" transform="rotate(-90 %.2f %.2f)">tip deflection (mm)</text>`+"\n",
		x0+18, (top+bottom)/2, x0+18, (top+bottom)/2)

	for k, c := range cs {
		color := palette[k%len(palette)]
		var poly, line bytes.Buffer
		for _, s := range bands[k] {
			fmt.Fprintf(&poly, "%.2f,%.2f ", px(s.p), py(s.mean+s.half))
		}
		for j := len(bands[k]) - 1; j >= 0; j-- {
			s := bands[k][j]
			fmt.Fprintf(&poly, "%.2f,%.2f ", px(s.p), py(s.mean-s.half))
		}
		for _, s := range bands[k] {
			fmt.Fprintf(&line, "%.2f,%.2f ", px(s.p), py(s.mean))
		}
		fmt.Fprintf(b, `<polygon class="band" points="%s" fill="%s" fill-opacity="0.2" stroke="none"><title>95 %% band, %s</title></polygon>`+"\n",
			bytes.TrimSpace(poly.Bytes()), color, esc(c.label))
		fmt.Fprintf(b, `<polyline class="fit" points="%s" fill="none" stroke="%s" stroke-width="1.5"><title>fit, %s</title></polyline>`+"\n",
			bytes.TrimSpace(line.Bytes()), color, esc(c.label))
		ly := top + 8 + legendH*float64(k)
		fmt.Fprintf(b, `<g class="legend"><line x1="%.2f" y1="%.2f" x2="%.2f" y2="%.2f" stroke="%s" stroke-width="1.5"/><text x="%.2f" y="%.2f" dominant-baseline="middle">%s</text></g>`+"\n",
			left+8, ly, left+26, ly, color, left+30, ly, esc(c.label))
	}
	for i, pt := range p.Points {
		color := palette[of[i]%len(palette)]
		fmt.Fprintf(b, `<circle class="point" cx="%.2f" cy="%.2f" r="3.5" fill="%s" stroke="black" stroke-width="0.5"><title>%s N, %s mm</title></circle>`+"\n",
			px(pt.Load), py(pt.Deflection), color, g4(pt.Load), g4(pt.Deflection*1e3))
	}
	b.WriteString("</g>\n")
	return nil
}

// WriteCalibrationPlot writes CalibrationSVG to path atomically (a
// temporary file in the same directory, then a rename).
func WriteCalibrationPlot(path, title string, panels []CalibrationPanel) error {
	var b bytes.Buffer
	if err := CalibrationSVG(&b, title, panels); err != nil {
		return err
	}
	return writeAtomic(path, b.Bytes())
}

func writeAtomic(path string, data []byte) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if _, err = tmp.Write(data); err != nil {
		return err
	}
	if err = tmp.Sync(); err != nil {
		return err
	}
	if err = tmp.Chmod(0o644); err != nil {
		return err
	}
	if err = tmp.Close(); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}

// niceTicks returns 4–8 round tick values covering [lo, hi]
// (1-2-5 steps, common practice for plot axes).
func niceTicks(lo, hi float64) []float64 {
	if !(hi > lo) {
		hi = lo + 1
	}
	raw := (hi - lo) / 5
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, m := range []float64{1, 2, 5, 10} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	start := math.Floor(lo/step+1e-9) * step
	var out []float64
	for i := 0; i < 100; i++ {
		v := start + float64(i)*step
		out = append(out, v)
		if v >= hi-1e-9*step && i >= 1 {
			break
		}
	}
	return out
}

func g4(x float64) string {
	if math.IsInf(x, 1) {
		return "∞"
	}
	return strconv.FormatFloat(x, 'g', 4, 64)
}

func esc(s string) string {
	var b bytes.Buffer
	xml.EscapeText(&b, []byte(s))
	return b.String()
}
