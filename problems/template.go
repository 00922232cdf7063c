package problems

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"

	"plica/objective"
	"plica/surrogate"
)

// A problem is compiled once, when it is parsed, into a template: the
// design and scenario in SI with every variable at its lower bound (first
// option), and one setter per variable that writes a candidate's value
// into a copy of the design. Evaluating a candidate reads no file and
// decodes nothing: it is a pure function of the variables.
type template struct {
	design   objective.Design
	scenario objective.Scenario
	set      []setter // one per Spec.Variables entry
	// leadIsPitch marks threaded bellows without thread_lead_mm: their
	// lead is their pitch.
	leadIsPitch []bool
}

// setter writes one variable's value (file units; an option index for a
// categorical variable) into a design.
type setter func(d *objective.Design, x float64)

// compile builds the template from the design and scenario read at the
// lower bounds, and the materials the file defines.
func (s *Spec) compile(d *objective.Design, sc *objective.Scenario, materials map[string]surrogate.Material) error {
	s.tmpl = template{design: *d, scenario: *sc, leadIsPitch: make([]bool, len(d.Bellows))}
	for i, bf := range s.form.Bellows {
		s.tmpl.leadIsPitch[i] = d.Bellows[i].Model != nil && bf.Threaded != nil && *bf.Threaded && bf.ThreadLead == nil
	}
	for _, v := range s.Variables {
		set, err := s.setter(v, materials)
		if err != nil {
			return err
		}
		s.tmpl.set = append(s.tmpl.set, set)
	}
	return nil
}

// option returns the option index a categorical variable's value stands for.
func option(v Variable, x float64) int { return max(0, min(int(x), len(v.Options)-1)) }

func (s *Spec) setter(v Variable, materials map[string]surrogate.Material) (setter, error) {
	i := v.Table
	model := func(d *objective.Design) *surrogate.Bellows { return d.Bellows[i].Model }
	bad := func() error {
		return &Error{File: s.File, Key: v.Path(), Msg: "cannot be a design variable in this bellows"}
	}
	hasModel := s.tmpl.design.Bellows[i].Model != nil
	switch v.Key {
	case "material", "profile", "winding":
		if !hasModel {
			return nil, bad()
		}
	}
	switch v.Key {
	case "straight_length_mm":
		return func(d *objective.Design, x float64) { d.Bellows[i].StraightLength = x * mm }, nil
	case "curved_length_mm":
		return func(d *objective.Design, x float64) { d.Bellows[i].CurvedLength = x * mm }, nil
	case "precurvature_per_m":
		return func(d *objective.Design, x float64) { d.Bellows[i].Precurvature = [2]float64{0, x} }, nil
	case "outer_diameter_mm":
		if !hasModel {
			return func(d *objective.Design, x float64) { d.Bellows[i].Measured.OuterDiameter = x * mm }, nil
		}
		return func(d *objective.Design, x float64) { model(d).OuterDiameter = x * mm }, nil
	case "material":
		ms := make([]surrogate.Material, len(v.Options))
		for k, name := range v.Options {
			m, found := materials[name]
			if !found {
				m, found = surrogate.LookupMaterial(name)
			}
			if !found {
				return nil, bad()
			}
			ms[k] = m
		}
		return func(d *objective.Design, x float64) { model(d).Material = ms[option(v, x)] }, nil
	case "profile":
		ps := make([]surrogate.Profile, len(v.Options))
		for k, name := range v.Options {
			if err := ps[k].UnmarshalText([]byte(name)); err != nil {
				return nil, bad()
			}
		}
		return func(d *objective.Design, x float64) { model(d).Profile = ps[option(v, x)] }, nil
	case "winding":
		hs := make([]bool, len(v.Options))
		for k, name := range v.Options {
			var w surrogate.Winding
			if err := w.UnmarshalText([]byte(name)); err != nil {
				return nil, bad()
			}
			hs[k] = w == surrogate.Helical
		}
		return func(d *objective.Design, x float64) { model(d).Helical = hs[option(v, x)] }, nil
	}
	if !hasModel {
		return nil, bad()
	}
	var field func(g *surrogate.Geometry) *float64
	scale := mm
	switch v.Key {
	case "depth_mm":
		field = func(g *surrogate.Geometry) *float64 { return &g.Depth }
	case "pitch_mm":
		field = func(g *surrogate.Geometry) *float64 { return &g.Pitch }
	case "wall_mm":
		field = func(g *surrogate.Geometry) *float64 { return &g.Wall }
	case "crest_radius_mm":
		field = func(g *surrogate.Geometry) *float64 { return &g.CrestRadius }
	case "spine_width_mm":
		field = func(g *surrogate.Geometry) *float64 { return &g.SpineWidth }
	case "flat_fraction":
		field, scale = func(g *surrogate.Geometry) *float64 { return &g.FlatFraction }, 1
	case "spine_angle_deg":
		field, scale = func(g *surrogate.Geometry) *float64 { return &g.SpineAngle }, deg
	default:
		return nil, bad()
	}
	if scale == 1 {
		return func(d *objective.Design, x float64) { *field(&model(d).Geometry) = x }, nil
	}
	return func(d *objective.Design, x float64) { *field(&model(d).Geometry) = x * scale }, nil
}

