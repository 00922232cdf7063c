package search

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestSBXLimits checks bounded SBX (search/REFERENCE.md §2.7, reference code `realcross`) at values derived
// from its formulas: u = 0 gives β_q = 0, both children at the parents' mean; u → 1 gives
// β_q → β, the children at the bounds; with bounds far away α → 2 and the unbounded form of Deb
// and Agrawal (1995), β_q = (2u)^{1/(η+1)} for u ≤ 0.5 and (1/(2(1−u)))^{1/(η+1)} otherwise.
func TestSBXLimits(t *testing.T) {
	const eta = 15
	c1, c2 := sbx(0.2, 0.6, 0, 1, eta, 0)
	assert.InDelta(t, 0.4, c1, 1e-15, "sbx u=0: lower child at the mean")
	assert.InDelta(t, 0.4, c2, 1e-15, "sbx u=0: upper child at the mean")

	// u = 1 − 2⁻⁵³: the bounds are reached to within the rounding of u (derived: ~1e-10 here).
	c1, c2 = sbx(0.2, 0.6, 0, 1, eta, math.Nextafter(1, 0))
	assert.InDelta(t, 0, c1, 1e-9, "sbx u→1: lower child at the lower bound")
	assert.InDelta(t, 1, c2, 1e-9, "sbx u→1: upper child at the upper bound")

	for _, u := range []float64{0.05, 0.3, 0.5, 0.7, 0.95} {
		bq := math.Pow(2*u, 1.0/(eta+1))
		if u > 0.5 {
			bq = math.Pow(1/(2*(1-u)), 1.0/(eta+1))
		}
		y1, y2 := 1.0, 2.0
		c1, c2 := sbx(y1, y2, -1e6, 1e6, eta, u)
		assert.InDelta(t, 0.5*((y1+y2)-bq*(y2-y1)), c1, 1e-12, "unbounded limit, u=%g: lower child", u)
		assert.InDelta(t, 0.5*((y1+y2)+bq*(y2-y1)), c2, 1e-12, "unbounded limit, u=%g: upper child", u)
	}
}

// TestSBXStaysInBounds: the bounded form keeps children in [yl, yu] without clipping, since
// β_q ≤ β (derived); clipping only absorbs rounding.
func TestSBXStaysInBounds(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for range 10000 {
		lo := -5 + 10*rng.Float64()
		hi := lo + 10*rng.Float64() + 1e-9
		a, b := lo+(hi-lo)*rng.Float64(), lo+(hi-lo)*rng.Float64()
		if math.Abs(a-b) <= sbxEps {
			continue
		}
		y1, y2 := min(a, b), max(a, b)
		c1, c2 := sbx(y1, y2, lo, hi, 1+30*rng.Float64(), rng.Float64())
		require.True(t, c1 >= lo && c1 <= hi && c2 >= lo && c2 <= hi && c1 <= c2,
			"sbx(%g, %g, [%g, %g]) = %g, %g", y1, y2, lo, hi, c1, c2)
	}
}

// TestPolynomialMutationValues checks bounded polynomial mutation (search/REFERENCE.md §2.8, reference code
// `real_mutate_ind`) at values derived from its formulas.
func TestPolynomialMutationValues(t *testing.T) {
	const eta = 20
	cases := []struct {
		name         string
		y, u, want   float64
		tol          float64
		lower, upper float64
	}{
		// u = 0.5: val = 1, δq = 0.
		{"u=0.5 leaves y", 0.3, 0.5, 0.3, 0, 0, 1},
		// u → 0: val → (1 − δ1)^{η+1}, δq → −δ1, y → yl.
		{"u→0 reaches the lower bound", 0.3, 0, 0, 1e-15, 0, 1},
		// u → 1: δq → δ2, y → yu (to within the rounding of u = 1 − 2⁻⁵³, ~3e-7 here).
		{"u→1 reaches the upper bound", 0.3, math.Nextafter(1, 0), 1, 1e-6, 0, 1},
		// At y = yu (δ1 = 1) and u ≤ 0.5 the original form of Deb and Goyal (1996):
		// δ = (2u)^{1/(η+1)} − 1.
		{"original form at the upper bound", 2, 0.25, 2 + 2*(math.Pow(0.5, 1.0/21)-1), 1e-15, 0, 2},
		// At y = yl (δ2 = 1) and u > 0.5: δ = 1 − (2(1 − u))^{1/(η+1)}.
		{"original form at the lower bound", 0, 0.75, 2 * (1 - math.Pow(0.5, 1.0/21)), 1e-15, 0, 2},
	}
	for _, c := range cases {
		got := polynomialMutation(c.y, c.lower, c.upper, eta, c.u)
		assert.InDelta(t, c.want, got, c.tol, "%s: polynomialMutation(%g, [%g, %g], u=%g)", c.name, c.y, c.lower, c.upper, c.u)
	}
}

