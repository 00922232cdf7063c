package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"plica/problems"
	"plica/results"
)

func init() {
	register(&command{
		name:  "islands",
		usage: "PROBLEM.toml -islands N -cores N -limit D [-checkpoint D] [-evals N] [-seed N] [-runs DIR] [-logs DIR] [-plica PATH] [-o DIR]",
		short: "write a Slurm job array of island searches and the dependent merge",
		long: `Writes three scripts into -o (default slurm): islands.sh, a job array with
one island per task (island i searches with seed -seed+i-1 into
RUNS/NAME-island-i); merge.sh, which merges the islands into
RUNS/NAME-merged and compares them; and submit.sh, which submits the array
and the merge with --dependency=afterany on it. Run submit.sh from the
folder the paths are relative to. Each island's search gets -time set
-checkpoint below Slurm's -limit, so it stops and saves its checkpoint
before Slurm kills it. The array is requeue-safe: a task that finds its run
folder with a checkpoint resumes it (the same front as an uninterrupted run);
one that finds a folder without a checkpoint starts it again.`,
		run: runIslands,
	})
}

// islandsPlan is what the scripts are written from.
type islandsPlan struct {
	Problem    string
	Name       string
	Islands    int
	Cores      int
	Limit      time.Duration
	Checkpoint time.Duration
	Evals      int64
	Seed       int64
	Runs, Logs string
	Plica      string
}

func runIslands(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	var p islandsPlan
	fs.IntVar(&p.Islands, "islands", 0, "number of islands (array tasks), 1 to 1000 (required)")
	fs.IntVar(&p.Cores, "cores", 0, "cores per island: --cpus-per-task and -workers (required)")
	fs.DurationVar(&p.Limit, "limit", 0, "Slurm time limit per island, e.g. 2h (required)")
	fs.DurationVar(&p.Checkpoint, "checkpoint", 5*time.Minute, "longest time between two checkpoints; -time of the search is set this much below -limit")
	fs.Int64Var(&p.Evals, "evals", 0, "evaluation budget per island (default: the problem's)")
	fs.Int64Var(&p.Seed, "seed", 1, "seed of island 1; island i gets seed+i-1")
	fs.StringVar(&p.Runs, "runs", "runs", "`folder` of the island and merged run folders")
	fs.StringVar(&p.Logs, "logs", "logs", "`folder` of the Slurm logs")
	fs.StringVar(&p.Plica, "plica", "plica", "plica `command` the jobs run (a path on the cluster)")
	out := fs.String("o", "slurm", "`folder` to write islands.sh, merge.sh and submit.sh into")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("islands: expected one problem file, got %d arguments", len(pos))
	}
	if err := emptyFlags(fs, "o", "runs", "logs", "plica"); err != nil {
		return err
	}
	p.Problem = pos[0]
	if err := p.check(); err != nil {
		return err
	}
	spec, err := problems.LoadProblem(p.Problem)
	if err != nil {
		return err
	}
	if _, err := inputFiles(spec.Text, p.Problem); err != nil {
		return err
	}
	p.Name = strings.TrimSuffix(filepath.Base(p.Problem), filepath.Ext(p.Problem))
	if err := os.MkdirAll(*out, 0o755); err != nil {
		return usagef("-o: %v", err)
	}
	files := []string{"islands.sh", "merge.sh", "submit.sh"}
	texts := []string{p.arrayScript(), p.mergeScript(), p.submitScript(*out)}
	paths := make([]string, len(files))
	data := make([][]byte, len(files))
	for i := range files {
		paths[i], data[i] = filepath.Join(*out, files[i]), []byte(texts[i])
	}
	if err := results.WriteAtomicAll(paths, data); err != nil {
		return err
	}
	for _, path := range paths {
		if err := os.Chmod(path, 0o755); err != nil {
			return err
		}
	}
	fmt.Fprintf(stdout, "wrote %s: %d islands x %d cores, Slurm limit %s, search -time %s, seeds %d..%d\n",
		strings.Join(paths, ", "), p.Islands, p.Cores, slurmTime(p.Limit), p.searchTime(), p.Seed, p.Seed+int64(p.Islands)-1)
	fmt.Fprintf(stdout, "submit with: bash %s (from the folder that %s, %s and %s are relative to)\n", paths[2], p.Problem, p.Runs, p.Logs)
	return nil
}

