package report

import (
	"context"
	"html"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/results"
)

// TestDiagnosisLines: no diagnosis, no lines; a diagnosis gives its count,
// one line per sentence, the variables at a bound and only the violated
// margins of the least-infeasible design.
func TestDiagnosisLines(t *testing.T) {
	assert.Nil(t, diagnosisLines(nil))
	d := &results.Diagnosis{Evaluations: 100, Sentences: []string{"task_miss is violated by 100 % of the evaluations"},
		AtBound:         []string{"bellows1_wall_mm at its upper bound"},
		LeastInfeasible: []results.DiagnosedDesign{{Evaluation: 7, Violation: 3, Margins: map[string]float64{"task_miss": 3, "reach": -0.2}}}}
	lines := diagnosisLines(d)
	assert.Equal(t, []string{
		"Diagnosis: 0 feasible of 100 evaluations.",
		"Diagnosis: task_miss is violated by 100 % of the evaluations.",
		"Diagnosis: the least-infeasible designs hold bellows1_wall_mm at its upper bound; widening those ranges may help.",
		"Diagnosis: the least-infeasible design is evaluation 7 of evaluations.csv; it violates task_miss 3.",
	}, lines)

	// with design files, the last line names them
	d.LeastInfeasible = append(d.LeastInfeasible, results.DiagnosedDesign{Evaluation: 9, Violation: 4})
	d.LeastInfeasible[0].DesignFile = results.ClosestFileName(1)
	lines = diagnosisLines(d)
	assert.Equal(t, "Diagnosis: the least-infeasible design is evaluation 7 of evaluations.csv; it violates task_miss 3; it and the next closest are design files (closest/design-1.toml to design-2.toml) that plica check accepts.", lines[len(lines)-1])

	// after a resume from an old checkpoint, the first line says what it covers
	d.SinceEvaluation = 40
	assert.Equal(t, "Diagnosis: 0 feasible of the 100 evaluations after evaluation 40 (the run was resumed from a checkpoint without diagnosis counters).", diagnosisLines(d)[0])
}

// TestReportFrontLimits: the report shows run.json's front limits, one
// line per objective, after the chosen designs and before the problem
// summary; a run without a front has none.
func TestReportFrontLimits(t *testing.T) {
	f := fixtureRun(t, 36)
	info, err := f.ReadInfo()
	require.NoError(t, err)
	require.NotEmpty(t, info.FrontLimits, "a search with a front writes front_limits")
	assert.Len(t, info.FrontLimits, 2, "one per objective")
	rep, err := Build(context.Background(), f, Options{})
	require.NoError(t, err)
	page := string(rep.HTML)
	require.True(t, findID(parseReport(t, rep.HTML), "front-limits"), "front limits block")
	for _, l := range info.FrontLimits {
		assert.Contains(t, page, html.EscapeString(l.Sentence)+".")
	}
	assert.Less(t, strings.Index(page, `id="chosen-table"`), strings.Index(page, `id="front-limits"`), "after the chosen designs")
	assert.Less(t, strings.Index(page, `id="front-limits"`), strings.Index(page, `id="summary"`), "before the summary")

	empty := fixtureRun(t, 36, impossibleSag)
	rep, err = Build(context.Background(), empty, Options{})
	require.NoError(t, err)
	assert.False(t, findID(parseReport(t, rep.HTML), "front-limits"), "no front, no front limits")
}
