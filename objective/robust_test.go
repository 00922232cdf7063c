package objective

import (
	"context"
	"math"
	"sort"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"
)

// truncP is the distribution function of the standard normal truncated
// at ±c, by its definition (Φ(x) − Φ(−c))/(Φ(c) − Φ(−c)), with gonum's
// normal distribution as the independent Φ.
func truncP(x, c float64) float64 {
	n := distuv.UnitNormal
	return (n.CDF(x) - n.CDF(-c)) / (n.CDF(c) - n.CDF(-c))
}

// truncQ is its inverse, through gonum's normal quantile.
func truncQ(p, c float64) float64 {
	n := distuv.UnitNormal
	return n.Quantile(n.CDF(-c) + p*(n.CDF(c)-n.CDF(-c)))
}

// TestTruncatedNormal: the sampler inverts the truncated distribution
// function exactly (checked against gonum's normal distribution), never
// leaves ±3 sd, and its standard deviation is the closed form
// sqrt(1 − 2cφ(c)/(Φ(c) − Φ(−c))) for a symmetric truncation (Johnson,
// Kotz & Balakrishnan, Continuous Univariate Distributions, vol. 1, 2nd
// ed., 1994, chapter 13, section 10.1, moments of the doubly truncated
// normal; from memory), itself checked by quadrature of z²φ(z).
func TestTruncatedNormal(t *testing.T) {
	for _, u := range []float64{1e-12, 0.001, 0.05, 0.3, 0.5, 0.7, 0.95, 0.999, 1 - 1e-12} {
		z := TruncatedNormal(u)
		assert.InDelta(t, u, truncP(z, TruncationSD), 1e-9, "F(z) = u at u = %g", u)
		assert.LessOrEqual(t, math.Abs(z), float64(TruncationSD))
	}
	assert.InDelta(t, 0, TruncatedNormal(0.5), 1e-12)
	c := float64(TruncationSD)
	m2 := quad.Fixed(func(z float64) float64 { return z * z * distuv.UnitNormal.Prob(z) }, -c, c, 64, nil, 0) /
		(distuv.UnitNormal.CDF(c) - distuv.UnitNormal.CDF(-c))
	assert.InDelta(t, math.Sqrt(m2), TruncatedNormalSD(c), 1e-10, "closed form against quadrature")
	assert.InDelta(t, 0.98658, TruncatedNormalSD(3), 1e-4, "±3 sd truncation keeps about 98.7 % of the sd (from memory)")
	// the sample moments of the generator's own stream
	var s, ss float64
	const n = 200000
	for k := 0; k < n; k++ {
		z := TruncatedNormal(uniform(7, k, 0))
		s += z
		ss += z * z
	}
	sd := TruncatedNormalSD(c)
	assert.InDelta(t, 0, s/n, 4*sd/math.Sqrt(n), "mean 0 within 4 standard errors")
	assert.InDelta(t, sd*sd, ss/n, 0.01)
}

// TestProportionSE: the binomial standard error sqrt(p(1−p)/n) (common
// practice; any statistics text, e.g. the normal approximation to the
// binomial).
func TestProportionSE(t *testing.T) {
	assert.InDelta(t, 0.5/math.Sqrt(100), ProportionSE(0.5, 100), 1e-15)
	assert.Equal(t, 0.0, ProportionSE(1, 4000))
	assert.True(t, math.IsNaN(ProportionSE(0.5, 0)))
}

// TestQuantileDefinition7: linear interpolation between order statistics
// at h = (n−1)p (Hyndman & Fan, "Sample quantiles in statistical
// packages", The American Statistician 50(4), 1996, definition 7): for
// 1..5, p = 0.05 gives 1.2 and p = 0.95 gives 4.8.
func TestQuantileDefinition7(t *testing.T) {
	v := []float64{1, 2, 3, 4, 5}
	assert.InDelta(t, 1.2, Quantile(v, 0.05), 1e-12)
	assert.InDelta(t, 3, Quantile(v, 0.5), 1e-12)
	assert.InDelta(t, 4.8, Quantile(v, 0.95), 1e-12)
	st := Stats([]float64{2, 4, 4, 4, 5, 5, 7, 9})
	assert.InDelta(t, 5, st.Mean, 1e-12)
	assert.InDelta(t, math.Sqrt(32.0/7), st.SD, 1e-12, "sample sd with n − 1")
}

