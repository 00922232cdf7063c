package objective

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"sync"
)

// Scatter is the print scatter of a design: one standard deviation of each
// quantity in percent of its nominal value, drawn from a normal
// distribution truncated at ±TruncationSD standard deviations
// (objective/REFERENCE.md §9.1).
type Scatter struct {
	ModulusPct      float64 // Young's moduli of a bellows with geometry
	WallPct         float64 // wall thickness of a bellows with geometry
	PrecurvaturePct float64 // both pre-curvature components
	StiffnessPct    float64 // EI and GJ together, measured bellows
	// Samples is the Monte Carlo sample count (DefaultScatterSamples when 0).
	Samples int
	// Seed fixes the random numbers: sample k of a seed is the same draw
	// whatever the worker count (common random numbers).
	Seed uint64
	// Correlated draws one factor per quantity for all bellows; otherwise
	// every bellows draws its own.
	Correlated bool
	// CalibrationSE is, per bellows and own bending axis, the relative
	// standard error of its calibration factor (SE/c; 0: not calibrated).
	// A calibrated axis scatters its EI by this error instead of by
	// ModulusPct.
	CalibrationSE [][2]float64
}

// TruncationSD is where the scatter distribution is cut, in standard
// deviations.
const TruncationSD = 3

// DefaultScatterSamples is the Monte Carlo sample count when a [scatter]
// table gives none.
const DefaultScatterSamples = 1000

// MaxScatterPct is the largest standard deviation accepted, percent: a
// draw at −TruncationSD standard deviations must leave the quantity
// positive.
const MaxScatterPct = 100.0 / TruncationSD

// MaxScatterSamples is the largest Monte Carlo sample count accepted.
const MaxScatterSamples = 1000000

// Active reports whether any quantity scatters.
func (s *Scatter) Active() bool {
	if s == nil {
		return false
	}
	if s.ModulusPct > 0 || s.WallPct > 0 || s.PrecurvaturePct > 0 || s.StiffnessPct > 0 {
		return true
	}
	for _, c := range s.CalibrationSE {
		if c[0] > 0 || c[1] > 0 {
			return true
		}
	}
	return false
}

// quantities per bellows, in draw order.
const (
	qModulus = iota
	qWall
	qPrecurvature
	qStiffness
	qCalX
	qCalY
	nQuantities
)

// sd returns the relative standard deviation of quantity q of bellows i
// of d (0 when the quantity does not apply to that bellows).
func (s *Scatter) sd(d *Design, i, q int) float64 {
	b := d.Bellows[i]
	var cal [2]float64
	if i < len(s.CalibrationSE) && b.Model != nil {
		for a := 0; a < 2; a++ {
			if b.Model.Calibration[a] != 0 {
				cal[a] = s.CalibrationSE[i][a]
			}
		}
	}
	switch q {
	case qModulus:
		if b.Model == nil || (cal[0] > 0 && cal[1] > 0) {
			return 0
		}
		return s.ModulusPct / 100
	case qWall:
		if b.Model == nil {
			return 0
		}
		return s.WallPct / 100
	case qPrecurvature:
		return s.PrecurvaturePct / 100
	case qStiffness:
		if b.Measured == nil {
			return 0
		}
		return s.StiffnessPct / 100
	case qCalX, qCalY:
		return cal[q-qCalX]
	}
	return 0
}

// scatterVar is one scattered quantity: bellows (−1: all, correlated)
// and quantity.
type scatterVar struct {
	bellows, q int
	sd         float64
}

// vars lists the quantities that scatter, in draw order.
func (s *Scatter) vars(d *Design) []scatterVar {
	var out []scatterVar
	for q := 0; q < nQuantities; q++ {
		if s.Correlated && q <= qStiffness {
			// one factor for all bellows; the sd is the same wherever it applies
			for i := range d.Bellows {
				if sd := s.sd(d, i, q); sd > 0 {
					out = append(out, scatterVar{-1, q, sd})
					break
				}
			}
			continue
		}
		for i := range d.Bellows {
			if sd := s.sd(d, i, q); sd > 0 {
				out = append(out, scatterVar{i, q, sd})
			}
		}
	}
	return out
}

