// Package verify runs plica's built-in verification cases for plica verify.
// Each model package (objective/kinematics, objective/statics, surrogate,
// search/front, search) keeps its own cases in verification.go: a value its
// production code computes, the published (or derived) value it must
// match, the tolerance and the source. This package gathers them, runs them
// and renders each as a table row.
package verify

import (
	"context"
	"fmt"
	"math"
	"slices"

	"plica/objective/kinematics"
	"plica/objective/statics"
	"plica/search"
	"plica/search/front"
	"plica/surrogate"
)

// Case is one built-in verification case: a value plica computes with its
// production code, the published (or derived) value it must match, the
// tolerance and where the value comes from.
type Case struct {
	Area      string // kinematics, surrogate, elastica, stability, calibration, indicators, search
	Name      string
	Unit      string
	Computed  float64
	Published float64
	// Tolerance is relative to |Published| when Relative, else absolute.
	Tolerance float64
	Relative  bool
	Source    string
	Err       error
}

// Pass reports whether the computed value is within tolerance.
func (c Case) Pass() bool {
	if c.Err != nil || math.IsNaN(c.Computed) {
		return false
	}
	d := math.Abs(c.Computed - c.Published)
	if c.Relative {
		return d <= c.Tolerance*math.Abs(c.Published)
	}
	return d <= c.Tolerance
}

// caseDef is the verification case type of every model package; each
// declares the same fields, so a case converts to caseDef.
type caseDef struct {
	Area      string
	Name      string
	Unit      string
	Published float64
	Tolerance float64
	Relative  bool
	Source    string
	Slow      bool
	Compute   func() (float64, error)
}

// areas is the order in which plica verify lists the cases.
var areas = []string{"kinematics", "surrogate", "elastica", "stability", "calibration", "indicators", "search"}

// defs gathers the verification cases of the model packages, area by area
// in the order of areas and, within an area, in the package's order.
func defs() []caseDef {
	var all []caseDef
	for _, c := range kinematics.VerificationCases() {
		all = append(all, caseDef(c))
	}
	for _, c := range statics.VerificationCases() {
		all = append(all, caseDef(c))
	}
	for _, c := range surrogate.VerificationCases() {
		all = append(all, caseDef(c))
	}
	for _, c := range front.VerificationCases() {
		all = append(all, caseDef(c))
	}
	for _, c := range search.VerificationCases() {
		all = append(all, caseDef(c))
	}
	slices.SortStableFunc(all, func(a, b caseDef) int {
		return slices.Index(areas, a.Area) - slices.Index(areas, b.Area)
	})
	return all
}

// Run runs the built-in verification cases. With quick, the slow cases
// (a full NSGA-II run) are left out. Run looks at ctx before each case and
// stops with ctx.Err() (and no cases) once ctx is done; a case running
// then is abandoned (cases compute in memory and write nothing), so an
// interrupt does not wait for the NSGA-II run to end.
func Run(ctx context.Context, quick bool) ([]Case, error) {
	return run(ctx, defs(), quick)
}

func run(ctx context.Context, all []caseDef, quick bool) ([]Case, error) {
	var out []Case
	for _, d := range all {
		if quick && d.Slow {
			continue
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		v, err, stopped := compute(ctx, d.Compute)
		if stopped != nil {
			return nil, stopped
		}
		out = append(out, Case{Area: d.Area, Name: d.Name, Unit: d.Unit, Computed: v, Published: d.Published,
			Tolerance: d.Tolerance, Relative: d.Relative, Source: d.Source, Err: err})
	}
	if err := ctx.Err(); err != nil {
		return nil, err // the last case may have been cut short
	}
	return out, nil
}

// Row renders one case as a row of values for a table.
func (c Case) Row() []string {
	tol := fmt.Sprintf("±%.3g", c.Tolerance)
	if c.Relative {
		tol = fmt.Sprintf("±%.3g rel", c.Tolerance)
	}
	verdict := "PASS"
	if !c.Pass() {
		verdict = "FAIL"
	}
	computed := fmt.Sprintf("%.10g", c.Computed)
	if c.Err != nil {
		computed = "error: " + c.Err.Error()
	}
	return []string{c.Area, c.Name, computed, fmt.Sprintf("%.10g", c.Published), tol, c.Unit, verdict, c.Source}
}

// compute runs one case's Compute, or returns ctx.Err() as stopped once
// ctx is done before it ends (leaving it to finish in the background).
func compute(ctx context.Context, f func() (float64, error)) (v float64, err, stopped error) {
	type result struct {
		v   float64
		err error
	}
	done := make(chan result, 1)
	go func() {
		v, err := f()
		done <- result{v, err}
	}()
	select {
	case r := <-done:
		return r.v, r.err, nil
	case <-ctx.Done():
		return 0, nil, ctx.Err()
	}
}
