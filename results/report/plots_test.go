package report

import (
	"bytes"
	"context"
	"encoding/xml"
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"plica/objective"
	"plica/problems"

	"plica/results"
)

// Problem-file edits for the fixtures.
var (
	threeObjectives = [2]string{"[search]", "[[objective]]\nscore = \"mass_g\"\ngoal = \"minimize\"\n\n[search]"}
	oneObjective    = [2]string{"[[objective]]\nscore = \"reach_mm\"\ngoal = \"maximize\"\n\n", ""}
	impossibleSag   = [2]string{"max_tip_sag_mm = 4.0", "max_tip_sag_mm = 0.0001"}
)

// fixtureRun runs a tiny search (the shipped demo problem with a
// population of 12 and a coarse workspace, as smallProblem) with the given
// edits into a new run folder and returns the folder.
func fixtureRun(t testing.TB, evals int64, edits ...[2]string) *results.Folder {
	t.Helper()
	text, err := os.ReadFile("../../problems/examples/boom-search.toml")
	require.NoError(t, err)
	s := string(text)
	base := [][2]string{{"relative_steps = 32", "relative_steps = 12"}, {"base_steps = 32", "base_steps = 8"}, {"population = 60", "population = 12"}}
	for _, r := range append(base, edits...) {
		require.Contains(t, s, r[0], "fixture edit")
		s = strings.Replace(s, r[0], r[1], 1)
	}
	spec, err := problems.ParseProblem([]byte(s), "small.toml")
	require.NoError(t, err, "fixture problem")
	f, err := results.Create(filepath.Join(t.TempDir(), "run"))
	require.NoError(t, err)
	set := spec.Settings()
	set.MaxEvaluations = evals
	set.Workers = 2
	_, err = results.Execute(context.Background(), spec, f, set, results.Options{Version: "test"})
	require.NoError(t, err, "fixture search")
	return f
}

func fixtureData(t *testing.T, evals int64, edits ...[2]string) *Data {
	t.Helper()
	r, err := Load(fixtureRun(t, evals, edits...))
	require.NoError(t, err, "Load")
	return r
}

// svgElement is one element of an SVG file.
type svgElement struct {
	Name, Style, D, Text string
}

// parseSVG checks that b is well-formed XML with an <svg> root and lists
// its elements.
func parseSVG(t *testing.T, b []byte) []svgElement {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(b))
	var out []svgElement
	var stack []int
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		require.NoError(t, err, "SVG parses as XML")
		switch e := tok.(type) {
		case xml.StartElement:
			el := svgElement{Name: e.Name.Local}
			for _, a := range e.Attr {
				switch a.Name.Local {
				case "style":
					el.Style = a.Value
				case "d":
					el.D = a.Value
				}
			}
			out = append(out, el)
			stack = append(stack, len(out)-1)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			if len(stack) > 0 {
				out[stack[len(stack)-1]].Text += string(e)
			}
		}
	}
	require.NotEmpty(t, out)
	require.Equal(t, "svg", out[0].Name, "root element")
	return out
}

func hexColor(c color.RGBA) string { return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B) }

// countGlyphs counts the filled circles (arc paths) of colour c.
func countGlyphs(els []svgElement, c color.RGBA) int {
	n := 0
	for _, e := range els {
		if e.Name == "path" && strings.Contains(e.D, "A") && strings.Contains(strings.ToLower(e.Style), "fill:"+hexColor(c)) {
			n++
		}
	}
	return n
}

// polylines returns the number of line segments of each stroked path.
func polylines(els []svgElement) []int {
	var out []int
	for _, e := range els {
		if e.Name == "path" && strings.Contains(e.Style, "stroke:") && !strings.Contains(e.D, "A") {
			out = append(out, strings.Count(e.D, "L"))
		}
	}
	return out
}

func texts(els []svgElement) []string {
	var out []string
	for _, e := range els {
		if e.Name == "text" {
			out = append(out, e.Text)
		}
	}
	return out
}

func countTexts(els []svgElement, prefix string) int {
	n := 0
	for _, s := range texts(els) {
		if strings.HasPrefix(s, prefix) {
			n++
		}
	}
	return n
}

func TestScoreAxis(t *testing.T) {
	cases := []struct{ key, name, unit string }{
		{"reach_mm", "reach", "mm"},
		{"surface_area_mm2", "surface area", "mm²"},
		{"volume_mm3", "volume", "mm³"},
		{"bend_angle_range_deg", "bend angle range", "deg"},
		{"mass_g", "mass", "g"},
		{"residual_curvature_per_m", "residual curvature", "1/m"},
		{"peak_strain", "peak strain", "1"},
		{"payload_to_weight", "payload to weight", "1"},
	}
	for _, c := range cases {
		t.Run(c.key, func(t *testing.T) {
			name, unit := scoreAxis(c.key)
			assert.Equal(t, c.name, name, "name of %s", c.key)
			assert.Equal(t, c.unit, unit, "unit of %s", c.key)
		})
	}
	// every score plica knows has a unit the figures can print
	for _, s := range objective.AllScores() {
		_, unit := scoreAxis(s.Name)
		assert.NotEmpty(t, unit, "unit of score %s", s.Name)
	}
}

