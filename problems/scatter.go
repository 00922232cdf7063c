package problems

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"plica/objective"
)

// scatterTopKeys are the top-level tables beyond topKeys that design and
// problem files both accept: [scatter] feeds plica check -robust and a
// robust search.
var scatterTopKeys = []string{"scatter"}

// scatterKeys are the keys of the [scatter] table.
var scatterKeys = []string{"modulus_pct", "wall_pct", "precurvature_pct", "stiffness_pct", "samples", "seed", "correlated"}

// scatterForm is the typed form of [scatter].
type scatterForm struct {
	Modulus      *num  `toml:"modulus_pct"`
	Wall         *num  `toml:"wall_pct"`
	Precurvature *num  `toml:"precurvature_pct"`
	Stiffness    *num  `toml:"stiffness_pct"`
	Samples      *int  `toml:"samples"`
	Seed         *int  `toml:"seed"`
	Correlated   *bool `toml:"correlated"`
}

// readScatter reads the optional [scatter] table (nil when absent) and
// attaches the relative standard errors of the calibration files the
// bellows name.
func readScatter(root *table) *objective.Scatter {
	if !root.has("scatter") {
		return nil
	}
	t := root.sub("scatter")
	s := &objective.Scatter{}
	pct := func(k, what string, dst *float64) {
		exp := fmt.Sprintf("one standard deviation of the %s in %% of its nominal value, from 0 to %.4g", what, objective.MaxScatterPct)
		x, ok := t.number(k, exp, false)
		if !ok {
			return
		}
		if x < 0 || x > objective.MaxScatterPct {
			t.r.errorf(t.key(k), "%s is out of range (expected %s)", fmtNum(x), exp)
			return
		}
		*dst = x
	}
	pct("modulus_pct", "Young's modulus", &s.ModulusPct)
	pct("wall_pct", "wall thickness", &s.WallPct)
	pct("precurvature_pct", "pre-curvature", &s.PrecurvaturePct)
	pct("stiffness_pct", "measured EI and GJ", &s.StiffnessPct)
	if t.has("samples") {
		s.Samples = t.whole("samples", fmt.Sprintf("a whole number of Monte Carlo samples from 1 to %d", objective.MaxScatterSamples), 1)
		if s.Samples > objective.MaxScatterSamples {
			v, _ := t.get("samples")
			t.r.errorf(t.key("samples"), "found %s (expected a whole number of Monte Carlo samples from 1 to %d)", describe(v), objective.MaxScatterSamples)
			s.Samples = 0
		}
	}
	if t.has("seed") {
		s.Seed = uint64(t.whole("seed", "a whole number >= 0", 0))
	}
	s.Correlated, _ = t.boolean("correlated")
	t.finish(scatterKeys)
	for path, se := range root.r.calSE {
		i, err := strconv.Atoi(strings.TrimSuffix(strings.TrimPrefix(path, "bellows["), "]"))
		if err != nil || i < 1 {
			continue
		}
		for len(s.CalibrationSE) < i {
			s.CalibrationSE = append(s.CalibrationSE, [2]float64{})
		}
		s.CalibrationSE[i-1] = se
	}
	return s
}

// recordCalibrationSE keeps the relative standard errors of the factors
// of a calibration file named by the bellows table at path.
func (r *reader) recordCalibrationSE(path string, c *Calibration) {
	if r.calSE == nil {
		r.calSE = map[string][2]float64{}
	}
	var se [2]float64
	for a := 0; a < 2; a++ {
		if f := c.Factor[a]; f.Value > 0 && !math.IsNaN(f.SE) {
			se[a] = f.SE / f.Value
		}
	}
	r.calSE[path] = se
}

// checkRobust reports quantile objectives and a min_pass_probability
// without a [scatter] that scatters anything: there would be no odds to
// put on them.
func (s *Spec) checkRobust(r *reader, root *table) {
	if s.Scatter.Active() {
		return
	}
	why := "no [scatter] table"
	if s.Scatter != nil {
		why = "[scatter] scatters nothing"
	}
	for i, o := range s.Objectives {
		if o.Quantile != 0 {
			r.errorf(fmt.Sprintf("objective[%d].quantile", i+1), "a quantile needs print scatter but the file has %s (expected a [scatter] table with modulus_pct, wall_pct, precurvature_pct or stiffness_pct > 0)", why)
		}
	}
	if s.MinPassProbability != 0 {
		r.errorf("requirements.min_pass_probability", "a pass probability needs print scatter but the file has %s (expected a [scatter] table with modulus_pct, wall_pct, precurvature_pct or stiffness_pct > 0)", why)
	}
}

// Robust reports whether the search scores candidates under scatter (a
// quantile objective or a min_pass_probability): each candidate then
// costs objective.FirstOrderEvaluations model evaluations.
func (s *Spec) Robust() bool {
	if !s.Scatter.Active() {
		return false
	}
	if s.MinPassProbability > 0 {
		return true
	}
	for _, o := range s.Objectives {
		if o.Quantile != 0 {
			return true
		}
	}
	return false
}

// ScatterSeeded is the problem's scatter with the seed the front's Monte
// Carlo draws from: the [scatter] seed when the file gives one, else the
// run's seed (nil when the problem has no active scatter).
func (s *Spec) ScatterSeeded(runSeed uint64) *objective.Scatter {
	if !s.Scatter.Active() {
		return nil
	}
	c := *s.Scatter
	if s.form.Scatter == nil || s.form.Scatter.Seed == nil {
		c.Seed = runSeed
	}
	return &c
}
