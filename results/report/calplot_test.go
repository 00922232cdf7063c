package report

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// svgPath is one <path> of the SVG: its vertices (M and L commands) and
// style; circles (two arcs) give their centre as the only vertex.
type svgPath struct {
	pts    [][2]float64
	circle bool
	style  string
}

// parsePaths decodes the SVG as XML (failing on malformed output) and
// returns its paths and the text of its <text> elements.
func parsePaths(t *testing.T, data []byte) (root xml.StartElement, paths []svgPath, texts []string) {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	inText := false
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		require.NoError(t, err, "SVG must be well-formed XML")
		switch e := tok.(type) {
		case xml.StartElement:
			if root.Name.Local == "" {
				root = e
			}
			switch e.Name.Local {
			case "path":
				var d, style string
				for _, a := range e.Attr {
					switch a.Name.Local {
					case "d":
						d = a.Value
					case "style":
						style = a.Value
					}
				}
				paths = append(paths, parsePath(t, d, style))
			case "text":
				inText = true
				texts = append(texts, "")
			}
		case xml.CharData:
			if inText {
				texts[len(texts)-1] += string(e)
			}
		case xml.EndElement:
			if e.Name.Local == "text" {
				inText = false
			}
		}
	}
	return root, paths, texts
}

func parsePath(t *testing.T, d, style string) svgPath {
	t.Helper()
	p := svgPath{style: style}
	if strings.Contains(d, "A") {
		// circle: M x0,y A r,r 0 1 1 x1,y A ... Z, centre ((x0+x1)/2, y)
		f := strings.FieldsFunc(d, func(r rune) bool { return r == 'M' || r == 'A' || r == ' ' || r == ',' || r == 'Z' })
		require.GreaterOrEqual(t, len(f), 9, "circle path %q", d)
		x0, y0, x1 := number(t, f[0]), number(t, f[1]), number(t, f[7])
		p.pts, p.circle = [][2]float64{{(x0 + x1) / 2, y0}}, true
		return p
	}
	for _, seg := range strings.FieldsFunc(d, func(r rune) bool { return r == 'M' || r == 'L' || r == 'Z' }) {
		xy := strings.Split(strings.TrimSpace(seg), ",")
		require.Len(t, xy, 2, "vertex %q of %q", seg, d)
		p.pts = append(p.pts, [2]float64{number(t, xy[0]), number(t, xy[1])})
	}
	return p
}

func number(t *testing.T, s string) float64 {
	t.Helper()
	x, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	require.NoError(t, err, "number %q", s)
	return x
}

// kinds sorts the paths of a calibration figure: point circles, band
// polygons (filled at partial opacity) and fitted lines (stroked, one
// vertex per band sample).
func pathKinds(paths []svgPath) (circles, bands, lines []svgPath) {
	for _, p := range paths {
		switch {
		case p.circle:
			circles = append(circles, p)
		case strings.Contains(p.style, "fill-opacity"):
			bands = append(bands, p)
		case strings.Contains(p.style, "fill:none") && len(p.pts) == bandPoints:
			lines = append(lines, p)
		}
	}
	return
}

// noiselessPanel is a cantilever test at two free lengths (δ = PL³/(3EI),
// Roark Table 8.1 case 1a / Gere & Timoshenko Table G-1 case 4), with an
// optional alternating error, fitted through the origin.
func noiselessPanel(t *testing.T, noise float64) CalibrationPanel {
	t.Helper()
	var pts []surrogate.BenchPoint
	i := 0
	for _, l := range []float64{0.1, 0.15} {
		for _, p := range []float64{0.5, 1, 1.5, 2} {
			d := p * l * l * l / (3 * 0.05)
			d += noise * float64(i%3-1)
			i++
			pts = append(pts, surrogate.BenchPoint{Load: p, Deflection: d, FreeLength: l})
		}
	}
	f, err := surrogate.FitCantilever(pts, surrogate.FitOptions{})
	require.NoError(t, err)
	return CalibrationPanel{Title: "bending about x", Points: pts, Fit: &f}
}

