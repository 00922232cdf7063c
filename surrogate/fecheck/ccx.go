package fecheck

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"
)

// Package names the Debian package that provides ccx.
const Package = "calculix-ccx"

// ErrNoCCX is returned (wrapped) when the ccx executable is not found.
var ErrNoCCX = errors.New("CalculiX (ccx) is not on PATH: install the Debian package " + Package)

// findCCX returns the path of the executable exe (default "ccx").
func findCCX(exe string) (string, error) {
	if exe == "" {
		exe = "ccx"
	}
	p, err := exec.LookPath(exe)
	if err != nil {
		if exe == "ccx" {
			return "", ErrNoCCX
		}
		return "", fmt.Errorf("%w (looked for %q)", ErrNoCCX, exe)
	}
	return p, nil
}

// HaveCCX reports whether the ccx executable exe (default "ccx") is on
// PATH.
func HaveCCX(exe string) bool { _, err := findCCX(exe); return err == nil }

// runCCX runs `ccx -i job` in dir with the given thread count, writes its
// combined output to job.log in dir and returns the run time. Cancelling
// ctx kills ccx. A failure is a one-line error with the first *ERROR line
// of ccx's output (and the line after it) or its exit status.
//
// onLine, when not nil, is called with each line of ccx's output as it
// arrives (from the goroutine that copies the output; one call at a time).
func runCCX(ctx context.Context, exe, dir, job string, threads int, onLine func(string)) (time.Duration, error) {
	path, err := findCCX(exe)
	if err != nil {
		return 0, err
	}
	if threads < 1 {
		threads = 1
	}
	var out bytes.Buffer
	cmd := exec.CommandContext(ctx, path, "-i", job)
	cmd.Dir = dir
	var w io.Writer = &out
	if onLine != nil {
		w = io.MultiWriter(&out, &lineWriter{fn: onLine})
	}
	cmd.Stdout, cmd.Stderr = w, w
	n := fmt.Sprint(threads)
	cmd.Env = append(os.Environ(), "OMP_NUM_THREADS="+n, "CCX_NPROC_EQUATION_SOLVER="+n, "CCX_NPROC_STIFFNESS="+n)
	cmd.WaitDelay = 2 * time.Second
	start := time.Now()
	runErr := cmd.Run()
	dur := time.Since(start)
	logErr := os.WriteFile(filepath.Join(dir, job+".log"), out.Bytes(), 0o644)
	if ctx.Err() != nil {
		return dur, fmt.Errorf("ccx %s: %w", job, ctx.Err())
	}
	if sig, ok := interrupted(cmd.ProcessState); ok {
		// Ctrl-C in a terminal reaches ccx too, and it may die of it
		// before ctx is cancelled: an interruption, not a failure.
		return dur, fmt.Errorf("ccx %s stopped by %v: %w", job, sig, context.Canceled)
	}
	if reason := ccxError(out.String()); reason != "" {
		return dur, fmt.Errorf("ccx %s failed: %s", job, reason)
	}
	if runErr != nil {
		return dur, fmt.Errorf("ccx %s failed: %v", job, runErr)
	}
	if _, err := os.Stat(filepath.Join(dir, job+".dat")); err != nil {
		return dur, fmt.Errorf("ccx %s wrote no results (%s.dat missing)", job, job)
	}
	return dur, logErr
}

// interrupted reports whether the process ended by SIGINT, SIGTERM or
// SIGHUP.
func interrupted(ps *os.ProcessState) (syscall.Signal, bool) {
	if ps == nil {
		return 0, false
	}
	ws, ok := ps.Sys().(syscall.WaitStatus)
	if !ok || !ws.Signaled() {
		return 0, false
	}
	switch sig := ws.Signal(); sig {
	case syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP:
		return sig, true
	}
	return 0, false
}

// ccxError returns the first error message in ccx's output on one line,
// or "".
func ccxError(out string) string {
	lines := strings.Split(out, "\n")
	for i, l := range lines {
		l = strings.TrimSpace(l)
		if !strings.HasPrefix(l, "*ERROR") {
			continue
		}
		msg := strings.Join(strings.Fields(l), " ")
		for _, next := range lines[i+1:] {
			if next = strings.TrimSpace(next); next != "" {
				if !strings.HasPrefix(next, "*") {
					msg += " " + strings.Join(strings.Fields(next), " ")
				}
				break
			}
		}
		return msg
	}
	return ""
}

// lineWriter calls fn with every complete line written to it.
type lineWriter struct {
	fn   func(string)
	part []byte
}

func (l *lineWriter) Write(p []byte) (int, error) {
	n := len(p)
	for {
		i := bytes.IndexByte(p, '\n')
		if i < 0 {
			l.part = append(l.part, p...)
			return n, nil
		}
		l.fn(string(append(l.part, p[:i]...)))
		l.part, p = l.part[:0], p[i+1:]
	}
}

// stepLine returns n for ccx's " STEP n" line at the start of a step.
func stepLine(line string) (int, bool) {
	f := strings.Fields(line)
	if len(f) != 2 || f[0] != "STEP" {
		return 0, false
	}
	n, err := strconv.Atoi(f[1])
	return n, err == nil && n > 0
}
