package problems

import (
	"math"

	"plica/objective"
)

var (
	loadKeys        = []string{"payload_g", "gravity_direction", "gravity_m_per_s2", "tip_force_n", "tip_moment_n_mm"}
	printerKeys     = []string{"process", "nozzle_mm", "line_width_mm", "layer_height_mm", "overhang_limit_deg", "min_wall_mm"}
	workspaceKeys   = []string{"relative_steps", "base_steps", "insertion_steps", "samples", "voxel_mm"}
	taskKeys        = []string{"position_mm", "tolerance_mm", "direction", "direction_tolerance_deg", "loaded"}
	requirementKeys = []string{"max_tip_sag_mm", "min_reach_mm", "min_bend_angle_range_deg",
		"max_residual_curvature_per_m", "max_straight_tip_offset_mm", "max_straight_tip_angle_deg", "strain_safety_factor",
		"min_stability_margin", "min_clearance_mm", "min_task_coverage", "max_mass_g", "min_payload_to_weight", "min_pass_probability",
		"within_validated_range"}
)

// readScenario reads the [load], [printer], [workspace], [[task_point]] and
// [requirements] tables.
func readScenario(root *table) objective.Scenario {
	var sc objective.Scenario
	readLoad(root.sub("load"), &sc.Load)
	readPrinter(root.sub("printer"), &sc.Printer)
	readWorkspace(root.sub("workspace"), &sc.Workspace)
	for _, t := range root.tables("task_point") {
		sc.Tasks = append(sc.Tasks, readTask(t))
	}
	readRequirements(root.sub("requirements"), &sc.Requirements)
	return sc
}

// maxPayloadGrams is the largest payload a scenario may carry (1 t): far
// beyond any bellows manipulator, far inside what the rod statics computes.
const maxPayloadGrams = 1e6

func readLoad(t *table, l *objective.Load) {
	if v, ok := t.positive("payload_g", "a mass in g", false, true); ok {
		if v > maxPayloadGrams {
			t.r.errorf(t.key("payload_g"), "%s is out of range (expected at most %.0f g)", fmtNum(v), float64(maxPayloadGrams))
		} else {
			l.PayloadMass = v * gram
		}
	}
	g := objective.StandardGravity
	if v, ok := t.positive("gravity_m_per_s2", "an acceleration in m/s² (0 switches gravity off)", false, true); ok {
		g = v
	}
	dir := [3]float64{0, -1, 0}
	if v, ok := t.numbers("gravity_direction", 3, "a direction [x, y, z] in the base frame", false); ok {
		n := math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2])
		if n == 0 {
			t.r.errorf(t.key("gravity_direction"), "[0, 0, 0] has no direction (expected a non-zero vector [x, y, z] in the base frame)")
		} else {
			dir = [3]float64{v[0] / n, v[1] / n, v[2] / n}
		}
	}
	if g == 0 {
		l.NoGravity = true
	} else {
		l.Gravity = [3]float64{g * dir[0], g * dir[1], g * dir[2]}
	}
	if v, ok := t.numbers("tip_force_n", 3, "a force [x, y, z] in N, base frame", false); ok {
		l.TipForce = [3]float64{v[0], v[1], v[2]}
	}
	if v, ok := t.numbers("tip_moment_n_mm", 3, "a moment [x, y, z] in N·mm, base frame", false); ok {
		l.TipMoment = [3]float64{v[0] * mm, v[1] * mm, v[2] * mm}
	}
	t.finish(loadKeys)
}

func readPrinter(t *table, p *objective.Printer) {
	t.enum("process", &p.Process, objective.ProcessNames())
	if v, ok := t.positive("nozzle_mm", "a nozzle diameter in mm", false, false); ok {
		p.Nozzle = v * mm
	}
	if v, ok := t.positive("line_width_mm", "a line width in mm", false, false); ok {
		p.LineWidth = v * mm
	}
	if v, ok := t.positive("layer_height_mm", "a layer height in mm", false, false); ok {
		p.LayerHeight = v * mm
	}
	if v, ok := t.number("overhang_limit_deg", "an angle from vertical in degrees, 0 < a < 90", false); ok {
		if v <= 0 || v >= 90 {
			t.r.errorf(t.key("overhang_limit_deg"), "%s is out of range (expected an angle from vertical in degrees, 0 < a < 90)", fmtNum(v))
		}
		p.OverhangLimit = v * deg
	}
	if v, ok := t.positive("min_wall_mm", "a wall thickness in mm", false, false); ok {
		p.MinWall = v * mm
	}
	t.finish(printerKeys)
}

func readWorkspace(t *table, w *objective.Workspace) {
	w.RelativeSteps = t.count("relative_steps", 4, objective.MaxRelativeSteps)
	w.BaseSteps = t.count("base_steps", 1, objective.MaxBaseSteps)
	w.InsertionSteps = t.count("insertion_steps", 2, objective.MaxInsertionSteps)
	w.Samples = t.count("samples", 16, objective.MaxSamples)
	if v, ok := t.positive("voxel_mm", "a voxel edge in mm", false, false); ok {
		w.VoxelSize = v * mm
	}
	t.finish(workspaceKeys)
}