// TestPow: the operators' pow agrees with math.Pow to a few ulps (derived: same algorithm for
// the fractional part, exact squaring for whole exponents).
func TestPow(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 2))
	for range 10000 {
		x := rng.Float64() * 3
		for _, y := range []float64{16, 21, 1.0 / 16, 1.0 / 21, 0.5, 1.0 / 64, 1.0 / 3, 2.5} {
			want := math.Pow(x, y)
			assert.InEpsilon(t, want, pow(x, y), 1e-14, "pow(%g, %g)", x, y)
		}
	}
	assert.Equal(t, 0.0, pow(0, 1.0/16), "pow(0, 1/16)")
	assert.Equal(t, 1.0, pow(0, 0), "pow(0, 0)")
}

func TestCategoricalOperators(t *testing.T) {
	p := &Problem{Dim: 3, Lower: []float64{0, 0, 0}, Upper: []float64{1, 0, 0}, Categorical: []int{0, 4, 1}}
	v := Variation{CrossoverProbability: 1, MutationProbability: 1}.resolve(3)
	rng := rand.New(rand.NewPCG(3, 3))
	seen := map[float64]int{}
	for range 4000 {
		p1 := []float64{rng.Float64(), float64(rng.IntN(4)), 0}
		p2 := []float64{rng.Float64(), float64(rng.IntN(4)), 0}
		c1, c2 := make([]float64, 3), make([]float64, 3)
		crossover(rng, p, &v, p1, p2, c1, c2)
		// Uniform crossover: the children hold the parents' categories, swapped or not.
		require.True(t, (c1[1] == p1[1] && c2[1] == p2[1]) || (c1[1] == p2[1] && c2[1] == p1[1]),
			"crossover of categories %g, %g gave %g, %g", p1[1], p2[1], c1[1], c2[1])
		before := c1[1]
		mutate(rng, p, &v, c1)
		// Random reset with p_m = 1: always another category, in range.
		require.NotEqual(t, before, c1[1], "mutation of category %g", before)
		require.True(t, c1[1] >= 0 && c1[1] <= 3 && c1[1] == math.Trunc(c1[1]), "category %g", c1[1])
		require.Equal(t, 0.0, c1[2], "a one-category variable stays 0")
		seen[c1[1]-before]++
	}
	// Each of the other three categories is reachable.
	assert.Len(t, seen, 6, "category changes seen: %v", seen)
}

// TestLatinHypercube checks the defining property (McKay, Beckman and Conover, Technometrics
// 21(2), 1979): in each continuous column exactly one point per stratum.
func TestLatinHypercube(t *testing.T) {
	p := &Problem{Dim: 3, Lower: []float64{-1, 0, 0}, Upper: []float64{1, 10, 0}, Categorical: []int{0, 0, 3}}
	rng := rand.New(rand.NewPCG(4, 4))
	const n = 17
	rows := make([][]float64, n)
	for i := range rows {
		rows[i] = make([]float64, 3)
	}
	latinHypercube(rng, p, rows)
	for col := range 2 {
		hit := make([]int, n)
		for _, r := range rows {
			s := int((r[col] - p.Lower[col]) / (p.Upper[col] - p.Lower[col]) * n)
			require.True(t, s >= 0 && s < n, "column %d value %g out of the box", col, r[col])
			hit[s]++
		}
		for s, h := range hit {
			assert.Equal(t, 1, h, "column %d stratum %d", col, s)
		}
	}
	for _, r := range rows {
		assert.True(t, r[2] >= 0 && r[2] <= 2 && r[2] == math.Trunc(r[2]), "category %g", r[2])
	}
}