func TestRepresentative(t *testing.T) {
	quarter := make([][]float64, 7)
	for k := range quarter {
		a := float64(k) * math.Pi / 12
		quarter[k] = []float64{1 - math.Cos(a), 1 - math.Sin(a)}
	}
	cases := []struct {
		name string
		f    [][]float64
		want []int
	}{
		{"empty", nil, nil},
		{"one design", [][]float64{{1, 2}}, []int{0}},
		{"two designs, no knee", [][]float64{{0, 1}, {1, 0}}, []int{0, 1}},
		// derived: distance to the chord x + y = 1 is (1 − x − y)/√2: 0.42 for (0.2, 0.2), 0.07 for (0.6, 0.3)
		{"knee in the middle", [][]float64{{0, 1}, {0.2, 0.2}, {1, 0}, {0.6, 0.3}}, []int{0, 2, 1}},
		// derived: on (1 − cos a, 1 − sin a) the distance to the chord is ∝ cos a + sin a − 1, largest at a = 45°
		{"quarter circle", quarter, []int{0, 6, 3}},
		{"straight front has no knee", [][]float64{{0, 1}, {0.25, 0.75}, {0.5, 0.5}, {1, 0}}, []int{0, 3}},
		{"flat objective has no knee", [][]float64{{0, 1}, {0.5, 1}, {1, 1}}, []int{0}},
		// derived: the plane through the three best designs is x + y + z = 1.5; (0.3, 0.3, 0.3) lies 0.35 on the ideal side
		{"three objectives", [][]float64{{0, 1, 0.5}, {0.5, 0, 1}, {1, 0.5, 0}, {0.3, 0.3, 0.3}}, []int{0, 1, 2, 3}},
		{"ties go to the lower index", [][]float64{{0, 1}, {0, 1}, {1, 0}}, []int{0, 2}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			assert.Equal(t, c.want, Representative(c.f), "Representative(%v)", c.f)
		})
	}
}

func TestLoad(t *testing.T) {
	r := fixtureData(t, 120)
	require.NotEmpty(t, r.Front, "the demo problem has feasible designs")
	assert.Len(t, r.Front, r.Info.FrontSize, "front.csv rows against run.json")
	for i, row := range r.Front {
		assert.Equal(t, i+1, row.ID, "front ids run from 1")
		x, err := r.Folder.FrontX(r.Spec, row.ID)
		require.NoError(t, err)
		assert.Equal(t, x, row.X, "variables of design %d against FrontX", row.ID)
		assert.Len(t, row.F, 2, "objectives of design %d", row.ID)
		assert.Positive(t, row.F[0], "reach_mm is read in its own sign (design %d)", row.ID)
	}
	assert.Len(t, r.History, r.Info.Generations+1, "history: initial population and every generation")
	assert.Equal(t, r.Info.Evaluations, r.History[len(r.History)-1].Evaluations, "last history row")
	assert.NotEmpty(t, r.Evaluated, "feasible evaluations")
	assert.LessOrEqual(t, len(r.Evaluated), MaxEvaluatedPoints)
	assert.Equal(t, []float64{-r.Front[0].F[0], r.Front[0].F[1]}, r.Minimised(r.Front[0]), "maximised reach is negated")
}

func TestThin(t *testing.T) {
	rows := make([]Row, 10)
	for i := range rows {
		rows[i].Index = int64(i)
	}
	got := thin(rows, 4)
	var idx []int64
	for _, r := range got {
		idx = append(idx, r.Index)
	}
	assert.Equal(t, []int64{0, 3, 6, 9}, idx, "evenly spread, ends kept")
	assert.Len(t, thin(rows, 20), 10, "short lists are kept whole")
}

func TestFrontFigure(t *testing.T) {
	cases := []struct {
		name   string
		edits  [][2]string
		panels int // scatter panels
		legend int // legend entries per series
		labels []string
	}{
		{"one objective", [][2]string{oneObjective}, 1, 0, []string{"tip sag (mm), minimize", "evaluation index (count)"}},
		{"two objectives", nil, 1, 1, []string{"reach (mm), maximize", "tip sag (mm), minimize"}},
		{"three objectives: pairs", [][2]string{threeObjectives}, 3, 1, []string{"reach (mm), maximize", "tip sag (mm), minimize", "mass (g), minimize"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := fixtureData(t, 72, c.edits...)
			require.NotEmpty(t, r.Front)
			chosen := []int{r.Front[0].ID}
			fig, err := r.FrontFigure(chosen)
			require.NoError(t, err)
			els := parseSVG(t, fig.SVG)
			assert.Equal(t, c.panels*len(r.Front)+c.legend, countGlyphs(els, frontColor), "front points")
			assert.Equal(t, c.panels*len(r.Evaluated)+c.legend, countGlyphs(els, evaluatedColor), "feasible evaluations")
			assert.Equal(t, c.panels*len(chosen)+c.legend, countGlyphs(els, chosenColor), "chosen designs")
			assert.Equal(t, c.panels*len(chosen), countTexts(els, "#"), "chosen designs are labelled")
			for _, l := range c.labels {
				assert.Contains(t, texts(els), l, "axis label")
			}
		})
	}
}

