// Package results reads and writes run folders: the resolved problem, the
// evaluation archive, the front as CSV and as design files, checkpoints and
// run.json. Execute runs a search into a folder with a progress bar; Merge
// joins island runs, Compare measures fronts against each other and Pick
// chooses designs of a front. atomic.go owns atomic writes (WriteAtomic,
// WriteAtomicStream, WriteAtomicAll); every file of a run folder goes
// through them but evaluations.csv, appended generation by generation
// (rewritten atomically on resume), checkpoint.prev.json, the previous
// checkpoint renamed, run.lock, hard-linked into place, and the run.json of
// a failed run when no temporary file fits (rewritten in place). The report and its figures are package results/report;
// package results/verify runs the verification cases of plica verify.
//
// A run folder holds:
//
//	run.json           seed, plica version, problem hash, method, status, counts, variables, objectives, constraints
//	problem.toml       the problem file, its calibration files pointing into calibration/
//	evaluations.csv    every evaluation, appended and flushed generation by generation
//	history.csv        counters and archive hypervolume after every generation
//	front.csv          the final front: variables, objectives, every score and check
//	designs/front-NNN.toml  each front design as a design file (check and pose accept it)
//	checkpoint.json    the latest checkpoint (atomic); checkpoint.prev.json the one before
//	calibration/       copies of the calibration files the problem names
//	plots/*.svg        the figures; report.html the self-contained report
//	picked/pick-NNN.toml  designs chosen by plica pick
//	run.lock           while search, resume or merge writes the folder: process id, host, start time, boot id
package results

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"plica/problems"
	"plica/search"
)

// File names inside a run folder.
const (
	RunFile         = "run.json"
	ProblemFile     = "problem.toml"
	EvaluationsFile = "evaluations.csv"
	HistoryFile     = "history.csv"
	FrontFile       = "front.csv"
	DesignsDir      = "designs"
	CheckpointFile  = "checkpoint.json"
	PrevCheckpoint  = "checkpoint.prev.json"
)

// RunInfo is run.json.
type RunInfo struct {
	Program     string    `json:"program"`
	Version     string    `json:"version"`
	ProblemName string    `json:"problem_name,omitempty"`
	ProblemFile string    `json:"problem_file"`
	ProblemHash string    `json:"problem_hash"`
	Method      string    `json:"method"`
	Seed        uint64    `json:"seed"`
	Started     time.Time `json:"started"`
	Updated     time.Time `json:"updated"`
	Status      RunStatus `json:"status"`
	Generations int       `json:"generations"`
	Evaluations int64     `json:"evaluations"`
	Failures    int64     `json:"failures"`
	FrontSize   int       `json:"front_size"`
	// Hypervolume of the front at Reference, in the search's minimised
	// objectives (maximised objectives negated).
	Hypervolume float64   `json:"hypervolume"`
	Reference   []float64 `json:"reference,omitempty"`
	RuntimeSec  float64   `json:"runtime_s"`
	Variables   []string  `json:"variables"`
	Objectives  []string  `json:"objectives"`
	Constraints []string  `json:"constraints"`
	Workers     int       `json:"workers"`
	// Population is the population size the search ran with (a merged
	// run: 0, see MergedFrom and Sources).
	Population int `json:"population,omitempty"`
	// MaxEvaluations and TimeBudget are the budgets of the latest
	// (possibly resumed) run.
	// TimeBudget is written as Go duration text ("10m0s"; "0s" for
	// none); an empty text reads as none.
	MaxEvaluations int64         `json:"max_evaluations"`
	TimeBudget     time.Duration `json:"-"`
	Caution        string        `json:"caution"`
	// Reason says why a run failed (Status StatusFailed): the error that
	// stopped it after work began, a write that failed, say.
	Reason string `json:"reason,omitempty"`
	// Files lists the files of the folder this run has written, relative
	// to the folder; a failed run lists only those actually written.
	Files []string `json:"files,omitempty"`
	// Sources identifies the searches whose evaluations a merged run
	// holds, merges of merges flattened: merge refuses to count one twice.
	Sources []RunSource `json:"sources,omitempty"`
	// MergedFrom lists the runs of a merged run (method "merge"); see
	// Merge.
	MergedFrom []MergedRun `json:"merged_from,omitempty"`
	// Diagnosis says what blocked a run whose front holds fewer than
	// FewFeasible designs (this session's evaluations).
	Diagnosis *Diagnosis `json:"diagnosis,omitempty"`
	// Warnings are findings about the run a designer should act on (a
	// front variable at a bound, a front still improving, bellows that
	// look listed outermost first); empty when none.
	Warnings []Warning `json:"warnings"`
	// FrontLimits say, for each objective, what limits the front design
	// best in it (active constraints, variables at a bound); empty when
	// the front is.
	FrontLimits []FrontLimit `json:"front_limits"`
	// Robust says, for a problem with [scatter], how the search scored
	// candidates (first_order or nominal) and how the front's robust
	// columns were computed (monte_carlo).
	Robust *RobustInfo `json:"robust,omitempty"`
}