// perturbed returns a copy of d with every scattered quantity multiplied
// by 1 + sd·z (z: one standardised value per variable).
func perturbed(d *Design, vars []scatterVar, z []float64) *Design {
	out := &Design{Name: d.Name, Fidelity: d.Fidelity, Bellows: make([]Bellows, len(d.Bellows))}
	copy(out.Bellows, d.Bellows)
	for i := range out.Bellows {
		if m := out.Bellows[i].Model; m != nil {
			c := *m
			out.Bellows[i].Model = &c
		}
		if m := out.Bellows[i].Measured; m != nil {
			c := *m
			out.Bellows[i].Measured = &c
		}
	}
	for k, v := range vars {
		f := 1 + v.sd*z[k]
		for i := range out.Bellows {
			if v.bellows >= 0 && v.bellows != i {
				continue
			}
			b := &out.Bellows[i]
			switch v.q {
			case qModulus:
				if b.Model != nil {
					b.Model.Material.ModulusAcross *= f
					b.Model.Material.ModulusInLayer *= f
				}
			case qWall:
				if b.Model != nil {
					b.Model.Wall *= f
				}
			case qPrecurvature:
				b.Precurvature[0] *= f
				b.Precurvature[1] *= f
			case qStiffness:
				if b.Measured != nil {
					b.Measured.EI[0] *= f
					b.Measured.EI[1] *= f
					b.Measured.GJ *= f
				}
			case qCalX, qCalY:
				if b.Model != nil {
					b.Model.Calibration[v.q-qCalX] *= f
				}
			}
		}
	}
	return out
}

// splitmix64 is the SplitMix64 generator (Steele, Lea & Flood, "Fast
// splittable pseudorandom number generators", 2014): a counter-based
// stream, so sample k's numbers depend on the seed and k only.
func splitmix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// uniform returns the j-th uniform number in (0, 1) of sample k.
func uniform(seed uint64, k, j int) float64 {
	h := splitmix64(seed ^ splitmix64(uint64(k)<<20^uint64(j)))
	return (float64(h>>11) + 0.5) / (1 << 53)
}

// NormalCDF is Φ, the standard normal distribution function.
func NormalCDF(x float64) float64 { return 0.5 * math.Erfc(-x/math.Sqrt2) }

// NormalQuantile is Φ⁻¹.
func NormalQuantile(p float64) float64 { return math.Sqrt2 * math.Erfinv(2*p-1) }

// TruncatedNormal maps a uniform u in (0, 1) to a standard normal value
// truncated at ±TruncationSD by inverting the truncated distribution
// function exactly: z = Φ⁻¹(Φ(−c) + u·(Φ(c) − Φ(−c))).
func TruncatedNormal(u float64) float64 {
	lo := NormalCDF(-TruncationSD)
	hi := NormalCDF(TruncationSD)
	return NormalQuantile(lo + u*(hi-lo))
}

// TruncatedNormalSD is the standard deviation of the standard normal
// truncated at ±c: sqrt(1 − 2c·φ(c)/(Φ(c) − Φ(−c))) (objective/REFERENCE.md §9.1).
func TruncatedNormalSD(c float64) float64 {
	phi := math.Exp(-c*c/2) / math.Sqrt(2*math.Pi)
	return math.Sqrt(1 - 2*c*phi/(NormalCDF(c)-NormalCDF(-c)))
}

// sampleZ fills z with the standardised draws of sample k.
func sampleZ(seed uint64, k int, z []float64) {
	for j := range z {
		z[j] = TruncatedNormal(uniform(seed, k, j))
	}
}

// ScoreStats are the statistics of one score over the samples, in the
// score's file unit.
type ScoreStats struct {
	Mean, SD, P05, P50, P95 float64
}

// RobustCheck is the pass probability of one check.
type RobustCheck struct {
	Name            string
	PassProbability float64
	// SE is the standard error of the probability: the binomial
	// sqrt(p(1−p)/n) for Monte Carlo; NaN for the first-order estimate.
	SE   float64
	Warn bool
	// Value and SD are, for the first-order estimate, the nominal check
	// value and its first-order standard deviation (0 for Monte Carlo).
	Value, SD float64
}

// Robust is the outcome of a design under scatter.
type Robust struct {
	// Method is "monte-carlo" or "first-order".
	Method  string
	Samples int // model evaluations behind the numbers
	// PassProbability is the probability that every check that fails a
	// design (not the warn-only ones) passes.
	PassProbability float64
	PassSE          float64
	Checks          []RobustCheck
	Scores          map[string]ScoreStats
	// Failed counts the samples the model could not evaluate (out of its
	// range or non-finite): they count as failing every check and are left
	// out of the score statistics.
	Failed int
	// Reasons holds the first few distinct reasons of those failures.
	Reasons []string
}

// MonteCarlo evaluates Samples scattered copies of d through
// EvaluateContext and reports pass probabilities and score statistics.
// The draws depend on the seed and the sample index only, so the result
// is the same for any worker count (workers < 1: one).
func MonteCarlo(ctx context.Context, d *Design, sc *Scenario, s *Scatter, workers int) (*Robust, error) {
	return MonteCarloProgress(ctx, d, sc, s, workers, nil)
}