// TestCalibrationSVG parses the plot as XML and checks its elements: one
// circle per point, one fitted line and one band polygon per free length
// and panel, titles and axis labels; points of a noiseless fit lie on their
// line, and each band encloses its line.
func TestCalibrationSVG(t *testing.T) {
	exact := noiselessPanel(t, 0)
	noisy := noiselessPanel(t, 2e-3)
	noisy.Title = "bending about y"
	var buf bytes.Buffer
	require.NoError(t, CalibrationSVG(&buf, "bench <fit> & check", []CalibrationPanel{exact, noisy}))
	root, paths, texts := parsePaths(t, buf.Bytes())
	assert.Equal(t, "svg", root.Name.Local, "root element")
	all := strings.Join(texts, "\n")
	for _, want := range []string{"bench <fit> & check", "bending about x", "bending about y", "tip load (N)", "tip deflection (mm)", "L = 100 mm", "L = 150 mm", "95 % interval"} {
		assert.Contains(t, all, want, "text of the figure")
	}
	circles, bands, lines := pathKinds(paths)
	require.Len(t, circles, 16, "one circle per point")
	require.Len(t, lines, 4, "one fitted line per free length and panel")
	require.Len(t, bands, 4, "one band per free length and panel")

	// Noiseless panel: each circle lies on the line of its free length.
	for i := range 8 {
		c := circles[i].pts[0]
		assert.InDelta(t, interpolate(lines[i/4].pts, c[0]), c[1], 0.05, "point %d (%g, %g) on its line (pt)", i, c[0], c[1])
	}
	// Each band encloses its line (y grows upward inside the figure); the
	// noisy panel's band has visible width.
	for k := range 4 {
		line, poly := lines[k].pts, bands[k].pts
		n := len(line)
		require.Len(t, poly, 2*n, "band %d has an upper and a lower edge", k)
		wide := false
		for j, p := range line {
			upper, lower := poly[j], poly[2*n-1-j]
			assert.GreaterOrEqual(t, upper[1], p[1]-0.01, "band %d upper edge above the line at %d", k, j)
			assert.LessOrEqual(t, lower[1], p[1]+0.01, "band %d lower edge below the line at %d", k, j)
			wide = wide || upper[1]-lower[1] > 0.5
		}
		assert.Equal(t, k >= 2, wide, "band %d: only the noisy panel has a visible band", k)
	}
}

func interpolate(line [][2]float64, x float64) float64 {
	for j := 1; j < len(line); j++ {
		if x <= line[j][0]+1e-9 {
			a, b := line[j-1], line[j]
			return a[1] + (x-a[0])/(b[0]-a[0])*(b[1]-a[1])
		}
	}
	return math.NaN()
}

// TestCalibrationSVGOffsets: with an intercept each setup has its own
// line, labelled with the setup name.
func TestCalibrationSVGOffsets(t *testing.T) {
	var pts []surrogate.BenchPoint
	for k, a := range []float64{0.2e-3, 0.5e-3} {
		for _, p := range []float64{0, 0.5, 1, 1.5} {
			pts = append(pts, surrogate.BenchPoint{Load: p, Deflection: a + p*0.001/(3*0.05) + 1e-6*p*p, FreeLength: 0.1, Setup: k})
		}
	}
	f, err := surrogate.FitCantilever(pts, surrogate.FitOptions{Intercept: true})
	require.NoError(t, err)
	var buf bytes.Buffer
	require.NoError(t, CalibrationSVG(&buf, "offsets", []CalibrationPanel{{Title: "x", Points: pts, Setups: []string{"A, 100 mm", "B, 100 mm"}, Fit: &f}}))
	_, paths, texts := parsePaths(t, buf.Bytes())
	_, _, lines := pathKinds(paths)
	assert.Len(t, lines, 2, "one line per setup")
	assert.Contains(t, texts, "B, 100 mm", "legend names the setup")
}

func TestCalibrationSVGErrors(t *testing.T) {
	var buf bytes.Buffer
	assert.Error(t, CalibrationSVG(&buf, "none", nil), "no panels")
	assert.Error(t, CalibrationSVG(&buf, "no fit", []CalibrationPanel{{Title: "x"}}), "panel without fit")
	assert.Zero(t, buf.Len(), "nothing written on error")
}

func TestWriteCalibrationPlotAtomic(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "fit.svg")
	require.NoError(t, WriteCalibrationPlot(path, "fit", []CalibrationPanel{noiselessPanel(t, 1e-5)}))
	data, err := os.ReadFile(path)
	require.NoError(t, err)
	parsePaths(t, data)
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 1, "no temporary file left")
	assert.Error(t, WriteCalibrationPlot(filepath.Join(dir, "no", "fit.svg"), "fit", []CalibrationPanel{noiselessPanel(t, 1e-5)}))
	assert.Error(t, WriteCalibrationPlot(filepath.Join(dir, "empty.svg"), "fit", nil))
	_, err = os.Stat(filepath.Join(dir, "empty.svg"))
	assert.True(t, os.IsNotExist(err), "no file for a plot that cannot be drawn")
}

// ExampleCalibrationSVG draws a noiseless cantilever fit (demo numbers)
// and counts the drawn elements.
func ExampleCalibrationSVG() {
	var pts []surrogate.BenchPoint
	for _, p := range []float64{0.5, 1, 1.5, 2} {
		pts = append(pts, surrogate.BenchPoint{Load: p, Deflection: p * 0.15 * 0.15 * 0.15 / (3 * 0.05), FreeLength: 0.15})
	}
	f, err := surrogate.FitCantilever(pts, surrogate.FitOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	var buf bytes.Buffer
	if err := CalibrationSVG(&buf, "demo", []CalibrationPanel{{Title: "bending about x", Points: pts, Fit: &f}}); err != nil {
		fmt.Println(err)
		return
	}
	s := buf.String()
	// each point is a circle of two arcs of radius 3 pt
	fmt.Println(strings.HasPrefix(s, "<?xml"), strings.Count(s, "A3,3")/2, "points,", strings.Count(s, "fill-opacity"), "band")
	// Output:
	// true 4 points, 1 band
}
