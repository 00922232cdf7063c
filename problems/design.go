package problems

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/BurntSushi/toml"

	"plica/objective"
	"plica/objective/kinematics"
	"plica/surrogate"
)

// Unit conversions at the file boundary.
const (
	mm    = 1e-3 // m per mm
	mpa   = 1e6  // Pa per MPa
	nmm2  = 1e-6 // N·m² per N·mm²
	deg   = math.Pi / 180
	gram  = 1e-3 // kg per g
	perMM = 1e3  // (1/m) per (1/mm)
)

var (
	topKeys = []string{"name", "fidelity", "material", "bellows", "load", "printer", "workspace", "task_point", "requirements"}

	commonBellowsKeys = []string{"straight_length_mm", "curved_length_mm", "precurvature_per_m",
		"precurvature_xy_per_m", "thread_lead_mm", "threaded", "outer_diameter_mm", "insertion_range_mm"}
	geometryKeys = []string{"material", "depth_mm", "pitch_mm", "wall_mm", "profile",
		"crest_radius_mm", "flat_fraction", "winding", "spine_width_mm", "spine_angle_deg", "calibration_factor", "calibration_file", "setting_overbend"}
	measuredKeys = []string{"bending_stiffness_n_mm2", "torsional_stiffness_n_mm2", "linear_density_kg_per_m"}
	materialKeys = []string{"name", "modulus_across_layers_mpa", "modulus_in_layer_mpa", "poisson_ratio",
		"density_kg_per_m3", "allowable_strain"}
)

// LoadDesign reads and checks a design file.
func LoadDesign(path string) (*objective.Design, *objective.Scenario, error) {
	data, err := readInput(path, "design file")
	if err != nil {
		return nil, nil, err
	}
	return ParseDesign(data, path)
}

// ParseDesign decodes a design file (every value fixed) into SI physics
// types: the design and the scenario it is checked in. Every problem found
// is reported, each with file:line:col and key.
func ParseDesign(data []byte, file string) (*objective.Design, *objective.Scenario, error) {
	r, root, err := decode(data, file, "design file")
	if err != nil {
		return nil, nil, err
	}
	d, ins, _ := readDesign(r, root)
	sc := readScenario(root)
	sc.Workspace.Insertion = ins
	for _, k := range problemOnlyKeys {
		if root.has(k) {
			root.get(k)
			r.errorf(k, "belongs in a problem file for plica search (expected a design file: every value fixed, no [[objective]], [[constraint]] or [search])")
		}
	}
	sc.Scatter = readScatter(root)
	if sc.Requirements.MinPassProbability > 0 && !sc.Scatter.Active() {
		r.errorf("requirements.min_pass_probability", "a pass probability needs print scatter but the file has no [scatter] that scatters anything (expected a [scatter] table with modulus_pct, wall_pct, precurvature_pct or stiffness_pct > 0)")
	}
	root.finish(append(append([]string{}, topKeys...), scatterTopKeys...))
	if len(r.errs) > 0 {
		return nil, nil, r.errs.sorted()
	}
	robot, _, err := d.Robot()
	if err != nil {
		return nil, nil, r.physicsError(err)
	}
	// The bellows must nest at their base insertions (the lower ends of
	// their insertion ranges, else 0) with no relative rotation.
	a := kinematics.Actuation{Theta: make([]float64, len(robot.Tubes)), Beta: make([]float64, len(robot.Tubes))}
	for i := range a.Beta {
		a.Beta[i] = sc.Workspace.Insertion[i][0]
	}
	if err := robot.CheckActuation(a); err != nil {
		var ae *kinematics.ActuationError
		path := "bellows"
		if errors.As(err, &ae) && ae.Tube >= 0 {
			path = fmt.Sprintf("bellows[%d]", ae.Tube+1)
		}
		r.errorf(path, "the bellows do not nest: %s", BellowsWording(err))
		return nil, nil, r.errs.sorted()
	}
	return d, &sc, nil
}

