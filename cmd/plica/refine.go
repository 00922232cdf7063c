package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"plica/problems"
	"plica/results"
	"plica/search"
)

func init() {
	register(&command{
		name:  "refine",
		usage: "RUN -design ID [-evals N]",
		short: "polish one front design with Nelder-Mead and write it beside the front",
		long: `Minimises an achievement function whose reference point is the design's own
objectives (each weighted by the front's range), with the constraints as a
penalty, inside the problem's bounds. Categorical choices stay as they are.
Writes designs/refined-ID.toml and prints the objectives before and after.`,
		run: runRefine,
	})
}

func runRefine(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	id := fs.Int("design", 0, "front design `ID` (the id column of front.csv)")
	evals := fs.Int64("evals", 400, "evaluation budget")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("refine: expected one run folder, got %d arguments", len(pos))
	}
	if *id < 1 {
		return usagef("refine: -design: expected a front design id >= 1")
	}
	if *evals < 1 {
		return usagef("-evals: %d is out of range (expected an evaluation budget >= 1)", *evals)
	}
	folder, err := results.Open(pos[0])
	if err != nil {
		return usagef("%v", err)
	}
	// refine reads front.csv and writes designs/refined-NNN.toml into the
	// run folder, which a live search rewrites: it holds the folder's lock
	// as search, resume and merge do.
	if err := folder.Lock(); err != nil {
		return err
	}
	defer folder.Unlock()
	if n := folder.LockNote(); n != "" {
		fmt.Fprintf(stderr, "plica: note: %s\n", n)
	}
	spec, err := problems.LoadProblem(folder.Path(results.ProblemFile))
	if err != nil {
		return err
	}
	x0, err := folder.FrontX(spec, *id)
	if err != nil {
		return usagef("%v", err)
	}
	p := spec.SearchProblem()
	f0 := make([]float64, p.NumObjectives)
	g0 := make([]float64, p.NumConstraints)
	if err := p.Evaluate(ctx, 0, x0, f0, g0); err != nil {
		return fmt.Errorf("design %d no longer evaluates: %v", *id, err)
	}
	// Categorical variables are held: their bounds collapse to the value.
	for j := range x0 {
		if p.Categorical[j] > 0 {
			p.Categorical[j] = 0
			p.Lower[j], p.Upper[j] = x0[j], x0[j]
		}
	}
	weights := frontWeights(folder, spec, len(f0))
	sc := search.Scalarization{Kind: search.Achievement, Weights: weights, Reference: f0}
	set := spec.Settings()
	set.MaxEvaluations = *evals
	set.Workers = 1
	res, err := search.Refine(ctx, p, x0, sc, &set)
	if err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	best := res.Population[0]
	name := fmt.Sprintf("%s/refined-%03d.toml", results.DesignsDir, *id)
	text, err := spec.DesignTOML(best.X, fmt.Sprintf("plica design %d of %s, refined by Nelder-Mead (%d evaluations, %s).\n%s", *id, folder.Dir, res.Evaluations, res.Status, results.Caution))
	if err != nil {
		return err
	}
	if err := folder.WriteFile(name, text); err != nil {
		return err
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "objective\tfront design\trefined")
	for i, o := range spec.Objectives {
		fmt.Fprintf(tw, "%s\t%.6g\t%.6g\n", o.Score, o.Natural(f0[i]), o.Natural(best.F[i]))
	}
	tw.Flush()
	fmt.Fprintf(stdout, "feasible: %v -> %v; %d evaluations (%s)\nwrote %s\n", cvOf(g0) == 0, best.Feasible(), res.Evaluations, res.Status, folder.Path(name))
	return nil
}

func cvOf(g []float64) float64 {
	cv := 0.0
	for _, v := range g {
		cv += math.Max(0, v)
	}
	return cv
}

// frontWeights weights each objective by 1/(range over the front), so the
// achievement function compares objectives of different units fairly.
func frontWeights(folder *results.Folder, spec *problems.Spec, m int) []float64 {
	header, rows, err := folder.ReadCSV(results.FrontFile)
	w := make([]float64, m)
	for i := range w {
		w[i] = 1
	}
	if err != nil || len(rows) < 2 {
		return w
	}
	for i, o := range spec.Objectives {
		col := -1
		for k, h := range header {
			if h == o.Score {
				col = k
			}
		}
		if col < 0 {
			continue
		}
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, r := range rows {
			var v float64
			if _, err := fmt.Sscan(r[col], &v); err == nil {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
		if hi > lo {
			w[i] = 1 / (hi - lo)
		}
	}
	return w
}
