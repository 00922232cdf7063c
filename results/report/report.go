package report

// The report: one self-contained HTML file per run (inline SVG and CSS, a
// small inline self-check script; no network, no external files).

import (
	"bytes"
	"context"
	"fmt"
	"html/template"
	"math"
	"regexp"
	"runtime"
	"slices"
	"strings"
	"sync"
	"sync/atomic"

	"plica/objective"
	"plica/problems"

	"plica/results"

	"plica/search/front"
)

// File is the report's default name inside a run folder.
const File = "report.html"

// Options controls Build.
type Options struct {
	// Designs lists the front ids whose checks, backbone and workspace the
	// report shows; nil means the Representative designs.
	Designs []int
	// CheckText renders the full check output of a design (as the check
	// verb prints it), shown below its check table; nil leaves it out.
	CheckText func(name string, res *objective.Result) string
}

// Report is a built report.
type Report struct {
	HTML    []byte
	Figures []Figure
	// Designs are the front ids shown.
	Designs []int
	// Problems lists parts that could not be built (a design file that
	// does not load, a figure that cannot be drawn); the report says so
	// where the part would be.
	Problems []string
}

// Cautions are printed in every report, after Caution.
var Cautions = []string{
	"Every number in this report is a model estimate from the models listed with each design; verify a design on printed prototypes before relying on it.",
	"Follow the standards that apply to the application, and have any design that carries payloads, works near people or is for medical use reviewed by a qualified engineer.",
	"The front holds the best designs this search found within its budget, not proven optima: another seed or a larger budget may find better ones.",
	"The backbone and workspace figures show unloaded shapes; the loaded-backbone figure draws the shape under gravity and payload beside the unloaded one, and the worst sag over the workspace is in the check tables.",
}

type keyValue struct{ Key, Value string }

type figureSection struct {
	ID, Title, Caption, Name string
	SVG                      template.HTML
	Problem                  string
}

type checkRow struct {
	Name, Value, Limit, Unit, Note string
	Pass                           bool
	// Warn marks a failed check that only warns (objective.Check.Warn,
	// the validated range): WARN, as plica check prints it, not FAIL.
	Warn bool
}

type designSection struct {
	ID                      int
	Reason, File, Problem   string
	Pass                    bool
	Checks                  []checkRow
	Models, Warnings        []string
	CheckText               string
	Figures                 []figureSection
	FailedChecks, NumChecks int
	WarnChecks              int
	Objectives              []keyValue
	Variables               []keyValue
	HasResult               bool
	Robust                  *robustSection
}

type htmlPage struct {
	Title, Folder, ProblemText  string
	NoFront                     string
	Caution                     string
	Cautions                    []string
	Variables                   [][]string
	Objectives                  [][]string
	Requirements, Settings, Run []keyValue
	Reference                   []keyValue
	Checks, Constraints         []string
	FrontHeader                 []string
	FrontRows                   []frontTableRow
	// Lead holds the figures shown first (the front); Figures the rest.
	Lead, Figures []figureSection
	// Diagnosis says why the search found no feasible design, or few.
	Diagnosis []string
	// RunWarnings are run.json's warnings (results.Warning messages).
	RunWarnings []string
	// FrontLimits say what limits the best front design of each objective
	// (run.json front_limits sentences).
	FrontLimits []string
	// Islands are the runs a merged run joins (run.json merged_from), and
	// Sources the searches behind them (merges of merges flattened);
	// HypervolumeUnit names the hypervolume's reference.
	Islands         []islandRow
	Sources         []sourceRow
	HypervolumeUnit string
	Designs         []designSection
	Problems        []string
}

type frontTableRow struct {
	Cells  []string
	Chosen bool
}

// inlineSVG prepares an SVG document for inlining into HTML: the XML
// prolog and comments go, and the namespace attributes too (HTML puts
// <svg> in the SVG namespace by itself), so the page names no URL at all.
var (
	svgProlog = regexp.MustCompile(`(?s)<\?xml.*?\?>|<!--.*?-->`)
	svgXMLNS  = regexp.MustCompile(`\s+xmlns(:\w+)?="[^"]*"`)
)

