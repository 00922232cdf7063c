package search

// The plain forms of the variation operators, as they were before the per-run precomputation of
// operators.go: each takes the problem and the Variation and works everything out per call.
// The tests of the operators' published properties run on these, and
// TestOperatorsMatchReference checks that the operators of a run draw the same random numbers
// and give the same values, bit for bit.

import (
	"math"
	"math/rand/v2"
)

// crossover writes two children of parents p1 and p2 into c1 and c2 (Deb's reference code
// `realcross`: with probability p_c per pair; each continuous variable with probability 0.5
// undergoes bounded SBX, the children's values then swapped with probability 0.5). A categorical
// variable is swapped between the children with probability 0.5 (uniform crossover).
func crossover(rng *rand.Rand, p *Problem, v *Variation, p1, p2, c1, c2 []float64) {
	copy(c1, p1)
	copy(c2, p2)
	if v.CrossoverProbability < 0 || rng.Float64() > v.CrossoverProbability {
		return
	}
	for i := range c1 {
		if p.categories(i) > 0 {
			if rng.Float64() <= 0.5 {
				c1[i], c2[i] = p2[i], p1[i]
			}
			continue
		}
		if rng.Float64() > 0.5 || math.Abs(p1[i]-p2[i]) <= sbxEps {
			continue
		}
		y1, y2 := min(p1[i], p2[i]), max(p1[i], p2[i])
		a, b := sbx(y1, y2, p.Lower[i], p.Upper[i], v.CrossoverEta, rng.Float64())
		if rng.Float64() <= 0.5 {
			c1[i], c2[i] = b, a
		} else {
			c1[i], c2[i] = a, b
		}
	}
}

// sbx is bounded simulated binary crossover of one variable with parents y1 < y2 in [yl, yu],
// distribution index eta and uniform number u (Deb and Agrawal, Complex Systems 9(2), 1995; bounded
// form of Deb's NSGA-II reference code `realcross`, search/REFERENCE.md §2.7). It returns the lower and
// upper child, clipped to the bounds.
func sbx(y1, y2, yl, yu, eta, u float64) (c1, c2 float64) {
	d := y2 - y1
	e := 1 / (eta + 1)
	beta := 1 + 2*(y1-yl)/d
	alpha := 2 - 1/pow(beta, eta+1)
	c1 = 0.5 * ((y1 + y2) - sbxBetaQ(u, alpha, e)*d)
	beta = 1 + 2*(yu-y2)/d
	alpha = 2 - 1/pow(beta, eta+1)
	c2 = 0.5 * ((y1 + y2) + sbxBetaQ(u, alpha, e)*d)
	return min(max(c1, yl), yu), min(max(c2, yl), yu)
}

// sbxBetaQ is the spread factor β_q of bounded SBX for uniform number u.
func sbxBetaQ(u, alpha, e float64) float64 {
	if u <= 1/alpha {
		return pow(u*alpha, e)
	}
	return pow(1/(2-u*alpha), e)
}

// pow is x^y for x ≥ 0, faster than math.Pow for the operators' exponents: by repeated squaring
// when y is a small whole number (η + 1 for integer η), by repeated square roots when 1/y is a
// power of two up to 64, else as exp(y ln x). It agrees with math.Pow to a few ulps.
func pow(x, y float64) float64 {
	if n := int(y); float64(n) == y && n >= 0 && n <= 64 {
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
		return math.Pow(x, y)
	}
	// Roots of order 2, 4, …, 64 (1/(η_c + 1) for the default η_c = 15) by square roots.
	if y > 0 && y <= 0.5 {
		if k := 1 / y; k == math.Trunc(k) && k <= 64 && int(k)&(int(k)-1) == 0 {
			for ; k > 1; k /= 2 {
				x = math.Sqrt(x)
			}
			return x
		}
	}
	return math.Exp(y * math.Log(x))
}

// mutate applies polynomial mutation to each continuous variable of x with probability p_m
// (Deb's reference code `real_mutate_ind`), and random-reset mutation to each categorical
// variable with the same probability: the category is replaced by one of the other k−1
// categories, chosen uniformly.
func mutate(rng *rand.Rand, p *Problem, v *Variation, x []float64) {
	if v.MutationProbability < 0 {
		return
	}
	for i := range x {
		if rng.Float64() > v.MutationProbability {
			continue
		}
		if k := p.categories(i); k > 0 {
			if k > 1 {
				c := rng.IntN(k - 1)
				if c >= int(x[i]) {
					c++
				}
				x[i] = float64(c)
			}
			continue
		}
		if lo, hi := p.Lower[i], p.Upper[i]; hi > lo {
			x[i] = polynomialMutation(x[i], lo, hi, v.MutationEta, rng.Float64())
		}
	}
}

// polynomialMutation mutates y in [yl, yu] (yl < yu) with distribution index eta and uniform
// number u: the bounded "highly disruptive" form of Deb and Goyal (1996) in Deb's NSGA-II
// reference code `real_mutate_ind` (search/REFERENCE.md §2.8). The result is clipped to the bounds.
func polynomialMutation(y, yl, yu, eta, u float64) float64 {
	d1 := (y - yl) / (yu - yl)
	d2 := (yu - y) / (yu - yl)
	e := 1 / (eta + 1)
	var dq float64
	if u <= 0.5 {
		val := 2*u + (1-2*u)*pow(1-d1, eta+1)
		dq = pow(val, e) - 1
	} else {
		val := 2*(1-u) + 2*(u-0.5)*pow(1-d2, eta+1)
		dq = 1 - pow(val, e)
	}
	y += dq * (yu - yl)
	return min(max(y, yl), yu)
}