// runInfoJSON is run.json on disk: RunInfo with the time budget as text.
type runInfoJSON struct {
	plainRunInfo
	TimeBudget string `json:"time_budget"`
}

type plainRunInfo RunInfo

// MarshalJSON writes run.json, the time budget as duration text.
func (r RunInfo) MarshalJSON() ([]byte, error) {
	if r.FrontLimits == nil {
		r.FrontLimits = []FrontLimit{} // an array, empty when none
	}
	if r.Warnings == nil {
		r.Warnings = []Warning{} // an array, empty when none
	}
	return json.Marshal(runInfoJSON{plainRunInfo(r), r.TimeBudget.String()})
}

// UnmarshalJSON reads run.json; a time budget that is not a duration is an
// error.
func (r *RunInfo) UnmarshalJSON(b []byte) error {
	var j runInfoJSON
	if err := json.Unmarshal(b, &j); err != nil {
		return err
	}
	*r = RunInfo(j.plainRunInfo)
	r.Method = methodText(r.Method)
	for i := range r.Sources {
		r.Sources[i].Method = methodText(r.Sources[i].Method)
	}
	for i := range r.MergedFrom {
		r.MergedFrom[i].Method = methodText(r.MergedFrom[i].Method)
	}
	if j.TimeBudget != "" {
		d, err := time.ParseDuration(j.TimeBudget)
		if err != nil {
			return fmt.Errorf("time_budget %q: %v", j.TimeBudget, err)
		}
		r.TimeBudget = d
	}
	return nil
}

// MergeMethod is the method of run.json of a merged run.
const MergeMethod = "merge"

// methodText is a method of run.json as the problem file names it
// (problems.Method's text, or MergeMethod): run folders written before
// run.json used the problem file's names say "NSGA2" or "GA".
func methodText(m string) string {
	switch m {
	case "NSGA2":
		return problems.NSGA2.String()
	case "GA":
		return problems.GA.String()
	}
	return m
}

// RunSource identifies one search run: its problem hash and seed (the same
// problem and seed give the same evaluations), where it was and when it
// started.
type RunSource struct {
	Run         string    `json:"run"`
	ProblemHash string    `json:"problem_hash"`
	Seed        uint64    `json:"seed"`
	Method      string    `json:"method"`
	Started     time.Time `json:"started"`
	// Population and Evaluations are the search's population size and
	// the evaluations its folder held when merged (0: not recorded, a
	// merge written before they were).
	Population  int   `json:"population,omitempty"`
	Evaluations int64 `json:"evaluations,omitempty"`
}

// RunStatus is the status of run.json: StatusRunning while a search writes
// the folder, StatusMerged for a merged run, StatusFailed for a run that
// failed after work began (Reason says why), else why the search stopped
// (the names of search.Status).
type RunStatus int

const (
	StatusRunning RunStatus = iota
	StatusNotTerminated
	StatusEvaluationLimit
	StatusRuntimeLimit
	StatusStalled
	StatusInterrupted
	StatusConverged
	StatusFailure
	StatusMerged
	StatusFailed
)

