package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"

	"plica/problems"
	"plica/results"
	"plica/search"
)

func init() {
	register(&command{
		name:  "search",
		usage: "PROBLEM.toml [-o RUN] [-seed N] [-workers N] [-evals N] [-time D] [-quiet]",
		short: "search a problem's design space and write the front to a run folder",
		long: `Flags override the problem's [search] table. Ctrl-C (or SIGTERM) stops
after the current generation and leaves a checkpoint: continue with
"plica resume RUN". The same seed gives the same front for any -workers.`,
		run: runSearch,
	})
}

type budgetFlags struct {
	seed    int64
	workers int
	evals   int64
	time    time.Duration
	quiet   bool
}

func (b *budgetFlags) bind(fs *flag.FlagSet, withSeed bool) {
	if withSeed {
		fs.Int64Var(&b.seed, "seed", -1, "random `seed` (default: the problem's, else 0)")
	}
	fs.IntVar(&b.workers, "workers", 0, "concurrent evaluations (default: the problem's, else all cores)")
	fs.Int64Var(&b.evals, "evals", 0, "evaluation budget (default: the problem's)")
	fs.DurationVar(&b.time, "time", 0, "wall-clock budget, e.g. 20m or 8h (default: the problem's)")
	fs.BoolVar(&b.quiet, "quiet", false, "no progress bar")
}

func (b *budgetFlags) apply(set *search.Settings) error {
	if b.seed < -1 {
		// -1 (the flag's default) means "the problem's seed".
		return usagef("-seed: %d is out of range (expected a seed >= 0)", b.seed)
	}
	if b.seed >= 0 {
		set.Seed = uint64(b.seed)
	}
	if b.workers < 0 || b.evals < 0 || b.time < 0 {
		return usagef("-workers, -evals and -time must not be negative")
	}
	if b.workers > 0 {
		set.Workers = b.workers
	}
	if b.evals > 0 {
		set.MaxEvaluations = b.evals
	}
	if b.time > 0 {
		set.Runtime = b.time
	}
	return nil
}

func runSearch(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	var b budgetFlags
	b.bind(fs, true)
	out := fs.String("o", "", "run `folder` to create (default: runs/PROBLEM-seedN)")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("search: expected one problem file, got %d arguments", len(pos))
	}
	spec, err := problems.LoadProblem(pos[0])
	if err != nil {
		return err
	}
	set := spec.Settings()
	if err := b.apply(&set); err != nil {
		return err
	}
	dir := *out
	if dir == "" {
		base := strings.TrimSuffix(filepath.Base(pos[0]), filepath.Ext(pos[0]))
		dir = filepath.Join("runs", fmt.Sprintf("%s-seed%d", base, set.Seed))
	}
	folder, err := results.Create(dir)
	if err != nil {
		return usagef("%v", err)
	}
	return finishRun(ctx, spec, folder, set, b.quiet, false, stdout, stderr)
}

// finishRun executes (or resumes) a search and prints its summary.
func finishRun(ctx context.Context, spec *problems.Spec, folder *results.Folder, set search.Settings, quiet, resume bool, stdout, stderr io.Writer) error {
	opt := results.Options{Version: version, Resume: resume}
	if !quiet {
		opt.Progress = stderr
	}
	res, err := results.Execute(ctx, spec, folder, set, opt)
	if res != nil {
		printSummary(stdout, spec, folder, res)
	}
	if errors.Is(err, context.Canceled) {
		fmt.Fprintf(stderr, "plica: interrupted; checkpoint saved: continue with plica resume %s\n", folder.Dir)
		return err
	}
	if err == nil {
		// The run is complete and saved; a report that cannot be written
		// is a warning, never a failed run.
		if rerr := writeReport(folder, "", nil, stdout, stderr); rerr != nil {
			fmt.Fprintf(stderr, "plica: warning: report not written: %v (the run is saved; retry with plica report %s)\n", rerr, folder.Dir)
		}
	}
	return err
}

func printSummary(w io.Writer, spec *problems.Spec, folder *results.Folder, res *search.Result) {
	feasible := 0
	for _, d := range res.Population {
		if d.Feasible() {
			feasible++
		}
	}
	fmt.Fprintf(w, "run %s: %s after %d evaluations (%d generations, %d failed), %s\n", folder.Dir, res.Status, res.Evaluations,
		res.Generation, res.Failures, res.Runtime.Round(time.Millisecond))
	fmt.Fprintf(w, "front: %d designs (feasible in population: %d of %d); hypervolume %.6g at reference %v (objectives as minimised)\n",
		len(res.Front), feasible, len(res.Population), res.Hypervolume, res.Reference)
	if src := stiffnessSources(spec); src != "" {
		fmt.Fprintf(w, "stiffness per bellows: %s\n", src)
	}
	fmt.Fprintf(w, "files: %s, %s, %s/front-NNN.toml\n", folder.Path(results.FrontFile), folder.Path(results.EvaluationsFile), folder.Path(results.DesignsDir))
	if len(res.Front) == 0 {
		fmt.Fprintln(w, "no feasible design found: relax the requirements or widen the ranges")
	}
	fmt.Fprintf(w, "caution: %s\n", results.Caution)
}

// stiffnessSources says where each bellows' stiffness comes from (strip,
// shell, measured or calibrated), for the design at the middle of the
// ranges; "" if that design cannot be built.
func stiffnessSources(spec *problems.Spec) string {
	d, _, err := spec.Design(spec.Midpoint())
	if err != nil {
		return ""
	}
	st, err := d.Stiffness()
	if err != nil {
		return ""
	}
	src := make([]string, len(st))
	for i, s := range st {
		src[i] = s.Source.String()
	}
	return strings.Join(src, ", ")
}
