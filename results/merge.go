package results

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"maps"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"plica/problems"
	"plica/search"

	"plica/search/front"
)

// Columns that merge adds to evaluations.csv: the run folder each row
// comes from and its index there. The index column of a merged archive
// numbers the rows 0, 1, 2, … in the order of the runs given, then of
// their rows.
const (
	SourceRunColumn   = "source_run"
	SourceIndexColumn = "source_index"
)

// MergedRun describes one run of a merge in run.json.
type MergedRun struct {
	Run         string    `json:"run"`
	Seed        uint64    `json:"seed"`
	ProblemHash string    `json:"problem_hash"`
	Method      string    `json:"method"`
	Status      RunStatus `json:"status"`
	// Population is its population size (0 for a merged run).
	Population int `json:"population,omitempty"`
	// Evaluations counts the rows of its evaluations.csv merged.
	Evaluations int64 `json:"evaluations"`
	// FrontSize is the size of the front of its own evaluations.
	FrontSize int `json:"front_size"`
	// Hypervolume is the hypervolume of that front at the merged run's
	// reference point.
	Hypervolume float64 `json:"hypervolume"`
	// UnionFront counts the designs of the merged front it found.
	UnionFront int `json:"union_front_points"`
}

// MergeResult is what Merge wrote.
type MergeResult struct {
	Folder *Folder
	Info   *RunInfo
	Front  []FrontRow
	// Skipped counts incomplete rows left out (the torn last line of a run
	// that was killed while writing).
	Skipped int
	// ReferenceReason says how the reference point of the hypervolumes
	// in run.json was chosen.
	ReferenceReason string
	Notes           []string
}

// mergeInput is one run being merged.
type mergeInput struct {
	dir     string
	info    *RunInfo
	spec    *problems.Spec
	sources []RunSource // the searches whose evaluations it holds
}

// runSources are the searches whose evaluations the run in dir holds:
// itself, or for a merged run the sources in its run.json (a merge
// written before sources were recorded: the runs of merged_from that are
// not merges themselves).
func runSources(dir string, info *RunInfo) []RunSource {
	if info.Method != MergeMethod {
		return []RunSource{{Run: dir, ProblemHash: info.ProblemHash, Seed: info.Seed, Method: info.Method, Started: info.Started,
			Population: info.Population, Evaluations: info.Evaluations}}
	}
	if len(info.Sources) > 0 {
		return info.Sources
	}
	var out []RunSource
	for _, m := range info.MergedFrom {
		if m.Method != MergeMethod {
			out = append(out, RunSource{Run: m.Run, ProblemHash: m.ProblemHash, Seed: m.Seed, Method: m.Method, Population: m.Population, Evaluations: m.Evaluations})
		}
	}
	return out
}

// runPopulation is the population size of a run: run.json's, or for a
// search recorded before run.json kept it, its problem's; 0 for a merge.
func runPopulation(info *RunInfo, spec *problems.Spec) int {
	switch {
	case info.Method == MergeMethod:
		return 0
	case info.Population > 0:
		return info.Population
	}
	return specPopulation(spec)
}

// specPopulation is the population size a search of spec runs with.
func specPopulation(spec *problems.Spec) int {
	if spec.Search.Population > 0 {
		return spec.Search.Population
	}
	return search.DefaultPopulation
}

// overlap refuses two runs of a merge that hold the evaluations of one
// search (a merged run and one of its sources, say): merging both would
// count those evaluations twice. Two searches of the same problem with the
// same seed and method evaluate the same designs, so they count as one.
func overlap(a, b mergeInput) error {
	for _, x := range a.sources {
		for _, y := range b.sources {
			if x.ProblemHash != y.ProblemHash || x.Seed != y.Seed || x.Method != y.Method {
				continue
			}
			switch {
			case a.info.Method == MergeMethod && b.info.Method != MergeMethod:
				return inputErrorf("%s is a merge that already holds the evaluations of %s (seed %d): merging both would count them twice (expected one of them)", a.dir, b.dir, y.Seed)
			case b.info.Method == MergeMethod && a.info.Method != MergeMethod:
				return inputErrorf("%s is a merge that already holds the evaluations of %s (seed %d): merging both would count them twice (expected one of them)", b.dir, a.dir, x.Seed)
			case a.info.Method == MergeMethod:
				return inputErrorf("%s and %s both hold the evaluations of the search %s (seed %d): merging both would count them twice (expected merges of different runs)", a.dir, b.dir, x.Run, x.Seed)
			}
			return inputErrorf("%s and %s are searches of the same problem with the same seed %d: they evaluate the same designs, and merging both would count them twice (expected runs with different seeds)", a.dir, b.dir, x.Seed)
		}
	}
	return nil
}

