package problems

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"plica/objective"
	"plica/surrogate"
)

// PlanRow is one planned load of a cantilever bench test, in SI.
type PlanRow struct {
	Specimen   string
	Axis       int     // 0: direction x (EI_x, load along the bellows' own y), 1: y
	Load       float64 // tip load, N
	FreeLength float64 // m
	// Predicted is the nominal tip deflection along the load, m:
	// δ = P·L³/(3·EI) (Roark Table 8.1 case 1a; objective/REFERENCE.md §6).
	Predicted float64
	// Band is the 5 and 95 % quantiles of the prediction under print
	// scatter, m; both zero when the design gives no [scatter].
	Band [2]float64
}

// planFractions are the planned loads as fractions of the top load: a
// zero-load row (the gauge zero) and four equal steps.
var planFractions = []float64{0, 0.25, 0.5, 0.75, 1}

// planSteps are the top loads' leading digits, in grams-force: easy
// weights whose quarters are easy too.
var planSteps = []float64{1, 2, 4, 6, 8}

// TopLoad returns the largest planned tip load, N, for a cantilever of
// stiffness ei (N·m²) and free length l (m): the largest 1, 2, 4, 6 or
// 8 × 10ⁿ grams-force whose predicted deflection stays within the
// small-deflection range δ ≤ surrogate.SmallDeflectionLimit·L, i.e.
// P ≤ 3·EI·limit/L² (surrogate/REFERENCE.md §4.1).
func TopLoad(ei, l float64) float64 {
	maxG := 3 * ei * surrogate.SmallDeflectionLimit / (l * l) / (1e-3 * standardGravity)
	e := math.Pow(10, math.Floor(math.Log10(maxG)))
	top := e
	for _, s := range planSteps {
		if s*e <= maxG*(1+1e-12) {
			top = s * e
		}
	}
	return top * 1e-3 * standardGravity
}

// PlanBench plans the bench test of one specimen in one direction: loads
// from 0 to TopLoad in four steps and the deflection predicted from the
// effective stiffness ei (N·m²: 1/(EI⁻¹)_aa, what the cantilever fit
// measures). samples, if any, are the same stiffness under print scatter
// and give the 5–95 % band.
func PlanBench(specimen string, axis int, ei, freeLength float64, samples []float64) []PlanRow {
	top := TopLoad(ei, freeLength)
	l3 := freeLength * freeLength * freeLength
	var rows []PlanRow
	for _, f := range planFractions {
		p := f * top
		r := PlanRow{Specimen: specimen, Axis: axis, Load: p, FreeLength: freeLength, Predicted: p * l3 / (3 * ei)}
		if len(samples) > 0 {
			d := make([]float64, len(samples))
			for k, e := range samples {
				d[k] = p * l3 / (3 * e)
			}
			sort.Float64s(d)
			r.Band = [2]float64{objective.Quantile(d, 0.05), objective.Quantile(d, 0.95)}
		}
		rows = append(rows, r)
	}
	return rows
}

// EffectiveEI returns 1/(EI⁻¹)_aa of a bending stiffness tensor (N·m²):
// the stiffness a tip load along the other own axis reads on the bench.
func EffectiveEI(ei [2][2]float64, axis int) float64 {
	det := ei[0][0]*ei[1][1] - ei[0][1]*ei[1][0]
	return det / ei[1-axis][1-axis]
}

// WriteBenchPlan writes the plan as a bench CSV that LoadBench reads:
// loads in grams-force, the deflection_mm column empty to fill in, the
// predictions in extra columns (with the band when banded). comments are
// written first as # lines.
func WriteBenchPlan(w io.Writer, comments []string, rows []PlanRow, banded bool) error {
	var b strings.Builder
	for _, c := range comments {
		fmt.Fprintf(&b, "# %s\n", c)
	}
	b.WriteString("specimen,direction,free_length_mm,load_g,deflection_mm,predicted_deflection_mm")
	if banded {
		b.WriteString(",predicted_p5_mm,predicted_p95_mm")
	}
	b.WriteString("\n")
	for _, r := range rows {
		fmt.Fprintf(&b, "%s,%s,%.6g,%.6g,,%.6g", r.Specimen, AxisName(r.Axis), r.FreeLength/mm, r.Load/(1e-3*standardGravity), r.Predicted/mm)
		if banded {
			fmt.Fprintf(&b, ",%.6g,%.6g", r.Band[0]/mm, r.Band[1]/mm)
		}
		b.WriteString("\n")
	}
	_, err := io.WriteString(w, b.String())
	return err
}
