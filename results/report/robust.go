package report

import (
	"fmt"
	"html/template"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"plica/problems"
	"plica/results"
)

// RowRobust is the robust part of a front.csv row (objective/REFERENCE.md
// §9.7): Monte Carlo pass probabilities and score quantiles.
type RowRobust struct {
	Method          string // front.csv robust_method: monte_carlo or not_scored
	SearchEstimate  string // search_estimate: first_order or nominal
	Samples         int
	PassProbability float64
	PassSE          float64
	// Checks holds pass_probability_<check>, in the problem's check order.
	Checks []float64
	// Scores holds, per objective, mean, sd, p05, p50 and p95 of its score.
	Scores [][5]float64
}

// Scored reports whether the row carries Monte Carlo numbers.
func (rr *RowRobust) Scored() bool { return rr != nil && rr.Method == results.RobustMonteCarlo }

// readRowRobust reads a row's robust columns (nil when front.csv has
// none: a problem without [scatter]).
func readRowRobust(s *problems.Spec, header, rec []string) *RowRobust {
	col := map[string]int{}
	for i, h := range header {
		col[h] = i
	}
	if _, ok := col["robust_method"]; !ok {
		return nil
	}
	cell := func(name string) string {
		if k, ok := col[name]; ok && k < len(rec) {
			return rec[k]
		}
		return ""
	}
	f := func(name string) float64 {
		v, err := strconv.ParseFloat(cell(name), 64)
		if err != nil {
			return math.NaN()
		}
		return v
	}
	rr := &RowRobust{Method: cell("robust_method"), SearchEstimate: cell("search_estimate"),
		PassProbability: f("pass_probability"), PassSE: f("pass_probability_se")}
	rr.Samples, _ = strconv.Atoi(cell("robust_samples"))
	for _, n := range s.Checks {
		rr.Checks = append(rr.Checks, f("pass_probability_"+n))
	}
	for _, o := range s.Objectives {
		var st [5]float64
		for k, q := range []string{"mean", "sd", "p05", "p50", "p95"} {
			st[k] = f(o.Score + "_" + q)
		}
		rr.Scores = append(rr.Scores, st)
	}
	return rr
}

// robustSection is a shown design's table of odds in the report.
type robustSection struct {
	Method, Note string
	All          string
	Checks       [][3]string // check, P(pass), note
	Scores       [][6]string // score, mean, sd, p05, p50, p95
	MinPass      string      // min_pass_probability and the verdict, or ""
}

// newRobustSection turns a front row's robust columns into the report's
// table (nil without).
func newRobustSection(s *problems.Spec, rr *RowRobust) *robustSection {
	if rr == nil {
		return nil
	}
	sec := &robustSection{Method: rr.Method}
	if !rr.Scored() {
		sec.Note = "The run stopped before its front was scored under print scatter; resume it to score the front."
		return sec
	}
	search := "scored nominal designs"
	if rr.SearchEstimate == results.RobustFirstOrder {
		search = "ranked candidates by the first-order estimate (objective/REFERENCE.md §9.7)"
	}
	sec.Note = fmt.Sprintf("Monte Carlo, %d samples, under the problem's [scatter]; the search %s. Standard error of a probability: sqrt(p(1-p)/n).", rr.Samples, search)
	sec.All = fmt.Sprintf("%.4f ± %.4f", rr.PassProbability, rr.PassSE)
	low := math.Inf(1)
	for i, n := range s.Checks {
		p := rr.Checks[i]
		low = math.Min(low, p)
		sec.Checks = append(sec.Checks, [3]string{n, fmt.Sprintf("%.4f", p), fmt.Sprintf("± %.4f", math.Sqrt(p*(1-p)/float64(max(1, rr.Samples))))})
	}
	for i, o := range s.Objectives {
		st := rr.Scores[i]
		sec.Scores = append(sec.Scores, [6]string{o.Score, num(st[0]), num(st[1]), num(st[2]), num(st[3]), num(st[4])})
	}
	if pmin := s.MinPassProbability; pmin > 0 {
		verdict := "met"
		if low < pmin {
			verdict = "not met"
		}
		sec.MinPass = fmt.Sprintf("min_pass_probability %g: lowest check %.4f, %s (by Monte Carlo)", pmin, low, verdict)
	}
	return sec
}