// origin locates a merged design in its source run.
type origin struct {
	run    int    // position among the runs given
	srcRun string // the run folder that evaluated it (deeper when merging a merge)
	index  string // its index there
}

// Merge joins the evaluation archives of runs of one problem (islands with
// different seeds, say) into a new run folder out: problem.toml of the
// first run; evaluations.csv with every row renumbered and two more
// columns, source_run and source_index; front.csv and designs/front-NNN.toml
// of the feasible non-dominated set of all the evaluations (re-evaluated,
// as a search writes them); and run.json with method "merge" and the runs,
// seeds and problem hashes in merged_from. Runs whose problems differ in
// anything but their [search] tables are refused (SameProblem), as is an
// out folder that already holds a run.
//
// Runs that hold the evaluations of one search (a merged run and one of
// its sources, by the sources in run.json) are refused. The out folder is
// locked while it is written; an error after it was made leaves its
// run.json saying "failed" with the reason and the files written.
//
// Merge looks at ctx every CheckEvery rows it reads. Once ctx is done it
// stops with ctx.Err() and leaves nothing behind: a merge cannot be
// resumed, so an interrupted one removes the files it wrote, its lock and
// the folders it made, and the same command can simply be run again.
func Merge(ctx context.Context, dirs []string, out, version string) (_ *MergeResult, err error) {
	if len(dirs) == 0 {
		return nil, inputErrorf("no runs to merge")
	}
	var ins []mergeInput
	res := &MergeResult{}
	if err := CheckOutput("-o", out, dirs, nil); err != nil {
		return nil, err
	}
	for _, d := range dirs {
		d = filepath.Clean(d)
		for _, in := range ins {
			if SamePath(in.dir, d) {
				return nil, inputErrorf("%s is given twice", d)
			}
		}
		f := &Folder{Dir: d}
		info, err := f.ReadInfo()
		if err != nil {
			if errors.Is(err, os.ErrNotExist) {
				return nil, inputErrorf("%s is not a run folder (no %s)", d, RunFile)
			}
			return nil, &InputError{err}
		}
		spec, err := problems.LoadProblem(f.Path(ProblemFile))
		if err != nil {
			return nil, err
		}
		if len(ins) > 0 {
			if err := SameProblem(ins[0].spec, spec); err != nil {
				return nil, err
			}
		}
		switch info.Status {
		case StatusRunning:
			res.Notes = append(res.Notes, fmt.Sprintf("%s says it is still running (or was killed): merging the evaluations it has written", d))
		case StatusFailed:
			res.Notes = append(res.Notes, fmt.Sprintf("%s says it failed (%s): merging the evaluations it has written", d, info.Reason))
		}
		in := mergeInput{dir: d, info: info, spec: spec, sources: runSources(d, info)}
		for _, prev := range ins {
			if err := overlap(prev, in); err != nil {
				return nil, err
			}
		}
		ins = append(ins, in)
	}
	// The problem of the first run, with the calibration files it names
	// (read before the new folder is made, so a failure writes nothing).
	text, files, err := ins[0].spec.Portable()
	if err != nil {
		return nil, err
	}
	// Every row of every run is read once before the new folder is made:
	// a run with a bad row writes nothing.
	for _, in := range ins {
		skipped := 0
		err := readEvaluations(ctx, &Folder{Dir: in.dir}, ins[0].spec, EvaluationHeader(ins[0].spec), func(search.Design, []string, string, string) error { return nil }, &skipped)
		if err != nil {
			return nil, err
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	made := madeDirs(filepath.Join(out, DesignsDir))
	folder, err := Create(out)
	if err != nil {
		if errors.Is(err, problems.ErrInput) {
			return nil, err
		}
		return nil, &InputError{err}
	}
	defer folder.Unlock()
	defer func() {
		if err == nil {
			return
		}
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			if rerr := folder.removeWritten(made); rerr != nil {
				err = &UnremovedError{Err: err, Dir: folder.Dir, Remove: rerr}
			}
			return
		}
		files := append(folder.Written(), RunFile)
		failed := &RunInfo{Program: "plica", Version: version, ProblemFile: ins[0].info.ProblemFile, Method: MergeMethod, Started: time.Now().UTC(),
			Updated: time.Now().UTC(), Status: StatusFailed, Reason: err.Error(), Files: files, Caution: Caution}
		if werr := folder.writeFailedInfo(failed); werr != nil {
			err = &UnrecordedError{Err: err, Path: folder.Path(RunFile), Record: werr, Files: folder.Written()}
		}
	}()
	if n := folder.LockNote(); n != "" {
		res.Notes = append(res.Notes, n)
	}
	res.Folder = folder
	for _, name := range slices.Sorted(maps.Keys(files)) {
		if err := os.MkdirAll(filepath.Dir(folder.Path(name)), 0o755); err != nil {
			return nil, err
		}
		if err := folder.WriteFile(name, files[name]); err != nil {
			return nil, err
		}
	}
	spec, err := problems.ParseProblem(text, folder.Path(ProblemFile))
	if err != nil {
		return nil, err
	}
	if err := folder.WriteFile(ProblemFile, spec.Text); err != nil {
		return nil, err
	}

	// evaluations.csv, streamed to a temporary file and renamed at the end
	header := EvaluationHeader(spec)
	var designs []search.Design
	origins := map[int64]origin{}
	perRun := make([][]search.Design, len(ins))
	counts := make([]int64, len(ins))
	var next, failures int64
	err = folder.writeStream(EvaluationsFile, func(out io.Writer) error {
		w := csv.NewWriter(out)
		w.Write(append(append([]string{}, header...), SourceRunColumn, SourceIndexColumn))
		for r, in := range ins {
			err := readEvaluations(ctx, &Folder{Dir: in.dir}, spec, header, func(d search.Design, cells []string, srcRun, srcIndex string) error {
				row := append([]string{strconv.FormatInt(next, 10)}, cells[1:]...)
				row = append(row, srcRun, srcIndex)
				if err := w.Write(row); err != nil {
					return err
				}
				d.Index = next
				origins[next] = origin{run: r, srcRun: srcRun, index: srcIndex}
				if d.Failed != "" {
					failures++
				}
				if d.Feasible() {
					designs = append(designs, d)
					perRun[r] = append(perRun[r], d)
				}
				next++
				counts[r]++
				return nil
			}, &res.Skipped)
			if err != nil {
				return err
			}
		}
		w.Flush()
		return w.Error()
	})
	if err != nil {
		return nil, err
	}

	if err := ctx.Err(); err != nil {
		return nil, err
	}
	merged := front.ParetoFront(designs, (*search.Design).Point)
	res.Front = FrontRows(spec, merged)
	if s := spec.ScatterSeeded(spec.Search.Seed); s != nil {
		scoreFrontRobust(ctx, spec, res.Front, s, 0, nil)
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	info := &RunInfo{Program: "plica", Version: version, ProblemName: ins[0].info.ProblemName, ProblemFile: ins[0].info.ProblemFile,
		ProblemHash: spec.Hash(), Method: MergeMethod, Started: time.Now().UTC(), Status: StatusMerged, Evaluations: next,
		Failures: failures, FrontSize: len(merged), Caution: Caution}
	c := NewColumns(spec)
	info.Variables, info.Objectives, info.Constraints = c.Variables, c.Objectives, c.Constraints
	info.Robust = newRobustInfo(spec, spec.Search.Seed)
	info.Reference, res.ReferenceReason = mergeReference(ins, merged, len(spec.Objectives))
	info.Hypervolume = finiteOr0(hypervolumeOf(merged, info.Reference))
	for r, in := range ins {
		own := front.ParetoFront(perRun[r], (*search.Design).Point)
		src := MergedRun{Run: in.dir, Seed: in.info.Seed, ProblemHash: in.info.ProblemHash, Method: in.info.Method, Status: in.info.Status,
			Population: runPopulation(in.info, in.spec), Evaluations: counts[r], FrontSize: len(own), Hypervolume: finiteOr0(hypervolumeOf(own, info.Reference))}
		for _, d := range merged {
			if origins[d.Index].run == r {
				src.UnionFront++
			}
		}
		info.MergedFrom = append(info.MergedFrom, src)
		info.Sources = append(info.Sources, in.sources...)
		info.RuntimeSec += in.info.RuntimeSec
		info.Generations = max(info.Generations, in.info.Generations)
	}
	info.Warnings = frontWarnings(spec, merged, nil, 0)
	info.Updated = time.Now().UTC()
	comment := func(fr FrontRow) string {
		o := origins[fr.Design.Index]
		src := ins[o.run]
		seed := ""
		if o.srcRun == src.dir {
			seed = fmt.Sprintf(" (seed %d)", src.info.Seed)
		}
		var b strings.Builder
		fmt.Fprintf(&b, "plica design %d of the front merged from %d runs of %s: run %s%s, evaluation %s.\n",
			fr.ID, len(ins), src.info.ProblemFile, o.srcRun, seed, o.index)
		for i, ob := range spec.Objectives {
			fmt.Fprintf(&b, "%s = %.6g\n", ob.Column(), ob.Natural(fr.Design.F[i]))
		}
		b.WriteString("Check it with: plica check THIS_FILE\n")
		b.WriteString(Caution)
		return b.String()
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := folder.WriteFront(spec, res.Front, comment); err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	info.FrontLimits = FrontLimits(spec, res.Front)
	info.Files = append(folder.Written(), RunFile)
	if err := folder.WriteInfo(info); err != nil {
		return nil, err
	}
	res.Info = info
	if res.Skipped > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%d incomplete rows left out (a run killed while writing leaves a torn last line)", res.Skipped))
	}
	return res, nil
}

// mergeReference is the component-wise worst of the runs' reference
// points, so that every run's front and the merged front are measured at
// one point; when a run has none, the worst point of the merged front
// plus a tenth of its range (as the search chooses one).
func mergeReference(ins []mergeInput, merged []search.Design, m int) ([]float64, string) {
	ref := make([]float64, m)
	for k := range ref {
		ref[k] = math.Inf(-1)
	}
	ok := true
	for _, in := range ins {
		if len(in.info.Reference) != m {
			ok = false
			break
		}
		for k, v := range in.info.Reference {
			ref[k] = max(ref[k], v)
		}
	}
	if ok {
		return ref, "the worst of the runs' reference points, objectives as minimised"
	}
	if len(merged) == 0 {
		return nil, "none: no feasible design"
	}
	for k := range ref {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, d := range merged {
			lo, hi = min(lo, d.F[k]), max(hi, d.F[k])
		}
		span := hi - lo
		if span == 0 {
			span = math.Max(math.Abs(hi), 1)
		}
		ref[k] = hi + 0.1*span
	}
	return ref, "the worst point of the merged front plus a tenth of its range, objectives as minimised"
}

func hypervolumeOf(ds []search.Design, ref []float64) float64 {
	if ref == nil {
		return 0
	}
	pts := make([][]float64, len(ds))
	for i, d := range ds {
		pts[i] = d.F
	}
	return front.Hypervolume(pts, ref)
}

// UnremovedError is an interrupted merge (Err) whose partly written
// folder could not be removed (Remove).
type UnremovedError struct {
	Err    error
	Dir    string
	Remove error
}

func (e *UnremovedError) Error() string {
	return fmt.Sprintf("%v (and %s could not be removed: %v)", e.Err, e.Dir, e.Remove)
}

func (e *UnremovedError) Unwrap() error { return e.Err }

// readEvaluations reads evaluations.csv of a run folder and calls add for
// every complete row with the design (minimised objectives, Index unset),
// the row's cells in the order of header, and its source run and index
// (carried over when the run is itself a merge). It stops with ctx.Err()
// once ctx is done (looked at every CheckEvery lines). Rows with the wrong
// number of cells (a torn last line) are counted in skipped.
func readEvaluations(ctx context.Context, f *Folder, spec *problems.Spec, header []string, add func(d search.Design, cells []string, srcRun, srcIndex string) error, skipped *int) error {
	path := f.Path(EvaluationsFile)
	fh, err := os.Open(path)
	if err != nil {
		return &InputError{fmt.Errorf("%s: %w", f.Dir, err)}
	}
	defer fh.Close()
	r := csv.NewReader(fh)
	r.FieldsPerRecord = -1
	have, err := r.Read()
	if err != nil {
		return inputErrorf("%s: no header: %v", path, err)
	}
	col := make([]int, len(header))
	for j, h := range header {
		col[j] = headerColumn(have, h)
		if col[j] < 0 {
			return inputErrorf("%s has no column %s (was the problem changed?)", path, h)
		}
	}
	srcRunCol, srcIdxCol := headerColumn(have, SourceRunColumn), headerColumn(have, SourceIndexColumn)
	nv, no, ng := len(spec.Variables), len(spec.Objectives), spec.NumConstraints()
	checks := evaluationChecks(spec, have)
	cells := make([]string, len(header))
	for line := 2; ; line++ {
		if line%CheckEvery == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
		}
		rec, err := r.Read()
		if err == io.EOF {
			return nil
		}
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			*skipped++
			continue
		}
		if err != nil {
			return fmt.Errorf("%s: %w", path, err)
		}
		if len(rec) != len(have) {
			*skipped++
			continue
		}
		if err := checkCells(path, r, rec, checks); err != nil {
			return err
		}
		for j, c := range col {
			cells[j] = rec[c]
		}
		d := search.Design{X: make([]float64, nv), F: make([]float64, no), G: make([]float64, ng)}
		bad := func(what string) error {
			return inputErrorf("%s:%d: %s", path, line, what)
		}
		for j, v := range spec.Variables {
			cell := cells[1+j]
			if v.Options != nil {
				k := v.OptionIndex(cell)
				if k < 0 {
					return bad(fmt.Sprintf("%q is not an option of %s", cell, v.Path()))
				}
				d.X[j] = float64(k)
				continue
			}
			x, err := strconv.ParseFloat(cell, 64)
			if err != nil {
				return bad(fmt.Sprintf("%s = %q is not a number", header[1+j], cell))
			}
			if !(x >= v.Lower && x <= v.Upper) {
				// a search never leaves the ranges: the row is not one of its evaluations
				return bad(fmt.Sprintf("%s = %s is outside the problem's range [%g, %g]", header[1+j], cell, v.Lower, v.Upper))
			}
			d.X[j] = x
		}
		for i, o := range spec.Objectives {
			v, err := strconv.ParseFloat(cells[1+nv+i], 64)
			if err != nil {
				return bad(fmt.Sprintf("%s = %q is not a number", header[1+nv+i], cells[1+nv+i]))
			}
			d.F[i] = o.Minimised(v)
		}
		for k := range ng {
			v, err := strconv.ParseFloat(cells[1+nv+no+k], 64)
			if err != nil {
				return bad(fmt.Sprintf("%s = %q is not a number", header[1+nv+no+k], cells[1+nv+no+k]))
			}
			d.G[k] = v
		}
		base := 1 + nv + no + ng
		cv, err := strconv.ParseFloat(cells[base], 64)
		if err != nil {
			return bad(fmt.Sprintf("violation = %q is not a number", cells[base]))
		}
		d.CV = cv
		d.Failed = cells[base+2]
		if feas, err := strconv.ParseBool(cells[base+1]); err != nil {
			return bad(fmt.Sprintf("feasible = %q is not true or false", cells[base+1]))
		} else if feas != d.Feasible() {
			return bad(fmt.Sprintf("feasible = %s disagrees with violation %s and failure %q", cells[base+1], cells[base], d.Failed))
		}
		srcRun, srcIndex := f.Dir, cells[0]
		if srcRunCol >= 0 && srcIdxCol >= 0 {
			srcRun, srcIndex = rec[srcRunCol], rec[srcIdxCol]
		}
		if err := add(d, cells, srcRun, srcIndex); err != nil {
			return err
		}
	}
}