var runStatusNames = [...]string{
	StatusRunning:         "running",
	StatusNotTerminated:   search.NotTerminated.String(),
	StatusEvaluationLimit: search.EvaluationLimit.String(),
	StatusRuntimeLimit:    search.RuntimeLimit.String(),
	StatusStalled:         search.Stalled.String(),
	StatusInterrupted:     search.Interrupted.String(),
	StatusConverged:       search.Converged.String(),
	StatusFailure:         search.Failure.String(),
	StatusMerged:          "merged",
	StatusFailed:          "failed",
}

// StatusOf is the run status of a search that stopped with s.
func StatusOf(s search.Status) RunStatus {
	switch s {
	case search.NotTerminated:
		return StatusNotTerminated
	case search.EvaluationLimit:
		return StatusEvaluationLimit
	case search.RuntimeLimit:
		return StatusRuntimeLimit
	case search.Stalled:
		return StatusStalled
	case search.Interrupted:
		return StatusInterrupted
	case search.Converged:
		return StatusConverged
	}
	return StatusFailure
}

func (s RunStatus) String() string {
	if s >= 0 && int(s) < len(runStatusNames) {
		return runStatusNames[s]
	}
	return fmt.Sprintf("RunStatus(%d)", int(s))
}

// Finished reports whether the search ran to one of its stopping rules
// (a budget, stagnation or convergence); merged runs are not searches.
func (s RunStatus) Finished() bool {
	switch s {
	case StatusEvaluationLimit, StatusRuntimeLimit, StatusStalled, StatusConverged:
		return true
	}
	return false
}

// MarshalText writes the status name.
func (s RunStatus) MarshalText() ([]byte, error) {
	if s < 0 || int(s) >= len(runStatusNames) {
		return nil, fmt.Errorf("results: unknown run status %d", int(s))
	}
	return []byte(runStatusNames[s]), nil
}

// UnmarshalText reads a status name.
func (s *RunStatus) UnmarshalText(b []byte) error {
	for i, n := range runStatusNames {
		if string(b) == n {
			*s = RunStatus(i)
			return nil
		}
	}
	return fmt.Errorf("unknown run status %q (expected one of running, merged, failed, %s, %s, %s, %s, %s, %s, %s)", b,
		runStatusNames[1], runStatusNames[2], runStatusNames[3], runStatusNames[4], runStatusNames[5], runStatusNames[6], runStatusNames[7])
}

// Folder is one run folder.
type Folder struct {
	Dir string
	// lock is the folder's lock while this process holds it.
	lock *heldLock
	// written lists the files written through the folder, in order,
	// without repeats.
	written []string
}

// Create makes a new run folder and takes its lock (see Lock; release it
// with Unlock). It refuses a folder that already holds a run, and checks
// that the folder is writable before any work starts.
func Create(dir string) (*Folder, error) {
	if dir == "" {
		return nil, inputErrorf("the run folder name is empty (expected a folder)")
	}
	if _, err := os.Stat(filepath.Join(dir, RunFile)); err == nil {
		return nil, inputErrorf("%s already holds a run (resume it with plica resume %s, or choose another -o)", dir, dir)
	}
	if err := os.MkdirAll(filepath.Join(dir, DesignsDir), 0o755); err != nil {
		return nil, fmt.Errorf("cannot create run folder: %w", err)
	}
	f := &Folder{Dir: dir}
	if err := f.probe(); err != nil {
		return nil, err
	}
	if err := f.Lock(); err != nil {
		return nil, err
	}
	// Checked again under the lock: a run that another process finished
	// between the first check and the lock is not overwritten.
	if _, err := os.Stat(filepath.Join(dir, RunFile)); err == nil {
		f.Unlock()
		return nil, inputErrorf("%s already holds a run (resume it with plica resume %s, or choose another -o)", dir, dir)
	}
	return f, nil
}

// Written lists the files this process wrote into the folder, relative
// to it, in the order first written.
func (f *Folder) Written() []string { return slices.Clone(f.written) }

// wrote records a file written into the folder.
func (f *Folder) wrote(name string) {
	name = filepath.ToSlash(name)
	if !slices.Contains(f.written, name) {
		f.written = append(f.written, name)
	}
}

