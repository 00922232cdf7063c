package results

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"plica/problems"
)

// InputError is a mistake in the runs given to compare, merge or pick (not
// a run folder, runs of different problems, an unknown column, a bad
// expression): the caller's input, not a failure of the work. Command-line
// tools exit with status 2 on it: it matches problems.ErrInput.
type InputError struct{ Err error }

func (e *InputError) Error() string        { return e.Err.Error() }
func (e *InputError) Unwrap() error        { return e.Err }
func (e *InputError) Is(target error) bool { return target == problems.ErrInput }

func inputErrorf(format string, args ...any) error {
	return &InputError{fmt.Errorf(format, args...)}
}

// RunFront is the front of one run folder read back from front.csv, for
// comparing, merging and picking. Rows whose objectives cannot be read (a
// design whose re-evaluation failed has NaN scores) are left out and
// counted in Skipped.
type RunFront struct {
	Dir    string
	Info   *RunInfo
	Spec   *problems.Spec
	Header []string   // front.csv header
	Rows   [][]string // front.csv rows with readable objectives
	IDs    []int      // the id column of Rows
	// F holds the objectives of Rows as the search minimises them
	// (maximised scores negated).
	F       [][]float64
	Skipped int
}

// LoadRunFront reads run.json, problem.toml and front.csv of a run folder.
// It does not need write access.
func LoadRunFront(dir string) (*RunFront, error) {
	return LoadRunFrontContext(context.Background(), dir)
}

// LoadRunFrontContext is LoadRunFront that stops with ctx.Err() once ctx
// is done (looked at every CheckEvery rows of front.csv).
func LoadRunFrontContext(ctx context.Context, dir string) (*RunFront, error) {
	dir = filepath.Clean(dir)
	f := &Folder{Dir: dir}
	b, err := os.ReadFile(f.Path(RunFile))
	if err != nil {
		return nil, inputErrorf("%s is not a run folder (no %s)", dir, RunFile)
	}
	var info RunInfo
	if err := json.Unmarshal(b, &info); err != nil {
		return nil, jsonInputError(f.Path(RunFile), b, err)
	}
	spec, err := problems.LoadProblem(f.Path(ProblemFile))
	if err != nil {
		return nil, err
	}
	header, rows, err := f.ReadCSVContext(ctx, FrontFile)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, inputErrorf("%s has no %s yet (is the run still in its first generations?)", dir, FrontFile)
		}
		return nil, err
	}
	rf := &RunFront{Dir: dir, Info: &info, Spec: spec, Header: header}
	cols, err := rf.objectiveColumns()
	if err != nil {
		return nil, err
	}
	idCol := headerColumn(header, "id")
	if idCol < 0 {
		return nil, inputErrorf("%s has no id column", f.Path(FrontFile))
	}
	for line, row := range rows {
		if line%CheckEvery == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		if len(row) != len(header) {
			return nil, inputErrorf("%s:%d: %d cells for %d columns", f.Path(FrontFile), line+2, len(row), len(header))
		}
		id, err := strconv.Atoi(row[idCol])
		if err != nil {
			return nil, inputErrorf("%s:%d: id %q is not a whole number", f.Path(FrontFile), line+2, row[idCol])
		}
		fv := make([]float64, len(cols))
		ok := true
		for i, c := range cols {
			v, err := strconv.ParseFloat(row[c], 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				ok = false
				break
			}
			fv[i] = spec.Objectives[i].Minimised(v)
		}
		if !ok {
			rf.Skipped++
			continue
		}
		rf.Rows = append(rf.Rows, row)
		rf.IDs = append(rf.IDs, id)
		rf.F = append(rf.F, fv)
	}
	return rf, nil
}

// objectiveColumns finds the score column of each objective in front.csv.
func (rf *RunFront) objectiveColumns() ([]int, error) {
	cols := make([]int, len(rf.Spec.Objectives))
	for i, o := range rf.Spec.Objectives {
		cols[i] = headerColumn(rf.Header, o.Score)
		if cols[i] < 0 {
			return nil, inputErrorf("%s has no column %s (was the problem changed?)", filepath.Join(rf.Dir, FrontFile), o.Score)
		}
	}
	return cols, nil
}

func headerColumn(header []string, name string) int {
	for k, h := range header {
		if h == name {
			return k
		}
	}
	return -1
}

