package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"maps"
	"slices"
	"strings"
	"text/tabwriter"

	"plica/results/verify"
)

func init() {
	register(&command{
		name:  "verify",
		usage: "[-quick] [-fe]",
		short: "run the built-in verification cases against published values",
		long: `Prints, for each case, the value plica computes, the published (or derived)
value, the tolerance, the source and PASS or FAIL. Exit status 1 if any
case fails. The same cases run as unit tests.

-fe adds the finite-element comparisons: the thin cylinder through the
CalculiX shell path and the wall models against a CalculiX 3-D solid
(about 25 s on one core). They need ccx on PATH (Debian package
calculix-ccx); without it they are listed as SKIP, neither pass nor fail.`,
		run: runVerify,
	})
}

func runVerify(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	quick := fs.Bool("quick", false, "leave out the slow cases (a full NSGA-II run)")
	fe := fs.Bool("fe", false, "add the comparisons with CalculiX (needs ccx on PATH; about 25 s)")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("verify: expected no arguments, got %d", len(pos))
	}
	cases, err := verify.Run(ctx, verify.Options{Quick: *quick, FE: *fe})
	if err != nil {
		return err
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "area\tcase\tcomputed\tpublished\ttolerance\tunit\tresult\tsource")
	failed, skipped := 0, map[string]int{}
	for _, c := range cases {
		fmt.Fprintln(tw, strings.Join(c.Row(), "\t"))
		if c.Failed() {
			failed++
		}
		if c.Skipped != "" {
			skipped[c.Skipped]++
		}
	}
	tw.Flush()
	nSkipped := 0
	for _, n := range skipped {
		nSkipped += n
	}
	ran := len(cases) - nSkipped
	fmt.Fprintf(stdout, "\n%d of %d cases pass", ran-failed, ran)
	for _, why := range slices.Sorted(maps.Keys(skipped)) {
		fmt.Fprintf(stdout, "; %d skipped: %s", skipped[why], why)
	}
	fmt.Fprintln(stdout)
	if !*fe {
		fmt.Fprintln(stdout, "(the finite-element comparisons with CalculiX run with -fe)")
	}
	if failed > 0 {
		return &failure{msg: fmt.Sprintf("%d verification cases failed", failed)}
	}
	return nil
}