// Open opens an existing run folder.
func Open(dir string) (*Folder, error) {
	if _, err := os.Stat(filepath.Join(dir, RunFile)); err != nil {
		return nil, fmt.Errorf("%s is not a run folder (no %s)", dir, RunFile)
	}
	f := &Folder{Dir: dir}
	if err := f.probe(); err != nil {
		return nil, err
	}
	return f, nil
}

// probe checks that the folder accepts files.
func (f *Folder) probe() error {
	tmp, err := os.CreateTemp(f.Dir, ".probe-*")
	if err != nil {
		return fmt.Errorf("run folder %s is not writable: %w", f.Dir, errors.Unwrap(err))
	}
	name := tmp.Name()
	tmp.Close()
	return os.Remove(name)
}

// Path returns the path of a file in the folder.
func (f *Folder) Path(name string) string { return filepath.Join(f.Dir, name) }

// WriteFile writes a file atomically: a temporary file in the same
// folder, synced, then renamed over the target.
func (f *Folder) WriteFile(name string, data []byte) error {
	if err := WriteAtomic(f.Path(name), data); err != nil {
		return err
	}
	f.wrote(name)
	return nil
}

// writeStream writes a file of the folder with WriteAtomicStream.
func (f *Folder) writeStream(name string, write func(w io.Writer) error) error {
	if err := WriteAtomicStream(f.Path(name), write); err != nil {
		return err
	}
	f.wrote(name)
	return nil
}

// WriteInfo writes run.json.
func (f *Folder) WriteInfo(info *RunInfo) error {
	b, err := json.MarshalIndent(info, "", "  ")
	if err != nil {
		return err
	}
	return f.WriteFile(RunFile, append(b, '\n'))
}

// writeFailedInfo writes run.json of a run that failed after work began,
// as robustly as it can: atomically when the disk allows, else (no room for
// a temporary file: a full disk) by rewriting run.json in place. The old
// run.json already holds disk space; the new content is written over it
// (in compact form when the indented one is longer) and the file cut to
// its length, so a full disk still records the failure. An error means
// run.json could not be updated.
func (f *Folder) writeFailedInfo(info *RunInfo) error {
	err := f.WriteInfo(info)
	if err == nil {
		return nil
	}
	indented, merr := json.MarshalIndent(info, "", "  ")
	if merr != nil {
		return err
	}
	compact, merr := json.Marshal(info)
	if merr != nil {
		return err
	}
	if ierr := rewriteInPlace(f.Path(RunFile), append(indented, '\n'), append(compact, '\n')); ierr != nil {
		return fmt.Errorf("%v; rewriting it in place: %v", err, ierr)
	}
	f.wrote(RunFile)
	return nil
}

// rewriteInPlace overwrites an existing file with the first content that
// fits in its current size (else the last, which may need more room), then
// cuts it to that length and syncs it: no new file, so no new disk space
// while the content fits.
func rewriteInPlace(path string, contents ...[]byte) error {
	fh, err := os.OpenFile(path, os.O_WRONLY, 0)
	if err != nil {
		return err
	}
	st, err := fh.Stat()
	if err != nil {
		fh.Close()
		return err
	}
	data := contents[len(contents)-1]
	for _, c := range contents {
		if int64(len(c)) <= st.Size() {
			data = c
			break
		}
	}
	_, err = fh.WriteAt(data, 0)
	if err == nil {
		err = fh.Truncate(int64(len(data)))
	}
	if err == nil {
		err = fh.Sync()
	}
	if cerr := fh.Close(); err == nil {
		err = cerr
	}
	return err
}

// UnrecordedError is a run that failed after work began (Err) and whose
// run.json could not be updated to say so (Record): it may still say
// "running". Files lists the files of the folder written by this process.
type UnrecordedError struct {
	Err    error
	Path   string // run.json
	Record error
	Files  []string
}

func (e *UnrecordedError) Error() string {
	return fmt.Sprintf("%v (and %s could not be updated to say \"failed\": %v)", e.Err, e.Path, e.Record)
}

func (e *UnrecordedError) Unwrap() error { return e.Err }

