package results

import (
	"context"
	"errors"
	"fmt"
	"io"
	"maps"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/schollz/progressbar/v3"

	"plica/problems"
	"plica/search"
)

// Caution is printed in run folders, reports and check outputs.
const Caution = "Model estimates only: verify on a printed prototype before relying on a design; where it carries payloads, works near people or is for medical use, follow the applicable standards and have it reviewed by a qualified engineer."

// Options controls Execute.
type Options struct {
	// Version is the program version recorded in run.json.
	Version string
	// Progress receives a progress bar; nil means none.
	Progress io.Writer
	// Resume continues the run saved in the folder's checkpoint.
	Resume bool
	// Note, if not nil, receives notes a user should see (a resume from
	// the previous checkpoint because the latest is unusable, say).
	Note func(string)
}

// Execute runs a search into a run folder: it records the problem and the
// settings, appends every evaluation to evaluations.csv, writes a
// checkpoint every few generations and when the run stops (Ctrl-C
// included), and finally writes the front as CSV and design files. An
// interrupted run returns its result and context.Canceled.
//
// A resumed run first checks evaluations.csv against the checkpoint (see
// ResumeLog). Once run.json says "running", an error that stops the run (a
// write that fails on a full disk, say) leaves run.json saying "failed"
// with the reason and listing only the files actually written (Written).
func Execute(ctx context.Context, spec *problems.Spec, f *Folder, set search.Settings, opt Options) (*search.Result, error) {
	method := spec.Method()
	note := func(s string) {
		if opt.Note != nil && s != "" {
			opt.Note(s)
		}
	}
	info := &RunInfo{}
	keep := int64(-1)
	var logData []byte // evaluations.csv to start a resumed run from
	var files map[string][]byte
	var text []byte
	var earlierFiles []string // the files of a resumed run's earlier sessions
	var saved *diagnosisState // the diagnosis gathered before a resume
	since := int64(0)         // the evaluation the diagnosis starts from (0: all)
	if opt.Resume {
		old, err := f.ReadInfo()
		if err != nil {
			return nil, err
		}
		info = old
		earlierFiles = old.Files
		if err := sameConstraints(f, old, spec); err != nil {
			return nil, err
		}
		if f.HasCheckpoint() {
			cp, st, why, err := f.readCheckpoint()
			if err != nil {
				return nil, err
			}
			note(why)
			set.Resume = cp
			keep = cp.Evaluations
			saved = st
			if st != nil && st.Evaluations+cp.Failures != cp.Evaluations {
				note(fmt.Sprintf("the saved diagnosis counts %d evaluations, the checkpoint %d: the diagnosis covers only the evaluations since this resume",
					st.Evaluations, cp.Evaluations-cp.Failures))
				saved = nil
			}
			if saved == nil && keep > 0 {
				since = keep
				if st == nil {
					note(fmt.Sprintf("the checkpoint predates saved diagnosis counters: the diagnosis covers only the evaluations since this resume (after evaluation %d)", keep))
				}
			}
		} else {
			// Stopped before the first checkpoint: start again from the
			// beginning with the same seed, which repeats the same
			// evaluations.
			keep = 0
		}
		if set.MaxEvaluations > 0 && set.MaxEvaluations < keep {
			return nil, inputErrorf("the evaluation budget (-evals) %d is below the %d evaluations already done in %s (expected more than %d to extend the run)",
				set.MaxEvaluations, keep, f.Dir, keep)
		}
		// Checked before anything is written: a log that does not match
		// the checkpoint leaves the folder as it was.
		if logData, err = ResumeLog(f.Path(EvaluationsFile), spec, keep); err != nil {
			return nil, err
		}
		// The files of the earlier sessions stay, but for the front,
		// which this session writes anew.
		for _, name := range info.Files {
			if name != FrontFile && !strings.HasPrefix(name, DesignsDir+"/") && !strings.HasPrefix(name, ClosestDir+"/") && Exists(f.Path(name)) {
				f.wrote(name)
			}
		}
		if len(info.Files) == 0 && Exists(f.Path(ProblemFile)) {
			f.wrote(ProblemFile)
		}
	} else {
		// The run folder keeps the problem and the calibration files it
		// names, so it loads wherever it is moved (read before anything
		// is written).
		var err error
		if text, files, err = spec.Portable(); err != nil {
			return nil, err
		}
		// A new evaluations.csv, whatever the folder held.
		if logData, err = ResumeLog(f.Path(EvaluationsFile), spec, 0); err != nil {
			return nil, err
		}
		info = &RunInfo{Program: "plica", Version: opt.Version, ProblemName: problemName(spec), ProblemFile: spec.File,
			ProblemHash: spec.Hash(), Seed: set.Seed, Started: time.Now().UTC(), Caution: Caution}
		c := NewColumns(spec)
		info.Variables, info.Objectives, info.Constraints = c.Variables, c.Objectives, c.Constraints
	}
	info.Method = spec.Search.Method.String()
	info.Status = StatusRunning
	info.Reason = ""
	info.Workers = set.Workers
	info.Population = set.Population
	if info.Population == 0 {
		info.Population = search.DefaultPopulation
	}
	info.MaxEvaluations = set.MaxEvaluations
	info.TimeBudget = set.Runtime
	info.Updated = time.Now().UTC()
	// fail records a failure after work began in run.json.
	fail := func(res *search.Result, err error) (*search.Result, error) {
		info.Status = StatusFailed
		info.Reason = err.Error()
		info.Files = f.Written()
		if !slices.Contains(info.Files, RunFile) {
			info.Files = append(info.Files, RunFile)
		}
		info.Updated = time.Now().UTC()
		if werr := f.writeFailedInfo(info); werr != nil {
			return res, &UnrecordedError{Err: err, Path: f.Path(RunFile), Record: werr, Files: f.Written()}
		}
		return res, err
	}
	for _, name := range slices.Sorted(maps.Keys(files)) {
		if err := os.MkdirAll(filepath.Dir(f.Path(name)), 0o755); err != nil {
			return fail(nil, err)
		}
		if err := f.WriteFile(name, files[name]); err != nil {
			return fail(nil, err)
		}
	}
	if text != nil {
		if err := f.WriteFile(ProblemFile, text); err != nil {
			return fail(nil, err)
		}
	}
	info.Files = f.Written()
	if err := f.WriteInfo(info); err != nil {
		return fail(nil, err)
	}
	log, err := f.openLog(spec, logData)
	if err != nil {
		return fail(nil, err)
	}
	defer log.Close()

	// The file work runs on the persister's goroutine while the next
	// generation is evaluated; the hooks below only hand it copies.
	// diag and info belong to the persister until Wait returns.
	diag := &search.Diagnoser{}
	ex := newExplainer(spec)
	if saved != nil {
		if err := saved.restore(diag, ex, spec.NumConstraints()); err != nil {
			note(fmt.Sprintf("the saved diagnosis does not fit the problem (%v): the diagnosis covers only the evaluations since this resume", err))
			diag, ex, since = &search.Diagnoser{}, newExplainer(spec), keep
		}
	}
	persist := newPersister()
	persisting := true
	waitPersist := func() error {
		if !persisting {
			return persist.Err()
		}
		persisting = false
		return persist.Wait()
	}
	defer waitPersist()
	batch := &designBatch{}
	set.Evaluated = func(d *search.Design) { batch.add(d) }
	bar := newBar(opt.Progress, set)
	userProgress := set.Progress
	// logBatch queues the rows evaluated since the last call.
	logBatch := func() {
		if len(batch.ds) == 0 {
			return
		}
		b := batch
		batch = &designBatch{}
		persist.Do(func() error {
			ds := b.designs()
			for i := range ds {
				diag.Add(&ds[i])
				// committed in the order the search recorded them, on the
				// persister beside diag, so a checkpoint saves both at
				// the same evaluation
				ex.commit(ds[i].Index, ds[i].Failed != "")
				if err := log.Add(&ds[i]); err != nil {
					return err
				}
			}
			return log.Flush()
		})
	}
	set.Progress = func(p search.Progress) {
		logBatch()
		bar.update(p)
		if userProgress != nil {
			userProgress(p)
		}
	}
	set.Checkpoint = func(c *search.Checkpoint) error {
		logBatch()
		persist.Do(func() error {
			if err := log.Sync(); err != nil {
				return err
			}
			if err := f.writeCheckpoint(c, saveDiagnosis(diag, ex)); err != nil {
				return err
			}
			if err := f.WriteHistory(c.History); err != nil {
				return err
			}
			info.Generations, info.Evaluations, info.Failures = c.Generation, c.Evaluations, c.Failures
			info.FrontSize, info.Hypervolume, info.Reference = c.ArchiveSize, c.Hypervolume, c.Reference
			info.RuntimeSec = c.Elapsed.Seconds()
			info.Updated = time.Now().UTC()
			info.Files = f.Written()
			return f.WriteInfo(info)
		})
		// A job that failed (now or earlier) stops the search at its
		// next checkpoint; Wait below reports one that fails later.
		return persist.Err()
	}
	problem := spec.SearchProblem()
	if ex != nil {
		problem = spec.ObservedSearchProblem(ex.add)
	}
	res, runErr := search.Run(ctx, problem, &set, method)
	bar.finish()
	logBatch()
	persistErr := waitPersist()
	if res == nil {
		if runErr == nil {
			runErr = errors.New("search returned no result")
		}
		return fail(nil, runErr)
	}
	info.Generations, info.Evaluations, info.Failures = res.Generation, res.Evaluations, res.Failures
	info.RuntimeSec = res.Runtime.Seconds()
	if runErr != nil && !errors.Is(runErr, context.Canceled) {
		return fail(res, runErr)
	}
	if persistErr != nil {
		return fail(res, persistErr)
	}
	if err := log.Sync(); err != nil {
		return fail(res, err)
	}
	if err := f.WriteHistory(res.History); err != nil {
		return fail(res, err)
	}
	rows := frontRows(spec, res.Front, set.Workers)
	if info.Robust = newRobustInfo(spec, set.Seed); info.Robust != nil {
		scoreFrontRobust(ctx, spec, rows, spec.ScatterSeeded(set.Seed), set.Workers, opt.Progress)
		if ctx.Err() != nil {
			info.Robust.Front = RobustNotScored
		}
	}
	if err := f.WriteFront(spec, rows, frontComment(spec, info)); err != nil {
		return fail(res, err)
	}
	info.Status = StatusOf(res.Status)
	info.FrontSize, info.Hypervolume, info.Reference = len(res.Front), res.Hypervolume, res.Reference
	stallTol := set.Stall.Tolerance
	if stallTol == 0 {
		stallTol = search.DefaultStallTolerance
	}
	info.Warnings = frontWarnings(spec, res.Front, res.History, stallTol)
	info.FrontLimits = FrontLimits(spec, rows)
	if w, ok := ex.orderWarning(); ok {
		info.Warnings = append(info.Warnings, w)
	}
	info.Diagnosis = nil
	if len(res.Front) < FewFeasible {
		info.Diagnosis = Diagnose(spec, diag)
		if info.Diagnosis != nil {
			info.Diagnosis.Explanations = ex.sentences(info.Diagnosis.Blocking)
			info.Diagnosis.SinceEvaluation = since
		}
		if err := writeClosest(f, spec, info, info.Diagnosis, diag.Least); err != nil {
			return fail(res, err)
		}
	}
	if err := removeStaleClosest(f, earlierFiles); err != nil {
		return fail(res, err)
	}
	info.Updated = time.Now().UTC()
	info.Files = f.Written()
	if !slices.Contains(info.Files, RunFile) {
		info.Files = append(info.Files, RunFile)
	}
	if err := f.WriteInfo(info); err != nil {
		return fail(res, err)
	}
	if runErr != nil {
		return res, runErr
	}
	if res.Status == search.Interrupted {
		return res, context.Canceled
	}
	if info.Robust != nil && info.Robust.Front == RobustNotScored {
		// stopped while the front was scored under scatter: resume scores it
		return res, context.Canceled
	}
	return res, nil
}