func inlineSVG(b []byte) template.HTML {
	s := svgProlog.ReplaceAllString(string(b), "")
	s = svgXMLNS.ReplaceAllString(s, "")
	s = strings.Replace(s, "<svg ", `<svg class="figure" role="img" `, 1)
	return template.HTML(strings.TrimSpace(s))
}

func num(x float64) string {
	if math.IsNaN(x) {
		return "n/a"
	}
	return fmt.Sprintf("%.5g", x)
}

// checkRows renders checks as the report's table rows and counts those
// that fail and those that only warn (failed with Warn set), the verdicts
// plica check prints: PASS, WARN, FAIL.
func checkRows(checks []objective.Check) (rows []checkRow, failed, warned int) {
	for _, c := range checks {
		op := "≥ "
		if c.Max {
			op = "≤ "
		}
		r := checkRow{Name: c.Name, Value: num(c.Value), Limit: op + num(c.Limit), Unit: c.Unit, Note: c.Note, Pass: c.Pass, Warn: !c.Pass && c.Warn}
		switch {
		case r.Warn:
			warned++
		case !c.Pass:
			failed++
		}
		rows = append(rows, r)
	}
	return rows, failed, warned
}

// Build reads a run folder and builds its report and figures. Parts
// that cannot be built are reported in the page and in Report.Problems; an
// error means the folder itself cannot be read (or a requested design id
// is not on the front). Build looks at ctx between figures and designs,
// inside each design's check and every results.CheckEvery rows read, and
// stops with ctx.Err() once ctx is done.
func Build(ctx context.Context, f *results.Folder, opt Options) (*Report, error) {
	ctx = &latchCtx{Context: ctx}
	r, err := loadBase(ctx, f)
	if err != nil {
		return nil, err
	}
	ids, err := r.chosenIDs(opt.Designs)
	if err != nil {
		return nil, err
	}
	rep := &Report{Designs: ids}
	page := r.page(ids)
	reasons := r.reasons(ids, opt.Designs != nil)
	// The parts of the page are built concurrently (reading
	// evaluations.csv, which only the front figure needs, beside the
	// designs' checks and figures) and put together in their fixed order
	// afterwards, so the page does not depend on which finished first.
	var (
		front, variables, hypervolume, islands part
		designs                                = make([]part, len(ids))
		sections                               = make([]designSection, len(ids))
		evalErr                                error
	)
	tasks := []func(){func() { evalErr = r.loadEvaluated(ctx) }}
	if len(r.Front) > 0 {
		tasks = append(tasks, func() { variables.addFig(ctx, func() (Figure, error) { return r.VariablesFigure(ids) }) })
	}
	if len(r.History) > 0 {
		tasks = append(tasks, func() { hypervolume.addFig(ctx, r.HypervolumeFigure) })
	}
	if len(r.Info.MergedFrom) > 0 {
		tasks = append(tasks, func() { islands.addFig(ctx, r.IslandsFigure) })
	}
	for k, id := range ids {
		tasks = append(tasks, func() { sections[k] = r.designSection(ctx, f, opt, id, reasons[id], &designs[k]) })
	}
	runTasks(tasks)
	if evalErr != nil {
		return nil, evalErr
	}
	if len(r.Front) > 0 {
		front.addFig(ctx, func() (Figure, error) { return r.FrontFigure(ids) })
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for _, p := range []*part{&front, &variables, &hypervolume, &islands} {
		p.into(rep)
	}
	page.Lead = front.sections
	page.Figures = slices.Concat(variables.sections, hypervolume.sections, islands.sections)
	for k := range ids {
		designs[k].into(rep)
		sections[k].Figures = designs[k].sections
		page.Designs = append(page.Designs, sections[k])
	}
	page.Problems = rep.Problems
	var b bytes.Buffer
	if err := reportTemplate.Execute(&b, page); err != nil {
		return nil, err
	}
	rep.HTML = b.Bytes()
	return rep, nil
}

// part is what one concurrently built part of the report adds: its figure
// sections, the figures drawn and the problems met, in order.
type part struct {
	sections []figureSection
	figures  []Figure
	problems []string
}

// addFig builds the next figure, unless ctx is done (then Build returns
// ctx.Err()), and adds it or its problem.
func (p *part) addFig(ctx context.Context, build func() (Figure, error)) {
	if ctx.Err() != nil {
		return
	}
	fig, err := build()
	rf := figureSection{ID: "fig-" + strings.TrimSuffix(fig.Name, ".svg"), Title: fig.Title, Caption: fig.Caption, Name: fig.Name}
	if err != nil {
		rf.Problem = fmt.Sprintf("%s could not be drawn: %v", fig.Title, err)
		p.problems = append(p.problems, rf.Problem)
	} else {
		rf.SVG = inlineSVG(fig.SVG)
		p.figures = append(p.figures, fig)
	}
	p.sections = append(p.sections, rf)
}

// problem records a problem of the part.
func (p *part) problem(s string) { p.problems = append(p.problems, s) }

// into adds the part's figures and problems to rep.
func (p *part) into(rep *Report) {
	rep.Figures = append(rep.Figures, p.figures...)
	rep.Problems = append(rep.Problems, p.problems...)
}

// reportWorkers is how many parts of a report are built at once: the two
// largest, reading evaluations.csv and the designs' checks and figures,
// side by side.
const reportWorkers = 2

// runTasks runs the tasks on up to reportWorkers goroutines (fewer with
// fewer cores), taking them in order, and returns when all are done.
func runTasks(tasks []func()) {
	var next atomic.Int64
	var wg sync.WaitGroup
	for range max(1, min(reportWorkers, runtime.GOMAXPROCS(0), len(tasks))) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(tasks) {
					return
				}
				tasks[i]()
			}
		})
	}
	wg.Wait()
}