// ReadInfo reads run.json. A file that is not run.json (bad JSON, a
// field of the wrong type, an unknown status) is an *InputError naming the
// line and column.
func (f *Folder) ReadInfo() (*RunInfo, error) {
	b, err := os.ReadFile(f.Path(RunFile))
	if err != nil {
		return nil, err
	}
	var info RunInfo
	if err := json.Unmarshal(b, &info); err != nil {
		return nil, jsonInputError(f.Path(RunFile), b, err)
	}
	return &info, nil
}

// jsonInputError positions a JSON decoding error in its file.
func jsonInputError(path string, data []byte, err error) error {
	var off int64 = -1
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		off = se.Offset
	case errors.As(err, &te):
		off = te.Offset
		if te.Field != "" {
			err = fmt.Errorf("%s: found JSON %s, expected %s", te.Field, te.Value, te.Type)
		}
	}
	if off < 0 {
		return inputErrorf("%s: %v", path, err)
	}
	line, col := 1, 1
	for _, c := range data[:min(int(off), len(data))] {
		if c == '\n' {
			line, col = line+1, 1
		} else {
			col++
		}
	}
	return inputErrorf("%s:%d:%d: %v", path, line, col, err)
}

// WriteCheckpoint keeps the previous checkpoint and writes the new one
// atomically.
func (f *Folder) WriteCheckpoint(c *search.Checkpoint) error {
	return f.writeCheckpoint(c, nil)
}

// writeCheckpoint is WriteCheckpoint with the diagnosis gathered so far
// (nil: none) saved beside the search's state.
func (f *Folder) writeCheckpoint(c *search.Checkpoint, st *diagnosisState) error {
	b, err := checkpointWithDiagnosis(c, st)
	if err != nil {
		return err
	}
	if _, err := os.Stat(f.Path(CheckpointFile)); err == nil {
		if err := os.Rename(f.Path(CheckpointFile), f.Path(PrevCheckpoint)); err != nil {
			return err
		}
		f.wrote(PrevCheckpoint)
	}
	return f.WriteFile(CheckpointFile, b)
}

// HasCheckpoint reports whether the folder holds a checkpoint file.
func (f *Folder) HasCheckpoint() bool {
	return Exists(f.Path(CheckpointFile)) || Exists(f.Path(PrevCheckpoint))
}

// ReadCheckpoint reads the latest checkpoint, falling back to the previous
// one when the latest is missing or unreadable.
func (f *Folder) ReadCheckpoint() (*search.Checkpoint, error) {
	c, _, _, err := f.readCheckpoint()
	return c, err
}

// readCheckpoint is ReadCheckpoint that also says, when it fell back to
// the previous checkpoint, why. A checkpoint whose counters are negative
// is unusable like one that is not JSON; none usable is an *InputError.
// The diagnosis state is the one saved in the same file (nil when the
// file has none, or an unreadable one, which the note then says).
func (f *Folder) readCheckpoint() (*search.Checkpoint, *diagnosisState, string, error) {
	var firstErr error
	for _, name := range []string{CheckpointFile, PrevCheckpoint} {
		b, err := os.ReadFile(f.Path(name))
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		var c search.Checkpoint
		if err := json.Unmarshal(b, &c); err != nil {
			err = jsonInputError(f.Path(name), b, err)
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		if c.Evaluations < 0 || c.Generation < 0 || c.Failures < 0 || c.Failures > c.Evaluations {
			if firstErr == nil {
				firstErr = fmt.Errorf("%s: counters out of range (generation %d, evaluations %d, failures %d; expected 0 <= failures <= evaluations)",
					f.Path(name), c.Generation, c.Evaluations, c.Failures)
			}
			continue
		}
		note := ""
		if name == PrevCheckpoint {
			note = fmt.Sprintf("%s is unusable (%v): resuming from %s (generation %d, %d evaluations)", CheckpointFile, firstErr, PrevCheckpoint, c.Generation, c.Evaluations)
		}
		st, err := readDiagnosisState(b)
		if err != nil {
			st = nil
			note = strings.TrimPrefix(note+"; ", "; ") + fmt.Sprintf("the diagnosis state in %s is unreadable (%v)", name, err)
		}
		return &c, st, note, nil
	}
	return nil, nil, "", inputErrorf("no usable checkpoint in %s: %v", f.Dir, firstErr)
}