// robustTemplate is the report's block for one design's odds.
const robustTemplate = `{{define "robust"}}<h4>Under print scatter</h4>
<p>{{.Note}}</p>
{{if .Checks}}<table class="checks"><tr><th>check</th><th>P(pass)</th><th>std error</th></tr>
{{range .Checks}}<tr><td><code>{{index . 0}}</code></td><td class="num">{{index . 1}}</td><td class="num">{{index . 2}}</td></tr>
{{end}}<tr><td>all checks</td><td class="num" colspan="2">{{.All}}</td></tr></table>
{{if .MinPass}}<p>{{.MinPass}}</p>{{end}}
<table class="checks"><tr><th>score</th><th>mean</th><th>sd</th><th>p05</th><th>p50</th><th>p95</th></tr>
{{range .Scores}}<tr><td><code>{{index . 0}}</code></td><td class="num">{{index . 1}}</td><td class="num">{{index . 2}}</td><td class="num">{{index . 3}}</td><td class="num">{{index . 4}}</td><td class="num">{{index . 5}}</td></tr>
{{end}}</table>{{end}}
{{end}}`

func init() { template.Must(reportTemplate.Parse(robustTemplate)) }

// rangeBars draws, for every front row scored by Monte Carlo, the 5–95 %
// range of objective i along x and of objective j along y (j < 0: along
// y only, objective i, at the row's evaluation index).
func (r *Data) rangeBars(p *plot.Plot, i, j int) (bool, error) {
	var xs, ys rangeXYs
	for _, row := range r.Front {
		if !row.Robust.Scored() {
			continue
		}
		if j < 0 {
			st := row.Robust.Scores[i]
			ys = append(ys, rangeXY{x: float64(row.Index), y: row.F[i], lo: st[2], hi: st[4]})
			continue
		}
		sx, sy := row.Robust.Scores[i], row.Robust.Scores[j]
		xs = append(xs, rangeXY{x: row.F[i], y: row.F[j], lo: sx[2], hi: sx[4]})
		ys = append(ys, rangeXY{x: row.F[i], y: row.F[j], lo: sy[2], hi: sy[4]})
	}
	if len(ys) == 0 {
		return false, nil
	}
	c := color.NRGBA{R: 70, G: 110, B: 200, A: 160}
	if len(xs) > 0 {
		b, err := plotter.NewXErrorBars(xs)
		if err != nil {
			return false, err
		}
		b.LineStyle.Color, b.LineStyle.Width, b.CapWidth = c, vg.Points(0.8), vg.Points(3)
		p.Add(b)
	}
	b, err := plotter.NewYErrorBars(ys)
	if err != nil {
		return false, err
	}
	b.LineStyle.Color, b.LineStyle.Width, b.CapWidth = c, vg.Points(0.8), vg.Points(3)
	p.Add(b)
	return true, nil
}

// rangeCaption is the front figure's sentence on the bars ("" without).
func (r *Data) rangeCaption() string {
	for _, row := range r.Front {
		if row.Robust.Scored() {
			return " Bars: the 5–95 % range of each objective's score under print scatter (Monte Carlo at the [scatter] sample count; a point is the objective as the search ranked it)."
		}
	}
	return ""
}

// rangeXY is a point with a 5–95 % range [lo, hi] along one axis.
type rangeXY struct{ x, y, lo, hi float64 }

type rangeXYs []rangeXY

func (s rangeXYs) Len() int                    { return len(s) }
func (s rangeXYs) XY(i int) (float64, float64) { return s[i].x, s[i].y }

// XError and YError give the distances from the point to the range ends
// (the point may lie outside the range: then one distance is 0).
func (s rangeXYs) XError(i int) (float64, float64) {
	return math.Max(0, s[i].x-s[i].lo), math.Max(0, s[i].hi-s[i].x)
}
func (s rangeXYs) YError(i int) (float64, float64) {
	return math.Max(0, s[i].y-s[i].lo), math.Max(0, s[i].hi-s[i].y)
}
