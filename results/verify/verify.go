// Package verify runs plica's built-in verification cases for plica verify.
// Each model package (objective/kinematics, objective/statics, surrogate,
// search/front, search, surrogate/fecheck) keeps its own cases in
// verification.go: a value its production code computes, the published (or
// derived) value it must match, the tolerance and the source. This package
// gathers them, runs them and renders each as a table row. The cases of
// surrogate/fecheck run CalculiX: they run only when asked for
// (Options.FE) and are skipped, not failed, where ccx is not on PATH.
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
	"plica/surrogate/fecheck"
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
	// Tolerance is relative to |Published| when Relative, else absolute;
	// it is the allowed deviation either way, or only above Published
	// when Below (the allowed deviation below it, in the same measure) is
	// set.
	Tolerance float64
	Below     float64
	Relative  bool
	Source    string
	Err       error
	// Skipped, when not empty, says why the case did not run (ccx not
	// found); a skipped case neither passes nor fails.
	Skipped string
}

// Pass reports whether the case ran and the computed value is within
// tolerance.
func (c Case) Pass() bool {
	if c.Skipped != "" || c.Err != nil || math.IsNaN(c.Computed) {
		return false
	}
	above, below := c.Tolerance, c.Tolerance
	if c.Below > 0 {
		below = c.Below
	}
	if c.Relative {
		above, below = above*math.Abs(c.Published), below*math.Abs(c.Published)
	}
	d := c.Computed - c.Published
	return d <= above && -d <= below
}

// Failed reports whether the case ran and missed its tolerance.
func (c Case) Failed() bool { return c.Skipped == "" && !c.Pass() }

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
var areas = []string{"kinematics", "surrogate", "elastica", "stability", "calibration", "indicators", "search", "fe"}

// NoCCX is the reason an FE case is skipped.
var NoCCX = "ccx not found (Debian package " + fecheck.Package + ")"

// entry is a case as Run runs it: a model package's case, or an FE case
// with its own tolerance below the published value, a context for ccx,
// and run only on request.
type entry struct {
	caseDef
	below float64
	fe    bool
	ctxed func(ctx context.Context) (float64, error)
}

// feDefs gathers the FE cases of surrogate/fecheck.
func feDefs() []entry {
	var all []entry
	for _, c := range fecheck.VerificationCases() {
		all = append(all, entry{caseDef: caseDef{Area: c.Area, Name: c.Name, Unit: c.Unit, Published: c.Published,
			Tolerance: c.Tolerance, Relative: c.Relative, Source: c.Source}, below: c.Below, fe: true, ctxed: c.Compute})
	}
	return all
}

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

// Options selects the cases Run runs.
type Options struct {
	// Quick leaves out the slow cases (a full NSGA-II run).
	Quick bool
	// FE adds the comparisons with CalculiX (package surrogate/fecheck,
	// about 25 s on one core); where ccx is not on PATH they are
	// listed as skipped with the reason NoCCX.
	FE bool
}

// Run runs the built-in verification cases that opt selects. Run looks at
// ctx before each case and stops with ctx.Err() (and no cases) once ctx is
// done; a model package's case running then is abandoned (those compute in
// memory and write nothing), so an interrupt does not wait for the NSGA-II
// run to end; an FE case is handed ctx, which stops ccx, and Run waits for
// it to clean up its scratch directory.
func Run(ctx context.Context, opt Options) ([]Case, error) {
	var all []entry
	for _, d := range defs() {
		all = append(all, entry{caseDef: d})
	}
	if opt.FE {
		all = append(all, feDefs()...)
	}
	skip := ""
	if !fecheck.HaveCCX("") {
		skip = NoCCX
	}
	return run(ctx, all, opt.Quick, skip)
}

// run runs the cases; FE cases are skipped with the reason skipFE when it
// is not empty.
func run(ctx context.Context, all []entry, quick bool, skipFE string) ([]Case, error) {
	var out []Case
	for _, d := range all {
		if quick && d.Slow {
			continue
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		c := Case{Area: d.Area, Name: d.Name, Unit: d.Unit, Published: d.Published,
			Tolerance: d.Tolerance, Below: d.below, Relative: d.Relative, Source: d.Source}
		switch {
		case d.fe && skipFE != "":
			c.Skipped = skipFE
		case d.ctxed != nil:
			c.Computed, c.Err = d.ctxed(ctx)
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		default:
			v, err, stopped := compute(ctx, d.Compute)
			if stopped != nil {
				return nil, stopped
			}
			c.Computed, c.Err = v, err
		}
		out = append(out, c)
	}
	if err := ctx.Err(); err != nil {
		return nil, err // the last case may have been cut short
	}
	return out, nil
}

// Row renders one case as a row of values for a table.
func (c Case) Row() []string {
	tol := fmt.Sprintf("±%.3g", c.Tolerance)
	if c.Below > 0 {
		tol = fmt.Sprintf("−%.3g/+%.3g", c.Below, c.Tolerance)
	}
	if c.Relative {
		tol += " rel"
	}
	verdict := "PASS"
	computed := fmt.Sprintf("%.10g", c.Computed)
	switch {
	case c.Skipped != "":
		verdict, computed = "SKIP", "skipped: "+c.Skipped
	case c.Err != nil:
		verdict, computed = "FAIL", "error: "+c.Err.Error()
	case !c.Pass():
		verdict = "FAIL"
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
