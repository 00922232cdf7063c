package results

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"testing"

	"plica/problems"
)

// FuzzRunFiles feeds arbitrary run.json, checkpoint.json, front.csv and
// evaluations.csv to what resume, merge, compare and pick read of a run
// folder: none may panic, and every error is an input error (exit status
// 2), never an internal one.
func FuzzRunFiles(f *testing.F) {
	// Seeds: the files of a real small run, and a few damaged versions.
	spec := smallProblem(f)
	seed := filepath.Join(f.TempDir(), "seed")
	sf, err := Create(seed)
	if err != nil {
		f.Fatal(err)
	}
	set := spec.Settings()
	set.MaxEvaluations, set.Workers, set.CheckpointEvery = 24, 1, 1
	if _, err := Execute(context.Background(), spec, sf, set, Options{Version: "fuzz"}); err != nil {
		f.Fatal(err)
	}
	sf.Unlock()
	read := func(name string) []byte {
		b, err := os.ReadFile(filepath.Join(seed, name))
		if err != nil {
			f.Fatal(err)
		}
		return b
	}
	info, cp, front, evals := read(RunFile), read(CheckpointFile), read(FrontFile), read(EvaluationsFile)
	f.Add(info, cp, front, evals)
	f.Add(info[:len(info)/2], cp[:len(cp)/3], front[:len(front)/2], evals[:len(evals)/2])
	f.Add([]byte(`{"status":"nonsense","time_budget":"x"}`), []byte(`{"Evaluations":-1}`), []byte("id\n1\n"), []byte("index\n\"0\n"))
	f.Add([]byte(`{"method":"merge","merged_from":[{"run":"x"}]}`), []byte(`{"Evaluations":1e30}`), []byte{}, []byte{0xff, 0xfe, 'i', 0})
	problem := read(ProblemFile)

	f.Fuzz(func(t *testing.T, info, cp, front, evals []byte) {
		dir := filepath.Join(t.TempDir(), "run")
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		for name, b := range map[string][]byte{ProblemFile: problem, RunFile: info, CheckpointFile: cp, FrontFile: front, EvaluationsFile: evals} {
			if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		input := func(what string, err error) {
			t.Helper()
			if err != nil && !errors.Is(err, problems.ErrInput) {
				t.Fatalf("%s: not an input error: %v", what, err)
			}
		}
		folder := &Folder{Dir: dir}
		_, err := folder.ReadInfo()
		input("run.json", err)
		c, _, _, err := folder.readCheckpoint()
		input("checkpoint.json", err)
		keep := int64(3)
		if c != nil {
			keep = c.Evaluations
		}
		_, err = ResumeLog(folder.Path(EvaluationsFile), spec, keep)
		input("evaluations.csv for resume", err)
		rf, err := LoadRunFront(dir)
		input("front.csv", err)
		if rf != nil {
			_, err = SameObjectives([]*RunFront{rf, rf})
			input("compare objectives", err)
			_, err = Compare(context.Background(), []*RunFront{rf, rf}, CompareOptions{})
			input("compare", err)
			_, err = rf.Pick(PickOptions{Method: PickKnee, Count: 1})
			input("pick", err)
		}
		_, err = Merge(context.Background(), []string{dir}, filepath.Join(t.TempDir(), "merged"), "fuzz")
		input("merge", err)
	})
}
