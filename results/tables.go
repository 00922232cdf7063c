package results

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"

	"plica/objective"
	"plica/problems"
	"plica/search"
)

// Columns names the CSV columns of a problem's designs, units included.
type Columns struct {
	Variables   []string // e.g. "bellows1_wall_mm", "bellows1_material"
	Objectives  []string // score names, e.g. "reach_mm"
	Constraints []string // constraint slots, "g_" + name
}

// NewColumns derives the column names of a problem.
func NewColumns(s *problems.Spec) Columns {
	var c Columns
	for _, v := range s.Variables {
		c.Variables = append(c.Variables, fmt.Sprintf("bellows%d_%s", v.Table+1, v.Key))
	}
	for _, o := range s.Objectives {
		c.Objectives = append(c.Objectives, o.Column())
	}
	for _, n := range s.ConstraintNames() {
		c.Constraints = append(c.Constraints, "g_"+n)
	}
	return c
}

// formatFloat writes a float so that it reads back exactly.
func formatFloat(x float64) string {
	if math.IsNaN(x) {
		return "NaN"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// variableCells writes the variables in file units; categories by name.
func variableCells(s *problems.Spec, x []float64) []string {
	out := make([]string, len(x))
	for j, v := range s.Variables {
		if v.Options != nil {
			out[j] = v.Options[int(x[j])]
		} else {
			out[j] = formatFloat(x[j])
		}
	}
	return out
}

// objectiveCells writes objectives in the score's own sign (maximised
// objectives are negated back).
func objectiveCells(s *problems.Spec, f []float64) []string {
	out := make([]string, len(f))
	for i, o := range s.Objectives {
		out[i] = formatFloat(o.Natural(f[i]))
	}
	return out
}

// EvaluationLog appends every evaluation to evaluations.csv. Rows are
// written in evaluation-index order and flushed after every generation.
type EvaluationLog struct {
	f    *os.File
	w    *csv.Writer
	spec *problems.Spec
}

// EvaluationHeader is the header of evaluations.csv.
func EvaluationHeader(s *problems.Spec) []string {
	c := NewColumns(s)
	h := []string{"index"}
	h = append(h, c.Variables...)
	h = append(h, c.Objectives...)
	h = append(h, c.Constraints...)
	return append(h, "violation", "feasible", "failure")
}

// OpenEvaluationLog opens evaluations.csv for appending; the header is
// written when the file is new. When keep ≥ 0 (a resumed run, which
// repeats the generations after its checkpoint) the file is first checked
// against the checkpoint and cut to its first keep rows: see ResumeLog.
func (f *Folder) OpenEvaluationLog(s *problems.Spec, keep int64) (*EvaluationLog, error) {
	var data []byte
	if keep >= 0 {
		var err error
		if data, err = ResumeLog(f.Path(EvaluationsFile), s, keep); err != nil {
			return nil, err
		}
	}
	return f.openLog(s, data)
}

// openLog opens evaluations.csv for appending, first replaced by data if
// that is not nil.
func (f *Folder) openLog(s *problems.Spec, data []byte) (*EvaluationLog, error) {
	path := f.Path(EvaluationsFile)
	if data != nil {
		if err := f.WriteFile(EvaluationsFile, data); err != nil {
			return nil, err
		}
	}
	fh, err := os.OpenFile(path, os.O_CREATE|os.O_WRONLY|os.O_APPEND, 0o644)
	if err != nil {
		return nil, err
	}
	l := &EvaluationLog{f: fh, w: csv.NewWriter(fh), spec: s}
	if st, err := fh.Stat(); err == nil && st.Size() == 0 {
		if err := l.w.Write(EvaluationHeader(s)); err != nil {
			fh.Close()
			return nil, err
		}
	}
	f.wrote(EvaluationsFile)
	return l, nil
}

// ResumeLog checks the evaluations.csv at path against a checkpoint that
// holds keep evaluations and returns the file cut to its header and first
// keep rows. The header must be header; rows 0 … keep-1 must each be
// there, in order, with the header's number of cells. Rows after them
// (the resumed run repeats them) may be anything, a torn last line
// included. A file that cannot prove every evaluation the checkpoint
// counts (missing, cut short, a cut line glued to the next, rows missing
// or out of order) is an *InputError naming the line: resume never loses
// evaluations silently. With keep = 0 the old file is not needed.
func ResumeLog(path string, spec *problems.Spec, keep int64) ([]byte, error) {
	header := EvaluationHeader(spec)
	var fresh bytes.Buffer
	w := csv.NewWriter(&fresh)
	w.Write(header)
	w.Flush()
	if keep == 0 {
		return fresh.Bytes(), nil
	}
	data, err := os.ReadFile(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil, inputErrorf("%s is missing, but the checkpoint counts %d evaluations (expected rows 0 to %d): resume cannot rebuild them; start a new run", path, keep, keep-1)
	}
	if err != nil {
		return nil, err
	}
	r := csv.NewReader(bytes.NewReader(data))
	r.FieldsPerRecord = -1
	r.ReuseRecord = true
	have, err := r.Read()
	if err != nil {
		return nil, inputErrorf("%s: no header (expected %s)", path, strings.Join(header, ","))
	}
	if !slices.Equal(have, header) {
		return nil, inputErrorf("%s:1: the header differs from the problem's columns (was problem.toml changed?)", path)
	}
	checks := evaluationChecks(spec, have)
	var n int64
	for n < keep {
		rec, err := r.Read()
		if err == io.EOF {
			return nil, inputErrorf("%s holds %d of the %d evaluations the checkpoint counts (the file was cut short): resume cannot rebuild them; start a new run", path, n, keep)
		}
		if err != nil {
			line := 0
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				line = pe.StartLine
			}
			return nil, inputErrorf("%s:%d: evaluation %d is unreadable (%v); the checkpoint counts %d evaluations", path, line, n, unwrapCSV(err), keep)
		}
		line, _ := r.FieldPos(0)
		if len(rec) != len(header) {
			return nil, inputErrorf("%s:%d: evaluation %d has %d cells, expected %d (a line cut short or glued to the next); the checkpoint counts %d evaluations",
				path, line, n, len(rec), len(header), keep)
		}
		if rec[0] != strconv.FormatInt(n, 10) {
			return nil, inputErrorf("%s:%d: index %q, expected %d (rows missing or out of order); the checkpoint counts %d evaluations", path, line, rec[0], n, keep)
		}
		if err := checkCells(path, r, rec, checks); err != nil {
			return nil, err
		}
		n++
	}
	out := data[:r.InputOffset()]
	if len(out) > 0 && out[len(out)-1] != '\n' {
		out = append(slices.Clip(out), '\n')
	}
	return out, nil
}

// cellCheck is the rule for one cell of evaluations.csv that resume,
// merge and the report rely on: a number (NaN and ±Inf included: a failed
// evaluation writes NaN for its objectives and constraints and +Inf for
// its violation; a cell is never empty), one of a categorical variable's
// options, or true/false (feasible).
type cellCheck struct {
	col     int
	name    string
	options []string
	boolean bool
}

// evaluationChecks are the checks of the variable, objective, constraint,
// violation and feasible cells of evaluations.csv with header have (a
// column the header lacks is left to the caller).
func evaluationChecks(spec *problems.Spec, have []string) []cellCheck {
	c := NewColumns(spec)
	var out []cellCheck
	add := func(name string, ck cellCheck) {
		if k := headerColumn(have, name); k >= 0 {
			ck.col, ck.name = k, name
			out = append(out, ck)
		}
	}
	for j, name := range c.Variables {
		add(name, cellCheck{options: spec.Variables[j].Options})
	}
	for _, name := range slices.Concat(c.Objectives, c.Constraints, []string{"violation"}) {
		add(name, cellCheck{})
	}
	add("feasible", cellCheck{boolean: true})
	return out
}

// checkCells applies checks to rec, the record r read last: a cell that
// breaks its rule is an *InputError naming the file, line, column and
// column name and what was expected.
func checkCells(path string, r *csv.Reader, rec []string, checks []cellCheck) error {
	for _, ck := range checks {
		if ck.col >= len(rec) {
			continue
		}
		cell := rec[ck.col]
		var expected string
		switch {
		case ck.options != nil:
			if slices.Contains(ck.options, cell) {
				continue
			}
			expected = "one of " + strings.Join(ck.options, ", ")
		case ck.boolean:
			if cell == "true" || cell == "false" {
				continue
			}
			expected = "true or false"
		default:
			if _, err := strconv.ParseFloat(cell, 64); err == nil {
				continue
			}
			expected = "a number; a failed evaluation writes NaN"
		}
		line, col := r.FieldPos(ck.col)
		return inputErrorf("%s:%d:%d: %s = %q (expected %s)", path, line, col, ck.name, cell, expected)
	}
	return nil
}

// unwrapCSV is the reason of a CSV parse error without its position.
func unwrapCSV(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// Add writes one evaluated design.
func (l *EvaluationLog) Add(d *search.Design) error {
	row := []string{strconv.FormatInt(d.Index, 10)}
	row = append(row, variableCells(l.spec, d.X)...)
	row = append(row, objectiveCells(l.spec, d.F)...)
	for _, g := range d.G {
		row = append(row, formatFloat(g))
	}
	row = append(row, formatFloat(d.CV), strconv.FormatBool(d.Feasible()), d.Failed)
	return l.w.Write(row)
}

// Flush writes buffered rows to the file (to the operating system; Sync
// also waits until they are on the disk).
func (l *EvaluationLog) Flush() error {
	l.w.Flush()
	return l.w.Error()
}

// Sync flushes and waits until the rows are on the disk: done before each
// checkpoint, which counts on them.
func (l *EvaluationLog) Sync() error {
	if err := l.Flush(); err != nil {
		return err
	}
	return l.f.Sync()
}

// Close syncs and closes the log.
func (l *EvaluationLog) Close() error {
	err := l.Sync()
	if cerr := l.f.Close(); err == nil {
		err = cerr
	}
	return err
}

// HistoryHeader is the header of history.csv.
var HistoryHeader = []string{"generation", "evaluations", "failures", "feasible", "front_size", "hypervolume"}

// WriteHistory writes history.csv.
func (f *Folder) WriteHistory(h []search.Stats) error {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write(HistoryHeader)
	for _, s := range h {
		w.Write([]string{strconv.Itoa(s.Generation), strconv.FormatInt(s.Evaluations, 10), strconv.FormatInt(s.Failures, 10),
			strconv.Itoa(s.Feasible), strconv.Itoa(s.ArchiveSize), formatFloat(s.Hypervolume)})
	}
	w.Flush()
	return f.WriteFile(HistoryFile, b.Bytes())
}

// FrontRow is one design of a front with its full evaluation.
type FrontRow struct {
	ID     int // 1-based, as in designs/front-NNN.toml
	Design search.Design
	Result *objective.Result // nil when re-evaluation failed
	Err    string
	// Robust is the row's Monte Carlo under the problem's [scatter] (nil:
	// no scatter, or not scored).
	Robust *objective.Robust
	// ScatterSeed is the seed of Robust's draws.
	ScatterSeed uint64
}

// FrontHeader is the header of front.csv.
func FrontHeader(s *problems.Spec) []string {
	c := NewColumns(s)
	h := []string{"id", "index"}
	h = append(h, c.Variables...)
	for _, sc := range objective.AllScores() {
		h = append(h, sc.Name)
	}
	for i, n := range s.Checks {
		u := objective.UnitSuffix(s.CheckUnits[i])
		h = append(h, "check_"+n+u, "limit_"+n+u, "pass_"+n)
	}
	h = append(h, c.Constraints...)
	h = append(h, "pass", WarningsColumn)
	h = append(h, RobustColumns(s)...)
	return append(h, "design_file")
}

// WarningsColumn is the front.csv column that names, separated by ";",
// the warn-only checks (objective.Check.Warn, e.g. validated_range[1]) a
// design did not pass: their pass_NAME is false while pass stays true.
// Empty when every warn-only check passed.
const WarningsColumn = "warnings"

// warnedChecks returns the WarningsColumn cell of a result.
func warnedChecks(r *objective.Result) string {
	if r == nil {
		return ""
	}
	var names []string
	for _, c := range r.Checks {
		if c.Warn && !c.Pass {
			names = append(names, c.Name)
		}
	}
	return strings.Join(names, ";")
}

// WriteFront writes front.csv and designs/front-NNN.toml for each row.
func (f *Folder) WriteFront(s *problems.Spec, rows []FrontRow, comment func(FrontRow) string) error {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write(FrontHeader(s))
	var names []string
	var texts [][]byte
	for _, r := range rows {
		name := DesignFileName(r.ID)
		text, err := s.DesignTOML(r.Design.X, comment(r))
		if r.Robust != nil {
			text, err = s.DesignTOMLSeeded(r.Design.X, comment(r), r.ScatterSeed)
		}
		if err != nil {
			return err
		}
		names, texts = append(names, name), append(texts, text)
		row := []string{strconv.Itoa(r.ID), strconv.FormatInt(r.Design.Index, 10)}
		row = append(row, variableCells(s, r.Design.X)...)
		for _, sc := range objective.AllScores() {
			v := math.NaN()
			if r.Result != nil {
				v = sc.Value(&r.Result.Scores)
			}
			row = append(row, formatFloat(v))
		}
		for i := range s.Checks {
			if r.Result != nil && i < len(r.Result.Checks) {
				c := r.Result.Checks[i]
				row = append(row, formatFloat(c.Value), formatFloat(c.Limit), strconv.FormatBool(c.Pass))
			} else {
				row = append(row, "NaN", "NaN", "false")
			}
		}
		for _, g := range r.Design.G {
			row = append(row, formatFloat(g))
		}
		pass := r.Result != nil && r.Result.Pass
		row = append(row, strconv.FormatBool(pass), warnedChecks(r.Result))
		row = append(row, robustCells(s, r)...)
		row = append(row, name)
		w.Write(row)
	}
	w.Flush()
	if err := w.Error(); err != nil {
		return err
	}
	if err := f.writeFiles(names, texts); err != nil {
		return err
	}
	return f.WriteFile(FrontFile, b.Bytes())
}

// fileWriters is how many files writeFiles writes at once: each atomic
// write waits for its fsync, and the disk serves several at once.
const fileWriters = 8

// writeFiles writes files of the folder, each atomically, several at a
// time (written one by one, the front's design files were a serial step
// after the search that the disk's latency made long; DEVELOPERS.md,
// "Search speed"). Every file written is recorded, in the given order;
// the error is that of the first file, in that order, that failed.
func (f *Folder) writeFiles(names []string, data [][]byte) error {
	errs := make([]error, len(names))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(fileWriters, len(names)) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(names) {
					return
				}
				errs[i] = WriteAtomic(f.Path(names[i]), data[i])
			}
		})
	}
	wg.Wait()
	for i, name := range names {
		if errs[i] == nil {
			f.wrote(name)
		}
	}
	return firstNonNil(errs)
}