// Scores returns objective vector i in the scores' own signs and units, as
// front.csv shows them.
func (rf *RunFront) Scores(i int) []float64 {
	return rf.Spec.Natural(rf.F[i])
}

// ObjectiveLabels names the objectives with their goals, e.g.
// "reach_mm (max)".
func ObjectiveLabels(s *problems.Spec) []string {
	out := make([]string, len(s.Objectives))
	for i, o := range s.Objectives {
		goal := "min"
		if o.Maximize {
			goal = "max"
		}
		out[i] = fmt.Sprintf("%s (%s)", o.Column(), goal)
	}
	return out
}

// SameObjectives checks that the runs can be compared: the same problem
// (problem_hash in run.json), or at least the same objectives with the same
// goals. It returns a note when the problems differ but the objectives
// agree, and an *InputError when they do not.
func SameObjectives(fronts []*RunFront) (note string, err error) {
	if len(fronts) == 0 {
		return "", nil
	}
	first := fronts[0]
	want := strings.Join(ObjectiveLabels(first.Spec), ", ")
	sameHash := true
	for _, f := range fronts[1:] {
		got := strings.Join(ObjectiveLabels(f.Spec), ", ")
		if got != want {
			return "", inputErrorf("runs of different problems: %s has objectives %s, %s has %s (expected the same objectives with the same goals)",
				first.Dir, want, f.Dir, got)
		}
		if f.Info.ProblemHash != first.Info.ProblemHash {
			sameHash = false
		}
	}
	if !sameHash {
		var hs []string
		for _, f := range fronts {
			hs = append(hs, fmt.Sprintf("%s %s", f.Dir, f.Info.ProblemHash))
		}
		note = fmt.Sprintf("the problem files differ (problem_hash: %s) but the objectives agree: the fronts are compared as they are", strings.Join(hs, ", "))
	}
	return note, nil
}

// SameProblem reports, as an *InputError, how two problems differ, apart
// from their [search] tables (seed, budget, population, workers): the
// variables with their ranges or options, the objectives, the extra
// constraints, the requirement checks, and every fixed value of the design
// tables (compared through the design files at the lower and the upper
// bounds). Runs of the same problem with different seeds (islands) pass.
func SameProblem(a, b *problems.Spec) error {
	if string(a.Text) == string(b.Text) {
		return nil
	}
	differ := func(what, x, y string) error {
		return inputErrorf("runs of different problems: %s differ (%s: %s; %s: %s)", what, a.File, x, b.File, y)
	}
	if x, y := fmt.Sprint(ObjectiveLabels(a)), fmt.Sprint(ObjectiveLabels(b)); x != y {
		return differ("the objectives", x, y)
	}
	if x, y := variablesText(a), variablesText(b); x != y {
		return differ("the design variables", x, y)
	}
	if x, y := fmt.Sprint(a.ConstraintNames()), fmt.Sprint(b.ConstraintNames()); x != y {
		return differ("the constraints", x, y)
	}
	for _, bound := range []string{"lower", "upper"} {
		ta, err := a.DesignTOML(boundsOf(a, bound == "upper"), "")
		if err != nil {
			return err
		}
		tb, err := b.DesignTOML(boundsOf(b, bound == "upper"), "")
		if err != nil {
			return err
		}
		if string(ta) != string(tb) {
			return inputErrorf("runs of different problems: the fixed values of the design tables differ (%s and %s; compare them with diff)", a.File, b.File)
		}
	}
	return nil
}

func variablesText(s *problems.Spec) string {
	var parts []string
	for _, v := range s.Variables {
		if v.Options != nil {
			parts = append(parts, fmt.Sprintf("%s %v", v.Path(), v.Options))
		} else {
			parts = append(parts, fmt.Sprintf("%s [%g, %g]", v.Path(), v.Lower, v.Upper))
		}
	}
	return strings.Join(parts, ", ")
}

func boundsOf(s *problems.Spec, upper bool) []float64 {
	x := make([]float64, len(s.Variables))
	for j, v := range s.Variables {
		switch {
		case v.Options != nil && upper:
			x[j] = float64(len(v.Options) - 1)
		case v.Options != nil:
			x[j] = 0
		case upper:
			x[j] = v.Upper
		default:
			x[j] = v.Lower
		}
	}
	return x
}
