package search

import (
	"math"
	"math/rand/v2"
)

// Variation holds the parameters of the variation operators of NSGA2 and GA. The zero value gives
// plica's defaults (search/REFERENCE.md §2.9): p_c = 0.9, η_c = 15, p_m = 1/n, η_m = 20; Deb et al. (2002)
// used η_c = 20, equally good on the ZDT problems.
type Variation struct {
	// CrossoverProbability is the probability that a pair of parents is recombined; otherwise
	// the children are copies of the parents. Zero means 0.9; a negative value disables
	// crossover.
	CrossoverProbability float64

	// CrossoverEta is the distribution index η_c of simulated binary crossover. Zero means 15.
	CrossoverEta float64

	// MutationProbability is the probability that each variable of a child is mutated. Zero
	// means 1/Dim; a negative value disables mutation.
	MutationProbability float64

	// MutationEta is the distribution index η_m of polynomial mutation. Zero means 20.
	MutationEta float64
}

// resolve returns v with defaults applied for a problem of dimension n.
func (v Variation) resolve(n int) Variation {
	if v.CrossoverProbability == 0 {
		v.CrossoverProbability = 0.9
	}
	if v.CrossoverEta == 0 {
		v.CrossoverEta = 15
	}
	if v.MutationProbability == 0 {
		v.MutationProbability = 1 / float64(n)
	}
	if v.MutationEta == 0 {
		v.MutationEta = 20
	}
	return v
}

// sbxEps is the smallest parent difference for which SBX is applied to a variable (reference
// code `realcross`, EPS = 1e-14).
const sbxEps = 1e-14

// operators are the variation operators of a run, with everything that does not change during
// the run worked out once: the bounds and category counts of the variables, 1/(η + 1), and how
// each power is taken. They draw the same random numbers in the same order and compute the same
// values, bit for bit, as the plain forms kept beside the tests (operators_ref_test.go, checked
// by TestOperatorsMatchReference); they are only faster (search/REFERENCE.md §2.15).
type operators struct {
	pc, pm   float64   // crossover and mutation probabilities (< 0: off)
	lo, hi   []float64 // bounds
	cat      []int     // categories per variable (0: continuous)
	anyCat   bool
	hasBound []bool  // hi > lo: polynomial mutation applies
	cPow     powPlan // x^(η_c + 1)
	cRoot    powPlan // x^(1/(η_c + 1))
	mPow     powPlan // x^(η_m + 1)
	mRoot    powPlan // x^(1/(η_m + 1))
}

// newOperators prepares the operators of v (defaults resolved) for p.
func newOperators(p *Problem, v *Variation) *operators {
	o := &operators{pc: v.CrossoverProbability, pm: v.MutationProbability,
		lo: p.Lower, hi: p.Upper, cat: make([]int, p.Dim), hasBound: make([]bool, p.Dim)}
	for i := range p.Dim {
		o.cat[i] = p.categories(i)
		o.anyCat = o.anyCat || o.cat[i] > 0
		o.hasBound[i] = p.Upper[i] > p.Lower[i]
	}
	o.cPow, o.cRoot = newPowPlan(v.CrossoverEta+1), newPowPlan(1/(v.CrossoverEta+1))
	o.mPow, o.mRoot = newPowPlan(v.MutationEta+1), newPowPlan(1/(v.MutationEta+1))
	return o
}

// crossover writes two children of parents p1 and p2 into c1 and c2 (Deb's reference code
// `realcross`: with probability p_c per pair; each continuous variable with probability 0.5
// undergoes bounded SBX, the children's values then swapped with probability 0.5). A categorical
// variable is swapped between the children with probability 0.5 (uniform crossover).
func (o *operators) crossover(src *rand.PCG, p1, p2, c1, c2 []float64) {
	copy(c1, p1)
	copy(c2, p2)
	if o.pc < 0 || uniform(src) > o.pc {
		return
	}
	p1, p2, c2 = p1[:len(c1)], p2[:len(c1)], c2[:len(c1)]
	for i := range c1 {
		if o.anyCat && o.cat[i] > 0 {
			if uniform(src) <= 0.5 {
				c1[i], c2[i] = p2[i], p1[i]
			}
			continue
		}
		if uniform(src) > 0.5 || math.Abs(p1[i]-p2[i]) <= sbxEps {
			continue
		}
		y1, y2 := min(p1[i], p2[i]), max(p1[i], p2[i])
		a, b := o.sbx(y1, y2, o.lo[i], o.hi[i], uniform(src))
		if uniform(src) <= 0.5 {
			c1[i], c2[i] = b, a
		} else {
			c1[i], c2[i] = a, b
		}
	}
}

// sbx is bounded simulated binary crossover of one variable with parents y1 < y2 in [yl, yu]
// and uniform number u (Deb and Agrawal, Complex Systems 9(2), 1995; bounded form of Deb's
// NSGA-II reference code `realcross`, search/REFERENCE.md §2.7). It returns the lower and upper
// child, clipped to the bounds.
func (o *operators) sbx(y1, y2, yl, yu, u float64) (c1, c2 float64) {
	d := y2 - y1
	beta1 := 1 + 2*(y1-yl)/d
	alpha1 := 2 - 1/o.cPow.pow(beta1)
	beta2 := 1 + 2*(yu-y2)/d
	alpha2 := 2 - 1/o.cPow.pow(beta2)
	var bq1, bq2 float64
	if o.cRoot.roots > 0 {
		// Both spread factors at once: the two chains of square roots overlap.
		x1, x2 := sbxBetaQBase(u, alpha1), sbxBetaQBase(u, alpha2)
		for range o.cRoot.roots {
			x1, x2 = math.Sqrt(x1), math.Sqrt(x2)
		}
		bq1, bq2 = x1, x2
	} else {
		bq1, bq2 = o.cRoot.pow(sbxBetaQBase(u, alpha1)), o.cRoot.pow(sbxBetaQBase(u, alpha2))
	}
	c1 = 0.5 * ((y1 + y2) - bq1*d)
	c2 = 0.5 * ((y1 + y2) + bq2*d)
	return min(max(c1, yl), yu), min(max(c2, yl), yu)
}

