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
			if _, err := parseArgs(fs, args); err != nil {
				return err
			}
			fmt.Fprintf(stdout, "plica %s\n", version)
			return nil
		},
	})
}