// TestOperatorsMatchReference: the operators of a run (operators.go) give the same children as
// the plain forms (operators_ref_test.go), bit for bit, and leave the generator in the same
// state, for default and other distribution indices (whole, power-of-two-root and general
// exponents), with continuous, categorical and fixed variables, parents at and between the
// bounds, and probabilities that disable an operator.
func TestOperatorsMatchReference(t *testing.T) {
	p := &Problem{Dim: 6, Lower: []float64{0, -3, 0, 2, 0, 1e-3}, Upper: []float64{1, 5, 0, 2, 0, 1e3}, Categorical: []int{0, 0, 4, 0, 1, 0}}
	cont := &Problem{Dim: 30, Lower: make([]float64, 30), Upper: make([]float64, 30)}
	for i := range cont.Upper {
		cont.Upper[i] = 1
	}
	variations := []Variation{
		{},
		{CrossoverEta: 20, MutationEta: 15},
		{CrossoverEta: 1, MutationEta: 3},
		{CrossoverEta: 2.5, MutationEta: 0.5},
		{CrossoverEta: 63, MutationEta: 63},
		{CrossoverProbability: -1, MutationProbability: 1},
		{CrossoverProbability: 1, MutationProbability: -1},
	}
	for _, prob := range []*Problem{p, cont} {
		for vi, v := range variations {
			v = v.resolve(prob.Dim)
			ops := newOperators(prob, &v)
			seed := uint64(10 + vi)
			pb := rand.NewPCG(seed, 1)
			ra, rb := rand.New(rand.NewPCG(seed, 1)), rand.New(pb)
			pick := rand.New(rand.NewPCG(seed, 2))
			point := func() []float64 {
				x := make([]float64, prob.Dim)
				for i := range x {
					lo, hi := prob.Lower[i], prob.Upper[i]
					switch k := prob.categories(i); {
					case k > 0:
						x[i] = float64(pick.IntN(k))
					case pick.IntN(8) == 0:
						x[i] = lo
					case pick.IntN(8) == 0:
						x[i] = hi
					default:
						x[i] = lo + (hi-lo)*pick.Float64()
					}
				}
				return x
			}
			for n := range 3000 {
				p1, p2 := point(), point()
				if n%10 == 0 {
					copy(p2, p1) // equal parents: no SBX
				}
				a1, a2 := make([]float64, prob.Dim), make([]float64, prob.Dim)
				b1, b2 := make([]float64, prob.Dim), make([]float64, prob.Dim)
				crossover(ra, prob, &v, p1, p2, a1, a2)
				ops.crossover(pb, p1, p2, b1, b2)
				mutate(ra, prob, &v, a1)
				ops.mutate(rb, pb, b1)
				for i := range a1 {
					require.Equal(t, math.Float64bits(a1[i]), math.Float64bits(b1[i]), "variation %d, pair %d, child 1 variable %d: %v vs %v", vi, n, i, a1[i], b1[i])
					require.Equal(t, math.Float64bits(a2[i]), math.Float64bits(b2[i]), "variation %d, pair %d, child 2 variable %d", vi, n, i)
				}
				require.Equal(t, ra.Uint64(), rb.Uint64(), "variation %d, pair %d: generators in step", vi, n)
			}
		}
	}
	// The plans against the plain pow, over the exponents the operators take.
	rng := rand.New(rand.NewPCG(5, 5))
	for _, y := range []float64{16, 21, 2, 64, 65, 1.0 / 16, 1.0 / 21, 1.0 / 2, 1.0 / 64, 1.0 / 128, 1.0 / 3, 2.5, 0} {
		pl := newPowPlan(y)
		for _, x := range []float64{0, 1, 0.5, math.SmallestNonzeroFloat64, 3} {
			require.Equal(t, math.Float64bits(pow(x, y)), math.Float64bits(pl.pow(x)), "pow(%g, %g)", x, y)
		}
		for range 2000 {
			x := rng.Float64() * 3
			require.Equal(t, math.Float64bits(pow(x, y)), math.Float64bits(pl.pow(x)), "pow(%g, %g)", x, y)
		}
	}
}