// MonteCarloProgress is MonteCarlo reporting, from one goroutine, how
// many samples have been handed out (stage "scatter samples").
func MonteCarloProgress(ctx context.Context, d *Design, sc *Scenario, s *Scatter, workers int, progress func(Progress)) (*Robust, error) {
	n := s.Samples
	if n <= 0 {
		n = DefaultScatterSamples
	}
	vars := s.vars(d)
	results := make([]*Result, n)
	errs := make([]error, n)
	if workers < 1 {
		workers = 1
	}
	var wg sync.WaitGroup
	next := make(chan int)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			z := make([]float64, len(vars))
			for k := range next {
				sampleZ(s.Seed, k, z)
				results[k], errs[k] = EvaluateContext(ctx, perturbed(d, vars, z), sc)
			}
		}()
	}
	for k := 0; k < n; k++ {
		if ctx != nil && ctx.Err() != nil {
			break
		}
		next <- k
		if progress != nil {
			progress(Progress{Stage: "scatter samples", Done: k, Total: n})
		}
	}
	close(next)
	wg.Wait()
	if ctx != nil && ctx.Err() != nil {
		return nil, ctx.Err()
	}
	for _, err := range errs {
		var ie *InternalError
		if errors.As(err, &ie) {
			return nil, err
		}
	}
	return summarise(d, sc, results, errs), nil
}

func summarise(d *Design, sc *Scenario, results []*Result, errs []error) *Robust {
	n := len(results)
	list := CheckList(d, sc)
	r := &Robust{Method: "monte-carlo", Samples: n, Scores: map[string]ScoreStats{}}
	passCount := make([]int, len(list))
	all := 0
	values := map[string][]float64{}
	seen := map[string]bool{}
	for k, res := range results {
		if errs[k] != nil || res == nil {
			r.Failed++
			if msg := fmt.Sprint(errs[k]); !seen[msg] && len(r.Reasons) < 3 {
				seen[msg] = true
				r.Reasons = append(r.Reasons, msg)
			}
			continue
		}
		ok := true
		for i, c := range list {
			if i < len(res.Checks) && res.Checks[i].Name == c.Name && res.Checks[i].Pass {
				passCount[i]++
			} else if !c.Warn {
				ok = false
			}
		}
		if ok {
			all++
		}
		for _, s := range scoreList {
			if v := s.Value(&res.Scores); isFinite(v) {
				values[s.Name] = append(values[s.Name], v)
			}
		}
	}
	for i, c := range list {
		p := float64(passCount[i]) / float64(n)
		r.Checks = append(r.Checks, RobustCheck{Name: c.Name, PassProbability: p, SE: ProportionSE(p, n), Warn: c.Warn})
	}
	r.PassProbability = float64(all) / float64(n)
	r.PassSE = ProportionSE(r.PassProbability, n)
	for name, v := range values {
		r.Scores[name] = Stats(v)
	}
	return r
}

// ProportionSE is the standard error of a proportion p estimated from n
// independent samples, sqrt(p(1−p)/n) (binomial distribution).
func ProportionSE(p float64, n int) float64 {
	if n <= 0 {
		return math.NaN()
	}
	return math.Sqrt(p * (1 - p) / float64(n))
}

// Stats returns the mean, sample standard deviation and the 5th, 50th and
// 95th percentiles of v (Quantile).
func Stats(v []float64) ScoreStats {
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	var mean float64
	for _, x := range s {
		mean += x
	}
	mean /= float64(len(s))
	var ss float64
	for _, x := range s {
		ss += (x - mean) * (x - mean)
	}
	sd := 0.0
	if len(s) > 1 {
		sd = math.Sqrt(ss / float64(len(s)-1))
	}
	return ScoreStats{Mean: mean, SD: sd, P05: Quantile(s, 0.05), P50: Quantile(s, 0.5), P95: Quantile(s, 0.95)}
}

// Quantile is the p-quantile of sorted values by linear interpolation
// between order statistics at h = (n−1)p (Hyndman & Fan, "Sample
// quantiles in statistical packages", 1996, definition 7).
func Quantile(sorted []float64, p float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := float64(n-1) * p
	lo := int(math.Floor(h))
	if lo >= n-1 {
		return sorted[n-1]
	}
	return sorted[lo] + (h-float64(lo))*(sorted[lo+1]-sorted[lo])
}

