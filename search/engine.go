package search

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"time"

	"plica/search/front"
)

// engine is the state of a population run (NSGA2 or GA). It is driven by a host, which calls
// stopping before each generation and step to run one; the host is eaopt (eaopt.go), and the
// plain loop `for !e.stopping() { e.step(e.pop) }` would do the same.
type engine struct {
	ctx    context.Context
	p      *Problem
	cfg    config
	method string
	surv   survival
	scal   *Scalarization // GA only
	pcg    *rand.PCG
	rng    *rand.Rand
	ops    *operators
	ev     evaluator

	pop      []*Design
	arch     archive
	stats    Stats
	history  []Stats
	ref      []float64
	elapsed0 time.Duration
	start    time.Time
	status   Status
	err      error
	savedGen int // generation of the last checkpoint, −1 if none

	// Buffers kept between generations, so that a generation allocates nothing in the steady
	// state: the sorted parents, parents and children together, the children, the archive
	// before the generation, and the designs free for reuse (recycle).
	popBuf, unionBuf, kids, oldArch, free []*Design
	epoch                                 int64
}

func newEngine(ctx context.Context, p *Problem, c config, method string, surv survival, scal *Scalarization) (*engine, error) {
	if c.Population < 2 {
		return nil, fmt.Errorf("search: population %d, want at least 2", c.Population)
	}
	if len(c.InitialDesigns) > c.Population && c.Resume == nil {
		return nil, fmt.Errorf("search: %d initial designs for a population of %d", len(c.InitialDesigns), c.Population)
	}
	if c.Resume == nil {
		for i, x := range c.InitialDesigns {
			if err := p.checkPoint(x); err != nil {
				return nil, fmt.Errorf("search: initial design %d: %w", i, err)
			}
		}
	}
	if c.Reference != nil && len(c.Reference) != p.NumObjectives {
		return nil, fmt.Errorf("search: reference point of %d values for %d objectives", len(c.Reference), p.NumObjectives)
	}
	pcg := newPCG(c.Seed, streamModel)
	return &engine{
		ctx: ctx, p: p, cfg: c, method: method, surv: surv, scal: scal,
		pcg: pcg, rng: rand.New(pcg), ops: newOperators(p, &c.Variation),
		ev:       evaluator{p: p, workers: c.Workers, timeout: c.EvaluationTimeout},
		arch:     archive{m: p.NumObjectives, capacity: c.ArchiveSize},
		ref:      slices.Clone(c.Reference),
		start:    time.Now(),
		savedGen: -1,
	}, nil
}

// initialise builds, evaluates and ranks the initial population: the initial designs first, the
// rest a Latin hypercube sample.
func (e *engine) initialise() {
	n := e.cfg.Population
	ds := make([]*Design, n)
	rows := make([][]float64, 0, n)
	for i := range ds {
		ds[i] = newDesign(e.p)
		ds[i].Index = int64(i)
		if i < len(e.cfg.InitialDesigns) {
			copy(ds[i].X, e.cfg.InitialDesigns[i])
		} else {
			rows = append(rows, ds[i].X)
		}
	}
	latinHypercube(e.rng, e.p, rows)
	if err := e.evaluate(ds); err != nil {
		e.status = Interrupted
		return
	}
	e.pop = e.surv.survive(ds, n)
	e.stats.Evaluations = int64(n)
	e.afterGeneration()
}

// evaluate evaluates ds and, if the context was not cancelled, records them: failure count,
// scalarisation, the Evaluated hook and the archive. A cancelled context returns errInterrupted
// and records nothing.
func (e *engine) evaluate(ds []*Design) error {
	if err := e.ev.run(e.ctx, ds); err != nil || e.ctx.Err() != nil {
		return errInterrupted
	}
	for _, d := range ds {
		if d.Failed != "" {
			e.stats.Failures++
		}
		if e.scal != nil {
			d.Scalar = math.Inf(1)
			if d.Failed == "" {
				d.Scalar = e.scal.Value(d.F)
			}
		}
		if e.cfg.Evaluated != nil {
			e.cfg.Evaluated(d)
		}
	}
	e.arch.addAll(ds)
	e.arch.truncate()
	return nil
}

