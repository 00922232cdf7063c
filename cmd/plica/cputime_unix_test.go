//go:build unix

package main

import (
	"syscall"
	"time"
)

// processCPU is the user plus system CPU time of the process so far (all threads, the garbage
// collector's included): on a shared machine it counts the work of a benchmark without the time
// it waited for a core.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