// straightCantilever is one straight measured bellows with a tip payload:
// its linear tip sag is δ = g(m_p L³/(3EI) + m' L⁴/(8EI)) (Roark's
// Formulas for Stress and Strain, 7th ed., Table 8.1, cases 1a and 2a),
// so with EI scaled by f the sag is δ₀/f.
func straightCantilever() (*Design, *Scenario) {
	d := &Design{Bellows: []Bellows{measuredBellows(0.3, 0, 0, 0.5, 20, 0.04)}}
	return d, &Scenario{Load: Load{PayloadMass: 0.02}}
}

// TestLinearCantileverQuantiles: with EI scattered by σ the linear sag is
// δ₀/(1 + σz), z truncated normal, so its p-quantile is δ₀/(1 + σ z₁₋ₚ)
// exactly; the Monte Carlo quantiles must match within their sampling
// error, and the mean of 1/f too.
func TestLinearCantileverQuantiles(t *testing.T) {
	d, sc := straightCantilever()
	nom, err := Evaluate(d, sc)
	require.NoError(t, err)
	const L, EI, mp, mpl = 0.3, 0.5, 0.02, 0.04
	d0 := StandardGravity * (mp*L*L*L/(3*EI) + mpl*L*L*L*L/(8*EI)) * 1e3
	require.InEpsilon(t, d0, nom.Scores.TipSagLinear*1e3, 1e-3, "the nominal sag is the handbook cantilever")
	const sigma = 0.1
	s := &Scatter{StiffnessPct: 100 * sigma, Samples: 2000, Seed: 3}
	r, err := MonteCarlo(context.Background(), d, sc, s, 2)
	require.NoError(t, err)
	st := r.Scores["tip_sag_linear_mm"]
	for _, c := range []struct {
		p, got float64
	}{{0.05, st.P05}, {0.5, st.P50}, {0.95, st.P95}} {
		want := d0 / (1 + sigma*truncQ(1-c.p, TruncationSD))
		assert.InEpsilon(t, want, c.got, 0.02, "p%02.0f of the sag", 100*c.p)
	}
	// E[1/(1+σz)] by quadrature over the truncated density
	c := float64(TruncationSD)
	norm := distuv.UnitNormal.CDF(c) - distuv.UnitNormal.CDF(-c)
	mean := d0 * quad.Fixed(func(z float64) float64 { return distuv.UnitNormal.Prob(z) / (1 + sigma*z) }, -c, c, 64, nil, 0) / norm
	assert.InEpsilon(t, mean, st.Mean, 0.01)
}

// TestCantileverPassProbability: the tip-sag check passes when the EI
// factor f is at least f*, the factor at which the sag meets its limit
// (found by bisection on the model), so P(pass) = 1 − F(( f* − 1)/σ) with F
// the truncated normal distribution (gonum). The Monte Carlo estimate
// must agree within 3 of its own binomial standard errors.
func TestCantileverPassProbability(t *testing.T) {
	d, sc := straightCantilever()
	nom, err := Evaluate(d, sc)
	require.NoError(t, err)
	sc.Requirements.MaxTipSag = nom.Scores.TipSag * 1.05
	const sigma = 0.08
	passAt := func(f float64) bool {
		dd := perturbed(d, []scatterVar{{0, qStiffness, 1}}, []float64{f - 1})
		res, err := Evaluate(dd, sc)
		require.NoError(t, err)
		return findCheck(res, "tip_sag").Pass
	}
	lo, hi := 0.8, 1.2
	require.False(t, passAt(lo))
	require.True(t, passAt(hi))
	for i := 0; i < 40; i++ {
		if m := (lo + hi) / 2; passAt(m) {
			hi = m
		} else {
			lo = m
		}
	}
	exact := 1 - truncP((hi-1)/sigma, TruncationSD)
	s := &Scatter{StiffnessPct: 100 * sigma, Samples: 1500, Seed: 11}
	r, err := MonteCarlo(context.Background(), d, sc, s, 2)
	require.NoError(t, err)
	var got RobustCheck
	for _, c := range r.Checks {
		if c.Name == "tip_sag" {
			got = c
		}
	}
	assert.InDelta(t, exact, got.PassProbability, 3*ProportionSE(exact, s.Samples), "P(tip_sag passes): exact %.4f", exact)
	assert.InDelta(t, got.SE, ProportionSE(got.PassProbability, s.Samples), 1e-15)
	assert.LessOrEqual(t, r.PassProbability, got.PassProbability)
}

