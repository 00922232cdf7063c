package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"

	"plica/problems"
	"plica/results"
)

func init() {
	register(&command{
		name:  "init",
		usage: "[FILE]",
		short: "write a commented starter problem file (default plica-problem.toml)",
		run:   runInit,
	})
}

func runInit(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 1 {
		return usagef("init: expected at most one file name, got %d arguments", len(pos))
	}
	path := "plica-problem.toml"
	if len(pos) == 1 {
		path = pos[0] // parseArgs refuses an empty name
	}
	if _, err := os.Stat(path); err == nil {
		return usagef("init: %s exists (expected a new file name; plica never overwrites a problem)", path)
	}
	if err := results.WriteAtomic(path, problems.Starter()); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "wrote %s: edit the ranges, requirements and objectives, then run plica search %s\n", path, path)
	return nil
}