// latchCtx is a context whose Err, once it has returned an error, returns
// it again without asking the parent: after an interrupt each of Build's
// goroutines looks at the parent at most once more (each may be looking
// when the interrupt comes), and then all of them stop.
type latchCtx struct {
	context.Context
	err atomic.Pointer[error]
}

func (c *latchCtx) Err() error {
	if e := c.err.Load(); e != nil {
		return *e
	}
	err := c.Context.Err()
	if err != nil {
		c.err.Store(&err)
	}
	return err
}

// designSection checks front design id and draws its figures into p; its
// problems go to p as well. It does nothing once ctx is done.
func (r *Data) designSection(ctx context.Context, f *results.Folder, opt Options, id int, reason string, p *part) designSection {
	row, _ := r.FrontRow(id)
	d := designSection{ID: id, Reason: reason, File: results.DesignFileName(id), Robust: newRobustSection(r.Spec, row.Robust)}
	if ctx.Err() != nil {
		return d
	}
	for i, o := range r.Spec.Objectives {
		d.Objectives = append(d.Objectives, keyValue{o.Column(), num(row.F[i])})
	}
	for j, name := range results.NewColumns(r.Spec).Variables {
		cell := row.Cells[j]
		if r.Spec.Variables[j].Options == nil {
			cell = num(row.X[j])
		}
		d.Variables = append(d.Variables, keyValue{name, cell})
	}
	design, sc, err := problems.LoadDesign(f.Path(d.File))
	var res *objective.Result
	if err == nil {
		res, err = objective.EvaluateContext(ctx, design, sc)
	}
	if ctx.Err() != nil {
		return d
	}
	if err != nil {
		d.Problem = fmt.Sprintf("design %d (%s) could not be checked: %v", id, d.File, err)
		p.problem(d.Problem)
		return d
	}
	d.HasResult, d.Pass, d.Models, d.Warnings = true, res.Pass, res.Models, res.Warnings
	d.NumChecks = len(res.Checks)
	d.Checks, d.FailedChecks, d.WarnChecks = checkRows(res.Checks)
	if opt.CheckText != nil {
		d.CheckText = opt.CheckText(fmt.Sprintf("%s (front design %d)", d.File, id), res)
	}
	robot, _, err := design.Robot()
	if err != nil {
		d.Problem = fmt.Sprintf("design %d: %v", id, err)
		p.problem(d.Problem)
		return d
	}
	p.addFig(ctx, func() (Figure, error) {
		return BackboneFigure(fmt.Sprintf("backbone-%03d.svg", id), fmt.Sprintf("Backbone of design %d", id), robot, sc.Workspace)
	})
	p.addFig(ctx, func() (Figure, error) {
		return LoadedBackboneFigure(fmt.Sprintf("loaded-%03d.svg", id), fmt.Sprintf("Loaded beside unloaded backbone of design %d", id), robot, sc.Workspace, sc.Load)
	})
	p.addFig(ctx, func() (Figure, error) {
		return WorkspaceTaskFigure(fmt.Sprintf("workspace-%03d.svg", id), fmt.Sprintf("Workspace of design %d", id), robot, sc.Workspace, sc.Tasks)
	})
	p.addFig(ctx, func() (Figure, error) {
		return TipSagFigure(fmt.Sprintf("sag-%03d.svg", id), fmt.Sprintf("Tip sag over the workspace of design %d", id), robot, sc.Workspace, sc.Load)
	})
	return d
}

