package main

import (
	"bytes"
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"

	"plica/objective"
	"plica/results"

	"plica/results/report"
)

func init() {
	register(&command{
		name:  "report",
		usage: "RUN [-o FILE.html] [-designs ID,...]",
		short: "write a run's report, one self-contained HTML file, and its plots",
		long: `Writes the figures into RUN/plots (front, design variables, hypervolume
history, and the backbone and workspace of each design shown) and the report,
RUN/report.html unless -o says otherwise. The report opens in any browser
without a network: problem, settings, status, the front, the figures, the
check table of each design shown, and the cautions. search and resume write
it at the end of a run.`,
		run: runReport,
	})
}

func runReport(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	out := fs.String("o", "", "report `file` (default: RUN/report.html)")
	designs := fs.String("designs", "", "comma-separated front `ids` to show in detail (default: the best design of each objective and the knee)")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("report: expected one run folder, got %d arguments", len(pos))
	}
	ids, err := idList("designs", *designs)
	if err != nil {
		return err
	}
	if err := emptyFlags(fs, "o"); err != nil {
		return err
	}
	folder, err := results.Open(pos[0])
	if err != nil {
		return usagef("%v", err)
	}
	if *out != "" && !results.SamePath(*out, folder.Path(report.File)) {
		// Checked before any plot is written.
		if err := results.CheckOutput("-o", *out, pos, nil); err != nil {
			return err
		}
		if err := results.ProbeOutput("-o", *out); err != nil {
			return err
		}
	}
	// report writes RUN/plots and RUN/report.html, which a live search
	// rewrites: it holds the folder's lock as search does.
	if err := folder.Lock(); err != nil {
		return err
	}
	defer folder.Unlock()
	if n := folder.LockNote(); n != "" {
		fmt.Fprintf(stderr, "plica: note: %s\n", n)
	}
	err = writeReport(ctx, folder, *out, ids, stdout, stderr)
	if errors.Is(err, context.Canceled) {
		// report.Write looks at ctx only before it writes a file.
		return fmt.Errorf("report interrupted, nothing written (the run folder is unchanged): %w", err)
	}
	return err
}

// writeReport writes a run's report and plots and says where.
func writeReport(ctx context.Context, folder *results.Folder, path string, ids []int, stdout, stderr io.Writer) error {
	rep, err := report.Write(ctx, folder, path, reportOptions(ids))
	var unknown *report.UnknownDesignError
	if errors.As(err, &unknown) {
		return usagef("-designs: %v", err)
	}
	if err != nil {
		return err
	}
	for _, p := range rep.Problems {
		fmt.Fprintf(stderr, "plica: warning: %s\n", p)
	}
	if path == "" {
		path = folder.Path(report.File)
	}
	fmt.Fprintf(stdout, "report: %s (plots in %s)\n", path, folder.Path(report.PlotsDir))
	return nil
}

// reportOptions shows the given designs with the check verb's full output.
func reportOptions(ids []int) report.Options {
	return report.Options{Designs: ids, CheckText: func(name string, res *objective.Result) string {
		var b bytes.Buffer
		writeCheck(&b, name, res)
		return b.String()
	}}
}

// idList parses "1,3,7" into design ids (≥ 1).
func idList(flagName, s string) ([]int, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	var out []int
	for _, p := range strings.Split(s, ",") {
		id, err := strconv.Atoi(strings.TrimSpace(p))
		if err != nil || id < 1 {
			return nil, usagef("-%s: %q is not a design id (expected a comma-separated list of front ids such as 1,4)", flagName, p)
		}
		out = append(out, id)
	}
	return out, nil
}