// step runs one generation on the parents handed over by the host and returns the survivors.
// If the context is cancelled during evaluation the generation is abandoned, the generator
// restored, and errInterrupted returned.
func (e *engine) step(parents []*Design) ([]*Design, error) {
	pop := append(e.popBuf[:0], parents...)
	e.popBuf = pop
	slices.SortFunc(pop, compareCanonical)
	e.pop = pop
	k := e.cfg.Population
	state := *e.pcg
	children := e.offspring(k)
	e.oldArch = append(e.oldArch[:0], e.arch.items...)
	if err := e.evaluate(children); err != nil {
		*e.pcg = state
		return nil, err
	}
	r := append(append(e.unionBuf[:0], pop...), children...)
	e.unionBuf = r
	e.pop = e.surv.survive(r, e.cfg.Population)
	e.recycle(pop, children, e.oldArch)
	clear(r)
	clear(e.oldArch)
	e.stats.Generation++
	e.stats.Evaluations += int64(k)
	e.afterGeneration()
	return e.pop, nil
}

// freed marks a design on the free list.
const freed = -1

// recycle puts on the free list the designs of the given sets (this generation's parents and
// children, and the archive before it) that are now in neither the population nor the
// archive. Nothing else holds the engine's designs: the hooks may not retain them, and
// checkpoints and results hold copies.
func (e *engine) recycle(sets ...[]*Design) {
	e.epoch++
	for _, d := range e.pop {
		d.mark = e.epoch
	}
	for _, d := range e.arch.items {
		d.mark = e.epoch
	}
	for _, ds := range sets {
		for _, d := range ds {
			if d.mark != e.epoch && d.mark != freed {
				d.mark = freed
				e.free = append(e.free, d)
			}
		}
	}
}

// newChild is a design from the free list, cleared, or a new one.
func (e *engine) newChild() *Design {
	n := len(e.free)
	if n == 0 {
		return newDesign(e.p)
	}
	d := e.free[n-1]
	e.free[n-1] = nil
	e.free = e.free[:n-1]
	*d = Design{X: d.X, F: d.F, G: d.G}
	return d
}

// offspring makes k children by crowded binary tournament, crossover and mutation.
func (e *engine) offspring(k int) []*Design {
	out := e.kids[:0]
	for len(out) < k {
		p1, p2 := e.tournament(), e.tournament()
		c1, c2 := e.newChild(), e.newChild()
		e.ops.crossover(e.pcg, p1.X, p2.X, c1.X, c2.X)
		for _, c := range [2]*Design{c1, c2} {
			if len(out) == k {
				// An odd k: the last pair's second child is not needed.
				c.mark = freed
				e.free = append(e.free, c)
				break
			}
			e.ops.mutate(e.rng, e.pcg, c.X)
			c.Index = e.stats.Evaluations + int64(len(out))
			out = append(out, c)
		}
	}
	e.kids = out
	return out
}

// tournament is the crowded binary tournament (Deb et al. 2002, Sec. III-C): two distinct
// members drawn at random, the lower rank wins, then the larger crowding distance, then a fair
// coin.
func (e *engine) tournament() *Design {
	n := len(e.pop)
	i := e.rng.IntN(n)
	j := e.rng.IntN(n - 1)
	if j >= i {
		j++
	}
	a, b := e.pop[i], e.pop[j]
	switch {
	case a.Rank != b.Rank:
		if a.Rank < b.Rank {
			return a
		}
		return b
	case a.Crowding != b.Crowding:
		if a.Crowding > b.Crowding {
			return a
		}
		return b
	}
	if e.rng.Float64() < 0.5 {
		return a
	}
	return b
}

// afterGeneration updates the statistics and history, and calls the hooks.
func (e *engine) afterGeneration() {
	e.stats.Feasible = 0
	for _, d := range e.pop {
		if d.Feasible() {
			e.stats.Feasible++
		}
	}
	e.stats.ArchiveSize = len(e.arch.items)
	if e.ref == nil && len(e.arch.items) > 0 {
		e.ref = autoReference(e.arch.items, e.p.NumObjectives)
	}
	e.stats.Hypervolume = 0
	if e.ref != nil {
		e.stats.Hypervolume = archiveHypervolume(e.arch.items, e.ref)
	}
	e.history = append(e.history, e.stats)
	if e.cfg.Progress != nil {
		e.cfg.Progress(Progress{Stats: e.stats, Elapsed: e.elapsed()})
	}
	if k := e.cfg.CheckpointEvery; k > 0 && e.stats.Generation > 0 && e.stats.Generation%k == 0 {
		e.checkpoint()
	}
}