// madeDirs lists dir and those of its parents that do not exist yet,
// deepest first: the folders that making dir creates.
func madeDirs(dir string) []string {
	var out []string
	for d := filepath.Clean(dir); ; d = filepath.Dir(d) {
		if _, err := os.Lstat(d); err == nil {
			return out
		}
		out = append(out, d)
		if p := filepath.Dir(d); p == d {
			return out
		}
	}
}

// removeWritten undoes an interrupted merge: it removes the files this
// process wrote into the folder and its lock, then the folders in made
// (those Create made, deepest first) if they are empty, with, when the
// folder itself is new, the folders of the files written. Files and
// folders it did not make are never touched.
func (f *Folder) removeWritten(made []string) error {
	var errs []error
	var inner []string
	for _, name := range f.written {
		if err := os.Remove(f.Path(name)); err != nil && !errors.Is(err, os.ErrNotExist) {
			errs = append(errs, err)
		}
		for d := filepath.Dir(filepath.FromSlash(name)); d != "."; d = filepath.Dir(d) {
			inner = append(inner, f.Path(d))
		}
	}
	f.written = nil
	if err := f.Unlock(); err != nil {
		errs = append(errs, err)
	}
	if slices.ContainsFunc(made, func(d string) bool { return SamePath(d, f.Dir) }) {
		// deepest first: longer paths before their parents
		slices.SortFunc(inner, func(a, b string) int { return len(b) - len(a) })
		for _, d := range inner {
			os.Remove(d) // only if empty
		}
	}
	for _, d := range made {
		os.Remove(d) // only if empty
	}
	return errors.Join(errs...)
}