// decode parses TOML text after checking its size and depth (kind names
// the file in those messages); a syntax error becomes one *Error that says
// what was expected.
func decode(data []byte, file, kind string) (*reader, *table, error) {
	if err := checkTOMLBounds(data, file, kind); err != nil {
		return nil, nil, err
	}
	var m map[string]any
	if _, err := toml.Decode(string(data), &m); err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			text := string(data)
			line, col := pe.Position.Line, pe.Position.Col
			if strings.HasPrefix(pe.Message, "TOML files cannot contain control characters") {
				// the decoder reports where its token ended, not the character
				if l, c := controlCharacter(text); l > 0 {
					line, col = l, c
				}
			}
			return nil, nil, &Error{File: file, Line: line, Col: col, Key: syntaxKey(text, line, pe.LastKey),
				Msg: "syntax error: " + syntaxMessage(pe.Message)}
		}
		return nil, nil, &Error{File: file, Msg: "syntax error: " + syntaxMessage(err.Error())}
	}
	r := &reader{file: file, loc: newLocator(string(data)), cals: calibrations{}}
	return r, r.root(m), nil
}

// readDesign reads the design tables; it returns the design, the
// insertion ranges and the materials the file defines.
func readDesign(r *reader, root *table) (*objective.Design, [][2]float64, map[string]surrogate.Material) {
	d := &objective.Design{}
	var ins [][2]float64
	d.Name, _ = root.text("name")
	root.enum("fidelity", &d.Fidelity, surrogate.FidelityNames())
	materials := readMaterials(root)
	bs := root.tables("bellows")
	if len(bs) == 0 && !root.has("bellows") {
		r.errorf("bellows", "missing (expected one [[bellows]] table per bellows, innermost first)")
	}
	for _, bt := range bs {
		ins = append(ins, readInsertion(bt)) // before readBellows reports unread keys
		d.Bellows = append(d.Bellows, readBellows(bt, materials))
	}
	if n := len(bs); n > 0 && d.Bellows[n-1].ThreadLead > 0 {
		k := "thread_lead_mm"
		if !bs[n-1].has(k) {
			k = "threaded"
		}
		r.errorf(bs[n-1].key(k), "the outermost bellows has no outer bellows to thread into (expected the thread on the inner bellows of a pair)")
	}
	return d, ins, materials
}

// readInsertion reads the optional insertion range of one bellows, m.
func readInsertion(t *table) [2]float64 {
	v, ok := t.numbers("insertion_range_mm", 2, "[lo, hi] in mm, lo <= hi <= 0", false)
	if !ok {
		return [2]float64{}
	}
	if v[0] > v[1] || v[1] > 0 {
		t.r.errorf(t.key("insertion_range_mm"), "[%s, %s] is out of range (expected [lo, hi] in mm, lo <= hi <= 0)", fmtNum(v[0]), fmtNum(v[1]))
	}
	return [2]float64{v[0] * mm, v[1] * mm}
}

func readMaterials(root *table) map[string]surrogate.Material {
	out := map[string]surrogate.Material{}
	for _, t := range root.tables("material") {
		var m surrogate.Material
		name, ok := t.text("name")
		if !ok {
			t.r.errorf(t.key("name"), "missing (expected a material name)")
		}
		m.Name = name
		e, _ := t.positive("modulus_across_layers_mpa", "a modulus in MPa", true, false)
		m.ModulusAcross = e * mpa
		m.ModulusInLayer = m.ModulusAcross
		if e2, ok := t.positive("modulus_in_layer_mpa", "a modulus in MPa", false, false); ok {
			m.ModulusInLayer = e2 * mpa
		}
		if nu, ok := t.number("poisson_ratio", "a Poisson ratio in [0, 0.5)", true); ok {
			if nu < 0 || nu >= 0.5 {
				t.r.errorf(t.key("poisson_ratio"), "%s is out of range (expected a Poisson ratio in [0, 0.5))", fmtNum(nu))
			}
			m.Poisson = nu
		}
		rho, _ := t.positive("density_kg_per_m3", "a density in kg/m³", true, false)
		m.Density = rho
		eps, _ := t.positive("allowable_strain", "a strain (dimensionless, e.g. 0.015)", true, false)
		m.AllowableStrain = eps
		t.finish(materialKeys)
		if name != "" {
			if _, dup := out[name]; dup {
				t.r.errorf(t.key("name"), "material %q is defined twice", name)
			}
			out[name] = m
		}
	}
	return out
}

