package objective

import (
	"fmt"
	"math"
	"strings"

	"plica/surrogate"
)

const (
	mmPerM  = 1e3
	degPerR = 180 / math.Pi
)

// checks compares the scores with the requirements and the printer.
func (e *evaluator) checks(res *Result) {
	sc := &res.Scores
	q := e.sc.Requirements
	add := func(name string, value, limit float64, unit string, max bool, note string) {
		pass := value <= limit
		if !max {
			pass = value >= limit
		}
		if math.IsNaN(value) {
			pass = false
		}
		res.Checks = append(res.Checks, Check{Name: name, Value: value, Limit: limit, Unit: unit, Max: max, Pass: pass, Note: note})
	}
	if q.MaxTipSag > 0 {
		add("tip_sag", sc.TipSag*mmPerM, q.MaxTipSag*mmPerM, "mm", true, "worst case over the workspace, exact rod model")
	}
	if q.MinReach > 0 {
		add("reach", sc.Reach*mmPerM, q.MinReach*mmPerM, "mm", false, "largest lateral tip distance")
	}
	if q.MinBendAngleRange > 0 {
		add("bend_angle_range", sc.BendAngleRange*degPerR, q.MinBendAngleRange*degPerR, "deg", false, "")
	}
	if q.MaxResidualCurvature > 0 {
		add("residual_curvature", sc.ResidualCurvature, q.MaxResidualCurvature, "1/m", true, "at the straightest configuration")
	}
	if q.MaxStraightTipOffset > 0 {
		add("straight_tip_offset", sc.StraightTipOffset*mmPerM, q.MaxStraightTipOffset*mmPerM, "mm", true, "at the straightest configuration")
	}
	if q.MaxStraightTipAngle > 0 {
		add("straight_tip_angle", sc.StraightTipAngle*degPerR, q.MaxStraightTipAngle*degPerR, "deg", true, "tip tangent from the base axis, straightest configuration")
	}
	if len(e.sc.Tasks) > 0 {
		min := q.MinTaskCoverage
		if min == 0 && !q.MinTaskCoverageSet {
			min = 1
		}
		if min >= 1 {
			// every point required: the continuous miss gives a search its direction
			add("task_miss", sc.TaskMiss*mmPerM, 0, "mm", true, fmt.Sprintf("%d task points, coverage %.3g", len(e.sc.Tasks), sc.TaskCoverage))
		} else {
			add("task_coverage", sc.TaskCoverage, min, "", false, fmt.Sprintf("%d task points", len(e.sc.Tasks)))
		}
	}
	sf := q.StrainSafetyFactor
	if sf == 0 {
		sf = 1
	}
	sc.AllowableStrain = math.NaN()
	sc.StrainRatio = math.NaN()
	for i, b := range e.d.Bellows {
		if b.Model == nil {
			continue
		}
		allow := b.Model.Material.AllowableStrain / sf
		if math.IsNaN(sc.AllowableStrain) || allow < sc.AllowableStrain {
			sc.AllowableStrain = allow
		}
		if r := sc.StrainPerBellows[i] / allow; math.IsNaN(sc.StrainRatio) || r > sc.StrainRatio {
			sc.StrainRatio = r
		}
		add(fmt.Sprintf("peak_strain[%d]", i+1), sc.StrainPerBellows[i], allow, "", true,
			fmt.Sprintf("allowable %.3g / safety factor %.3g", b.Model.Material.AllowableStrain, sf))
	}
	add("stability_margin", sc.StabilityMargin, q.MinStabilityMargin, "", false, "1 − L/L_crit, two-tube snap test")
	minGap := q.MinClearance
	if minGap == 0 && !q.MinClearanceSet {
		minGap = 0.2e-3
	}
	if len(e.d.Bellows) > 1 {
		for i := 0; i+1 < len(e.d.Bellows); i++ {
			c := e.clearance(i)
			if math.IsNaN(c) {
				res.Warnings = append(res.Warnings, fmt.Sprintf("clearance between bellows %d and %d not checked: a diameter is unknown (measured stiffness; give outer_diameter_mm and the outer bellows' geometry)", i+1, i+2))
				continue
			}
			kind := "nesting"
			if e.d.Bellows[i].ThreadLead > 0 {
				kind = "thread"
			}
			add(fmt.Sprintf("clearance[%d-%d]", i+1, i+2), c*mmPerM, minGap*mmPerM, "mm", false, kind+" clearance, radial")
			in, out := e.d.Bellows[i], e.d.Bellows[i+1]
			if hint, ok := OrderHint(i+1, c, out.Model.Wall); ok {
				res.MisorderedPairs = append(res.MisorderedPairs, i+1)
				res.Warnings = append(res.Warnings, hint)
			}
			if in.ThreadLead > 0 && in.Model != nil && out.Model != nil {
				// The inner bellows screws along the outer one's helix:
				// its lead must be the outer pitch.
				add(fmt.Sprintf("thread_lead[%d-%d]", i+1, i+2), math.Abs(in.ThreadLead-out.Model.Pitch)*mmPerM, 0.01*out.Model.Pitch*mmPerM, "mm", true,
					"thread lead against the outer bellows' pitch (within 1 %)")
			}
		}
	}
	if q.MaxMass > 0 {
		add("mass", sc.Mass*1e3, q.MaxMass*1e3, "g", true, "")
	}
	if q.MinPayloadToWeight > 0 {
		add("payload_to_weight", sc.PayloadToWeight, q.MinPayloadToWeight, "", false, "")
	}
	e.printability(res, add)
	e.validatedRange(res)
	res.Pass = true
	for _, c := range res.Checks {
		res.Pass = res.Pass && (c.Pass || c.Warn)
	}
}

