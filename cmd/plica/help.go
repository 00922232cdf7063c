package main

import (
	"context"
	"flag"
	"fmt"
	"io"
)

// version is the program version, recorded in run folders.
const version = "0.1.0"

func init() {
	register(&command{
		name:  "version",
		usage: "",
		short: "print plica's version",
		run: func(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
			pos, err := parseArgs(fs, args)
			if err != nil {
				return err
			}
			if len(pos) != 0 {
				return usagef("version: expected no arguments, got %d", len(pos))
			}
			fmt.Fprintf(stdout, "plica %s\n", version)
			return nil
		},
	})
}
