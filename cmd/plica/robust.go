package main

import (
	"context"
	"fmt"
	"io"
	"runtime"
	"text/tabwriter"

	"plica/objective"
)

// robustOutput is the "robust" member of plica check -robust -json; the
// fields samples, pass_probability, checks[].name,
// checks[].pass_probability and scores are a contract.
type robustOutput struct {
	Method          string                    `json:"method"`
	Samples         int                       `json:"samples"`
	Seed            uint64                    `json:"seed"`
	Correlated      bool                      `json:"correlated"`
	PassProbability num                       `json:"pass_probability"`
	PassSE          num                       `json:"pass_probability_se"`
	Checks          []robustCheckOutput       `json:"checks"`
	Scores          map[string]robustScoreOut `json:"scores"`
	FailedSamples   int                       `json:"failed_samples"`
	// MinPassProbability is [requirements] min_pass_probability (absent:
	// none) and MeetsMinPass whether every check reaches it.
	MinPassProbability num      `json:"min_pass_probability,omitempty"`
	MeetsMinPass       *bool    `json:"meets_min_pass_probability,omitempty"`
	FailureReasons     []string `json:"failure_reasons,omitempty"`
	Caution            string   `json:"caution"`
}

type robustCheckOutput struct {
	Name            string `json:"name"`
	PassProbability num    `json:"pass_probability"`
	SE              num    `json:"pass_probability_se"`
	Warn            bool   `json:"warn_only,omitempty"`
}

type robustScoreOut struct {
	Mean num `json:"mean"`
	SD   num `json:"sd"`
	P05  num `json:"p05"`
	P50  num `json:"p50"`
	P95  num `json:"p95"`
}

// robustCaution is printed with every robust result.
const robustCaution = "The odds are model estimates and only as good as the scatter entered in [scatter]: measure your own printer's scatter, verify on printed prototypes, and do not use these probabilities as a safety rating."

// runRobust runs the Monte Carlo of a design's [scatter] (samples > 0
// overrides its sample count).
func runRobust(ctx context.Context, stderr io.Writer, file string, d *objective.Design, sc *objective.Scenario, samples int) (*objective.Robust, *objective.Scatter, error) {
	if !sc.Scatter.Active() {
		return nil, nil, usagef("check -robust: %s has no scatter (expected a [scatter] table with at least one of modulus_pct, wall_pct, precurvature_pct, stiffness_pct > 0, or a calibrated bellows)", file)
	}
	s := *sc.Scatter
	if samples > 0 {
		s.Samples = samples
	}
	prog := newProgressLine(stderr, "check -robust")
	r, err := objective.MonteCarloProgress(ctx, d, sc, &s, runtime.GOMAXPROCS(0), prog.report)
	prog.clear()
	return r, &s, err
}

// meetsMinPass reports whether every check passes with probability at
// least pmin, and the check with the lowest probability.
func meetsMinPass(r *objective.Robust, pmin float64) (bool, objective.RobustCheck) {
	low := objective.RobustCheck{PassProbability: 2}
	for _, c := range r.Checks {
		if c.PassProbability < low.PassProbability {
			low = c
		}
	}
	return low.PassProbability >= pmin, low
}

func newRobustOutput(r *objective.Robust, s *objective.Scatter, pmin float64) *robustOutput {
	o := &robustOutput{Method: r.Method, Samples: r.Samples, Seed: s.Seed, Correlated: s.Correlated,
		PassProbability: num(r.PassProbability), PassSE: num(r.PassSE), Scores: map[string]robustScoreOut{},
		FailedSamples: r.Failed, FailureReasons: r.Reasons, Caution: robustCaution}
	if pmin > 0 {
		ok, _ := meetsMinPass(r, pmin)
		o.MinPassProbability, o.MeetsMinPass = num(pmin), &ok
	}
	for _, c := range r.Checks {
		o.Checks = append(o.Checks, robustCheckOutput{Name: c.Name, PassProbability: num(c.PassProbability), SE: num(c.SE), Warn: c.Warn})
	}
	for name, st := range r.Scores {
		o.Scores[name] = robustScoreOut{num(st.Mean), num(st.SD), num(st.P05), num(st.P50), num(st.P95)}
	}
	return o
}

// writeRobust prints the probability table and the score statistics.
func writeRobust(w io.Writer, r *objective.Robust, s *objective.Scatter, pmin float64) {
	corr := "independent per bellows"
	if s.Correlated {
		corr = "one draw for all bellows"
	}
	fmt.Fprintf(w, "\nunder print scatter (%s, %d samples, seed %d, %s; modulus %g %%, wall %g %%, pre-curvature %g %%, stiffness %g %% one sd, normal truncated at ±%d sd)\n\n",
		r.Method, r.Samples, s.Seed, corr, s.ModulusPct, s.WallPct, s.PrecurvaturePct, s.StiffnessPct, objective.TruncationSD)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "check\tP(pass)\tstd error")
	for _, c := range r.Checks {
		name := c.Name
		if c.Warn {
			name += " (warn only)"
		}
		fmt.Fprintf(tw, "%s\t%.4f\t%.4f\n", name, c.PassProbability, c.SE)
	}
	fmt.Fprintf(tw, "all checks\t%.4f\t%.4f\n", r.PassProbability, r.PassSE)
	tw.Flush()
	if pmin > 0 && len(r.Checks) > 0 {
		ok, low := meetsMinPass(r, pmin)
		verdict := "PASS"
		if !ok {
			verdict = "FAIL"
		}
		fmt.Fprintf(w, "min_pass_probability %g: lowest check %s %.4f  %s\n", pmin, low.Name, low.PassProbability, verdict)
	}
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "score\tmean\tsd\tp05\tp50\tp95")
	for _, sco := range objective.AllScores() {
		st, ok := r.Scores[sco.Name]
		if !ok {
			continue
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\n", sco.Name, fmtNum(st.Mean), fmtNum(st.SD), fmtNum(st.P05), fmtNum(st.P50), fmtNum(st.P95))
	}
	tw.Flush()
	if r.Failed > 0 {
		fmt.Fprintf(w, "\n%d of %d samples could not be evaluated and count as failing every check:\n", r.Failed, r.Samples)
		for _, m := range r.Reasons {
			fmt.Fprintf(w, "  %s\n", m)
		}
	}
	fmt.Fprintf(w, "\nstd error: Monte Carlo standard error of a proportion, sqrt(p(1-p)/n).\n%s\n", robustCaution)
}