// WriteReport builds the report of a run folder, writes its figures into
// RUN/plots and the page to path (RUN/report.html when empty), each file
// atomically, and returns the report. Interrupted (ctx done) while it
// builds, it writes nothing and returns ctx.Err(); the files are written
// only once everything is built.
func Write(ctx context.Context, f *results.Folder, path string, opt Options) (*Report, error) {
	rep, err := Build(ctx, f, opt)
	if err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := WritePlots(f, rep.Figures); err != nil {
		return nil, err
	}
	if path == "" {
		path = f.Path(File)
	}
	if err := results.WriteAtomic(path, rep.HTML); err != nil {
		return nil, err
	}
	return rep, nil
}

// reasons says why each design is shown.
func (r *Data) reasons(ids []int, requested bool) map[int]string {
	out := map[int]string{}
	if requested {
		for _, id := range ids {
			out[id] = "requested"
		}
		return out
	}
	if len(r.Front) == 0 {
		return out
	}
	f := make([][]float64, len(r.Front))
	for i, row := range r.Front {
		f[i] = r.Minimised(row)
	}
	best := bestOf(f)
	for k, o := range r.Spec.Objectives {
		id := r.Front[best[k]].ID
		if out[id] != "" {
			out[id] += ", "
		}
		out[id] += "best " + o.Score
	}
	if k := front.FindKnee(f); k.Found {
		id := r.Front[k.Index].ID
		if out[id] != "" {
			out[id] += ", "
		}
		out[id] += "knee of the front"
	}
	return out
}