func readBellows(t *table, materials map[string]surrogate.Material) objective.Bellows {
	var b objective.Bellows
	ls, _ := t.positive("straight_length_mm", what("straight_length_mm"), true, true)
	lc, _ := t.positive("curved_length_mm", what("curved_length_mm"), true, true)
	b.StraightLength, b.CurvedLength = ls*mm, lc*mm
	if ls+lc <= 0 && t.has("straight_length_mm") && t.has("curved_length_mm") {
		t.r.errorf(t.key("curved_length_mm"), "the bellows has zero length (expected straight_length_mm + curved_length_mm > 0)")
	}
	switch {
	case t.has("precurvature_per_m") && t.has("precurvature_xy_per_m"):
		t.get("precurvature_per_m")
		t.get("precurvature_xy_per_m")
		t.r.errorf(t.key("precurvature_xy_per_m"), "given together with precurvature_per_m (expected one of them)")
	case t.has("precurvature_xy_per_m"):
		if v, ok := t.numbers("precurvature_xy_per_m", 2, "[u_x, u_y] in 1/m", true); ok {
			b.Precurvature = [2]float64{v[0], v[1]}
		}
	default:
		k, _ := t.number("precurvature_per_m", what("precurvature_per_m"), false)
		b.Precurvature = [2]float64{0, k}
	}
	if b.CurvedLength == 0 && (b.Precurvature != [2]float64{}) && t.has("curved_length_mm") {
		t.r.errorf(t.key("precurvature_per_m"), "pre-curvature given but curved_length_mm is 0")
	}
	lead, hasLead := t.positive("thread_lead_mm", "a thread lead in mm", false, false)
	threaded, _ := t.boolean("threaded")
	od, hasOD := t.positive("outer_diameter_mm", what("outer_diameter_mm"), false, false)

	if t.has("bending_stiffness_n_mm2") {
		for _, k := range geometryKeys {
			if t.has(k) {
				t.get(k)
				t.r.errorf(t.key(k), "geometry key in a bellows with measured stiffness (expected either geometry and material, or bending_stiffness_n_mm2, torsional_stiffness_n_mm2 and linear_density_kg_per_m)")
			}
		}
		m := &objective.Measured{}
		if v, ok := t.numbers("bending_stiffness_n_mm2", 2, "[EI_x, EI_y] in N·mm², both > 0", true); ok {
			if v[0] <= 0 || v[1] <= 0 {
				t.r.errorf(t.key("bending_stiffness_n_mm2"), "[%s, %s] is out of range (expected [EI_x, EI_y] in N·mm², both > 0)", fmtNum(v[0]), fmtNum(v[1]))
			}
			m.EI = [2]float64{v[0] * nmm2, v[1] * nmm2}
		}
		gj, _ := t.positive("torsional_stiffness_n_mm2", "GJ in N·mm²", true, false)
		m.GJ = gj * nmm2
		m.LinearDensity, _ = t.positive("linear_density_kg_per_m", "a mass per length in kg/m", true, true)
		if hasOD {
			m.OuterDiameter = od * mm
		}
		if threaded && !hasLead {
			t.r.errorf(t.key("threaded"), "a bellows with measured stiffness needs thread_lead_mm (expected the lead in mm instead of threaded = true)")
		}
		b.ThreadLead = lead * mm
		b.Measured = m
		t.finish(append(append([]string{}, commonBellowsKeys...), measuredKeys...))
		return b
	}

	for _, k := range measuredKeys {
		if t.has(k) {
			t.get(k)
			t.r.errorf(t.key(k), "measured stiffness key without bending_stiffness_n_mm2 (expected either geometry and material, or all measured keys)")
		}
	}
	mb := &surrogate.Bellows{}
	name, ok := t.text("material")
	if !ok && !t.has("material") {
		t.r.errorf(t.key("material"), "missing (expected a material name: %s, or one defined in [[material]]; or give measured stiffness instead)", materialList(materials))
	}
	if ok {
		if m, found := materials[name]; found {
			mb.Material = m
		} else if m, found := surrogate.LookupMaterial(name); found {
			mb.Material = m
		} else {
			t.r.errorf(t.key("material"), "%q is not a material (expected: %s)", name, materialList(materials))
		}
	}
	g := &mb.Geometry
	if !t.has("outer_diameter_mm") {
		t.r.errorf(t.key("outer_diameter_mm"), "missing (expected a diameter in mm)")
	}
	g.OuterDiameter = od * mm
	v, _ := t.positive("depth_mm", what("depth_mm"), true, false)
	g.Depth = v * mm
	v, _ = t.positive("pitch_mm", what("pitch_mm"), true, false)
	g.Pitch = v * mm
	v, _ = t.positive("wall_mm", what("wall_mm"), true, false)
	g.Wall = v * mm
	t.enum("profile", &g.Profile, surrogate.ProfileNames())
	if v, ok := t.positive("crest_radius_mm", what("crest_radius_mm"), false, false); ok {
		if g.Profile != surrogate.UShape {
			t.r.errorf(t.key("crest_radius_mm"), "only used with profile = \"u\"")
		}
		g.CrestRadius = v * mm
	}
	if v, ok := t.number("flat_fraction", what("flat_fraction"), false); ok {
		if g.Profile != surrogate.Trapezoid {
			t.r.errorf(t.key("flat_fraction"), "only used with profile = \"trapezoid\"")
		} else if v < 0 || v >= 1 {
			t.r.errorf(t.key("flat_fraction"), "%s is out of range (expected a fraction of the pitch in [0, 1))", fmtNum(v))
		}
		g.FlatFraction = v
	}
	var w surrogate.Winding
	t.enum("winding", &w, surrogate.WindingNames())
	g.Helical = w == surrogate.Helical
	if v, ok := t.positive("spine_width_mm", what("spine_width_mm"), false, true); ok {
		g.SpineWidth = v * mm
	}
	if v, ok := t.number("spine_angle_deg", what("spine_angle_deg"), false); ok {
		g.SpineAngle = v * deg
	}
	if v, ok := t.numbers("calibration_factor", 2, "[c_x, c_y], both > 0", false); ok {
		if v[0] <= 0 || v[1] <= 0 {
			t.r.errorf(t.key("calibration_factor"), "[%s, %s] is out of range (expected [c_x, c_y], both > 0)", fmtNum(v[0]), fmtNum(v[1]))
		}
		mb.Calibration = [2]float64{v[0], v[1]}
	}
	t.calibrationFile(mb) // calibration.go
	b.SettingOverbend = 1
	if v, ok := t.positive("setting_overbend", "a factor on the pre-curvature the heat-setting jig bends to (1: none)", false, false); ok {
		b.SettingOverbend = v
	}
	switch {
	case hasLead:
		b.ThreadLead = lead * mm
	case threaded:
		if !g.Helical {
			t.r.errorf(t.key("threaded"), "a threaded bellows must have winding = \"helical\" (the lead is its pitch)")
		}
		b.ThreadLead = g.Pitch
	}
	b.Model = mb
	t.finish(append(append([]string{}, commonBellowsKeys...), geometryKeys...))
	return b
}