// FirstOrder estimates the same numbers from the nominal evaluation and
// one forward finite difference per scattered variable (first-order
// second-moment method, objective/REFERENCE.md §9.4): 1 + (number of
// variables) evaluations. Each score is taken as normal with mean the
// nominal value and variance Σ (∂score/∂z_j · σ_T)², σ_T the standard
// deviation of the truncated standard normal; a check's pass probability
// is Φ of its margin over that standard deviation. All-pass takes the
// worst check (a lower bound would need the correlations).
func FirstOrder(ctx context.Context, d *Design, sc *Scenario, s *Scatter) (*Robust, error) {
	_, r, err := FirstOrderNominal(ctx, d, sc, s)
	return r, err
}

// FirstOrderNominal is FirstOrder that also returns the nominal
// evaluation it starts from (what a search needs for its other
// constraints); Robust.Checks carry the nominal value and first-order
// standard deviation of every check.
func FirstOrderNominal(ctx context.Context, d *Design, sc *Scenario, s *Scatter) (*Result, *Robust, error) {
	vars := s.vars(d)
	nom, err := EvaluateContext(ctx, d, sc)
	if err != nil {
		return nil, nil, err
	}
	st := TruncatedNormalSD(TruncationSD)
	scoreVar := map[string]float64{}
	checkVar := make([]float64, len(nom.Checks))
	z := make([]float64, len(vars))
	const step = 1.0 // one standard deviation: the scale the scatter acts on
	for j := range vars {
		for k := range z {
			z[k] = 0
		}
		z[j] = step
		res, err := EvaluateContext(ctx, perturbed(d, vars, z), sc)
		if err != nil {
			var ie *InternalError
			if errors.As(err, &ie) || (ctx != nil && ctx.Err() != nil) {
				return nil, nil, err
			}
			// a step out of the model's range: fall back to a backward step
			z[j] = -step
			if res, err = EvaluateContext(ctx, perturbed(d, vars, z), sc); err != nil {
				return nil, nil, err
			}
		}
		h := z[j]
		for _, sco := range scoreList {
			a, b := sco.Value(&nom.Scores), sco.Value(&res.Scores)
			if isFinite(a) && isFinite(b) {
				g := (b - a) / h * st
				scoreVar[sco.Name] += g * g
			}
		}
		for i := range nom.Checks {
			if i < len(res.Checks) {
				g := (res.Checks[i].Value - nom.Checks[i].Value) / h * st
				checkVar[i] += g * g
			}
		}
	}
	r := &Robust{Method: "first-order", Samples: 1 + len(vars), Scores: map[string]ScoreStats{}, PassProbability: 1, PassSE: math.NaN()}
	for _, sco := range scoreList {
		m := sco.Value(&nom.Scores)
		if !isFinite(m) {
			continue
		}
		sd := math.Sqrt(scoreVar[sco.Name])
		q := func(p float64) float64 { return m + sd*NormalQuantile(p) }
		r.Scores[sco.Name] = ScoreStats{Mean: m, SD: sd, P05: q(0.05), P50: m, P95: q(0.95)}
	}
	for i, c := range nom.Checks {
		sd := math.Sqrt(checkVar[i])
		margin := c.Limit - c.Value
		if !c.Max {
			margin = -margin
		}
		var p float64
		switch {
		case sd > 0:
			p = NormalCDF(margin / sd)
		case c.Pass:
			p = 1
		}
		r.Checks = append(r.Checks, RobustCheck{Name: c.Name, PassProbability: p, SE: math.NaN(), Warn: c.Warn, Value: c.Value, SD: sd})
		if !c.Warn && p < r.PassProbability {
			r.PassProbability = p
		}
	}
	return nom, r, nil
}

// FirstOrderEvaluations is the number of model evaluations FirstOrder
// makes for d under s: the nominal one and one per scattered variable
// (a backward step, when a forward one leaves the model's range, adds
// one).
func FirstOrderEvaluations(d *Design, s *Scatter) int { return 1 + len(s.vars(d)) }

// StiffnessSamples computes the sections of every bellows for each of the
// s.Samples scattered copies of d (DefaultScatterSamples when 0), with the
// same draws as MonteCarlo (sample k depends on the seed and k only). A
// copy whose section cannot be computed is left out. progress, if not
// nil, is called after each sample.
func StiffnessSamples(ctx context.Context, d *Design, s *Scatter, progress func(Progress)) ([][]Stiffness, error) {
	n := s.Samples
	if n <= 0 {
		n = DefaultScatterSamples
	}
	vars := s.vars(d)
	z := make([]float64, len(vars))
	out := make([][]Stiffness, 0, n)
	for k := 0; k < n; k++ {
		if ctx != nil && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		sampleZ(s.Seed, k, z)
		st, err := perturbed(d, vars, z).Stiffness()
		if progress != nil {
			progress(Progress{Stage: "scatter samples", Done: k + 1, Total: n})
		}
		if err != nil {
			continue
		}
		out = append(out, st)
	}
	return out, nil
}
