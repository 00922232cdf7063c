package search

import (
	"context"
	"fmt"
	"math"
	"sync"
	"sync/atomic"
	"time"
)

// evaluator runs Problem.Evaluate on batches of designs with a bounded pool of workers.
type evaluator struct {
	p       *Problem
	workers int
	timeout time.Duration
	bufs    [][]float64 // each worker's copy of the variables, reused by every run
}

// buf is worker i's buffer.
func (ev *evaluator) buf(i int) []float64 {
	for len(ev.bufs) <= i {
		ev.bufs = append(ev.bufs, make([]float64, ev.p.Dim))
	}
	return ev.bufs[i]
}

// run evaluates every design of ds, dispatching one design at a time to min(workers, len(ds))
// goroutines (per-item dispatch balances evaluations of uneven cost). Each evaluation writes only
// its own design, so the outcome does not depend on the number of workers. When ctx is cancelled,
// designs not yet started are left unevaluated and run returns ctx.Err().
func (ev *evaluator) run(ctx context.Context, ds []*Design) error {
	w := min(ev.workers, len(ds))
	if w <= 1 {
		x := ev.buf(0)
		for _, d := range ds {
			if ctx.Err() != nil {
				break
			}
			ev.one(ctx, d, x)
		}
		return ctx.Err()
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for k := range w {
		x := ev.buf(k)
		wg.Go(func() {
			for {
				i := next.Add(1) - 1
				if i >= int64(len(ds)) || ctx.Err() != nil {
					return
				}
				ev.one(ctx, ds[i], x)
			}
		})
	}
	wg.Wait()
	return ctx.Err()
}

// one evaluates d, passing Evaluate a copy of d.X in the worker's buffer x, and sets F, G, CV and
// Failed. Objectives and constraints start as NaN, so that entries left unset count as failures.
func (ev *evaluator) one(ctx context.Context, d *Design, x []float64) {
	copy(x, d.X)
	for i := range d.F {
		d.F[i] = math.NaN()
	}
	for i := range d.G {
		d.G[i] = math.NaN()
	}
	d.Failed = ""
	if err := ev.call(ctx, d.Index, x, d.F, d.G); err != nil {
		d.Failed = err.Error()
		if d.Failed == "" {
			d.Failed = "evaluation failed"
		}
	} else {
		d.Failed = nonFinite(d.F, d.G)
	}
	if d.Failed != "" {
		d.CV = math.Inf(1)
		return
	}
	var cv float64
	for j, g := range d.G {
		if g > 0 {
			if ev.p.ConstraintScale != nil {
				g /= ev.p.ConstraintScale[j]
			}
			cv += g
		}
	}
	d.CV = cv
}

// call runs Evaluate, turning a panic into an error and applying the per-evaluation timeout.
func (ev *evaluator) call(ctx context.Context, index int64, x, f, g []float64) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("panic: %v", r)
		}
	}()
	if ev.timeout > 0 {
		var cancel context.CancelFunc
		ctx, cancel = context.WithTimeout(ctx, ev.timeout)
		defer cancel()
	}
	return ev.p.Evaluate(ctx, index, x, f, g)
}

// nonFinite describes the first NaN or infinite objective or constraint, or returns "".
func nonFinite(f, g []float64) string {
	for i, v := range f {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Sprintf("objective %d is %v", i, v)
		}
	}
	for j, v := range g {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Sprintf("constraint %d is %v", j, v)
		}
	}
	return ""
}