// Design builds the candidate design at x (file units; category indices)
// and its scenario. The values that depend on the candidate are checked as
// the reader checks them in a design file; an error names the offending
// key, and a search treats it as an infeasible candidate.
func (s *Spec) Design(x []float64) (*objective.Design, *objective.Scenario, error) {
	t := &s.tmpl
	d := &objective.Design{Name: t.design.Name, Fidelity: t.design.Fidelity, Bellows: make([]objective.Bellows, len(t.design.Bellows))}
	for i, b := range t.design.Bellows {
		if b.Model != nil {
			m := *b.Model
			b.Model = &m
		}
		if b.Measured != nil {
			m := *b.Measured
			b.Measured = &m
		}
		d.Bellows[i] = b
	}
	for j, set := range t.set {
		set(d, x[j])
	}
	for _, tie := range s.ties {
		if in, out := d.Bellows[tie[0]].Model, d.Bellows[tie[1]].Model; in != nil && out != nil {
			in.Pitch = out.Pitch
		}
	}
	for i, on := range t.leadIsPitch {
		if on {
			d.Bellows[i].ThreadLead = d.Bellows[i].Model.Pitch
		}
	}
	if err := s.check(d, x); err != nil {
		return nil, nil, err
	}
	sc := t.scenario
	return d, &sc, nil
}

// check reports, as the reader of a design file would, the values of a
// candidate that the file's keys do not accept: the variables' own ranges
// and the rules between keys that a variable can break.
func (s *Spec) check(d *objective.Design, x []float64) error {
	r := &reader{file: s.File, loc: s.loc}
	for j, v := range s.Variables {
		if v.Options == nil {
			if msg, ok := numericVariables[v.Key].check(x[j]); !ok {
				r.errorf(v.Path(), "%s", msg)
			}
		}
	}
	for i, bf := range s.form.Bellows {
		b := &d.Bellows[i]
		path := func(k string) string { return fmt.Sprintf("bellows[%d].%s", i+1, k) }
		if bf.StraightLength != nil && bf.CurvedLength != nil && b.StraightLength+b.CurvedLength <= 0 {
			r.errorf(path("curved_length_mm"), "the bellows has zero length (expected straight_length_mm + curved_length_mm > 0)")
		}
		if b.CurvedLength == 0 && (b.Precurvature != [2]float64{}) && bf.CurvedLength != nil {
			r.errorf(path("precurvature_per_m"), "pre-curvature given but curved_length_mm is 0")
		}
		mb := b.Model
		if mb == nil {
			continue
		}
		if bf.CrestRadius != nil && mb.Profile != surrogate.UShape {
			r.errorf(path("crest_radius_mm"), "only used with profile = \"u\"")
		}
		if bf.FlatFraction != nil {
			if mb.Profile != surrogate.Trapezoid {
				r.errorf(path("flat_fraction"), "only used with profile = \"trapezoid\"")
			} else if v := mb.FlatFraction; v < 0 || v >= 1 {
				r.errorf(path("flat_fraction"), "%s is out of range (expected a fraction of the pitch in [0, 1))", fmtNum(v))
			}
		}
		if s.tmpl.leadIsPitch[i] && !mb.Helical {
			r.errorf(path("threaded"), "a threaded bellows must have winding = \"helical\" (the lead is its pitch)")
		}
		if bf.CalibrationFile != nil {
			rel := *bf.CalibrationFile
			c, err := s.cals.lookup(s.resolveRel(rel))
			if err == nil && mb.Material.Name != "" && (c.Material != mb.Material.Name || c.Profile != mb.Profile) {
				r.errorf(path("calibration_file"), "%s calibrates material %q, profile %q (expected material %q, profile %q as in this bellows)",
					strconv.Quote(rel), c.Material, c.Profile, mb.Material.Name, mb.Profile)
			}
		}
	}
	if len(r.errs) > 0 {
		return r.errs.sorted()
	}
	return nil
}