// page fills everything but the figures and designs.
func (r *Data) page(ids []int) *htmlPage {
	s, info := r.Spec, r.Info
	name := info.ProblemName
	if name == "" {
		// the design at mid-range carries the file's name key
		if d, _, err := s.Design(s.Midpoint()); err == nil && d.Name != "" {
			name = d.Name
		} else {
			name = info.ProblemFile
		}
	}
	p := &htmlPage{Title: "plica report: " + name, Folder: r.Folder.Dir, ProblemText: string(s.Text),
		Caution: results.Caution, Checks: s.Checks, Constraints: s.ConstraintNames()[len(s.Checks):]}
	for _, v := range s.Variables {
		if v.Options != nil {
			p.Variables = append(p.Variables, []string{v.Path(), "one of " + strings.Join(v.Options, ", "), ""})
			continue
		}
		unit := v.Unit
		if unit == "" {
			unit = "1"
		}
		p.Variables = append(p.Variables, []string{v.Path(), fmt.Sprintf("%.6g to %.6g", v.Lower, v.Upper), unit})
	}
	for _, o := range s.Objectives {
		goal := o.Goal().String()
		_, unit := scoreAxis(o.Score)
		doc := ""
		if sc, ok := objective.LookupScore(o.Score); ok {
			doc = sc.Doc
		}
		p.Objectives = append(p.Objectives, []string{o.Score, goal, unit, doc})
	}
	for _, req := range s.Requirements() {
		p.Requirements = append(p.Requirements, keyValue{req.Key, req.Value})
	}
	timeBudget := info.TimeBudget.String()
	if info.TimeBudget == 0 {
		timeBudget = "none"
	}
	orDefault := func(v any, zero bool) string {
		if zero {
			return "default"
		}
		return fmt.Sprint(v)
	}
	st := s.Search
	p.Settings = []keyValue{
		{"method", info.Method},
		{"population", orDefault(st.Population, st.Population == 0)},
		{"evaluation budget", orDefault(info.MaxEvaluations, info.MaxEvaluations == 0)},
		{"time budget", timeBudget},
		{"seed", fmt.Sprint(info.Seed)},
		{"workers", orDefault(info.Workers, info.Workers == 0)},
		{"stall generations", orDefault(st.StallGenerations, st.StallGenerations == 0)},
		{"stall tolerance", orDefault(st.StallTolerance, st.StallTolerance == 0)},
		{"checkpoint every (generations)", orDefault(st.CheckpointEvery, st.CheckpointEvery == 0)},
	}
	p.Run = []keyValue{
		{"status", info.Status.String()},
		{"evaluations", fmt.Sprint(info.Evaluations)},
		{"generations", fmt.Sprint(info.Generations)},
		{"failed evaluations", fmt.Sprint(info.Failures)},
		{"front size", fmt.Sprint(len(r.Front))},
		{"runtime (s)", fmt.Sprintf("%.3g", info.RuntimeSec)},
		{"hypervolume (" + r.hypervolumeUnit() + ")", num(info.Hypervolume)},
		{"plica version", info.Version},
		{"problem file", info.ProblemFile + " (hash " + info.ProblemHash + ")"},
		{"started (UTC)", info.Started.Format("2006-01-02 15:04:05")},
	}
	for i, o := range s.Objectives {
		if i >= len(info.Reference) {
			break
		}
		v := num(info.Reference[i])
		if o.Maximize {
			v += " (maximised: negated, so " + o.Score + " = " + num(o.Natural(info.Reference[i])) + ")"
		}
		p.Reference = append(p.Reference, keyValue{o.Score, v})
	}
	c := results.NewColumns(s)
	p.FrontHeader = append([]string{"id"}, c.Objectives...)
	p.FrontHeader = append(p.FrontHeader, c.Variables...)
	p.FrontHeader = append(p.FrontHeader, "pass", "design file")
	shown := map[int]bool{}
	for _, id := range ids {
		shown[id] = true
	}
	for _, row := range r.Front {
		cells := []string{fmt.Sprint(row.ID)}
		for _, f := range row.F {
			cells = append(cells, num(f))
		}
		for j, v := range s.Variables {
			if v.Options != nil {
				cells = append(cells, row.Cells[j])
			} else {
				cells = append(cells, num(row.X[j]))
			}
		}
		pass := "no"
		if row.Pass {
			pass = "yes"
		}
		cells = append(cells, pass, results.DesignFileName(row.ID))
		p.FrontRows = append(p.FrontRows, frontTableRow{Cells: cells, Chosen: shown[row.ID]})
	}
	p.Cautions = append(p.Cautions, Cautions...)
	if !info.Status.Finished() {
		p.Cautions = append(p.Cautions, fmt.Sprintf("The run did not finish (status %s): the front is that of the last complete generation; continue it with plica resume %s.", info.Status, r.Folder.Dir))
	}
	if info.Failures > 0 {
		p.Cautions = append(p.Cautions, fmt.Sprintf("%d evaluations failed and count as infeasible; their messages are in the failure column of %s.", info.Failures, results.EvaluationsFile))
	}
	switch {
	case !results.Exists(r.Folder.Path(results.FrontFile)):
		p.NoFront = fmt.Sprintf("The run stopped before writing %s: continue it with plica resume %s.", results.FrontFile, r.Folder.Dir)
		p.Cautions = append(p.Cautions, p.NoFront)
	case len(r.Front) == 0:
		p.NoFront = "The front is empty: no feasible design was found."
		p.Cautions = append(p.Cautions, "No feasible design was found: relax the requirements or widen the ranges.")
	}
	p.Diagnosis = diagnosisLines(info.Diagnosis)
	p.FrontLimits = frontLimitLines(info.FrontLimits)
	for _, w := range info.Warnings {
		p.RunWarnings = append(p.RunWarnings, w.Message)
	}
	p.HypervolumeUnit = r.hypervolumeUnit()
	for _, m := range info.MergedFrom {
		p.Islands = append(p.Islands, islandRow{Run: m.Run, Method: m.Method, Status: m.Status.String(), Seed: fmt.Sprint(m.Seed),
			Population: countOrDash(int64(m.Population)), Evaluations: fmt.Sprint(m.Evaluations), FrontSize: fmt.Sprint(m.FrontSize),
			Hypervolume: num(m.Hypervolume), UnionFront: fmt.Sprint(m.UnionFront)})
	}
	if len(info.MergedFrom) > 0 {
		for _, s := range info.Sources {
			p.Sources = append(p.Sources, sourceRow{Run: s.Run, Method: s.Method, Seed: fmt.Sprint(s.Seed),
				Population: countOrDash(int64(s.Population)), Evaluations: countOrDash(s.Evaluations)})
		}
	}
	return p
}

