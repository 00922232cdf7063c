package report

import (
	"context"
	"fmt"
	"math"
	"strconv"

	"plica/problems"
	"plica/search"

	"plica/results"

	"plica/search/front"
)

// Data is what the plots and the report show, read back from a run
// folder: run.json, problem.toml, front.csv, evaluations.csv and
// history.csv. Everything is in file units, as the CSV files hold it.
type Data struct {
	Folder *results.Folder
	Info   *results.RunInfo
	Spec   *problems.Spec
	// Front holds the rows of front.csv in file order (ids 1, 2, ...).
	Front []Row
	// Evaluated holds the feasible evaluations of evaluations.csv, thinned
	// evenly to at most MaxEvaluatedPoints rows, for context in the front
	// figure.
	Evaluated []Row
	// History holds history.csv.
	History []search.Stats
}

// MaxEvaluatedPoints caps the feasible evaluations drawn behind the front:
// each is an SVG element, and a long run holds tens of thousands.
const MaxEvaluatedPoints = 1500

// Row is one design of front.csv or evaluations.csv.
type Row struct {
	ID    int   // front id (1-based); 0 for an evaluation
	Index int64 // evaluation index
	// X holds the variables in the problem's order, file units;
	// categories as option indices.
	X []float64
	// Cells holds the variables as written in the CSV file.
	Cells []string
	// F holds the objectives in each score's own sign (maximised
	// objectives are not negated).
	F    []float64
	Pass bool
	// Robust holds a front row's robust columns (nil: none).
	Robust *RowRobust
}

// Load reads a run folder for plots and the report. A run
// without evaluations or history (stopped before its first generation)
// loads with those parts empty.
func Load(f *results.Folder) (*Data, error) {
	return load(context.Background(), f)
}

// load is Load that stops with ctx.Err() once ctx is done (looked at every
// results.CheckEvery rows).
func load(ctx context.Context, f *results.Folder) (*Data, error) {
	r, err := loadBase(ctx, f)
	if err != nil {
		return nil, err
	}
	if err := r.loadEvaluated(ctx); err != nil {
		return nil, err
	}
	return r, nil
}

// loadBase is load without evaluations.csv, the largest file, which
// loadEvaluated reads (Build reads it while it draws the figures that do
// not need it).
func loadBase(ctx context.Context, f *results.Folder) (*Data, error) {
	info, err := f.ReadInfo()
	if err != nil {
		return nil, err
	}
	spec, err := problems.LoadProblem(f.Path(results.ProblemFile))
	if err != nil {
		return nil, err
	}
	r := &Data{Folder: f, Info: info, Spec: spec}
	if results.Exists(f.Path(results.FrontFile)) {
		if r.Front, err = r.readRows(ctx, results.FrontFile, true); err != nil {
			return nil, err
		}
	}
	if results.Exists(f.Path(results.HistoryFile)) {
		if r.History, err = r.readHistory(); err != nil {
			return nil, err
		}
	}
	return r, nil
}

// loadEvaluated reads the feasible rows of evaluations.csv, if the file
// exists, into r.Evaluated.
func (r *Data) loadEvaluated(ctx context.Context) error {
	if !results.Exists(r.Folder.Path(results.EvaluationsFile)) {
		return nil
	}
	rows, err := r.readRows(ctx, results.EvaluationsFile, false)
	if err != nil {
		return err
	}
	r.Evaluated = thin(rows, MaxEvaluatedPoints)
	return nil
}

// columns maps each wanted column name to its position in header.
func columns(file string, header, want []string) ([]int, error) {
	idx := make([]int, len(want))
	for j, c := range want {
		idx[j] = -1
		for k, h := range header {
			if h == c {
				idx[j] = k
				break
			}
		}
		if idx[j] < 0 {
			return nil, fmt.Errorf("%s has no column %s (was the problem changed?)", file, c)
		}
	}
	return idx, nil
}

// readRows reads front.csv (front = true) or the feasible rows of
// evaluations.csv.
func (r *Data) readRows(ctx context.Context, name string, front bool) ([]Row, error) {
	header, recs, err := r.Folder.ReadRunCSV(ctx, name, r.Spec)
	if err != nil {
		return nil, err
	}
	path := r.Folder.Path(name)
	s := r.Spec
	c := results.NewColumns(s)
	vi, err := columns(path, header, c.Variables)
	if err != nil {
		return nil, err
	}
	oi, err := columns(path, header, c.Objectives)
	if err != nil {
		return nil, err
	}
	extra := []string{"index", "feasible"}
	if front {
		extra = []string{"index", "id", "pass"}
	}
	ei, err := columns(path, header, extra)
	if err != nil {
		return nil, err
	}
	var out []Row
	for line, rec := range recs {
		if line%results.CheckEvery == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		at := func(k int) string {
			if k < len(rec) {
				return rec[k]
			}
			return ""
		}
		where := fmt.Sprintf("%s: row %d", path, line+2)
		if !front && at(ei[1]) != "true" {
			continue
		}
		row := Row{Cells: make([]string, len(vi)), X: make([]float64, len(vi)), F: make([]float64, len(oi))}
		if row.Index, err = strconv.ParseInt(at(ei[0]), 10, 64); err != nil {
			return nil, fmt.Errorf("%s: index %q is not a whole number", where, at(ei[0]))
		}
		if front {
			if row.ID, err = strconv.Atoi(at(ei[1])); err != nil {
				return nil, fmt.Errorf("%s: id %q is not a whole number", where, at(ei[1]))
			}
			row.Pass = at(ei[2]) == "true"
			row.Robust = readRowRobust(s, header, rec)
		}
		for j, v := range s.Variables {
			cell := at(vi[j])
			row.Cells[j] = cell
			if v.Options != nil {
				row.X[j] = math.NaN()
				for k, o := range v.Options {
					if o == cell {
						row.X[j] = float64(k)
					}
				}
				if math.IsNaN(row.X[j]) {
					return nil, fmt.Errorf("%s: %q is not an option of %s", where, cell, v.Path())
				}
				continue
			}
			if row.X[j], err = strconv.ParseFloat(cell, 64); err != nil {
				return nil, fmt.Errorf("%s: %s = %q is not a number", where, c.Variables[j], cell)
			}
		}
		for i := range oi {
			if row.F[i], err = strconv.ParseFloat(at(oi[i]), 64); err != nil {
				return nil, fmt.Errorf("%s: %s = %q is not a number", where, c.Objectives[i], at(oi[i]))
			}
		}
		out = append(out, row)
	}
	return out, nil
}