// firstNonNil is the first error of errs that is not nil, or nil.
func firstNonNil(errs []error) error {
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// DesignFileName is the path of front design id inside a run folder.
func DesignFileName(id int) string { return fmt.Sprintf("%s/front-%03d.toml", DesignsDir, id) }

// ReadCSV reads a CSV file of the run folder into a header and records.
func (f *Folder) ReadCSV(name string) ([]string, [][]string, error) {
	return f.ReadCSVContext(context.Background(), name)
}

// CheckEvery is how many rows the readers of run-folder files read
// between two looks at their context: cheap, and often enough that an
// interrupt lands well within a second on any file plica reads.
const CheckEvery = 1024

// ReadCSVContext is ReadCSV that stops with ctx.Err() once ctx is done
// (looked at every CheckEvery rows).
func (f *Folder) ReadCSVContext(ctx context.Context, name string) ([]string, [][]string, error) {
	return f.readCSV(ctx, name, nil)
}

// ReadRunCSV is ReadCSVContext for a CSV file of a run of spec:
// evaluations.csv has every complete row (one cell per column; a torn last
// line is not checked) checked by the rule resume and merge apply: the
// variable, objective, constraint and violation cells are numbers (or
// options), and feasible is true or false. A cell that breaks it is an
// *InputError with its file, line, column and column name.
func (f *Folder) ReadRunCSV(ctx context.Context, name string, spec *problems.Spec) ([]string, [][]string, error) {
	if name != EvaluationsFile {
		spec = nil
	}
	return f.readCSV(ctx, name, spec)
}

// readCSV reads a CSV file of the folder; with spec, as evaluations.csv
// (see ReadRunCSV).
func (f *Folder) readCSV(ctx context.Context, name string, spec *problems.Spec) ([]string, [][]string, error) {
	fh, err := os.Open(f.Path(name))
	if err != nil {
		return nil, nil, err
	}
	defer fh.Close()
	r := csv.NewReader(fh)
	r.FieldsPerRecord = -1
	var recs [][]string
	var checks []cellCheck
	for {
		if len(recs)%CheckEvery == 0 {
			if err := ctx.Err(); err != nil {
				return nil, nil, err
			}
		}
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, nil, inputErrorf("%s:%d:%d: %v", f.Path(name), pe.Line, pe.Column, pe.Err)
			}
			return nil, nil, fmt.Errorf("%s: %w", f.Path(name), err)
		}
		if spec != nil {
			if len(recs) == 0 {
				checks = evaluationChecks(spec, rec)
			} else if len(rec) == len(recs[0]) {
				if err := checkCells(f.Path(name), r, rec, checks); err != nil {
					return nil, nil, err
				}
			}
		}
		recs = append(recs, rec)
	}
	if len(recs) == 0 {
		return nil, nil, inputErrorf("%s is empty (expected a header and rows)", f.Path(name))
	}
	return recs[0], recs[1:], nil
}