// archiveHypervolume is Hypervolume of the archive's objective vectors. With two objectives
// the archive is sorted by f1, so the sweep of hv2 runs in place (same order, same sum).
func archiveHypervolume(items []*Design, ref []float64) float64 {
	if len(ref) == 2 {
		var hv float64
		best := ref[1]
		for _, d := range items {
			if !(d.F[0] < ref[0]) {
				break
			}
			if d.F[1] < best {
				hv += (ref[0] - d.F[0]) * (best - d.F[1])
				best = d.F[1]
			}
		}
		return hv
	}
	pts := make([][]float64, len(items))
	for i, d := range items {
		pts[i] = d.F
	}
	return front.Hypervolume(pts, ref)
}

// autoReference is the automatic hypervolume reference point of Settings.Reference.
func autoReference(items []*Design, m int) []float64 {
	ref := make([]float64, m)
	for k := range m {
		lo, hi := items[0].F[k], items[0].F[k]
		for _, d := range items[1:] {
			lo, hi = min(lo, d.F[k]), max(hi, d.F[k])
		}
		span := hi - lo
		if span == 0 {
			span = math.Abs(hi)
		}
		if span == 0 {
			span = 1
		}
		ref[k] = hi + 0.1*span
	}
	return ref
}

func (e *engine) elapsed() time.Duration { return e.elapsed0 + time.Since(e.start) }

// stopping reports whether the run must stop before the next generation, and sets the status.
func (e *engine) stopping() bool {
	if e.status != NotTerminated {
		return true
	}
	switch {
	case e.err != nil:
		e.status = Failure
	case e.ctx.Err() != nil:
		e.status = Interrupted
	case e.cfg.maxEvals >= 0 && e.stats.Evaluations+int64(e.cfg.Population) > e.cfg.maxEvals:
		e.status = EvaluationLimit
	case e.cfg.Runtime > 0 && e.elapsed() >= e.cfg.Runtime:
		e.status = RuntimeLimit
	case e.stalled():
		e.status = Stalled
	default:
		return false
	}
	return true
}

// stalled applies the Stall criterion to the history.
func (e *engine) stalled() bool {
	w, h := e.cfg.Stall.Generations, e.history
	if w <= 0 || len(h) <= w {
		return false
	}
	now, then := h[len(h)-1].Hypervolume, h[len(h)-1-w].Hypervolume
	return now > 0 && now-then <= e.cfg.Stall.Tolerance*now
}

// checkpoint passes a deep copy of the state to the Checkpoint hook.
func (e *engine) checkpoint() {
	if e.cfg.Checkpoint == nil || e.err != nil {
		return
	}
	state, err := e.pcg.MarshalBinary()
	if err != nil {
		e.err = fmt.Errorf("search: checkpoint: %w", err)
		return
	}
	cp := &Checkpoint{
		Version: CheckpointVersion, Method: e.method, ConfigHash: e.cfg.ConfigHash, Seed: e.cfg.Seed,
		RNG: state, Stats: e.stats, Elapsed: e.elapsed(), Reference: slices.Clone(e.ref),
		History:    slices.Clone(e.history),
		Population: make([]Design, len(e.pop)),
		Archive:    make([]Design, len(e.arch.items)),
	}
	for i, d := range e.pop {
		cp.Population[i] = d.clone()
	}
	for i, d := range e.arch.items {
		cp.Archive[i] = d.clone()
		cp.Archive[i].Rank, cp.Archive[i].Crowding = 0, 0
	}
	e.savedGen = e.stats.Generation
	if err := e.cfg.Checkpoint(cp); err != nil {
		e.err = fmt.Errorf("search: checkpoint: %w", err)
	}
}