// FrontRows re-evaluates the front designs for their full scores, sorted
// by the first objective, on all cores.
func FrontRows(spec *problems.Spec, front []search.Design) []FrontRow {
	return frontRows(spec, front, runtime.GOMAXPROCS(0))
}

// frontRows is FrontRows with at most workers concurrent evaluations
// (each row is evaluated on its own, so the rows do not depend on the
// number; 0 or less means all cores). Done one by one, this re-evaluation was the largest serial
// step at the end of a search (DEVELOPERS.md, "Search speed").
func frontRows(spec *problems.Spec, front []search.Design, workers int) []FrontRow {
	ds := append([]search.Design(nil), front...)
	sort.SliceStable(ds, func(i, j int) bool { return ds[i].F[0] < ds[j].F[0] })
	rows := make([]FrontRow, len(ds))
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range max(1, min(workers, len(ds))) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(ds) {
					return
				}
				rows[i] = FrontRow{ID: i + 1, Design: ds[i]}
				res, err := spec.Evaluate(ds[i].X)
				if err != nil {
					rows[i].Err = err.Error()
					continue
				}
				rows[i].Result = res
			}
		})
	}
	wg.Wait()
	return rows
}

func frontComment(spec *problems.Spec, info *RunInfo) func(FrontRow) string {
	return func(r FrontRow) string {
		var b strings.Builder
		fmt.Fprintf(&b, "plica design %d of the front of a search on %s (seed %d, evaluation %d).\n", r.ID, info.ProblemFile, info.Seed, r.Design.Index)
		for i, o := range spec.Objectives {
			fmt.Fprintf(&b, "%s = %.6g\n", o.Column(), o.Natural(r.Design.F[i]))
		}
		b.WriteString("Check it with: plica check THIS_FILE\n")
		b.WriteString(Caution)
		return b.String()
	}
}

