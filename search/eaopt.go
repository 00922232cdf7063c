package search

// This file is the only one that imports eaopt (v0.4.2 of November 2020, no longer developed as far as we know; search/REFERENCE.md §3.4 P13).
// Replacing it by a plain loop means: `for !e.stopping() { if _, err := e.step(e.pop); err != nil
// { return err } }`.

import (
	"errors"
	"fmt"
	"math"
	randv1 "math/rand"
	"sync"

	"github.com/MaxHalford/eaopt"
)

// host runs the generations of e on eaopt v0.4.2 with a custom Model that performs one whole
// generation (search/REFERENCE.md §3.2), working around the pitfalls of §3.4:
//
//   - one population, no migrator or speciator, and a TryLock guard against concurrent Apply (P8);
//   - the initial population is built, evaluated and ranked by the engine and handed out in
//     order by newGenome (P9); genomes cache their design, so eaopt never evaluates anything
//     (P4, P5, P11), and Mutate and Crossover are no-ops (P2, P3);
//   - Apply puts the parents in a canonical order before anything else, so eaopt's unstable sort
//     does not matter (P1), builds fresh Individuals for the survivors and sets Fitness to the
//     crowded-comparison order r + 0.5/(1 + crowding) (r the front index from 0);
//   - eaopt's generator is seeded from the run's seed on its own stream, never from the clock,
//     and nothing output depends on it (P6); the hall of fame is ignored (P7);
//   - stopping is decided by EarlyStop with NGenerations at its maximum (P10).
func host(e *engine) error {
	m := &eaoptModel{e: e}
	ga, err := eaopt.GAConfig{
		NPops:        1,
		PopSize:      uint(len(e.pop)),
		NGenerations: math.MaxUint32,
		HofSize:      1,
		Model:        m,
		EarlyStop:    func(*eaopt.GA) bool { return e.stopping() },
		RNG:          randv1.New(source64{newPCG(e.cfg.Seed, streamHost)}),
	}.NewGA()
	if err != nil {
		return fmt.Errorf("search: eaopt: %w", err)
	}
	next := 0
	return ga.Minimize(func(*randv1.Rand) eaopt.Genome {
		g := &genome{d: e.pop[next]}
		next++
		return g
	})
}

// genome is a Design seen by eaopt.
type genome struct{ d *Design }

// Evaluate returns the crowded-comparison scalar of the already evaluated design.
func (g *genome) Evaluate() (float64, error) { return eaoptFitness(g.d), nil }

// Mutate does nothing: the model varies designs itself.
func (g *genome) Mutate(*randv1.Rand) {}

// Crossover does nothing: the model varies designs itself.
func (g *genome) Crossover(eaopt.Genome, *randv1.Rand) {}

// Clone shares the design, which nothing modifies through eaopt.
func (g *genome) Clone() eaopt.Genome { return &genome{d: g.d} }

// eaoptFitness encodes the crowded-comparison order in one scalar: r + 0.5/(1 + crowding).
func eaoptFitness(d *Design) float64 { return float64(d.Rank) + 0.5/(1+d.Crowding) }

// eaoptModel runs one generation of the engine per Apply.
type eaoptModel struct {
	e       *engine
	mu      sync.Mutex
	genomes []genome  // one per population slot, reused every generation
	parents []*Design // the designs handed to step, reused every generation
}

var errConcurrentApply = errors.New("search: concurrent Apply (eaopt must run one population)")

// Apply runs one generation on pop.
func (m *eaoptModel) Apply(pop *eaopt.Population) error {
	if !m.mu.TryLock() {
		return errConcurrentApply
	}
	defer m.mu.Unlock()
	parents := m.parents[:0]
	for _, ind := range pop.Individuals {
		parents = append(parents, ind.Genome.(*genome).d)
	}
	m.parents = parents
	survivors, err := m.e.step(parents)
	if err != nil {
		return err
	}
	if len(m.genomes) != len(survivors) {
		m.genomes = make([]genome, len(survivors))
	}
	for i, d := range survivors {
		m.genomes[i].d = d
		pop.Individuals[i] = eaopt.Individual{Genome: &m.genomes[i], Fitness: eaoptFitness(d), Evaluated: true}
	}
	return nil
}

// Validate accepts any configuration: the model has no parameters of its own.
func (m *eaoptModel) Validate() error { return nil }
