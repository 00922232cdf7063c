package report

import (
	"fmt"
	"sort"
	"strings"

	"plica/results"
)

// diagnosisLines turns a run's diagnosis (run.json) into report lines: one
// per blocking constraint, the variables at a bound and the least
// infeasible design.
func diagnosisLines(d *results.Diagnosis) []string {
	if d == nil {
		return nil
	}
	first := fmt.Sprintf("Diagnosis: %d feasible of %d evaluations.", d.Feasible, d.Evaluations)
	if d.SinceEvaluation > 0 {
		first = fmt.Sprintf("Diagnosis: %d feasible of the %d evaluations after evaluation %d (the run was resumed from a checkpoint without diagnosis counters).",
			d.Feasible, d.Evaluations, d.SinceEvaluation)
	}
	out := []string{first}
	for _, s := range d.Sentences {
		out = append(out, "Diagnosis: "+s+".")
	}
	for _, s := range d.Explanations {
		out = append(out, "Diagnosis: "+s+".")
	}
	if len(d.AtBound) > 0 {
		out = append(out, "Diagnosis: the least-infeasible designs hold "+strings.Join(d.AtBound, ", ")+"; widening those ranges may help.")
	}
	if len(d.LeastInfeasible) > 0 {
		l := d.LeastInfeasible[0]
		var m []string
		for _, k := range sortedKeys(l.Margins) {
			if l.Margins[k] > 0 {
				m = append(m, fmt.Sprintf("%s %.4g", k, l.Margins[k]))
			}
		}
		line := fmt.Sprintf("Diagnosis: the least-infeasible design is evaluation %d of %s; it violates %s", l.Evaluation, results.EvaluationsFile, strings.Join(m, ", "))
		if l.DesignFile != "" {
			line += fmt.Sprintf("; it and the next closest are design files (%s/design-1.toml to design-%d.toml) that plica check accepts", results.ClosestDir, len(d.LeastInfeasible))
		}
		out = append(out, line+".")
	}
	return out
}

// frontLimitLines turns run.json's front limits into report lines, one
// per objective: what limits the front design best in it.
func frontLimitLines(ls []results.FrontLimit) []string {
	var out []string
	for _, l := range ls {
		out = append(out, l.Sentence+".")
	}
	return out
}

func sortedKeys(m map[string]float64) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}
