package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"text/tabwriter"

	"plica/results"
)

func init() {
	register(&command{
		name:  "merge",
		usage: "RUN... -o RUN",
		short: "join runs of one problem (islands with different seeds) into one run folder",
		long: `Writes a new run folder: problem.toml of the first run; evaluations.csv with
every evaluation of every run, renumbered 0, 1, 2, ... in the order given,
plus the columns source_run and source_index; front.csv and
designs/front-NNN.toml of the feasible non-dominated set of all those
evaluations; and run.json (method "merge") listing the runs and seeds in
merged_from. Runs whose problem files differ in anything but the [search]
table are refused, as are runs that hold the evaluations of one search
twice (a merged run and one of its sources: run.json records the sources).
The new folder is locked while it is written. The merged folder works with compare, pick, refine and
report; it has no checkpoint, so it cannot be resumed.`,
		run: runMerge,
	})
}

func runMerge(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	out := fs.String("o", "", "run `folder` to create for the merged run (required)")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("merge: expected one or more run folders")
	}
	if err := emptyFlags(fs, "o"); err != nil {
		return err
	}
	if *out == "" {
		return usagef("merge: -o: expected the folder of the merged run")
	}
	existed := results.Exists(*out)
	res, err := results.Merge(ctx, pos, *out, version)
	if errors.Is(err, context.Canceled) {
		// Merge removes what it wrote when interrupted.
		var ue *results.UnremovedError
		if errors.As(err, &ue) {
			return fmt.Errorf("merge interrupted, %s partly written: %w", *out, err)
		}
		if existed {
			return fmt.Errorf("merge interrupted, nothing written into %s: %w", *out, err)
		}
		return fmt.Errorf("merge interrupted, nothing written (%s not created): %w", *out, err)
	}
	if err != nil {
		return err
	}
	info := res.Info
	fmt.Fprintf(stdout, "merged %d runs into %s: %d evaluations (%d failed), front of %d designs\n",
		len(info.MergedFrom), res.Folder.Dir, info.Evaluations, info.Failures, info.FrontSize)
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "run\tseed\tpopulation\tstatus\tevaluations\tits front\tin merged front\thypervolume\n")
	for _, s := range info.MergedFrom {
		pop := "-"
		if s.Population > 0 {
			pop = fmt.Sprint(s.Population)
		}
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%d\t%d\t%d\t%.6g\n", s.Run, s.Seed, pop, s.Status, s.Evaluations, s.FrontSize, s.UnionFront, s.Hypervolume)
	}
	fmt.Fprintf(tw, "merged\t\t\t\t%d\t%d\t%d\t%.6g\n", info.Evaluations, info.FrontSize, info.FrontSize, info.Hypervolume)
	tw.Flush()
	fmt.Fprintf(stdout, "hypervolume at reference %v (%s)\n", info.Reference, res.ReferenceReason)
	for _, n := range res.Notes {
		fmt.Fprintf(stdout, "note: %s\n", n)
	}
	results.WriteFrontLimits(stdout, info.FrontLimits)
	results.WriteWarnings(stdout, info.Warnings)
	fmt.Fprintf(stdout, "files: %s, %s, %s/front-NNN.toml\n", res.Folder.Path(results.FrontFile), res.Folder.Path(results.EvaluationsFile), res.Folder.Path(results.DesignsDir))
	fmt.Fprintf(stdout, "caution: %s\n", results.Caution)
	return nil
}
