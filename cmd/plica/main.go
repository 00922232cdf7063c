// Command plica designs manipulators made of nested, pre-curved bellows.
//
// Run "plica help" for the verbs.
package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code) // the only os.Exit in the program
}