// sbxBetaQBase is the number whose 1/(η_c + 1)-th power is the spread factor β_q of bounded SBX
// for uniform number u. It is never −0, so that taking the power by square roots gives what
// powPlan.pow gives (+0 for 0).
func sbxBetaQBase(u, alpha float64) float64 {
	if u <= 1/alpha {
		return u*alpha + 0
	}
	return 1 / (2 - u*alpha)
}

// mutate applies polynomial mutation to each continuous variable of x with probability p_m
// (Deb's reference code `real_mutate_ind`), and random-reset mutation to each categorical
// variable with the same probability: the category is replaced by one of the other k−1
// categories, chosen uniformly.
func (o *operators) mutate(rng *rand.Rand, src *rand.PCG, x []float64) {
	if o.pm < 0 {
		return
	}
	cat, lo, hi, ok := o.cat[:len(x)], o.lo[:len(x)], o.hi[:len(x)], o.hasBound[:len(x)]
	for i := range x {
		if uniform(src) > o.pm {
			continue
		}
		if k := cat[i]; k > 0 {
			if k > 1 {
				c := rng.IntN(k - 1)
				if c >= int(x[i]) {
					c++
				}
				x[i] = float64(c)
			}
			continue
		}
		if ok[i] {
			x[i] = o.polynomialMutation(x[i], lo[i], hi[i], uniform(src))
		}
	}
}

// polynomialMutation mutates y in [yl, yu] (yl < yu) with uniform number u: the bounded "highly
// disruptive" form of Deb and Goyal (1996) in Deb's NSGA-II reference code `real_mutate_ind`
// (search/REFERENCE.md §2.8). The result is clipped to the bounds.
func (o *operators) polynomialMutation(y, yl, yu, u float64) float64 {
	d1 := (y - yl) / (yu - yl)
	d2 := (yu - y) / (yu - yl)
	var dq float64
	if u <= 0.5 {
		val := 2*u + (1-2*u)*o.mPow.pow(1-d1)
		dq = o.mRoot.pow(val) - 1
	} else {
		val := 2*(1-u) + 2*(u-0.5)*o.mPow.pow(1-d2)
		dq = 1 - o.mRoot.pow(val)
	}
	y += dq * (yu - yl)
	return min(max(y, yl), yu)
}

// uniform is rand.Rand.Float64 of a Rand on src, drawn from src directly (no call through the
// Source interface): float64(src.Uint64()<<11>>11) / 2^53, the formula of math/rand/v2; the
// operators take their other draws (IntN) from rng on the same src, so the stream is the same.
func uniform(src *rand.PCG) float64 { return float64(src.Uint64()<<11>>11) / (1 << 53) }

// powPlan is x^y for x ≥ 0 and a fixed y, the way of taking it chosen once: by repeated
// squaring when y is a small whole number (η + 1 for integer η), by repeated square roots when
// 1/y is a power of two up to 64 (1/(η_c + 1) for the default η_c = 15), else as exp(y ln x).
// It agrees with math.Pow to a few ulps (TestPow).
type powPlan struct {
	y     float64
	n     int // ≥ 0: y = n, by squaring
	roots int // > 0: y = 2^−roots, by square roots
}

func newPowPlan(y float64) powPlan {
	pl := powPlan{y: y, n: -1}
	if n := int(y); float64(n) == y && n >= 0 && n <= 64 {
		pl.n = n
		return pl
	}
	if y > 0 && y <= 0.5 {
		if k := 1 / y; k == math.Trunc(k) && k <= 64 && int(k)&(int(k)-1) == 0 {
			for ; k > 1; k /= 2 {
				pl.roots++
			}
		}
	}
	return pl
}

// pow is x^y.
func (pl *powPlan) pow(x float64) float64 {
	if n := pl.n; n >= 0 {
		r := 1.0
		for b := x; n > 0; n >>= 1 {
			if n&1 == 1 {
				r *= b
			}
			b *= b
		}
		return r
	}
	if x == 0 {
		return math.Pow(x, pl.y)
	}
	if pl.roots > 0 {
		for range pl.roots {
			x = math.Sqrt(x)
		}
		return x
	}
	return math.Exp(pl.y * math.Log(x))
}

// latinHypercube fills rows with a Latin hypercube sample of the box of p: for each continuous
// variable, one point in each of len(rows) equal strata, the strata permuted at random (McKay,
// Beckman and Conover, Technometrics 21(2), 1979). Categorical variables are drawn uniformly.
func latinHypercube(rng *rand.Rand, p *Problem, rows [][]float64) {
	n := len(rows)
	perm := make([]int, n)
	for i := range p.Dim {
		if k := p.categories(i); k > 0 {
			for _, r := range rows {
				r[i] = float64(rng.IntN(k))
			}
			continue
		}
		for j := range perm {
			perm[j] = j
		}
		rng.Shuffle(n, func(a, b int) { perm[a], perm[b] = perm[b], perm[a] })
		lo, hi := p.Lower[i], p.Upper[i]
		for j, r := range rows {
			t := (float64(perm[j]) + rng.Float64()) / float64(n)
			r[i] = min(max(lo+(hi-lo)*t, lo), hi)
		}
	}
}