// TestFirstOrderAgreesOnSmoothCase: on the cantilever with a small
// scatter the first-order estimate (objective/REFERENCE.md §9) of the
// sag's standard deviation is σ_T·σ·δ₀ to first order, and Monte Carlo
// agrees with it within a few per cent.
func TestFirstOrderAgreesOnSmoothCase(t *testing.T) {
	d, sc := straightCantilever()
	sc.Requirements.MaxTipSag = 0.0004
	s := &Scatter{StiffnessPct: 3, PrecurvaturePct: 0, Samples: 1500, Seed: 5}
	fo, err := FirstOrder(context.Background(), d, sc, s)
	require.NoError(t, err)
	assert.Equal(t, 2, fo.Samples, "nominal plus one difference")
	mc, err := MonteCarlo(context.Background(), d, sc, s, 2)
	require.NoError(t, err)
	a, b := fo.Scores["tip_sag_mm"], mc.Scores["tip_sag_mm"]
	assert.InEpsilon(t, b.Mean, a.Mean, 0.01)
	assert.InEpsilon(t, b.SD, a.SD, 0.06)
	assert.InEpsilon(t, b.P95, a.P95, 0.01)
	pf, pm := fo.Checks[0].PassProbability, mc.Checks[0].PassProbability
	assert.InDelta(t, pm, pf, 0.05, "P(tip_sag): first order %.3f, Monte Carlo %.3f", pf, pm)
}

// TestCommonRandomNumbers: the draws depend on the seed and the sample
// index only, so one and three workers give identical results, and a
// different seed a different one.
func TestCommonRandomNumbers(t *testing.T) {
	d := boomPair()
	sc := &Scenario{}
	s := &Scatter{StiffnessPct: 10, PrecurvaturePct: 5, Samples: 60, Seed: 9}
	a, err := MonteCarlo(context.Background(), d, sc, s, 1)
	require.NoError(t, err)
	b, err := MonteCarlo(context.Background(), d, sc, s, 3)
	require.NoError(t, err)
	assert.Equal(t, a, b)
	s.Seed = 10
	c, err := MonteCarlo(context.Background(), d, sc, s, 2)
	require.NoError(t, err)
	assert.NotEqual(t, a.Scores["tip_sag_mm"], c.Scores["tip_sag_mm"])
}

// TestCorrelatedScatter: correlated draws give both bellows one factor,
// so the sd of a score that adds the two bellows' effects is larger than
// with independent draws (variance of a sum of equal, fully correlated
// terms is twice that of independent ones, common practice).
func TestCorrelatedScatter(t *testing.T) {
	d := boomPair()
	sc := &Scenario{}
	ind := &Scatter{StiffnessPct: 10, Samples: 200, Seed: 1}
	cor := *ind
	cor.Correlated = true
	assert.Len(t, ind.vars(d), 2)
	assert.Len(t, cor.vars(d), 1)
	a, err := MonteCarlo(context.Background(), d, sc, ind, 2)
	require.NoError(t, err)
	b, err := MonteCarlo(context.Background(), d, sc, &cor, 2)
	require.NoError(t, err)
	assert.Greater(t, b.Scores["tip_sag_mm"].SD, a.Scores["tip_sag_mm"].SD)
}