// what is what the reader expects of a key a problem may vary.
func what(key string) string { return numericVariables[key].what }

func materialList(custom map[string]surrogate.Material) string {
	names := surrogate.MaterialNames()
	var extra []string
	for k := range custom {
		extra = append(extra, k)
	}
	sort.Strings(extra)
	names = append(names, extra...)
	s := ""
	for i, n := range names {
		if i > 0 {
			s += "|"
		}
		s += n
	}
	return s
}

// physicsError gives model errors (impossible geometry, nesting) the
// position of the key they name: a *surrogate.InputError carries its key.
// A joined error is split into its parts, one line each.
func (r *reader) physicsError(err error) error {
	var be *objective.BellowsError
	if !errors.As(err, &be) {
		r.errorf("bellows", "%s", BellowsWording(err))
		return r.errs.sorted()
	}
	for _, part := range leaves(be.Err) {
		path := fmt.Sprintf("bellows[%d]", be.Index+1)
		msg := part.Error()
		if ie, ok := part.(*surrogate.InputError); ok {
			if _, ok := r.loc.keys[path+"."+ie.Key]; ok {
				path += "." + ie.Key
				msg = ie.Msg
			}
		}
		r.errorf(path, "%s", msg)
	}
	return r.errs.sorted()
}

// leaves flattens joined errors (errors.Join, possibly nested).
func leaves(err error) []error {
	if j, ok := err.(interface{ Unwrap() []error }); ok {
		var out []error
		for _, e := range j.Unwrap() {
			out = append(out, leaves(e)...)
		}
		return out
	}
	return []error{err}
}

// BellowsWording turns a kinematics message about tubes into the words of
// the design files: bellows, counted from 1, innermost first.
func BellowsWording(err error) string {
	msg := strings.ReplaceAll(err.Error(), "tubes", "bellows")
	return strings.ReplaceAll(msg, "tube", "bellows")
}
