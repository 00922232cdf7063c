package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// writeIslands runs plica islands in a temporary folder and returns it.
func writeIslands(t *testing.T, args ...string) string {
	t.Helper()
	dir := t.TempDir()
	prob, err := filepath.Abs(examples + "boom-search.toml")
	require.NoError(t, err)
	all := append([]string{"islands", prob, "-o", filepath.Join(dir, "slurm")}, args...)
	code, _, errOut := runCLI(t, all...)
	require.Equal(t, 0, code, errOut)
	return dir
}

// The three scripts are valid bash, carry the Slurm settings asked for and
// set the search's -time the checkpoint interval below Slurm's limit.
func TestIslandsScripts(t *testing.T) {
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("bash not installed")
	}
	dir := writeIslands(t, "-islands", "3", "-cores", "4", "-limit", "2h", "-checkpoint", "10m", "-evals", "5000", "-seed", "11")
	for _, f := range []string{"islands.sh", "merge.sh", "submit.sh"} {
		path := filepath.Join(dir, "slurm", f)
		out, err := exec.Command("bash", "-n", path).CombinedOutput()
		require.NoError(t, err, "bash -n %s: %s", f, out)
	}
	text := readText(t, filepath.Join(dir, "slurm", "islands.sh"))
	for _, want := range []string{"#SBATCH --array=1-3\n", "#SBATCH --cpus-per-task=4\n", "#SBATCH --time=0-02:00:00\n",
		"#SBATCH --requeue\n", "#SBATCH --open-mode=append\n", "#SBATCH --output=logs/boom-search-island-%a.out\n",
		"seed=$((11 + i - 1))", `if [ -f "$run/checkpoint.json" ]; then`, `resume "$run"`, "-time 1h50m0s -evals 5000"} {
		assert.Contains(t, text, want)
	}
	merge := readText(t, filepath.Join(dir, "slurm", "merge.sh"))
	assert.Contains(t, merge, `merge 'runs'/boom-search-island-{1..3} -o "$merged"`)
	submit := readText(t, filepath.Join(dir, "slurm", "submit.sh"))
	assert.Contains(t, submit, `--dependency=afterany:"$array"`)
}

// Running a task of the array with a stand-in for plica: a new island
// searches with its own seed, a requeued one with a checkpoint resumes, one
// stopped before its first checkpoint starts again. Seeds do not depend on
// the order tasks run in.
func TestIslandsTaskLogic(t *testing.T) {
	if _, err := exec.LookPath("bash"); err != nil {
		t.Skip("bash not installed")
	}
	tmp := t.TempDir()
	fake := filepath.Join(tmp, "fake-plica")
	require.NoError(t, os.WriteFile(fake, []byte("#!/bin/bash\necho \"$@\" >> calls.txt\n"), 0o755))
	dir := writeIslands(t, "-islands", "4", "-cores", "2", "-limit", "30m", "-checkpoint", "5m", "-seed", "7", "-plica", fake)
	task := func(i string) string {
		t.Helper()
		os.Remove(filepath.Join(dir, "calls.txt"))
		cmd := exec.Command("bash", filepath.Join(dir, "slurm", "islands.sh"))
		cmd.Dir = dir
		cmd.Env = append(os.Environ(), "SLURM_ARRAY_TASK_ID="+i, "SLURM_CPUS_PER_TASK=2")
		out, err := cmd.CombinedOutput()
		require.NoError(t, err, "%s", out)
		return strings.TrimSpace(readText(t, filepath.Join(dir, "calls.txt")))
	}
	for _, c := range []struct{ task, seed string }{{"4", "10"}, {"1", "7"}, {"3", "9"}} {
		call := task(c.task)
		assert.Contains(t, call, "search ")
		assert.Contains(t, call, " -seed "+c.seed+" -workers 2 -time 25m0s -o runs/boom-search-island-"+c.task)
	}
	run := filepath.Join(dir, "runs", "boom-search-island-2")
	require.NoError(t, os.MkdirAll(run, 0o755))
	require.NoError(t, os.WriteFile(filepath.Join(run, "run.json"), []byte("{}"), 0o644))
	assert.Contains(t, task("2"), "search ", "no checkpoint: start again")
	_, err := os.Stat(filepath.Join(run, "run.json"))
	assert.True(t, os.IsNotExist(err), "the stale folder is removed before the search starts again")
	require.NoError(t, os.MkdirAll(run, 0o755))
	require.NoError(t, os.WriteFile(filepath.Join(run, "checkpoint.json"), []byte("{}"), 0o644))
	assert.Equal(t, "resume runs/boom-search-island-2 -workers 2", task("2"))
}