func TestVariablesFigure(t *testing.T) {
	r := fixtureData(t, 72)
	n := len(r.Spec.Variables)
	chosen := []int{1, r.Front[len(r.Front)-1].ID}
	fig, err := r.VariablesFigure(chosen)
	require.NoError(t, err)
	els := parseSVG(t, fig.SVG)
	designLines, axes := 0, 0
	for _, segs := range polylines(els) {
		if segs == n-1 {
			designLines++
		}
	}
	for _, e := range els {
		if e.Name == "path" && strings.Contains(strings.ToLower(e.Style), "stroke:"+hexColor(axisColor)) {
			axes++
		}
	}
	assert.Equal(t, len(r.Front)+len(chosen), designLines, "one line per front design, the chosen ones drawn again")
	assert.Equal(t, n, axes, "one axis per variable")
	all := strings.Join(texts(els), "\n")
	for _, v := range r.Spec.Variables {
		assert.Contains(t, all, v.Key, "tick label of %s", v.Path())
		assert.Contains(t, all, fmt.Sprintf("%.4g to %.4g %s", v.Lower, v.Upper, v.Unit), "range of %s", v.Path())
	}
	assert.Contains(t, texts(els), "position in range (1)", "y axis label")
}

func TestHypervolumeFigure(t *testing.T) {
	r := fixtureData(t, 72)
	fig, err := r.HypervolumeFigure()
	require.NoError(t, err)
	els := parseSVG(t, fig.SVG)
	assert.Equal(t, len(r.History), countGlyphs(els, historyColor), "one point per history row")
	lines := 0
	for _, e := range els {
		if e.Name == "path" && strings.Contains(strings.ToLower(e.Style), "stroke:"+hexColor(historyColor)) {
			lines++
			assert.Equal(t, len(r.History)-1, strings.Count(e.D, "L"), "hypervolume line segments")
		}
	}
	assert.Equal(t, 1, lines, "one hypervolume line")
	assert.Contains(t, texts(els), "hypervolume (mm·mm)", "y label with the objectives' units")
	assert.Contains(t, texts(els), "evaluations (count)", "x label")
	assert.Contains(t, fig.Caption, vector(r.Info.Reference), "caption names the reference point")

	r.History = nil
	_, err = r.HypervolumeFigure()
	assert.Error(t, err, "no history, no figure")
}

func loadRobot(t *testing.T, file string) (*objective.Design, *objective.Scenario) {
	t.Helper()
	d, sc, err := problems.LoadDesign("../../problems/examples/" + file)
	require.NoError(t, err, "load %s", file)
	return d, sc
}

func TestBackboneFigure(t *testing.T) {
	d, sc := loadRobot(t, "boom-geometry.toml")
	robot, _, err := d.Robot()
	require.NoError(t, err)
	fig, err := BackboneFigure("backbone.svg", "Backbone", robot, sc.Workspace)
	require.NoError(t, err)
	els := parseSVG(t, fig.SVG)
	long := 0
	for _, segs := range polylines(els) {
		if segs >= 10 {
			long++
		}
	}
	assert.Equal(t, 2*BackboneRotations, long, "one backbone per rotation in each view")
	for k := range BackboneRotations {
		assert.Contains(t, texts(els), fmt.Sprintf("%d°", 360*k/BackboneRotations), "tip label of rotation %d", k)
	}
	for _, l := range []string{"z (mm)", "x (mm)", "y (mm)", "side view", "top view"} {
		assert.Contains(t, texts(els), l, "label")
	}
}