func problemName(s *problems.Spec) string {
	d, _, err := s.Design(s.Midpoint())
	if err != nil || d == nil {
		return ""
	}
	return d.Name
}

// bar shows evaluations, rate, ETA, feasible count and hypervolume.
// Only a terminal gets the redrawn bar; anything else gets plain lines.
type bar struct {
	plain *plainLog
	pb    *progressbar.ProgressBar
	start time.Time
	first int64
}

func newBar(w io.Writer, set search.Settings) *bar {
	if w == nil {
		return &bar{}
	}
	if !isTerminal(w) {
		return &bar{plain: newPlainLog(w, set, time.Now)}
	}
	max := set.MaxEvaluations
	if max <= 0 {
		max = -1
	}
	pb := progressbar.NewOptions64(max,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetWidth(24),
		progressbar.OptionShowCount(),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionShowElapsedTimeOnFinish(),
		progressbar.OptionThrottle(200*time.Millisecond),
		progressbar.OptionSetDescription("evaluating"),
		progressbar.OptionOnCompletion(func() { fmt.Fprintln(w) }),
	)
	return &bar{pb: pb, start: time.Now(), first: evaluationsBefore(set)}
}

func (b *bar) update(p search.Progress) {
	if b.plain != nil {
		b.plain.update(p)
		return
	}
	if b.pb == nil {
		return
	}
	rate := sessionRate(p.Evaluations, b.first, b.start, time.Now())
	b.pb.Describe(fmt.Sprintf("gen %d, %.0f evals/s, feasible %d, front %d, HV %.4g", p.Generation, rate, p.Feasible, p.ArchiveSize, finiteOr0(p.Hypervolume)))
	b.pb.Set64(p.Evaluations)
}

