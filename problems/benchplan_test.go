package problems

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// TestTopLoad: the top load keeps the linear cantilever deflection
// δ = PL³/(3EI) (Roark, Formulas for Stress and Strain, Table 8.1 case 1a)
// within surrogate.SmallDeflectionLimit of the free length, and is at least
// half of the largest such load (the steps 1, 2, 4, 6, 8 are at most a
// factor 2 apart).
func TestTopLoad(t *testing.T) {
	for _, c := range []struct{ ei, l float64 }{{1, 0.1}, {0.05, 0.2}, {3e-3, 0.06}, {12, 0.35}} {
		p := TopLoad(c.ei, c.l)
		ratio := p * c.l * c.l * c.l / (3 * c.ei) / c.l
		assert.LessOrEqual(t, ratio, surrogate.SmallDeflectionLimit*(1+1e-12), "EI %g, L %g", c.ei, c.l)
		assert.GreaterOrEqual(t, ratio, surrogate.SmallDeflectionLimit/2, "EI %g, L %g", c.ei, c.l)
	}
	// worked example [derived by hand]: EI = 1 N·m², L = 100 mm: the limit is
	// P = 3·1·0.1/0.1² = 30 N = 3059 gf, so the top load is 2000 gf and its
	// deflection 2·9.80665·0.1³/3 m = 6.53777 mm.
	p := TopLoad(1, 0.1)
	assert.InDelta(t, 2000, p/(1e-3*standardGravity), 1e-9, "top load, gf")
	rows := PlanBench("bellows-1", 0, 1, 0.1, nil)
	require.Len(t, rows, 5)
	assert.InDelta(t, 6.53777e-3, rows[4].Predicted, 1e-8, "δ at 2000 gf")
	assert.Zero(t, rows[0].Load, "the first row is the gauge zero")
}

// TestBenchPlanRoundTrip: the written plan is read by LoadBench's parser
// (empty deflection_mm cells are rows not yet measured); filled in with
// the predicted deflections, the cantilever fit through the origin gives
// back the EI the plan was made for (δ = PL³/(3EI), Roark Table 8.1 case
// 1a, so the fit is exact up to the printed 6 digits).
func TestBenchPlanRoundTrip(t *testing.T) {
	eiX, eiY := 0.8, 0.35 // N·m², invented
	var rows []PlanRow
	samples := []float64{0.7, 0.75, 0.8, 0.85, 0.9}
	rows = append(rows, PlanBench("bellows-1", 0, eiX, 0.12, samples)...)
	rows = append(rows, PlanBench("bellows-1", 1, eiY, 0.12, samples)...)
	var buf bytes.Buffer
	require.NoError(t, WriteBenchPlan(&buf, []string{"plan, comment"}, rows, true))

	_, err := ParseBench(buf.Bytes(), "bench.csv")
	require.Error(t, err, "a plan with nothing measured has no measurements")
	assert.Contains(t, err.Error(), "bench.csv:3:5: deflection_mm: no measurements")

	// fill in the measured column with the predictions
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	for i, l := range lines {
		if i < 2 {
			continue
		}
		f := strings.Split(l, ",")
		f[4] = f[5]
		lines[i] = strings.Join(f, ",")
	}
	b, err := ParseBench([]byte(strings.Join(lines, "\n")), "bench.csv")
	require.NoError(t, err)
	require.Len(t, b.Rows, 10)
	assert.Equal(t, "load_g", b.LoadColumn)
	for axis, want := range []float64{eiX, eiY} {
		f, err := b.Fit(axis, TermOff, TermOff)
		require.NoError(t, err)
		assert.InEpsilon(t, want, f.Fit.EI, 1e-5, "direction %s: EI from the filled-in plan", AxisName(axis))
		assert.Empty(t, f.Warnings, "the planned loads stay in the small-deflection range")
	}
	// the band: the 5 and 95 % quantiles of δ = PL³/(3EI_k) over the samples
	// (Hyndman & Fan 1996 definition 7): at the top load of direction x the
	// sorted flexibilities 1/0.9 … 1/0.7 interpolate at h = 0.2 and 3.8.
	top := rows[4]
	c := top.Load * math.Pow(0.12, 3) / 3
	inv := []float64{1 / 0.9, 1 / 0.85, 1 / 0.8, 1 / 0.75, 1 / 0.7}
	assert.InEpsilon(t, c*(inv[0]+0.2*(inv[1]-inv[0])), top.Band[0], 1e-12, "5 %")
	assert.InEpsilon(t, c*(inv[3]+0.8*(inv[4]-inv[3])), top.Band[1], 1e-12, "95 %")
}

// TestEffectiveEI: for a tensor with a cross term the tip load along y
// reads 1/(EI⁻¹)_xx = det/EI_yy [derived: inverse of a 2×2 matrix].
func TestEffectiveEI(t *testing.T) {
	ei := [2][2]float64{{2, 0.5}, {0.5, 1}}
	assert.InDelta(t, 1.75, EffectiveEI(ei, 0), 1e-15)
	assert.InDelta(t, 0.875, EffectiveEI(ei, 1), 1e-15)
	assert.InDelta(t, 3, EffectiveEI([2][2]float64{{3, 0}, {0, 7}}, 0), 1e-15, "diagonal: EI_x itself")
}
