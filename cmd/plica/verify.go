package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"plica/results/verify"
)

func init() {
	register(&command{
		name:  "verify",
		usage: "[-quick]",
		short: "run the built-in verification cases against published values",
		long: `Prints, for each case, the value plica computes, the published (or derived)
value, the tolerance, the source and PASS or FAIL. Exit status 1 if any
case fails. The same cases run as unit tests.`,
		run: runVerify,
	})
}

func runVerify(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	quick := fs.Bool("quick", false, "leave out the slow cases (a full NSGA-II run)")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("verify: expected no arguments, got %d", len(pos))
	}
	cases, err := verify.Run(ctx, *quick)
	if err != nil {
		return err
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "area\tcase\tcomputed\tpublished\ttolerance\tunit\tresult\tsource")
	failed := 0
	for _, c := range cases {
		fmt.Fprintln(tw, strings.Join(c.Row(), "\t"))
		if !c.Pass() {
			failed++
		}
	}
	tw.Flush()
	fmt.Fprintf(stdout, "\n%d of %d cases pass\n", len(cases)-failed, len(cases))
	if failed > 0 {
		return &failure{msg: fmt.Sprintf("%d verification cases failed", failed)}
	}
	return nil
}