// restore loads a checkpoint after checking that it belongs to this run.
func (e *engine) restore(cp *Checkpoint) error {
	switch {
	case cp.Version != CheckpointVersion:
		return fmt.Errorf("search: checkpoint version %d, want %d", cp.Version, CheckpointVersion)
	case cp.Method != e.method:
		return fmt.Errorf("search: checkpoint of method %s cannot resume %s", cp.Method, e.method)
	case cp.ConfigHash != e.cfg.ConfigHash:
		return fmt.Errorf("search: checkpoint config hash %q differs from %q", cp.ConfigHash, e.cfg.ConfigHash)
	case cp.Seed != e.cfg.Seed:
		return fmt.Errorf("search: checkpoint seed %d differs from %d", cp.Seed, e.cfg.Seed)
	case len(cp.Population) != e.cfg.Population:
		return fmt.Errorf("search: checkpoint population %d differs from %d", len(cp.Population), e.cfg.Population)
	case e.ref != nil && !slices.Equal(e.ref, cp.Reference):
		return fmt.Errorf("search: checkpoint reference point %v differs from %v", cp.Reference, e.ref)
	}
	load := func(what string, src []Design) ([]*Design, error) {
		out := make([]*Design, len(src))
		for i := range src {
			d := &src[i]
			if len(d.X) != e.p.Dim || len(d.F) != e.p.NumObjectives || len(d.G) != e.p.NumConstraints {
				return nil, fmt.Errorf("search: checkpoint %s design %d has %d variables, %d objectives, %d constraints; the problem has %d, %d, %d",
					what, i, len(d.X), len(d.F), len(d.G), e.p.Dim, e.p.NumObjectives, e.p.NumConstraints)
			}
			c := d.clone()
			out[i] = &c
		}
		return out, nil
	}
	pop, err := load("population", cp.Population)
	if err != nil {
		return err
	}
	arch, err := load("archive", cp.Archive)
	if err != nil {
		return err
	}
	if err := e.pcg.UnmarshalBinary(cp.RNG); err != nil {
		return fmt.Errorf("search: checkpoint generator state: %w", err)
	}
	e.pop, e.arch.items = pop, arch
	e.stats, e.history = cp.Stats, slices.Clone(cp.History)
	e.ref = slices.Clone(cp.Reference)
	e.elapsed0 = cp.Elapsed
	e.savedGen = cp.Generation
	return nil
}

// finish writes the final checkpoint and builds the result.
func (e *engine) finish() (*Result, error) {
	if e.status == NotTerminated {
		e.stopping()
	}
	if len(e.pop) > 0 && e.savedGen != e.stats.Generation {
		e.checkpoint()
	}
	res := &Result{
		Status: e.status, Method: e.method, Seed: e.cfg.Seed, Stats: e.stats, Runtime: e.elapsed(),
		Reference: slices.Clone(e.ref), History: slices.Clone(e.history),
	}
	pop := slices.Clone(e.pop)
	slices.SortFunc(pop, compareCanonical)
	res.Population = make([]Design, len(pop))
	for i, d := range pop {
		res.Population[i] = d.clone()
	}
	res.Front = frontOf(e.arch.items, e.p.NumObjectives)
	if e.err != nil {
		res.Status = Failure
		return res, e.err
	}
	return res, nil
}

// frontOf copies archive members sorted by objectives (then index), with Rank 0 and crowding
// distances over the front.
func frontOf(items []*Design, m int) []Design {
	ds := slices.Clone(items)
	slices.SortFunc(ds, func(a, b *Design) int {
		if c := slices.Compare(a.F, b.F); c != 0 {
			return c
		}
		return cmp.Compare(a.Index, b.Index)
	})
	front := make([]int32, len(ds))
	for i := range front {
		front[i] = int32(i)
	}
	dist := make([]float64, len(ds))
	crowdingDistance(ds, front, m, dist)
	out := make([]Design, len(ds))
	for i, d := range ds {
		out[i] = d.clone()
		out[i].Rank, out[i].Crowding = 0, dist[i]
	}
	return out
}

// runPopulation runs a population method on its engine.
func runPopulation(ctx context.Context, p *Problem, c config, method string, surv survival, scal *Scalarization) (*Result, error) {
	e, err := newEngine(ctx, p, c, method, surv, scal)
	if err != nil {
		return nil, err
	}
	if c.Resume != nil {
		if err := e.restore(c.Resume); err != nil {
			return nil, err
		}
	} else {
		e.initialise()
	}
	if !e.stopping() {
		if err := host(e); err != nil && !errors.Is(err, errInterrupted) && e.err == nil {
			e.err = err
		}
	}
	return e.finish()
}