// FrontX reads the variables of front design id (1-based) from front.csv,
// in the problem's variable order (file units; categories as indices).
func (f *Folder) FrontX(s *problems.Spec, id int) ([]float64, error) {
	header, rows, err := f.ReadCSV(FrontFile)
	if err != nil {
		return nil, err
	}
	cols := NewColumns(s).Variables
	idx := make([]int, len(cols))
	for j, c := range cols {
		idx[j] = -1
		for k, h := range header {
			if h == c {
				idx[j] = k
			}
		}
		if idx[j] < 0 {
			return nil, fmt.Errorf("%s has no column %s (was the problem changed?)", f.Path(FrontFile), c)
		}
	}
	for _, row := range rows {
		if row[0] != strconv.Itoa(id) {
			continue
		}
		x := make([]float64, len(cols))
		for j, v := range s.Variables {
			cell := row[idx[j]]
			if v.Options != nil {
				k := v.OptionIndex(cell)
				if k < 0 {
					return nil, fmt.Errorf("%s: design %d: %q is not an option of %s", f.Path(FrontFile), id, cell, v.Path())
				}
				x[j] = float64(k)
				continue
			}
			val, err := strconv.ParseFloat(cell, 64)
			if err != nil {
				return nil, fmt.Errorf("%s: design %d: %s = %q is not a number", f.Path(FrontFile), id, cols[j], cell)
			}
			x[j] = val
		}
		return x, nil
	}
	return nil, fmt.Errorf("%s has no design %d (expected an id from 1 to %d)", f.Path(FrontFile), id, len(rows))
}
