package results

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
	"plica/search"
)

// coarseExample reads a shipped example problem (problems/examples/NAME,
// invented numbers) on a coarse workspace (12 relative and 8 base steps),
// applies the further text replacements given as old, new pairs (the
// population, an extra table) and parses it as file.
func coarseExample(t *testing.T, name, file string, replace ...string) *problems.Spec {
	t.Helper()
	require.Zero(t, len(replace)%2, "replacements come in old, new pairs")
	text, err := os.ReadFile(filepath.Join("../problems/examples", name))
	require.NoError(t, err)
	s := string(text)
	pairs := append([]string{"relative_steps = 32", "relative_steps = 12", "base_steps = 32", "base_steps = 8"}, replace...)
	for i := 0; i < len(pairs); i += 2 {
		require.Contains(t, s, pairs[i], "%s holds the text to replace", name)
		s = strings.Replace(s, pairs[i], pairs[i+1], 1)
	}
	spec, err := problems.ParseProblem([]byte(s), file)
	require.NoError(t, err)
	return spec
}

// smallBlocked is the blocked demo (problems/examples/boom-blocked.toml,
// invented numbers; no feasible design) on a coarse workspace and a small
// population, so that every run carries a diagnosis.
func smallBlocked(t *testing.T) *problems.Spec {
	t.Helper()
	return coarseExample(t, "boom-blocked.toml", "blocked.toml", "population = 40", "population = 12")
}

// interruptAt runs spec into dir and cancels it (Ctrl-C) in generation
// gen, while the next generation is being evaluated, so that the run
// abandons evaluations its checkpoint does not hold.
func interruptAt(t *testing.T, spec *problems.Spec, dir string, evals int64, gen int) {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	f, err := Create(dir)
	require.NoError(t, err)
	set := spec.Settings()
	set.MaxEvaluations = evals
	set.Workers = 2
	set.CheckpointEvery = 2
	set.Progress = func(p search.Progress) {
		if p.Generation == gen {
			cancel()
		}
	}
	_, err = Execute(ctx, spec, f, set, Options{Version: "test"})
	require.True(t, errors.Is(err, context.Canceled), "interrupted, got %v", err)
}

func readDiagnosis(t *testing.T, dir string) *Diagnosis {
	t.Helper()
	var info struct {
		Diagnosis *Diagnosis `json:"diagnosis"`
	}
	require.NoError(t, json.Unmarshal([]byte(readFile(t, filepath.Join(dir, RunFile))), &info))
	require.NotNil(t, info.Diagnosis, "%s carries a diagnosis", dir)
	return info.Diagnosis
}

// TestResumedDiagnosisMatchesUninterrupted: a run stopped by Ctrl-C and
// resumed has the same diagnosis in run.json (counts, smallest
// violations, least-infeasible designs, sentences, explanations) and the
// same closest/ design files as the uninterrupted run: the checkpoint keeps
// the diagnosis counters.
func TestResumedDiagnosisMatchesUninterrupted(t *testing.T) {
	spec := smallBlocked(t)
	tmp := t.TempDir()
	whole := filepath.Join(tmp, "whole")
	_, err := runTo(t, spec, whole, 144, 1, context.Background(), false)
	require.NoError(t, err)

	cut := filepath.Join(tmp, "cut")
	interruptAt(t, spec, cut, 144, 5)
	cp := readFile(t, filepath.Join(cut, CheckpointFile))
	require.Contains(t, cp, `"`+diagnosisStateKey+`"`, "the checkpoint keeps the diagnosis counters")
	_, err = runTo(t, spec, cut, 144, 2, context.Background(), true)
	require.NoError(t, err)

	want, got := readDiagnosis(t, whole), readDiagnosis(t, cut)
	assert.Equal(t, int64(144), want.Evaluations+failuresSince(t, whole, 0), "the whole run's diagnosis covers all evaluations")
	assert.Zero(t, got.SinceEvaluation)
	wb, err := json.Marshal(want)
	require.NoError(t, err)
	gb, err := json.Marshal(got)
	require.NoError(t, err)
	assert.JSONEq(t, string(wb), string(gb), "diagnosis after stop and resume")
	for i := range want.LeastInfeasible {
		name := filepath.Join(ClosestDir, filepath.Base(want.LeastInfeasible[i].DesignFile))
		assert.Equal(t, readFile(t, filepath.Join(whole, name)), readFile(t, filepath.Join(cut, name)), name)
	}
}

// TestResumeOldCheckpointDiagnosis: a checkpoint written before the
// diagnosis counters were saved (no diagnosis_state) still resumes; the
// run says in one line that the diagnosis covers only the evaluations
// since the resume, and run.json's diagnosis gives the evaluation it
// starts after.
func TestResumeOldCheckpointDiagnosis(t *testing.T) {
	spec := smallBlocked(t)
	dir := filepath.Join(t.TempDir(), "old")
	interruptAt(t, spec, dir, 144, 5)
	var keep int64
	for _, name := range []string{CheckpointFile, PrevCheckpoint} {
		p := filepath.Join(dir, name)
		b, err := os.ReadFile(p)
		if err != nil {
			continue
		}
		var m map[string]json.RawMessage
		require.NoError(t, json.Unmarshal(b, &m))
		delete(m, diagnosisStateKey)
		b, err = json.Marshal(m)
		require.NoError(t, err)
		require.NoError(t, os.WriteFile(p, b, 0o644))
		if name == CheckpointFile {
			var c search.Checkpoint
			require.NoError(t, json.Unmarshal(b, &c))
			keep = c.Evaluations
		}
	}
	require.Positive(t, keep)
	f, err := Open(dir)
	require.NoError(t, err)
	set := spec.Settings()
	set.MaxEvaluations = 144
	set.Workers = 2
	set.CheckpointEvery = 2
	var notes []string
	_, err = Execute(context.Background(), spec, f, set, Options{Version: "test", Resume: true, Note: func(s string) { notes = append(notes, s) }})
	require.NoError(t, err)
	var said []string
	for _, n := range notes {
		if strings.Contains(n, "diagnosis") {
			said = append(said, n)
		}
	}
	require.Len(t, said, 1, "one line about the diagnosis: %q", notes)
	assert.Contains(t, said[0], "covers only the evaluations since this resume")
	assert.NotContains(t, said[0], "\n")
	d := readDiagnosis(t, dir)
	assert.Equal(t, keep, d.SinceEvaluation)
	assert.Equal(t, 144-keep, d.Evaluations+failuresSince(t, dir, keep), "only the evaluations since the resume")
	var b strings.Builder
	WriteDiagnosis(&b, d)
	assert.Contains(t, b.String(), "only those after evaluation")
}

// failuresSince counts the failed evaluations in a run's evaluations.csv
// after the first after rows (the file is in evaluation order).
func failuresSince(t *testing.T, dir string, after int64) int64 {
	t.Helper()
	f, err := os.Open(filepath.Join(dir, EvaluationsFile))
	require.NoError(t, err)
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	require.NoError(t, err)
	col := slices.Index(rows[0], "failure")
	require.GreaterOrEqual(t, col, 0, "evaluations.csv has a failure column")
	var n int64
	for _, r := range rows[1+after:] {
		if r[col] != "" {
			n++
		}
	}
	return n
}