// islandRow is one run of a merged run, as the report shows it.
type islandRow struct {
	Run, Method, Status, Seed, Population, Evaluations, FrontSize, Hypervolume, UnionFront string
}

// sourceRow is one search behind a merged run.
type sourceRow struct {
	Run, Method, Seed, Population, Evaluations string
}

// countOrDash writes a count, or a dash for one not recorded (0).
func countOrDash(n int64) string {
	if n == 0 {
		return "–"
	}
	return fmt.Sprint(n)
}

var reportTemplate = template.Must(template.New("report").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8"/>
<meta name="viewport" content="width=device-width, initial-scale=1"/>
<title>{{.Title}}</title>
<script>var plicaErrors = 0; window.onerror = function () { plicaErrors++; };</script>
<style>
body { font-family: sans-serif; max-width: 72rem; margin: 1rem auto; padding: 0 1rem; color: #222; line-height: 1.4; }
h1 { font-size: 1.6rem; } h2 { border-bottom: 1px solid #ccc; padding-bottom: .2rem; margin-top: 2rem; }
table { border-collapse: collapse; margin: .5rem 0 1rem; font-size: .9rem; }
th, td { border: 1px solid #ccc; padding: .2rem .5rem; text-align: left; vertical-align: top; }
th { background: #f2f2f2; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
tr.chosen td { background: #fdecea; }
.wide { overflow-x: auto; }
.caution { border: 2px solid #d62728; background: #fff5f5; padding: .5rem 1rem; }
.pass { color: #1a7f37; font-weight: bold; } .fail { color: #d62728; font-weight: bold; }
.problem { color: #d62728; } .warn { color: #b35900; font-weight: bold; }
figure { margin: 1rem 0 2rem; } figcaption { font-size: .9rem; color: #444; max-width: 60rem; }
svg.figure { display: block; max-width: 100%; height: auto; }
pre { background: #f7f7f7; padding: .5rem; overflow-x: auto; font-size: .8rem; }
nav a { margin-right: 1rem; }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
<p>Run folder <code>{{.Folder}}</code>.</p>
<p class="caution"><strong>Caution.</strong> {{.Caution}}</p>
<nav><a href="#overview">overview</a><a href="#designs">designs</a><a href="#figures">figures</a><a href="#summary">problem and run</a><a href="#front">front table</a><a href="#cautions">cautions</a><a href="#problem">problem file</a></nav>
{{if .Problems}}<div class="problem"><p>Parts of this report could not be built:</p><ul>{{range .Problems}}<li>{{.}}</li>{{end}}</ul></div>{{end}}

<h2 id="overview">Front, chosen designs and diagnosis</h2>
{{range .Lead}}{{template "figure" .}}{{end}}
{{if not .FrontRows}}<p class="fail">{{.NoFront}}</p>{{end}}
{{if .Designs}}<table id="chosen-table"><tr><th>design</th><th>why shown</th><th>objectives</th><th>result</th><th>design file</th></tr>
{{range .Designs}}<tr><td><a href="#design-{{.ID}}">{{.ID}}</a></td><td>{{.Reason}}</td><td>{{range $i, $o := .Objectives}}{{if $i}}, {{end}}<code>{{$o.Key}}</code> = {{$o.Value}}{{end}}</td><td>{{if not .HasResult}}<span class="problem">not checked</span>{{else if .Pass}}<span class="pass">PASS</span>{{else}}<span class="fail">FAIL</span> ({{.FailedChecks}} of {{.NumChecks}}){{end}}</td><td><code>{{.File}}</code></td></tr>
{{end}}</table>{{end}}
{{if .Diagnosis}}<div id="diagnosis"><h3>Why the search found {{if .FrontRows}}few{{else}}no{{end}} feasible designs</h3><ul>{{range .Diagnosis}}<li>{{.}}</li>{{end}}</ul></div>{{end}}
{{if .FrontLimits}}<div id="front-limits"><h3>What limits the front</h3><ul>{{range .FrontLimits}}<li>{{.}}</li>{{end}}</ul></div>{{end}}
{{if .RunWarnings}}<div id="warnings"><h3>Warnings</h3><ul>{{range .RunWarnings}}<li class="warn">warning: {{.}}</li>{{end}}</ul></div>{{end}}

<h2 id="designs">Designs</h2>
{{if not .Designs}}<p>No design to show.</p>{{end}}
{{range .Designs}}<section id="design-{{.ID}}">
<h3>Design {{.ID}}{{if .Reason}}: {{.Reason}}{{end}}</h3>
<p>Design file <code>{{.File}}</code>.
{{range $i, $o := .Objectives}}{{if $i}}, {{end}}<code>{{$o.Key}}</code> = {{$o.Value}}{{end}}.</p>
<p>Variables: {{range $i, $v := .Variables}}{{if $i}}, {{end}}<code>{{$v.Key}}</code> = {{$v.Value}}{{end}}.</p>
{{if .Problem}}<p class="problem">{{.Problem}}</p>{{end}}
{{if .HasResult}}
<p>Result: {{if .Pass}}<span class="pass">PASS</span> ({{.NumChecks}} checks{{if .WarnChecks}}; {{.WarnChecks}} with a warning{{end}}){{else}}<span class="fail">FAIL</span> ({{.FailedChecks}} of {{.NumChecks}} checks failed{{if .WarnChecks}}; {{.WarnChecks}} with a warning{{end}}){{end}}</p>
<table class="checks"><tr><th>check</th><th>value</th><th>limit</th><th>unit</th><th>result</th><th>note</th></tr>
{{range .Checks}}<tr><td><code>{{.Name}}</code></td><td class="num">{{.Value}}</td><td class="num">{{.Limit}}</td><td>{{.Unit}}</td><td>{{if .Pass}}<span class="pass">PASS</span>{{else if .Warn}}<span class="warn">WARN</span>{{else}}<span class="fail">FAIL</span>{{end}}</td><td>{{.Note}}</td></tr>
{{end}}</table>
<ul>{{range .Models}}<li>model: {{.}}</li>{{end}}{{range .Warnings}}<li class="problem">warning: {{.}}</li>{{end}}</ul>
{{if .Robust}}{{template "robust" .Robust}}{{end}}
{{if .CheckText}}<details><summary>full check output (as <code>plica check {{.File}}</code> prints it)</summary><pre>{{.CheckText}}</pre></details>{{end}}
{{end}}
{{range .Figures}}{{template "figure" .}}{{end}}
</section>
{{end}}

<h2 id="figures">More figures</h2>
{{range .Figures}}{{template "figure" .}}{{else}}<p>No further figure.</p>{{end}}

<h2 id="summary">Problem and run</h2>
<h3>Design variables</h3>
<table><tr><th>variable</th><th>range</th><th>unit</th></tr>
{{range .Variables}}<tr><td><code>{{index . 0}}</code></td><td>{{index . 1}}</td><td>{{index . 2}}</td></tr>
{{end}}</table>
<h3>Objectives</h3>
<table><tr><th>score</th><th>goal</th><th>unit</th><th>meaning</th></tr>
{{range .Objectives}}<tr><td><code>{{index . 0}}</code></td><td>{{index . 1}}</td><td>{{index . 2}}</td><td>{{index . 3}}</td></tr>
{{end}}</table>
<h3>Requirements</h3>
{{if .Requirements}}<table><tr><th>key in [requirements]</th><th>value</th></tr>
{{range .Requirements}}<tr><td><code>{{.Key}}</code></td><td>{{.Value}}</td></tr>
{{end}}</table>{{else}}<p>No [requirements] table: only the checks with defaults apply.</p>{{end}}
<p>Checks every candidate must pass (constraints of the search): {{range $i, $c := .Checks}}{{if $i}}, {{end}}<code>{{$c}}</code>{{end}}{{if .Constraints}}; extra constraints: {{range $i, $c := .Constraints}}{{if $i}}, {{end}}<code>{{$c}}</code>{{end}}{{end}}.</p>
<h3>Search</h3>
<table>{{range .Settings}}<tr><th>{{.Key}}</th><td>{{.Value}}</td></tr>
{{end}}</table>
<h3>Run</h3>
<table>{{range .Run}}<tr><th>{{.Key}}</th><td>{{.Value}}</td></tr>
{{end}}</table>
{{if .Islands}}<h3 id="islands">Merged from</h3>
<p>This run merges the evaluations of {{len .Islands}} runs. The hypervolume of each run's own front is measured at the merged run's reference point, in {{.HypervolumeUnit}}, so the runs compare with each other and with the merged front.</p>
<table id="islands-table"><tr><th>run</th><th>method</th><th>status</th><th>seed</th><th>population</th><th>evaluations merged</th><th>own front</th><th>hypervolume of its front</th><th>designs on the merged front</th></tr>
{{range .Islands}}<tr><td><code>{{.Run}}</code></td><td>{{.Method}}</td><td>{{.Status}}</td><td class="num">{{.Seed}}</td><td class="num">{{.Population}}</td><td class="num">{{.Evaluations}}</td><td class="num">{{.FrontSize}}</td><td class="num">{{.Hypervolume}}</td><td class="num">{{.UnionFront}}</td></tr>
{{end}}</table>
{{if .Sources}}<p>The searches behind them:</p>
<table id="sources-table"><tr><th>search</th><th>method</th><th>seed</th><th>population</th><th>evaluations</th></tr>
{{range .Sources}}<tr><td><code>{{.Run}}</code></td><td>{{.Method}}</td><td class="num">{{.Seed}}</td><td class="num">{{.Population}}</td><td class="num">{{.Evaluations}}</td></tr>
{{end}}</table>{{end}}{{end}}
{{if .Reference}}<p>The hypervolume is measured in the objectives as the search minimises them (maximised objectives negated) against the reference point:</p>
<table><tr><th>objective</th><th>reference</th></tr>{{range .Reference}}<tr><td><code>{{.Key}}</code></td><td>{{.Value}}</td></tr>{{end}}</table>{{end}}

<h2 id="front">Front table</h2>
{{if .FrontRows}}<details id="front-details"><summary>all {{len .FrontRows}} front designs (objectives in each score's own sign; highlighted rows are the designs shown above)</summary>
<p>Each design is a design file in the run folder that <code>plica check</code> and <code>plica pose</code> accept.</p>
<div class="wide"><table id="front-table"><tr>{{range .FrontHeader}}<th>{{.}}</th>{{end}}</tr>
{{range .FrontRows}}<tr{{if .Chosen}} class="chosen"{{end}}>{{range .Cells}}<td>{{.}}</td>{{end}}</tr>
{{end}}</table></div></details>{{else}}<p class="fail">{{.NoFront}}</p>{{end}}

<h2 id="cautions">Cautions</h2>
<ul class="caution"><li>{{.Caution}}</li>{{range .Cautions}}<li>{{.}}</li>{{end}}</ul>

<h2 id="problem">Problem file</h2>
<details><summary>problem.toml as given</summary><pre>{{.ProblemText}}</pre></details>

<pre id="plica-selfcheck" hidden="hidden"></pre>
<script>
(function () {
  function check() {
    var figs = document.querySelectorAll("svg"), zero = 0;
    for (var i = 0; figs.length > i; i++) {
      var r = figs[i].getBoundingClientRect();
      figs[i].setAttribute("data-size", Math.round(r.width) + "x" + Math.round(r.height));
      if (!(r.width > 0) || !(r.height > 0)) { zero++; }
    }
    document.getElementById("plica-selfcheck").textContent =
      "figures=" + figs.length + " zero=" + zero + " errors=" + plicaErrors;
  }
  check();
  window.addEventListener("load", check);
})();
</script>
</body>
</html>
{{define "figure"}}<figure id="{{.ID}}">
{{if .Problem}}<p class="problem">{{.Problem}}</p>{{else}}{{.SVG}}
<figcaption><strong>{{.Title}}.</strong> {{.Caption}} (<code>plots/{{.Name}}</code>)</figcaption>{{end}}
</figure>
{{end}}`))
