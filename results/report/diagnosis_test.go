package report

import (
	"testing"

	"github.com/stretchr/testify/assert"

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
}
