package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime/debug"
	"slices"
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
	if err := emptyFlags(fs, "o"); err != nil {
		return err
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
	inputs, err := inputFiles(spec.Text, pos[0])
	if err != nil {
		return err
	}
	if err := results.CheckOutputFolder("-o", dir, inputs); err != nil {
		return usagef("%v", err)
	}
	folder, err := results.Create(dir)
	if err != nil {
		return usagef("%v", err)
	}
	defer folder.Unlock()
	return finishRun(ctx, spec, folder, set, b.quiet, false, stdout, stderr)
}

// inputFiles is a problem or design file and the calibration files it
// names (relative to it).
func inputFiles(text []byte, file string) ([]string, error) {
	cals, err := problems.CalibrationFiles(text, file)
	if err != nil {
		return nil, err
	}
	out := []string{file}
	for _, c := range cals {
		if !filepath.IsAbs(c) {
			c = filepath.Join(filepath.Dir(file), c)
		}
		out = append(out, c)
	}
	return out, nil
}

// emptyFlags refuses a path flag given with an empty name (-o ""): that
// is a mistake, never the default.
func emptyFlags(fs *flag.FlagSet, names ...string) error {
	var err error
	fs.Visit(func(f *flag.Flag) {
		if err == nil && slices.Contains(names, f.Name) && f.Value.String() == "" {
			err = usagef("-%s: the name is empty (expected a path; leave the flag out for the default)", f.Name)
		}
	})
	return err
}

// finishRun executes (or resumes) a search and prints its summary.
// The folder is locked; the caller releases it.
// searchGCPercent is the collector's GOGC during a search or resume.
const searchGCPercent = 400

func finishRun(ctx context.Context, spec *problems.Spec, folder *results.Folder, set search.Settings, quiet, resume bool, stdout, stderr io.Writer) error {
	note := func(s string) { fmt.Fprintf(stderr, "plica: note: %s\n", s) }
	if n := folder.LockNote(); n != "" {
		note(n)
	}
	// The live heap of a search is a few megabytes and the evaluations
	// allocate: at the default GOGC the collector took about 7 % of the
	// CPU, which is free on an idle core with one worker but competes with
	// the second (DEVELOPERS.md, "Search speed"). A user's GOGC wins.
	if os.Getenv("GOGC") == "" {
		defer debug.SetGCPercent(debug.SetGCPercent(searchGCPercent))
	}
	opt := results.Options{Version: version, Resume: resume, Note: note}
	if !quiet {
		opt.Progress = stderr
	}
	res, err := results.Execute(ctx, spec, folder, set, opt)
	failed := err != nil && !errors.Is(err, context.Canceled) && len(folder.Written()) > 0
	if res != nil {
		printSummary(stdout, spec, folder, res, failed)
	} else if failed {
		printFiles(stdout, folder)
	}
	if failed {
		var ue *results.UnrecordedError
		if errors.As(err, &ue) {
			fmt.Fprintf(stderr, "plica: the run failed; %s could not be updated (it may still say %q); the folder holds what this run wrote: %s\n",
				ue.Path, results.StatusRunning, strings.Join(ue.Files, ", "))
		} else {
			fmt.Fprintf(stderr, "plica: the run failed; %s says %q with the reason\n", folder.Path(results.RunFile), results.StatusFailed)
		}
	}
	if errors.Is(err, context.Canceled) {
		fmt.Fprintf(stderr, "plica: interrupted; checkpoint saved: continue with plica resume %s\n", folder.Dir)
		return &reported{err}
	}
	if err == nil {
		// The run is complete and saved; a report that cannot be written
		// is a warning, never a failed run.
		rerr := writeReport(ctx, folder, "", nil, stdout, stderr)
		if errors.Is(rerr, context.Canceled) {
			fmt.Fprintf(stderr, "plica: interrupted while writing the report; the run is saved (write it with plica report %s)\n", folder.Dir)
			return &reported{rerr}
		}
		if rerr != nil {
			fmt.Fprintf(stderr, "plica: warning: report not written: %v (the run is saved; retry with plica report %s)\n", rerr, folder.Dir)
		}
	}
	return err
}

func printSummary(w io.Writer, spec *problems.Spec, folder *results.Folder, res *search.Result, failed bool) {
	feasible := 0
	for _, d := range res.Population {
		if d.Feasible() {
			feasible++
		}
	}
	status := res.Status.String()
	if failed {
		status = results.StatusFailed.String()
	}
	fmt.Fprintf(w, "run %s: %s after %d evaluations (%d generations, %d failed), %s\n", folder.Dir, status, res.Evaluations,
		res.Generation, res.Failures, res.Runtime.Round(time.Millisecond))
	fmt.Fprintf(w, "front: %d designs (feasible in population: %d of %d); hypervolume %.6g at reference %v (objectives as minimised)\n",
		len(res.Front), feasible, len(res.Population), res.Hypervolume, res.Reference)
	if src := stiffnessSources(spec); src != "" {
		fmt.Fprintf(w, "stiffness per bellows: %s\n", src)
	}
	printFiles(w, folder)
	if len(res.Front) == 0 && !failed {
		fmt.Fprintln(w, "no feasible design found: relax the requirements or widen the ranges")
	}
	if info, err := folder.ReadInfo(); err == nil && !failed {
		results.WriteDiagnosis(w, info.Diagnosis)
		results.WriteFrontLimits(w, info.FrontLimits)
		results.WriteWarnings(w, info.Warnings)
	}
	fmt.Fprintf(w, "caution: %s\n", results.Caution)
}

// printFiles lists the files of the run written by this process (only
// those actually written), the front's design files as one pattern.
func printFiles(w io.Writer, folder *results.Folder) {
	var names []string
	designs := 0
	for _, n := range folder.Written() {
		switch {
		case strings.HasPrefix(n, results.DesignsDir+"/front-"):
			designs++
		case n == results.FrontFile || n == results.EvaluationsFile:
			names = append(names, folder.Path(n))
		}
	}
	if designs > 0 {
		names = append(names, fmt.Sprintf("%s/front-NNN.toml (%d)", folder.Path(results.DesignsDir), designs))
	}
	if len(names) == 0 {
		names = append(names, "none of the front or the evaluations")
	}
	fmt.Fprintf(w, "files: %s\n", strings.Join(names, ", "))
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
