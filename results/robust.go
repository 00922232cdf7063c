package results

import (
	"context"
	"fmt"
	"io"
	"runtime"
	"strconv"
	"sync"
	"sync/atomic"

	"plica/objective"
	"plica/problems"
)

// Robust method names, as front.csv's robust_method column and run.json
// write them.
const (
	// RobustMonteCarlo: the robust columns of a front row come from a
	// full Monte Carlo at the [scatter] sample count.
	RobustMonteCarlo = "monte_carlo"
	// RobustFirstOrder: a candidate was scored inside the search by the
	// first-order estimate (objective/REFERENCE.md §9.7).
	RobustFirstOrder = "first_order"
	// RobustNominal: the search scored nominal designs.
	RobustNominal = "nominal"
	// RobustNotScored: the run stopped before its front was re-scored
	// (resume it to score the front).
	RobustNotScored = "not_scored"
)

// RobustInfo is run.json's account of scatter in a run: how the search
// scored candidates and how the front was re-scored.
type RobustInfo struct {
	// Search is RobustFirstOrder (quantile objectives or a
	// min_pass_probability) or RobustNominal.
	Search string `json:"search"`
	// EvaluationsPerCandidate is the model evaluations behind one search
	// evaluation (1 for a nominal search).
	EvaluationsPerCandidate int `json:"evaluations_per_candidate"`
	// Front is RobustMonteCarlo, or RobustNotScored for an interrupted run.
	Front   string `json:"front"`
	Samples int    `json:"samples"`
	Seed    uint64 `json:"seed"`
}

// newRobustInfo describes the scatter of spec (nil when none).
func newRobustInfo(spec *problems.Spec, seed uint64) *RobustInfo {
	s := spec.ScatterSeeded(seed)
	if s == nil {
		return nil
	}
	ri := &RobustInfo{Search: RobustNominal, EvaluationsPerCandidate: 1, Front: RobustMonteCarlo, Samples: scatterSamples(s), Seed: s.Seed}
	if spec.Robust() {
		ri.Search = RobustFirstOrder
		if d, _, err := spec.Design(spec.Midpoint()); err == nil {
			ri.EvaluationsPerCandidate = objective.FirstOrderEvaluations(d, s)
		}
	}
	return ri
}

func scatterSamples(s *objective.Scatter) int {
	if s.Samples > 0 {
		return s.Samples
	}
	return objective.DefaultScatterSamples
}

// robustRow scores one front row by Monte Carlo under s (one worker: the
// rows run in parallel, and the draws do not depend on the count). A
// cancelled ctx leaves the row unscored.
func robustRow(ctx context.Context, spec *problems.Spec, s *objective.Scatter, row *FrontRow) {
	if s == nil || row.Result == nil || ctx.Err() != nil {
		return
	}
	d, sc, err := spec.Design(row.Design.X)
	if err != nil {
		return
	}
	r, err := objective.MonteCarlo(ctx, d, sc, s, 1)
	if err != nil {
		return
	}
	row.Robust, row.ScatterSeed = r, s.Seed
}

// RobustColumns are front.csv's robust columns of a problem with
// [scatter] (nil without): robust_method, robust_samples,
// pass_probability and its standard error, pass_probability_<check> per
// check, and <score>_mean, _sd, _p05, _p50, _p95 per objective score
// (all Monte Carlo); then search_estimate (first_order or nominal: how the
// search scored its candidates, the g_ columns included) and, per
// quantile objective, <score>_q<NN> (the search's first-order value).
func RobustColumns(s *problems.Spec) []string {
	if !s.Scatter.Active() {
		return nil
	}
	h := []string{"robust_method", "robust_samples", "pass_probability", "pass_probability_se"}
	for _, n := range s.Checks {
		h = append(h, "pass_probability_"+n)
	}
	for _, o := range s.Objectives {
		for _, q := range []string{"mean", "sd", "p05", "p50", "p95"} {
			h = append(h, o.Score+"_"+q)
		}
	}
	h = append(h, "search_estimate")
	for _, o := range s.Objectives {
		if o.Quantile != 0 {
			h = append(h, o.Column())
		}
	}
	return h
}

// robustCells are the cells of RobustColumns for a row.
func robustCells(s *problems.Spec, r FrontRow) []string {
	if !s.Scatter.Active() {
		return nil
	}
	nan := func(n int) []string {
		out := make([]string, n)
		for i := range out {
			out[i] = "NaN"
		}
		return out
	}
	var row []string
	if rob := r.Robust; rob != nil {
		row = append(row, RobustMonteCarlo, strconv.Itoa(rob.Samples), formatFloat(rob.PassProbability), formatFloat(rob.PassSE))
		for i, n := range s.Checks {
			v := "NaN"
			if i < len(rob.Checks) && rob.Checks[i].Name == n {
				v = formatFloat(rob.Checks[i].PassProbability)
			}
			row = append(row, v)
		}
		for _, o := range s.Objectives {
			st, ok := rob.Scores[o.Score]
			if !ok {
				row = append(row, nan(5)...)
				continue
			}
			for _, v := range []float64{st.Mean, st.SD, st.P05, st.P50, st.P95} {
				row = append(row, formatFloat(v))
			}
		}
	} else {
		row = append(row, RobustNotScored, "0")
		row = append(row, nan(2+len(s.Checks)+5*len(s.Objectives))...)
	}
	est := RobustNominal
	if s.Robust() {
		est = RobustFirstOrder
	}
	row = append(row, est)
	for i, o := range s.Objectives {
		if o.Quantile != 0 {
			row = append(row, formatFloat(o.Natural(r.Design.F[i])))
		}
	}
	return row
}

// scoreFrontRobust runs the Monte Carlo of every front row on up to
// workers goroutines (0: all cores), reporting each finished design on
// progress (nil: silent).
func scoreFrontRobust(ctx context.Context, spec *problems.Spec, rows []FrontRow, s *objective.Scatter, workers int, progress io.Writer) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var next, done atomic.Int64
	var mu sync.Mutex
	var wg sync.WaitGroup
	for range max(1, min(workers, len(rows))) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(rows) {
					return
				}
				robustRow(ctx, spec, s, &rows[i])
				n := done.Add(1)
				if progress != nil {
					mu.Lock()
					fmt.Fprintf(progress, "scoring the front under scatter: %d of %d designs (%d Monte Carlo samples each)\n", n, len(rows), scatterSamples(s))
					mu.Unlock()
				}
			}
		})
	}
	wg.Wait()
}