// check refuses settings no scheduler can run.
func (p *islandsPlan) check() error {
	switch {
	case p.Islands < 1 || p.Islands > 1000:
		return usagef("-islands: %d is out of range (expected 1 to 1000 islands)", p.Islands)
	case p.Cores < 1:
		return usagef("-cores: %d is out of range (expected at least 1 core per island)", p.Cores)
	case p.Limit <= 0:
		return usagef("-limit: expected Slurm's time limit per island, e.g. 2h")
	case p.Limit%time.Second != 0:
		return usagef("-limit: %s is not a whole number of seconds", p.Limit)
	case p.Checkpoint <= 0 || p.Checkpoint%time.Second != 0:
		return usagef("-checkpoint: %s is out of range (expected a whole number of seconds above 0)", p.Checkpoint)
	case p.Limit <= p.Checkpoint:
		return usagef("-limit: %s is not longer than the checkpoint interval %s (expected a limit above -checkpoint, so an island saves a checkpoint before Slurm stops it)", p.Limit, p.Checkpoint)
	case p.Evals < 0:
		return usagef("-evals: %d is out of range (expected a budget >= 0)", p.Evals)
	case strings.ContainsAny(p.Logs, " \t\n\"'%\\"):
		return usagef("-logs: %q holds a space, quote, backslash or %%%% (expected a plain folder name: it goes into #SBATCH --output)", p.Logs)
	case p.Seed < 0:
		return usagef("-seed: %d is out of range (expected a seed >= 0)", p.Seed)
	}
	return nil
}

// searchTime is the search's -time: the checkpoint interval below the limit.
func (p *islandsPlan) searchTime() string {
	return (p.Limit - p.Checkpoint).String()
}

// slurmTime formats a limit for --time: D-HH:MM:SS.
func slurmTime(d time.Duration) string {
	s := int64(d / time.Second)
	days, s := s/86400, s%86400
	return fmt.Sprintf("%d-%02d:%02d:%02d", days, s/3600, s/60%60, s%60)
}

// shq quotes a word for bash.
func shq(s string) string {
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

func (p *islandsPlan) arrayScript() string {
	evals := ""
	if p.Evals > 0 {
		evals = fmt.Sprintf(" -evals %d", p.Evals)
	}
	return fmt.Sprintf(`#!/bin/bash
# Island searches of %[1]s as a Slurm job array, written by plica islands.
# Task i searches with seed %[2]d+i-1 into %[3]s/%[4]s-island-i.
#SBATCH --job-name=%[4]s-islands
#SBATCH --array=1-%[5]d
#SBATCH --cpus-per-task=%[6]d
#SBATCH --ntasks=1
#SBATCH --time=%[7]s
#SBATCH --requeue
#SBATCH --open-mode=append
#SBATCH --output=%[8]s/%[4]s-island-%%a.out
set -euo pipefail
plica=%[9]s
i="$SLURM_ARRAY_TASK_ID"
seed=$((%[2]d + i - 1))
run=%[10]s/%[4]s-island-"$i"
workers="${SLURM_CPUS_PER_TASK:-%[6]d}"
echo "island $i (seed $seed) on $(hostname), job ${SLURM_JOB_ID:-?}, restart ${SLURM_RESTART_COUNT:-0}"
if [ -f "$run/checkpoint.json" ]; then
    # Requeued (or resubmitted): continue this island from its checkpoint.
    exec "$plica" resume "$run" -workers "$workers"
fi
if [ -e "$run" ]; then
    # Stopped before its first checkpoint: nothing to continue, start again.
    rm -rf -- "$run"
fi
mkdir -p %[10]s
exec "$plica" search %[11]s -seed "$seed" -workers "$workers" -time %[12]s%[13]s -o "$run"
`, p.Problem, p.Seed, p.Runs, p.Name, p.Islands, p.Cores, slurmTime(p.Limit), p.Logs, shq(p.Plica),
		shq(p.Runs), shq(p.Problem), p.searchTime(), evals)
}

func (p *islandsPlan) islandRuns() string {
	return fmt.Sprintf(`%s/%s-island-{1..%d}`, shq(p.Runs), p.Name, p.Islands)
}

func (p *islandsPlan) mergeScript() string {
	return fmt.Sprintf(`#!/bin/bash
# Merge of the %[1]d islands of %[2]s, written by plica islands; submit.sh
# runs it after the array (--dependency=afterany). Run it again by hand
# after resubmitting islands: it replaces the merged run.
#SBATCH --job-name=%[3]s-merge
#SBATCH --ntasks=1
#SBATCH --time=00:30:00
#SBATCH --output=%[4]s/%[3]s-merge.out
set -euo pipefail
plica=%[5]s
merged=%[6]s/%[3]s-merged
rm -rf -- "$merged"
"$plica" merge %[7]s -o "$merged"
"$plica" compare %[7]s "$merged" -plot %[6]s/%[3]s-islands.svg > %[6]s/%[3]s-compare.txt
`, p.Islands, p.Problem, p.Name, p.Logs, shq(p.Plica), shq(p.Runs), p.islandRuns())
}

func (p *islandsPlan) submitScript(dir string) string {
	return fmt.Sprintf(`#!/bin/bash
# Submits the island array and the merge that waits for it, written by
# plica islands. Run it from the folder the paths are relative to.
set -euo pipefail
mkdir -p %[1]s %[2]s
array=$(sbatch --parsable %[3]s)
array=${array%%%%;*}
merge=$(sbatch --parsable --dependency=afterany:"$array" %[4]s)
merge=${merge%%%%;*}
echo "islands: job $array; merge: job $merge"
`, shq(p.Logs), shq(p.Runs), shq(filepath.Join(dir, "islands.sh")), shq(filepath.Join(dir, "merge.sh")))
}