// validatedRange warns about every bellows with geometry that lies
// outside the surrogate's validated range (surrogate.Validity: the
// geometric limits of its section, the convolution count over the
// bellows' length and the largest opening per convolution over the
// workspace) and, unless the requirements switch it off, adds the check
// validated_range[i]: the largest relative excess over a limit (0 inside,
// at most 10), which must not exceed 0. It warns without failing the
// design (Check.Warn); a search treats it as a constraint.
func (e *evaluator) validatedRange(res *Result) {
	sc := &res.Scores
	for i, b := range e.d.Bellows {
		if b.Model == nil {
			continue
		}
		var notes []surrogate.RangeNote
		if i < len(e.st) && e.st[i].Section != nil {
			s := e.st[i].Section
			notes = append(notes, s.OutOfRange...)
			g := b.Model.Geometry
			n := (b.StraightLength + b.CurvedLength) / g.Pitch
			notes = append(notes, surrogate.CheckLimit(surrogate.QuantityConvolutions, g.Profile, n)...)
			if i < len(sc.StrainPerBellows) && s.StrainPerCurvature > 0 {
				// largest curvature change over the workspace × opening per curvature
				open := sc.StrainPerBellows[i] / s.StrainPerCurvature * s.OpeningPerCurvature
				if !math.IsNaN(open) {
					notes = append(notes, surrogate.CheckLimit(surrogate.QuantityOpening, g.Profile, open/g.Depth)...)
				}
			}
		}
		worst := 0.0
		var names []string
		for _, n := range notes {
			worst = math.Max(worst, n.Excess())
			names = append(names, n.Quantity)
			res.Warnings = append(res.Warnings, fmt.Sprintf("bellows %d is outside the validated range: %s", i+1, n))
		}
		if e.sc.Requirements.OutsideValidatedRange {
			continue
		}
		note := "inside surrogate.Validity"
		if len(names) > 0 {
			note = "outside: " + strings.Join(names, ", ") + " (warns; a search constraint)"
		}
		res.Checks = append(res.Checks, Check{Name: fmt.Sprintf("validated_range[%d]", i+1), Value: worst, Limit: 0, Max: true,
			Pass: worst <= 0, Warn: true, Note: note})
	}
}

// printability checks each bellows with geometry against the printer
// (surrogate/REFERENCE.md §3.1, common practice).
func (e *evaluator) printability(res *Result, add func(string, float64, float64, string, bool, string)) {
	for _, c := range PrintabilityChecks(e.d, e.sc.Printer) {
		add(c.Name, c.Value, c.Limit, c.Unit, c.Max, c.Note)
	}
}

// Resolved returns the printer with every zero field set to the default
// the printability checks use: nozzle 0.4 mm, line width 1.2 × nozzle,
// layer 0.2 mm, overhang limit 45° for FFF (none for resin and powder:
// zero), minimum wall one line width (FFF), 0.8 mm (powder), 0.5 mm
// (resin).
func (p Printer) Resolved() Printer {
	if p.Nozzle == 0 {
		p.Nozzle = 0.4e-3
	}
	if p.LineWidth == 0 {
		p.LineWidth = 1.2 * p.Nozzle
	}
	if p.LayerHeight == 0 {
		p.LayerHeight = 0.2e-3
	}
	if p.MinWall == 0 {
		switch p.Process {
		case FFF:
			p.MinWall = p.LineWidth
		case Powder:
			p.MinWall = 0.8e-3
		default:
			p.MinWall = 0.5e-3
		}
	}
	if p.OverhangLimit == 0 && p.Process == FFF {
		p.OverhangLimit = math.Pi / 4
	}
	return p
}

