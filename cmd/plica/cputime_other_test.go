//go:build !unix

package main

import "time"

// processCPU is not measured outside Unix; the benchmarks then report no CPU figures.
func processCPU() time.Duration { return 0 }
