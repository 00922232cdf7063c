package results

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
	"plica/search"

	"plica/search/front"
)

// islandRun runs a small search with the given seed into dir.
func islandRun(t *testing.T, dir string, seed uint64) {
	t.Helper()
	spec := smallProblem(t)
	f, err := Create(dir)
	require.NoError(t, err)
	set := spec.Settings()
	set.Seed = seed
	set.MaxEvaluations = 120
	set.Workers = 1
	_, err = Execute(context.Background(), spec, f, set, Options{Version: "test"})
	require.NoError(t, err)
}

// TestMergeArchives: the merged front is ParetoFront of every evaluation
// of the runs (definition of Pareto dominance, search/REFERENCE.md §1.3), a torn last
// line of a killed run is left out and counted, and merging a merge keeps
// the original source runs.
func TestMergeArchives(t *testing.T) {
	tmp := t.TempDir()
	a, b, c := filepath.Join(tmp, "a"), filepath.Join(tmp, "b"), filepath.Join(tmp, "c")
	islandRun(t, a, 1)
	islandRun(t, b, 2)
	islandRun(t, c, 3)
	// a run killed while writing: a torn last line
	fh, err := os.OpenFile(filepath.Join(b, EvaluationsFile), os.O_APPEND|os.O_WRONLY, 0)
	require.NoError(t, err)
	_, err = fh.WriteString("120,2.5,19")
	require.NoError(t, err)
	require.NoError(t, fh.Close())

	ab := filepath.Join(tmp, "ab")
	res, err := Merge(context.Background(), []string{a, b}, ab, "test")
	require.NoError(t, err)
	assert.Equal(t, 1, res.Skipped, "the torn line is left out")
	assert.Equal(t, int64(240), res.Info.Evaluations, "every complete row")

	spec := smallProblem(t)
	var all []search.Design
	for _, dir := range []string{a, b} {
		var n int
		err := readEvaluations(context.Background(), &Folder{Dir: dir}, spec, EvaluationHeader(spec), func(d search.Design, _ []string, _, idx string) error {
			d.Index = int64(len(all))
			all = append(all, d)
			return nil
		}, &n)
		require.NoError(t, err)
	}
	want := front.ParetoFront(all, (*search.Design).Point)
	require.NotEmpty(t, want, "the islands found feasible designs")
	require.Len(t, res.Front, len(want), "merged front size")
	for i, r := range res.Front {
		assert.Equal(t, want[i].F, r.Design.F, "front design %d", i+1)
		assert.Equal(t, want[i].Index, r.Design.Index, "front design %d keeps its merged index", i+1)
	}
	rf, err := LoadRunFront(ab)
	require.NoError(t, err)
	assert.Len(t, rf.F, len(want), "front.csv of the merged run reads back")

	// merge of a merge: the source columns name the first runs
	abc := filepath.Join(tmp, "abc")
	mres, err := Merge(context.Background(), []string{ab, c}, abc, "test")
	require.NoError(t, err)

	// provenance in run.json: each merged run's seed, population and
	// evaluations, and the searches behind a merged merge
	info, err := (&Folder{Dir: abc}).ReadInfo()
	require.NoError(t, err)
	assert.Equal(t, mres.Info.MergedFrom, info.MergedFrom, "merged_from reads back")
	require.Len(t, info.MergedFrom, 2)
	pop := smallProblem(t).Search.Population
	require.Equal(t, 12, pop, "the small problem's population")
	assert.Equal(t, MergeMethod, info.MergedFrom[0].Method)
	assert.Equal(t, 0, info.MergedFrom[0].Population, "a merge has no population")
	assert.Equal(t, int64(240), info.MergedFrom[0].Evaluations, "evaluations of the merged merge")
	assert.Equal(t, uint64(3), info.MergedFrom[1].Seed)
	assert.Equal(t, pop, info.MergedFrom[1].Population, "population of run c")
	assert.Equal(t, int64(120), info.MergedFrom[1].Evaluations, "evaluations of run c")
	for _, m := range info.MergedFrom {
		assert.Greater(t, m.Hypervolume, 0.0, "hypervolume of %s's own front at the merged reference", m.Run)
		assert.LessOrEqual(t, m.Hypervolume, info.Hypervolume*(1+1e-12), "a run's front is dominated by the merged front: %s", m.Run)
	}
	require.Len(t, info.Sources, 3, "the three searches")
	for i, s := range info.Sources {
		assert.Equal(t, uint64(i+1), s.Seed, "seed of search %s", s.Run)
		assert.Equal(t, pop, s.Population, "population of search %s", s.Run)
		assert.Equal(t, int64(120), s.Evaluations, "evaluations of search %s", s.Run)
	}
	assert.NotNil(t, info.Warnings, "run.json carries a warnings array")
	h, rows, err := (&Folder{Dir: abc}).ReadCSV(EvaluationsFile)
	require.NoError(t, err)
	src := slices.Index(h, SourceRunColumn)
	seen := map[string]int{}
	for _, r := range rows {
		seen[r[src]]++
	}
	assert.Equal(t, map[string]int{filepath.Clean(a): 120, filepath.Clean(b): 120, filepath.Clean(c): 120}, seen, "source runs of a merged merge")
	si := slices.Index(h, SourceIndexColumn)
	assert.Equal(t, "0", rows[0][si], "source index of the first row")
	assert.Equal(t, strconv.Itoa(119), rows[359][si], "source index of the last row")

	_, err = Merge(context.Background(), []string{a, a}, filepath.Join(tmp, "twice"), "test")
	var ie *InputError
	assert.True(t, errors.As(err, &ie), "a run given twice is an input error: %v", err)
}

// TestMergeKeepsCalibrationFiles: runs of a problem that names a
// calibration file keep a copy in calibration/; their merge must too, so
// that the merged problem.toml loads (for pick, refine and report).
func TestMergeKeepsCalibrationFiles(t *testing.T) {
	tmp := t.TempDir()
	cal, err := os.ReadFile("../problems/examples/boom-calibration.toml")
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(tmp, "cal.toml"), cal, 0o644))
	text := string(smallProblem(t).Text)
	require.Contains(t, text, "material = \"petg\"\n")
	text = strings.ReplaceAll(text, "material = \"petg\"\n", "material = \"petg\"\ncalibration_file = \"cal.toml\"\n")
	spec, err := problems.ParseProblem([]byte(text), filepath.Join(tmp, "problem.toml"))
	require.NoError(t, err, "problem with a calibration file")
	var runs []string
	for seed := uint64(1); seed <= 2; seed++ {
		dir := filepath.Join(tmp, "island"+strconv.FormatUint(seed, 10))
		f, err := Create(dir)
		require.NoError(t, err)
		set := spec.Settings()
		set.Seed, set.MaxEvaluations, set.Workers = seed, 48, 1
		_, err = Execute(context.Background(), spec, f, set, Options{Version: "test"})
		require.NoError(t, err, "island seed %d", seed)
		runs = append(runs, dir)
	}
	out := filepath.Join(tmp, "merged")
	_, err = Merge(context.Background(), runs, out, "test")
	require.NoError(t, err, "merge of runs whose problem names a calibration file")
	assert.FileExists(t, filepath.Join(out, "calibration", "cal.toml"), "the merged run keeps the calibration file")
	_, err = problems.LoadProblem(filepath.Join(out, ProblemFile))
	assert.NoError(t, err, "the merged problem.toml loads")
}