func readTask(t *table) objective.TaskPoint {
	var p objective.TaskPoint
	if v, ok := t.numbers("position_mm", 3, "a position [x, y, z] in mm, base frame", true); ok {
		p.Position = [3]float64{v[0] * mm, v[1] * mm, v[2] * mm}
	}
	if v, ok := t.positive("tolerance_mm", "a distance in mm", false, false); ok {
		p.Tolerance = v * mm
	}
	if v, ok := t.numbers("direction", 3, "a tip direction [x, y, z], base frame", false); ok {
		n := math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2])
		if n == 0 {
			t.r.errorf(t.key("direction"), "[0, 0, 0] has no direction (expected a non-zero vector)")
		} else {
			p.Direction = [3]float64{v[0] / n, v[1] / n, v[2] / n}
		}
	}
	if v, ok := t.number("direction_tolerance_deg", "an angle in degrees, 0 < a <= 180", false); ok {
		if v <= 0 || v > 180 {
			t.r.errorf(t.key("direction_tolerance_deg"), "%s is out of range (expected an angle in degrees, 0 < a <= 180)", fmtNum(v))
		}
		if !t.has("direction") {
			t.r.errorf(t.key("direction_tolerance_deg"), "given without direction (expected direction = [x, y, z] as well)")
		}
		p.DirectionTolerance = v * deg
	}
	if v, ok := t.boolean("loaded"); ok {
		p.Unloaded = !v
	}
	t.finish(taskKeys)
	return p
}

func readRequirements(t *table, q *objective.Requirements) {
	pos := func(k, what string, scale float64) float64 {
		v, _ := t.positive(k, what, false, true)
		return v * scale
	}
	q.MaxTipSag = pos("max_tip_sag_mm", "a distance in mm", mm)
	q.MinReach = pos("min_reach_mm", "a distance in mm", mm)
	q.MinBendAngleRange = pos("min_bend_angle_range_deg", "an angle in degrees", deg)
	q.MaxResidualCurvature = pos("max_residual_curvature_per_m", "a curvature in 1/m", 1)
	q.MaxStraightTipOffset = pos("max_straight_tip_offset_mm", "a distance in mm", mm)
	q.MaxStraightTipAngle = pos("max_straight_tip_angle_deg", "an angle in degrees", deg)
	if v, ok := t.number("strain_safety_factor", "a factor >= 1", false); ok {
		if v < 1 {
			t.r.errorf(t.key("strain_safety_factor"), "%s is out of range (expected a factor >= 1)", fmtNum(v))
		}
		q.StrainSafetyFactor = v
	}
	if v, ok := t.number("min_stability_margin", "a margin 1 − L/L_crit, below 1", false); ok {
		if v >= 1 {
			t.r.errorf(t.key("min_stability_margin"), "%s is out of range (expected a margin 1 − L/L_crit, below 1)", fmtNum(v))
		}
		q.MinStabilityMargin = v
	}
	q.MinClearanceSet = t.has("min_clearance_mm")
	q.MinClearance = pos("min_clearance_mm", "a radial clearance in mm", mm)
	if v, ok := t.number("min_task_coverage", "a fraction in [0, 1]", false); ok {
		if v < 0 || v > 1 {
			t.r.errorf(t.key("min_task_coverage"), "%s is out of range (expected a fraction in [0, 1])", fmtNum(v))
		}
		q.MinTaskCoverage = v
		q.MinTaskCoverageSet = true
	}
	if v, ok := t.number("min_pass_probability", "a probability strictly between 0 and 1, e.g. 0.9", false); ok {
		if v <= 0 || v >= 1 {
			t.r.errorf(t.key("min_pass_probability"), "%s is out of range (expected a probability strictly between 0 and 1, e.g. 0.9)", fmtNum(v))
		} else {
			q.MinPassProbability = v
		}
	}
	q.MaxMass = pos("max_mass_g", "a mass in g", gram)
	q.MinPayloadToWeight = pos("min_payload_to_weight", "a ratio", 1)
	if v, ok := t.boolean("within_validated_range"); ok {
		q.OutsideValidatedRange = !v
	}
	t.finish(requirementKeys)
}

// count reads an optional integer in [lo, hi]; 0 when absent.
func (t *table) count(k string, lo, hi int) int {
	v, ok := t.get(k)
	if !ok {
		return 0
	}
	n, isInt := v.(int64)
	if !isInt {
		t.r.errorf(t.key(k), "found %s (expected a whole number from %d to %d)", describe(v), lo, hi)
		return 0
	}
	if n < int64(lo) || n > int64(hi) {
		t.r.errorf(t.key(k), "%d is out of range (expected a whole number from %d to %d)", n, lo, hi)
		return 0
	}
	return int(n)
}
