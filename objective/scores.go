package objective

import (
	"fmt"
	"math"
	"sort"
)

// Score names a score in file units, for objectives, constraints and
// outputs.
type Score struct {
	Name  string // with its unit, e.g. "tip_sag_mm"
	Doc   string
	Value func(*Scores) float64 // in the unit of the name
}

var scoreList = []Score{
	{"tip_sag_mm", "worst tip sag under self-weight and payload over the workspace (exact rod model)", func(s *Scores) float64 { return s.TipSag * mmPerM }},
	{"tip_sag_linear_mm", "small-load linear estimate of the tip sag at the same configuration", func(s *Scores) float64 { return s.TipSagLinear * mmPerM }},
	{"reach_mm", "largest lateral distance of the tip from the base axis", func(s *Scores) float64 { return s.Reach * mmPerM }},
	{"bend_angle_range_deg", "range of the tip angle from the base axis over the workspace", func(s *Scores) float64 { return s.BendAngleRange * degPerR }},
	{"bend_angle_min_deg", "smallest angle of the tip tangent from the base axis", func(s *Scores) float64 { return s.BendAngleMin * degPerR }},
	{"bend_angle_max_deg", "largest angle of the tip tangent from the base axis", func(s *Scores) float64 { return s.BendAngleMax * degPerR }},
	{"surface_area_mm2", "area of the tip surface (two actuation parameters)", func(s *Scores) float64 { return s.SurfaceArea * 1e6 }},
	{"volume_mm3", "voxel volume of the tip point cloud (three or more actuation parameters)", func(s *Scores) float64 { return s.Volume * 1e9 }},
	{"task_coverage", "fraction of task points reached", func(s *Scores) float64 { return s.TaskCoverage }},
	{"task_miss_mm", "largest miss of a task point beyond its tolerance, loaded shape (an angular miss counts as the arc arm length × angle)", func(s *Scores) float64 { return s.TaskMiss * mmPerM }},
	{"residual_curvature_per_m", "largest nested-section curvature at the straightest configuration", func(s *Scores) float64 { return s.ResidualCurvature }},
	{"straight_tip_offset_mm", "tip lateral offset at the straightest configuration", func(s *Scores) float64 { return s.StraightTipOffset * mmPerM }},
	{"straight_tip_angle_deg", "angle of the tip tangent from the base axis at the straightest configuration", func(s *Scores) float64 { return s.StraightTipAngle * degPerR }},
	{"curvature_min_per_m", "smallest nested-section curvature over the workspace", func(s *Scores) float64 { return s.CurvatureMin }},
	{"curvature_max_per_m", "largest nested-section curvature over the workspace", func(s *Scores) float64 { return s.CurvatureMax }},
	{"peak_strain", "largest meridional wall strain over the workspace", func(s *Scores) float64 { return s.PeakStrain }},
	{"allowable_strain", "smallest allowable strain over the bellows, after the safety factor", func(s *Scores) float64 { return s.AllowableStrain }},
	{"strain_ratio", "largest peak strain over allowable strain of a bellows (worst bellows)", func(s *Scores) float64 { return s.StrainRatio }},
	{"stability_margin", "smallest snap margin 1 − L/L_crit over neighbouring pairs", func(s *Scores) float64 { return s.StabilityMargin }},
	{"mass_g", "mass of the bellows", func(s *Scores) float64 { return s.Mass * 1e3 }},
	{"payload_to_weight", "payload mass divided by the bellows mass", func(s *Scores) float64 { return s.PayloadToWeight }},
	{"min_clearance_mm", "smallest radial clearance between neighbouring bellows", func(s *Scores) float64 { return s.MinClearance * mmPerM }},
}

// LookupScore finds a score by its name.
func LookupScore(name string) (Score, bool) {
	for _, s := range scoreList {
		if s.Name == name {
			return s, true
		}
	}
	return Score{}, false
}

// ScoreNames lists every score name, sorted.
func ScoreNames() []string {
	out := make([]string, len(scoreList))
	for i, s := range scoreList {
		out[i] = s.Name
	}
	sort.Strings(out)
	return out
}

// AllScores lists the scores in their documented order.
func AllScores() []Score { return append([]Score(nil), scoreList...) }

// CheckNames lists the names of the checks Evaluate produces for designs of
// this shape in this scenario, in order. The list depends on the scenario
// and on which bellows have geometry, not on the values, so a search can
// give every check a fixed constraint slot.
func CheckNames(d *Design, sc *Scenario) []string {
	list := CheckList(d, sc)
	names := make([]string, len(list))
	for i, c := range list {
		names[i] = c.Name
	}
	return names
}

// CheckList is CheckNames with each check's unit, limit and direction
// (values zero).
func CheckList(d *Design, sc *Scenario) []Check {
	if sc == nil {
		sc = &Scenario{}
	}
	e := &evaluator{d: d, sc: sc}
	res := &Result{}
	res.Scores.StrainPerBellows = make([]float64, len(d.Bellows))
	e.checks(res)
	for i := range res.Checks {
		res.Checks[i].Value, res.Checks[i].Pass = 0, false
	}
	return res.Checks
}

// UnitSuffix turns a unit into the suffix of a key or column name:
// "mm" → "_mm", "1/m" → "_per_m", "" → "".
func UnitSuffix(unit string) string {
	switch unit {
	case "":
		return ""
	case "1/m":
		return "_per_m"
	}
	return "_" + unit
}

// finiteScores is the last guard of an evaluation: every score and check
// value is finite, except the scores documented as NaN when the model
// cannot give them (the wall strain of bellows without a wall model, a
// clearance with an unknown diameter).
func finiteScores(d *Design, res *Result) error {
	sc := &res.Scores
	withWall := 0
	for i, b := range d.Bellows {
		if b.Model == nil {
			continue
		}
		withWall++
		if !isFinite(sc.StrainPerBellows[i]) {
			return nonFinite(fmt.Sprintf("the peak wall strain of bellows %d", i+1))
		}
	}
	for _, s := range scoreList {
		v := s.Value(sc)
		switch s.Name {
		case "peak_strain", "allowable_strain", "strain_ratio":
			if withWall == 0 && math.IsNaN(v) {
				continue
			}
		case "min_clearance_mm":
			if math.IsNaN(v) {
				continue
			}
		}
		if !isFinite(v) {
			return nonFinite("the score " + s.Name)
		}
	}
	for _, c := range res.Checks {
		if !isFinite(c.Value) {
			return nonFinite("the value of check " + c.Name)
		}
	}
	return nil
}
