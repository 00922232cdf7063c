package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"plica/results"

	"plica/results/report"
)

func init() {
	register(&command{
		name:  "compare",
		usage: "RUN_A RUN_B ... [-json] [-plot FILE.svg] [-ref R] [-groups LABELS]",
		short: "compare the fronts of runs of one problem: indicators, who dominates where, an overlay plot",
		long: `All runs are normalised together: each objective maps to [0, 1] between the
ideal and the nadir point of the non-dominated set of the union of the
fronts. For each run: the normalised hypervolume at the common reference
point (printed with it; by default 1 + 1/H, H from the largest front),
IGD and IGD+ to the union front, and how many union-front points it holds.
For each pair: I_eps+ and the coverage C both ways, and a sentence. -groups
labels the runs (e.g. a,a,a,b,b,b for two settings of three seeds each)
and adds medians, interquartile ranges and Mann-Whitney U tests between
groups. The runs must share the problem, or at least its objectives.`,
		run: runCompare,
	})
}

func runCompare(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	asJSON := fs.Bool("json", false, "print JSON instead of tables")
	plotPath := fs.String("plot", "", "write an overlay plot of the fronts to `FILE.svg`")
	ref := fs.Float64("ref", 0, "hypervolume reference point in normalised objectives, e.g. 1.1 (default 1 + 1/H)")
	groups := fs.String("groups", "", "comma-separated group `LABELS`, one per run, for statistics across seeds")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) < 1 {
		return usagef("compare: expected one or more run folders")
	}
	if err := emptyFlags(fs, "plot"); err != nil {
		return err
	}
	if *plotPath != "" {
		// Checked before any work: never over an input, never half done.
		if err := results.CheckOutput("-plot", *plotPath, pos, nil); err != nil {
			return err
		}
		if err := results.ProbeOutput("-plot", *plotPath); err != nil {
			return err
		}
	}
	var fronts []*results.RunFront
	for _, dir := range pos {
		f, err := results.LoadRunFrontContext(ctx, dir)
		if err != nil {
			return err
		}
		fronts = append(fronts, f)
	}
	note, err := results.SameObjectives(fronts)
	if err != nil {
		return err
	}
	opt := results.CompareOptions{Reference: *ref}
	if *groups != "" {
		for _, g := range strings.Split(*groups, ",") {
			opt.Groups = append(opt.Groups, strings.TrimSpace(g))
		}
	}
	c, err := results.Compare(ctx, fronts, opt)
	if err != nil {
		return err
	}
	if note != "" {
		c.Notes = append([]string{note}, c.Notes...)
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if *plotPath != "" {
		if err := report.WriteOverlaySVG(*plotPath, fronts); err != nil {
			return fmt.Errorf("plot: %w", err)
		}
		c.Notes = append(c.Notes, "overlay plot written to "+*plotPath)
	}
	if err := ctx.Err(); err != nil {
		// Stopped while plotting: the plot is whole (written atomically) but
		// the user asked to stop, so it is removed and nothing is printed.
		if *plotPath != "" {
			os.Remove(*plotPath)
		}
		return err
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(c)
	}
	return results.WriteComparison(stdout, c)
}