// TestFigureTipsAreScored: the workspace figure draws the tips the
// workspace scores use (objective.WorkspaceTips), all of them when they fit
// under the cap, else an even selection of them.
func TestFigureTipsAreScored(t *testing.T) {
	d, sc := loadRobot(t, "boom-geometry.toml")
	robot, _, err := d.Robot()
	require.NoError(t, err)
	scored, err := objective.WorkspaceTips(robot, sc.Workspace)
	require.NoError(t, err)
	all, err := figureTips(robot, sc.Workspace, len(scored))
	require.NoError(t, err)
	assert.Equal(t, scored, all, "under the cap: every scored tip")
	capped, err := figureTips(robot, sc.Workspace, 100)
	require.NoError(t, err)
	assert.Len(t, capped, 100, "at most (and here exactly) maxPoints tips")
	seen := map[[3]float64]bool{}
	for _, p := range scored {
		seen[p] = true
	}
	for _, p := range capped {
		assert.True(t, seen[p], "drawn tip %v is a scored tip", p)
	}
	assert.Equal(t, scored[0], capped[0], "first tip kept")
	assert.Equal(t, scored[len(scored)-1], capped[len(capped)-1], "last tip kept")
}

func TestWorkspaceFigure(t *testing.T) {
	d, sc := loadRobot(t, "boom-geometry.toml")
	robot, _, err := d.Robot()
	require.NoError(t, err)
	fig, err := WorkspaceFigure("workspace.svg", "Workspace", robot, sc.Workspace)
	require.NoError(t, err)
	tips, err := figureTips(robot, sc.Workspace, MaxWorkspacePoints)
	require.NoError(t, err)
	els := parseSVG(t, fig.SVG)
	assert.Equal(t, 2*len(tips), countGlyphs(els, workspaceColor), "every tip in both views")
	assert.Equal(t, 1, countGlyphs(els, baseColor), "the base")
	for _, l := range []string{"z (mm)", "x (mm)", "y (mm)"} {
		assert.Contains(t, texts(els), l, "axis label")
	}
}

func TestFigEqualAspect(t *testing.T) {
	cases := []struct {
		name          string
		xmax, ymax    float64
		width, height vg.Length
		growX, growY  bool
	}{
		{"wide data, square canvas", 100, 10, 300, 300, false, true},
		{"tall data, wide canvas", 10, 100, 500, 200, true, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := plot.New()
			l, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: c.xmax, Y: c.ymax}})
			require.NoError(t, err)
			p.Add(l)
			dc := draw.New(vgsvg.New(c.width, c.height))
			equalAspect(p, dc)
			da := p.DataCanvas(dc)
			ux := (p.X.Max - p.X.Min) / float64(da.Max.X-da.Min.X)
			uy := (p.Y.Max - p.Y.Min) / float64(da.Max.Y-da.Min.Y)
			// tick labels can change width after the last pass: 2 %
			assert.InEpsilon(t, ux, uy, 0.02, "data units per point on x and y")
			assert.LessOrEqual(t, p.X.Min, 0.0, "x range still holds the data")
			assert.GreaterOrEqual(t, p.X.Max, c.xmax, "x range still holds the data")
			assert.LessOrEqual(t, p.Y.Min, 0.0, "y range still holds the data")
			assert.GreaterOrEqual(t, p.Y.Max, c.ymax, "y range still holds the data")
		})
	}
}

func TestWritePlots(t *testing.T) {
	f, err := results.Create(t.TempDir())
	require.NoError(t, err)
	p := newPlot("t", "a (mm)", "b (mm)")
	b, err := SVG(p, 3*vg.Inch, 2*vg.Inch)
	require.NoError(t, err)
	figs := []Figure{{Name: "a.svg", SVG: b}, {Name: "b.svg", SVG: b}}
	require.NoError(t, WritePlots(f, figs))
	require.NoError(t, WritePlots(f, figs), "writing again replaces the files")
	entries, err := os.ReadDir(f.Path(PlotsDir))
	require.NoError(t, err)
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
		parseSVG(t, []byte(readFile(t, filepath.Join(f.Path(PlotsDir), e.Name()))))
	}
	assert.Equal(t, []string{"a.svg", "b.svg"}, names, "no temporary files left behind")
}

// BenchmarkBuild builds the report of a tiny run (72 evaluations,
// two objectives): reading the folder, checking the designs shown and
// drawing every figure.
func BenchmarkBuild(b *testing.B) {
	f := fixtureRun(b, 72)
	var rep *Report
	for b.Loop() {
		var err error
		rep, err = Build(context.Background(), f, Options{})
		if err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(rep.Figures)), "figures/op")
	b.ReportMetric(float64(len(rep.HTML)), "html-bytes/op")
}

// BenchmarkWorkspaceFigure draws the workspace of the shipped geometry
// example (64 relative rotations, capped at MaxWorkspacePoints tips).
func BenchmarkWorkspaceFigure(b *testing.B) {
	d, sc, err := problems.LoadDesign("../../problems/examples/boom-geometry.toml")
	if err != nil {
		b.Fatal(err)
	}
	robot, _, err := d.Robot()
	if err != nil {
		b.Fatal(err)
	}
	var fig Figure
	for b.Loop() {
		if fig, err = WorkspaceFigure("w.svg", "w", robot, sc.Workspace); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(fig.SVG)), "svg-bytes/op")
}