// PrintabilityChecks checks each bellows of d with geometry against the
// printer (objective/REFERENCE.md §5.4): the wall against the process
// minimum; for fused filament also the layer height against 80 % of the
// nozzle and the steepest wall of the profile against the overhang limit,
// lowered to atan(b/(2h)) when single-wall layers would not overlap.
func PrintabilityChecks(d *Design, printer Printer) []Check {
	p := printer.Resolved()
	var out []Check
	add := func(name string, value, limit float64, unit string, max bool, note string) {
		pass := value <= limit
		if !max {
			pass = value >= limit
		}
		out = append(out, Check{Name: name, Value: value, Limit: limit, Unit: unit, Max: max, Pass: pass && !math.IsNaN(value), Note: note})
	}
	if p.Process == FFF {
		add("layer_height", p.LayerHeight*mmPerM, 0.8*p.Nozzle*mmPerM, "mm", true, "at most 80 % of the nozzle diameter")
	}
	for i, b := range d.Bellows {
		if b.Model == nil {
			continue
		}
		g := b.Model.Geometry
		add(fmt.Sprintf("wall[%d]", i+1), g.Wall*mmPerM, p.MinWall*mmPerM, "mm", false, p.Process.String()+" minimum wall")
		if p.Process == FFF {
			limit := p.OverhangLimit
			// single-wall layers must overlap: h tan θ ≤ b/2
			note := "wall angle from vertical"
			if vase := math.Atan(0.5 * p.LineWidth / p.LayerHeight); vase < limit {
				limit = vase
				note += ", limited by layer overlap h·tan θ ≤ line width/2"
			}
			add(fmt.Sprintf("overhang[%d]", i+1), overhang(g)*degPerR, limit*degPerR, "deg", true, note)
		}
	}
	return out
}

// models records the models and fidelity behind the numbers.
func (e *evaluator) models(res *Result) {
	var src []string
	for _, s := range e.st {
		src = append(src, s.Source.String())
	}
	res.Models = []string{
		"stiffness per bellows: " + strings.Join(src, ", ") + " (surrogate fidelity " + e.d.Fidelity.String() + ")",
		"shape: torsionally rigid nested tubes, constant-curvature links",
		fmt.Sprintf("tip sag: geometrically exact rod statics (RK4, Newton shooting, %d iterations), worst case found with the linear compliance over %d x %d samples",
			res.Scores.SagIterations, len(e.shapes), defaults(e.sc.Workspace).BaseSteps),
		"stability: two-tube snap test with the bellows' torsional stiffness",
		"wall strain: strip or shell wall model per unit curvature change, thick-wall and bending corrections from the axisymmetric solid model (sinusoid, U)",
	}
	geometry := false
	for _, b := range e.d.Bellows {
		geometry = geometry || b.Model != nil
	}
	if geometry {
		if e.sc.Requirements.OutsideValidatedRange {
			res.Models = append(res.Models, "validated range: not enforced (requirements within_validated_range = false); bellows outside it are only warned about")
		} else {
			res.Models = append(res.Models, "validated range: each bellows with geometry is checked against the surrogate's validated range (validated_range checks warn; a search treats them as constraints)")
		}
	}
	if len(e.d.Bellows) > 0 {
		for _, s := range e.st {
			if s.Source == SourceCalibrated {
				res.Models = append(res.Models, "EI multiplied by the calibration factor (bench or finite-element)")
				break
			}
		}
	}
}

// OrderHint is the hint for the nesting clearance c (m) between bellows
// inner and inner+1 (1-based) when it fails by more than the outer
// bellows' wall (m), too much for a tight fit: bellows are numbered from
// the inside out, and a list written outermost first puts the wide bellows
// inside the narrow one. ok is false, and the hint empty, otherwise.
func OrderHint(inner int, c, wall float64) (hint string, ok bool) {
	if !(c < -wall) {
		return "", false
	}
	return fmt.Sprintf("clearance[%d-%d] fails by %.3g mm, more than the %.3g mm wall of bellows %d: bellows are listed innermost first ([[bellows]] 1 is the innermost, each next one goes around it); if bellows %d is meant to be the outer one, reverse the order of the [[bellows]] tables",
		inner, inner+1, -c*mmPerM, wall*mmPerM, inner+1, inner), true
}