func (b *bar) finish() {
	if b.plain != nil {
		b.plain.finish()
	}
	if b.pb != nil {
		b.pb.Finish()
	}
}

func finiteOr0(x float64) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0
	}
	return x
}

// Exists reports whether a path exists.
func Exists(path string) bool {
	_, err := os.Stat(path)
	return err == nil
}

// renamedConstraints maps constraint columns of older plica versions to
// the column that replaced them and why their margins cannot be carried
// over.
var renamedConstraints = map[string]struct{ now, why string }{
	"g_task_coverage": {"g_task_miss", "the task constraint is now the miss distance in mm, no longer the covered fraction, so the saved margins mean something else"},
}

// sameConstraints refuses to resume a run whose constraint columns
// (run.json) differ from those this plica makes of its problem: the
// checkpoint's margins would be read as other constraints. Run folders
// written before run.json listed constraints are let through (the
// evaluations.csv header check catches them).
func sameConstraints(f *Folder, old *RunInfo, spec *problems.Spec) error {
	now := NewColumns(spec).Constraints
	if len(old.Constraints) == 0 || slices.Equal(old.Constraints, now) {
		return nil
	}
	for _, c := range old.Constraints {
		if r, ok := renamedConstraints[c]; ok && slices.Contains(now, r.now) {
			return inputErrorf("%s: cannot resume: the run was made by an older plica with constraint %s, which is now %s (%s); start a new search from its problem: plica search %s -o NEW_RUN",
				f.Dir, c, r.now, r.why, f.Path(ProblemFile))
		}
	}
	return inputErrorf("%s: cannot resume: the run's constraints (%s) differ from those of its problem.toml as this plica reads it (%s); start a new search from its problem: plica search %s -o NEW_RUN",
		f.Dir, strings.Join(old.Constraints, ", "), strings.Join(now, ", "), f.Path(ProblemFile))
}
