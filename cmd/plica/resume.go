package main

import (
	"context"
	"flag"
	"io"

	"plica/problems"
	"plica/results"
)

func init() {
	register(&command{
		name:  "resume",
		usage: "RUN [-workers N] [-evals N] [-time D] [-quiet]",
		short: "continue an interrupted (or extend a finished) search from its checkpoint",
		long: `Reads the problem, seed and budgets saved in the run folder. The resumed run
reaches the same front as an uninterrupted run with the same seed; a larger
-evals or -time extends a finished run (an -evals below the evaluations
already done is refused). evaluations.csv is checked against the checkpoint
first: a file that cannot prove every evaluation the checkpoint counts is
refused, and the folder is left as it was. A run whose constraints differ
from those of its problem.toml as this plica reads it (a task-point run
made when the task constraint was g_task_coverage, now g_task_miss) is
refused too: search its problem.toml anew. The checkpoint keeps the
diagnosis counters, so the diagnosis covers every evaluation of the run.
The folder is locked while it runs (run.lock).`,
		run: runResume,
	})
}

func runResume(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	var b budgetFlags
	b.bind(fs, false)
	b.seed = -1
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("resume: expected one run folder, got %d arguments", len(pos))
	}
	folder, err := results.Open(pos[0])
	if err != nil {
		return usagef("%v", err)
	}
	if err := folder.Lock(); err != nil {
		return err
	}
	defer folder.Unlock()
	info, err := folder.ReadInfo()
	if err != nil {
		return err
	}
	if info.Method == "merge" {
		// A merged run has no checkpoint: resuming it would start a new
		// search from seed 0 and overwrite the merged archive and front.
		return usagef("%s is a merged run: it has no checkpoint and cannot be resumed (resume the island runs, then merge them again)", pos[0])
	}
	spec, err := problems.LoadProblem(folder.Path(results.ProblemFile))
	if err != nil {
		return err
	}
	set := spec.Settings()
	set.Seed = info.Seed
	set.Workers = info.Workers
	set.MaxEvaluations = info.MaxEvaluations
	set.Runtime = info.TimeBudget
	if err := b.apply(&set); err != nil {
		return err
	}
	return finishRun(ctx, spec, folder, set, b.quiet, true, stdout, stderr)
}