// DesignTOML writes the candidate at x as a design file that check and
// pose accept: the problem's design tables with every variable fixed (to
// 9 significant digits) and every calibration_file replaced by the
// calibration_factor it stands for.
func (s *Spec) DesignTOML(x []float64, comment string) ([]byte, error) {
	return s.designTOML(x, comment, nil)
}

// DesignTOMLSeeded is DesignTOML whose [scatter], when the problem's gives
// no seed, gets seed: the run's, from which the front's Monte Carlo drew,
// so that plica check -robust on the file repeats the front's numbers.
func (s *Spec) DesignTOMLSeeded(x []float64, comment string, seed uint64) ([]byte, error) {
	return s.designTOML(x, comment, &seed)
}

func (s *Spec) designTOML(x []float64, comment string, seed *uint64) ([]byte, error) {
	form := s.form.design()
	if form.Scatter != nil && form.Scatter.Seed == nil && seed != nil {
		sf := *form.Scatter
		v := int(*seed)
		sf.Seed = &v
		form.Scatter = &sf
	}
	form.Bellows = cloneBellows(form.Bellows)
	for j, v := range s.Variables {
		b := &form.Bellows[v.Table]
		if v.Options != nil {
			*b.names(v.Key) = &nameParam{name: v.Options[option(v, x[j])]}
		} else {
			*b.numeric(v.Key) = &numParam{num: float(x[j])}
		}
	}
	for _, t := range s.ties { // the unrounded pitch, as the design evaluates it
		if p := form.Bellows[t[1]].Pitch; p != nil {
			form.Bellows[t[0]].Pitch = p
		}
	}
	for j, v := range s.Variables {
		if v.Options == nil {
			*form.Bellows[v.Table].numeric(v.Key) = &numParam{num: float(roundSig(x[j], 9))}
		}
	}
	var names []string
	for i := range form.Bellows {
		b := &form.Bellows[i]
		if b.CalibrationFile == nil {
			continue
		}
		c, err := s.cals.lookup(s.resolveRel(*b.CalibrationFile))
		if err != nil {
			continue // the problem would not have loaded; leave the reference
		}
		names = append(names, *b.CalibrationFile)
		b.CalibrationFile = nil
		b.CalibrationFactor = []num{float(roundSig(c.Factor[0].Value, 9)), float(roundSig(c.Factor[1].Value, 9))}
	}
	if len(names) > 0 {
		comment += "\ncalibration_factor values from " + strings.Join(names, ", ")
	}
	var buf bytes.Buffer
	for _, line := range strings.Split(strings.TrimSpace(comment), "\n") {
		fmt.Fprintf(&buf, "# %s\n", line)
	}
	if err := encodeForm(&buf, form); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// roundSig rounds to n significant digits, so that written designs read
// cleanly; 9 digits keep every score within 1e-8 relative.
func roundSig(f float64, n int) float64 {
	if f == 0 || math.IsNaN(f) || math.IsInf(f, 0) {
		return f
	}
	p := math.Pow(10, float64(n-1)-math.Floor(math.Log10(math.Abs(f))))
	return math.Round(f*p) / p
}