// thin keeps at most n rows, evenly spread over the slice, first and last
// included.
func thin[T any](rows []T, n int) []T {
	if len(rows) <= n || n < 2 {
		return rows
	}
	out := make([]T, n)
	for k := range n {
		out[k] = rows[k*(len(rows)-1)/(n-1)]
	}
	return out
}

// readHistory reads history.csv.
func (r *Data) readHistory() ([]search.Stats, error) {
	header, recs, err := r.Folder.ReadCSV(results.HistoryFile)
	if err != nil {
		return nil, err
	}
	path := r.Folder.Path(results.HistoryFile)
	idx, err := columns(path, header, results.HistoryHeader)
	if err != nil {
		return nil, err
	}
	out := make([]search.Stats, 0, len(recs))
	for line, rec := range recs {
		var v [6]float64
		for k, i := range idx {
			if i >= len(rec) {
				return nil, fmt.Errorf("%s: row %d has %d columns (expected %d)", path, line+2, len(rec), len(header))
			}
			x, err := strconv.ParseFloat(rec[i], 64)
			if err != nil {
				return nil, fmt.Errorf("%s: row %d: %s = %q is not a number", path, line+2, results.HistoryHeader[k], rec[i])
			}
			v[k] = x
		}
		out = append(out, search.Stats{Generation: int(v[0]), Evaluations: int64(v[1]), Failures: int64(v[2]),
			Feasible: int(v[3]), ArchiveSize: int(v[4]), Hypervolume: v[5]})
	}
	return out, nil
}

// Minimised returns the objectives of a row as the search minimises them
// (maximised objectives negated).
func (r *Data) Minimised(row Row) []float64 {
	return r.Spec.Minimised(row.F)
}

// FrontRow returns the front row with the given id.
func (r *Data) FrontRow(id int) (Row, bool) {
	for _, row := range r.Front {
		if row.ID == id {
			return row, true
		}
	}
	return Row{}, false
}

// Representative returns the designs a report shows by default, as
// indices into f (objective vectors, all minimised): the best design of
// each objective in objective order, then the knee of front.FindKnee when
// the front has one (Knee.Found), without repeats. Ties go to the lower
// index. plica pick -knee names the same knee.
func Representative(f [][]float64) []int {
	if len(f) == 0 {
		return nil
	}
	var out []int
	seen := map[int]bool{}
	add := func(i int) {
		if !seen[i] {
			seen[i] = true
			out = append(out, i)
		}
	}
	for _, i := range bestOf(f) {
		add(i)
	}
	if k := front.FindKnee(f); k.Found {
		add(k.Index)
	}
	return out
}

// bestOf returns, for each objective, the index of the best design (the
// lowest index among equals).
func bestOf(f [][]float64) []int {
	best := make([]int, len(f[0]))
	for k := range best {
		for i := range f {
			if f[i][k] < f[best[k]][k] {
				best[k] = i
			}
		}
	}
	return best
}

// chosenIDs returns the front ids a report shows: ids when given, checked
// against the front, else the representative designs.
func (r *Data) chosenIDs(ids []int) ([]int, error) {
	if len(ids) > 0 {
		for _, id := range ids {
			if _, ok := r.FrontRow(id); !ok {
				return nil, &UnknownDesignError{Dir: r.Folder.Dir, ID: id, FrontSize: len(r.Front)}
			}
		}
		return ids, nil
	}
	f := make([][]float64, len(r.Front))
	for i, row := range r.Front {
		f[i] = r.Minimised(row)
	}
	var out []int
	for _, i := range Representative(f) {
		out = append(out, r.Front[i].ID)
	}
	return out, nil
}

// UnknownDesignError is a requested design id that is not on the front.
type UnknownDesignError struct {
	Dir       string // run folder
	ID        int
	FrontSize int
}

func (e *UnknownDesignError) Error() string {
	if e.FrontSize == 0 {
		return fmt.Sprintf("the front of %s is empty: there is no design %d", e.Dir, e.ID)
	}
	return fmt.Sprintf("the front of %s has no design %d (expected an id from 1 to %d)", e.Dir, e.ID, e.FrontSize)
}