// BenchmarkRobust reports the cost of the in-search first-order estimate
// and of a Monte Carlo sample, in nominal evaluations.
func BenchmarkRobust(b *testing.B) {
	d := boomPair()
	sc := &Scenario{}
	s := &Scatter{StiffnessPct: 10, PrecurvaturePct: 5, Samples: 50, Seed: 1}
	b.Run("first-order", func(b *testing.B) {
		var evals int
		for i := 0; i < b.N; i++ {
			r, err := FirstOrder(context.Background(), d, sc, s)
			if err != nil {
				b.Fatal(err)
			}
			evals = r.Samples
		}
		b.ReportMetric(float64(evals), "evaluations/op")
	})
	b.Run("monte-carlo-50", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if _, err := MonteCarlo(context.Background(), d, sc, s, 1); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(50, "evaluations/op")
	})
}

// TestFirstOrderNominalCheckSD: the chance constraint of a robust search
// reads each check's nominal value and first-order standard deviation. On
// the straight cantilever the sag is δ₀/f with f the EI factor (Roark's
// Formulas for Stress and Strain, 7th ed., Table 8.1, cases 1a and 2a), so
// the forward difference of one standard deviation is δ₀/(1 + σ) − δ₀ and
// the first-order sd is δ₀·σ/(1 + σ)·σ_T; the pass probability is Φ of the
// margin over it (gonum's unit normal).
func TestFirstOrderNominalCheckSD(t *testing.T) {
	d, sc := straightCantilever()
	nom0, err := Evaluate(d, sc)
	require.NoError(t, err)
	sc.Requirements.MaxTipSag = nom0.Scores.TipSag * 1.1
	const sigma = 0.05
	s := &Scatter{StiffnessPct: 100 * sigma}
	nom, r, err := FirstOrderNominal(context.Background(), d, sc, s)
	require.NoError(t, err)
	assert.Equal(t, 2, FirstOrderEvaluations(d, s))
	var c RobustCheck
	for _, x := range r.Checks {
		if x.Name == "tip_sag" {
			c = x
		}
	}
	d0 := findCheck(nom, "tip_sag").Value
	assert.Equal(t, d0, c.Value, "the nominal check value")
	want := d0 * sigma / (1 + sigma) * TruncatedNormalSD(TruncationSD)
	assert.InEpsilon(t, want, c.SD, 2e-3, "first-order sd of the sag (the large-deflection sag is nearly δ₀/f at this load)")
	limit := findCheck(nom, "tip_sag").Limit
	assert.InDelta(t, distuv.UnitNormal.CDF((limit-d0)/c.SD), c.PassProbability, 1e-12)
}

// TestStiffnessSamples: with measured stiffness scattered by σ the EI of
// each sample is EI·(1 + σz), so the 5 and 95 % quantiles of EI are those
// of the truncated normal (checked through gonum's normal quantile); the
// draws are the same on a second call (common random numbers).
func TestStiffnessSamples(t *testing.T) {
	d, _ := straightCantilever()
	const sigma = 0.1
	s := &Scatter{StiffnessPct: 100 * sigma, Samples: 2000, Seed: 5}
	a, err := StiffnessSamples(context.Background(), d, s, nil)
	require.NoError(t, err)
	b, err := StiffnessSamples(context.Background(), d, s, nil)
	require.NoError(t, err)
	require.Len(t, a, 2000)
	assert.Equal(t, a, b, "same seed, same draws")
	nom, err := d.Stiffness()
	require.NoError(t, err)
	ei := make([]float64, len(a))
	for k, st := range a {
		ei[k] = st[0].EI[0][0] / nom[0].EI[0][0]
	}
	sort.Float64s(ei)
	for _, p := range []float64{0.05, 0.95} {
		assert.InDelta(t, 1+sigma*truncQ(p, TruncationSD), Quantile(ei, p), 0.01, "p%02.0f of EI", 100*p) // about 2 standard errors of a sample quantile at n = 2000 (sqrt(p(1−p)/n)/density)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = StiffnessSamples(ctx, d, s, nil)
	assert.ErrorIs(t, err, context.Canceled)
}