// Impossible settings are refused with exit status 2 and one line.
func TestIslandsRefuses(t *testing.T) {
	prob := examples + "boom-search.toml"
	for name, args := range map[string][]string{
		"zero islands":          {"-islands", "0", "-cores", "1", "-limit", "1h"},
		"zero cores":            {"-islands", "2", "-cores", "0", "-limit", "1h"},
		"no limit":              {"-islands", "2", "-cores", "1"},
		"limit below interval":  {"-islands", "2", "-cores", "1", "-limit", "4m", "-checkpoint", "5m"},
		"limit equals interval": {"-islands", "2", "-cores", "1", "-limit", "5m"},
		"too many islands":      {"-islands", "1001", "-cores", "1", "-limit", "1h"},
		"log folder with space": {"-islands", "2", "-cores", "1", "-limit", "1h", "-logs", "my logs"},
	} {
		t.Run(name, func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "slurm")
			code, _, errOut := runCLI(t, append([]string{"islands", prob, "-o", out}, args...)...)
			assert.Equal(t, 2, code)
			assert.Equal(t, 1, strings.Count(errOut, "\n"), errOut)
			_, err := os.Stat(out)
			assert.True(t, os.IsNotExist(err), "nothing written")
		})
	}
}

// The README's cluster recipe is exactly what plica islands writes for the
// command it shows.
func TestIslandsREADME(t *testing.T) {
	readme := readText(t, "../../README.md")
	dir := t.TempDir()
	wd, err := os.Getwd()
	require.NoError(t, err)
	require.NoError(t, os.MkdirAll(filepath.Join(dir, "problems", "examples"), 0o755))
	text, err := os.ReadFile(examples + "boom-search.toml")
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(dir, "problems", "examples", "boom-search.toml"), text, 0o644))
	require.NoError(t, os.Chdir(dir))
	defer os.Chdir(wd)
	code, _, errOut := runCLI(t, "islands", "problems/examples/boom-search.toml", "-islands", "8", "-cores", "4", "-limit", "2h", "-checkpoint", "10m")
	require.Equal(t, 0, code, errOut)
	for _, f := range []string{"islands.sh", "merge.sh", "submit.sh"} {
		script := readText(t, filepath.Join(dir, "slurm", f))
		assert.True(t, strings.Contains(readme, "```bash\n"+script+"```\n"), "README shows slurm/%s exactly as plica islands writes it:\n%s", f, script)
	}
}

func readText(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return string(b)
}

// A search whose standard error is not a terminal (here a buffer, as a
// scheduler's log file) writes plain progress lines, never redraws;
// -quiet writes none.
func TestSearchPlainProgress(t *testing.T) {
	dir := t.TempDir()
	code, _, errOut := runCLI(t, "search", examples+"boom-search.toml", "-evals", "240", "-workers", "1", "-o", filepath.Join(dir, "r"))
	require.Equal(t, 0, code, errOut)
	assert.NotContains(t, errOut, "\r")
	assert.Contains(t, errOut, " progress: generation 0, 60/240 evaluations, ")
	assert.Regexp(t, `(?m)^\S+ done: generation 3, 240/240 evaluations, [0-9.]+ evals/s, feasible \d+, front \d+, hypervolume \S+, ETA 0s$`, errOut)
	code, _, errOut = runCLI(t, "search", examples+"boom-search.toml", "-evals", "120", "-workers", "1", "-quiet", "-o", filepath.Join(dir, "q"))
	require.Equal(t, 0, code, errOut)
	assert.NotContains(t, errOut, "progress:")
	assert.NotContains(t, errOut, "done:")
}
