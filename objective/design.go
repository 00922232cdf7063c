// Package objective turns one manipulator design into the numbers a
// designer decides on. It knows nothing of files: the problems package
// builds a Design from a file, in SI units.
//
// Evaluate scores a Design in a Scenario: the stiffness of each bellows
// (package surrogate, or a measured calibration), the shapes over the
// sampled actuation space (objective/kinematics), the sag under payload and
// gravity (objective/statics), wall strain and margins, and the checks
// (CheckNames) that a search uses as constraints.
//
// All quantities are SI: metres, radians, newtons, N·m², kg/m.
package objective

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"plica/objective/kinematics"
	"plica/surrogate"
	"plica/surrogate/shell"
)

// Design is one fully specified manipulator of nested bellows.
type Design struct {
	Name     string
	Fidelity surrogate.Fidelity
	Bellows  []Bellows // innermost first
}

// Bellows is one bellows of a design. Exactly one of Model and Measured is
// set: the stiffness comes from the surrogate or from measurements.
type Bellows struct {
	Model    *surrogate.Bellows
	Measured *Measured

	StraightLength float64    // m
	CurvedLength   float64    // m
	Precurvature   [2]float64 // (u*_x, u*_y) in the bellows' own frame, 1/m
	// ThreadLead couples this bellows to the next outer one by a helical
	// thread, m per turn; 0 means not threaded.
	ThreadLead float64
	// SettingOverbend multiplies the pre-curvature the heat-setting jig
	// bends the bellows to, for the spring-back measured after setting
	// (1 or 0: none). It does not enter the scores.
	SettingOverbend float64
}

// Measured is stiffness measured on a bench (or given by hand).
type Measured struct {
	EI            [2]float64 // about the bellows' own x and y axes, N·m²
	GJ            float64    // N·m²
	LinearDensity float64    // kg/m
	OuterDiameter float64    // m, 0 if not given
}

// Stiffness is the section of one bellows as the scores use it.
type Stiffness struct {
	EI            [2][2]float64 // tensor about the bellows' own x and y axes, N·m²
	GJ            float64       // N·m²
	EA            float64       // N (0 when measured and not given)
	AxialRate     float64       // per convolution, N/m (0 when measured)
	LinearDensity float64       // kg/m
	// Source says where the numbers come from.
	Source Source
	// Section is the full surrogate output; nil for measured stiffness.
	Section *surrogate.Section
}

// Source says where a bellows' stiffness numbers come from.
type Source int

// The stiffness sources.
const (
	SourceStrip      Source = iota // the strip surrogate
	SourceShell                    // the thin-shell surrogate
	SourceMeasured                 // measured values given in the design
	SourceCalibrated               // a surrogate scaled by a bench or FE calibration factor
)

var sourceNames = []string{SourceStrip: "strip", SourceShell: "shell", SourceMeasured: "measured", SourceCalibrated: "calibrated"}

// String returns the source's name as printed in outputs.
func (s Source) String() string {
	if s >= 0 && int(s) < len(sourceNames) {
		return sourceNames[s]
	}
	return fmt.Sprintf("source(%d)", int(s))
}

// MarshalText writes the source's name (JSON and TOML outputs).
func (s Source) MarshalText() ([]byte, error) { return []byte(s.String()), nil }

// UnmarshalText reads a source name as String writes it; an unknown one is
// a *surrogate.InputError (key "stiffness_source") that lists the names.
func (s *Source) UnmarshalText(text []byte) error {
	v, err := parseName(sourceNames, text, "stiffness_source")
	if err == nil {
		*s = Source(v)
	}
	return err
}

// parseName finds text in names (indexed by value); an unknown name is an
// input error at key listing the allowed ones.
func parseName(names []string, text []byte, key string) (int, error) {
	for i, n := range names {
		if string(text) == n {
			return i, nil
		}
	}
	return 0, &surrogate.InputError{Key: key, Msg: fmt.Sprintf("%q is not allowed (expected one of: %s)", text, strings.Join(names, "|"))}
}

// BellowsError is a failure that belongs to one bellows of a design.
type BellowsError struct {
	Index int // 0-based, innermost first
	Err   error
}

func (e *BellowsError) Error() string {
	// Several reasons (errors.Join) stay on one line: a failure is one
	// line in evaluations.csv and on the terminal.
	return fmt.Sprintf("bellows %d: %s", e.Index+1, strings.ReplaceAll(e.Err.Error(), "\n", "; "))
}

func (e *BellowsError) Unwrap() error { return e.Err }

// Stiffness computes the section properties of every bellows.
func (d *Design) Stiffness() ([]Stiffness, error) {
	out := make([]Stiffness, len(d.Bellows))
	for i, b := range d.Bellows {
		switch {
		case b.Model != nil:
			sec, err := b.Model.Section(d.Fidelity)
			if err != nil {
				return nil, &BellowsError{Index: i, Err: modelFailure(err)}
			}
			src := SourceStrip
			if sec.Fidelity == surrogate.Shell {
				src = SourceShell
			}
			c := b.Model.Calibration
			if (c[0] != 0 && c[0] != 1) || (c[1] != 0 && c[1] != 1) {
				src = SourceCalibrated
			}
			out[i] = Stiffness{EI: sec.EI, GJ: sec.GJ, EA: sec.EA, AxialRate: sec.AxialRatePerConvolution,
				LinearDensity: sec.MassPerLength, Source: src, Section: &sec}
		case b.Measured != nil:
			m := b.Measured
			out[i] = Stiffness{EI: [2][2]float64{{m.EI[0], 0}, {0, m.EI[1]}}, GJ: m.GJ,
				LinearDensity: m.LinearDensity, Source: SourceMeasured}
		default:
			return nil, &BellowsError{Index: i, Err: fmt.Errorf("neither geometry nor measured stiffness given")}
		}
	}
	return out, nil
}

// modelFailure words a stiffness-model failure for the user: an invalid
// input stays as it is (its key positions it); a model that cannot compute
// an accepted geometry says so in plain words, with the shell solver's bare
// reason rather than its package-named message.
func modelFailure(err error) error {
	var ie *surrogate.InputError
	if errors.As(err, &ie) {
		return err
	}
	reason := err.Error()
	var se *shell.SolveError
	if errors.As(err, &se) {
		reason = se.Reason
	}
	return fmt.Errorf("the stiffness model cannot compute this geometry: %s", reason)
}

// Largest and smallest values a design may hold. They lie far beyond any
// bellows that can be printed or bought, and far inside what the models
// compute in floating point: a longer, more curved, stiffer or softer
// bellows is refused as out of range rather than evaluated into overflow
// or an ill-conditioned stiffness matrix. At 10 m a bellows still gets a
// result or a plain reason from the rod statics; at 100 m the shooting
// overflows.
const (
	MaxLength        = 10.0 // m, each of the straight and curved lengths and a thread lead
	MaxPrecurvature  = 1e4  // 1/m (a bend radius of 0.1 mm)
	MaxStiffness     = 1e9  // N·m², measured EI and GJ
	MinStiffness     = 1e-9 // N·m² (1e-3 N·mm²), measured EI and GJ
	MaxLinearDensity = 1e4  // kg/m, measured
)

// rangeErr is an out-of-range value of one design-file key; the key is a
// field, so a loader positions the message without reading its text.
func rangeErr(key, format string, args ...any) error {
	return &surrogate.InputError{Key: key, Msg: fmt.Sprintf(format, args...)}
}

// checkRanges refuses values outside the ranges above, one error per
// value, each starting with the design-file key it belongs to.
func (b Bellows) checkRanges() error {
	var errs []error
	out := func(key string, v, hi, scale float64, unit string) {
		if !(math.Abs(v) <= hi) {
			errs = append(errs, rangeErr(key, "%.6g is out of range (expected at most %.6g %s)", v*scale, hi*scale, unit))
		}
	}
	out("straight_length_mm", b.StraightLength, MaxLength, 1e3, "mm")
	out("curved_length_mm", b.CurvedLength, MaxLength, 1e3, "mm")
	if k := math.Hypot(b.Precurvature[0], b.Precurvature[1]); !(k <= MaxPrecurvature) {
		if b.Precurvature[0] == 0 { // the file form (0, κ)
			errs = append(errs, rangeErr("precurvature_per_m", "%.6g is out of range (expected at most %.6g 1/m in magnitude)", b.Precurvature[1], float64(MaxPrecurvature)))
		} else {
			errs = append(errs, rangeErr("precurvature_xy_per_m", "[%.6g, %.6g] is out of range (expected a magnitude of at most %.6g 1/m)", b.Precurvature[0], b.Precurvature[1], float64(MaxPrecurvature)))
		}
	}
	out("thread_lead_mm", b.ThreadLead, MaxLength, 1e3, "mm")
	if m := b.Measured; m != nil {
		for _, v := range m.EI {
			if !(v <= MaxStiffness) {
				errs = append(errs, rangeErr("bending_stiffness_n_mm2", "[%.6g, %.6g] is out of range (expected each at most %.6g N·mm²)", m.EI[0]*1e6, m.EI[1]*1e6, MaxStiffness*1e6))
				break
			}
			if v < MinStiffness {
				errs = append(errs, rangeErr("bending_stiffness_n_mm2", "[%.6g, %.6g] is out of range (expected each at least %.6g N·mm²)", m.EI[0]*1e6, m.EI[1]*1e6, MinStiffness*1e6))
				break
			}
		}
		out("torsional_stiffness_n_mm2", m.GJ, MaxStiffness, 1e6, "N·mm²")
		if m.GJ < MinStiffness {
			errs = append(errs, rangeErr("torsional_stiffness_n_mm2", "%.6g is out of range (expected at least %.6g N·mm²)", m.GJ*1e6, MinStiffness*1e6))
		}
		out("linear_density_kg_per_m", m.LinearDensity, MaxLinearDensity, 1, "kg/m")
	}
	return errors.Join(errs...)
}

// checkFinite refuses a section the stiffness model could not compute in
// floating point (a geometry far outside the model's range).
func (s Stiffness) checkFinite() error {
	bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
	switch {
	case bad(s.EI[0][0]) || bad(s.EI[0][1]) || bad(s.EI[1][0]) || bad(s.EI[1][1]):
		return fmt.Errorf("the %s stiffness model gives a non-finite bending stiffness (the geometry is beyond what the model represents)", s.Source)
	case bad(s.GJ):
		return fmt.Errorf("the %s stiffness model gives a non-finite torsional stiffness (the geometry is beyond what the model represents)", s.Source)
	case bad(s.LinearDensity):
		return fmt.Errorf("the %s stiffness model gives a non-finite mass per length (the geometry is beyond what the model represents)", s.Source)
	case s.Section != nil && bad(s.Section.StrainPerCurvature):
		return fmt.Errorf("the %s stiffness model gives a non-finite wall strain per curvature (the geometry is beyond what the model represents)", s.Source)
	}
	return nil
}

// Robot builds the nested-tube model of the design. Values outside the
// ranges of MaxLength and its neighbours, and sections the stiffness model
// cannot compute in floating point, are *BellowsError.
func (d *Design) Robot() (*kinematics.Robot, []Stiffness, error) {
	for i, b := range d.Bellows {
		if err := b.checkRanges(); err != nil {
			return nil, nil, &BellowsError{Index: i, Err: err}
		}
	}
	st, err := d.Stiffness()
	if err != nil {
		return nil, nil, err
	}
	for i, s := range st {
		if err := s.checkFinite(); err != nil {
			return nil, nil, &BellowsError{Index: i, Err: err}
		}
	}
	r := &kinematics.Robot{Tubes: make([]kinematics.Tube, len(d.Bellows))}
	for i, b := range d.Bellows {
		r.Tubes[i] = kinematics.Tube{
			StraightLength: b.StraightLength,
			CurvedLength:   b.CurvedLength,
			Precurvature:   b.Precurvature,
			Bending:        st[i].EI,
			Torsion:        st[i].GJ,
			LinearDensity:  st[i].LinearDensity,
		}
		if b.ThreadLead > 0 {
			if i == len(d.Bellows)-1 {
				return nil, nil, &BellowsError{Index: i, Err: fmt.Errorf("threaded, but there is no outer bellows to thread into")}
			}
			r.Threads = append(r.Threads, kinematics.Thread{Inner: i, Lead: b.ThreadLead})
		}
	}
	if err := r.Validate(); err != nil {
		return nil, nil, err
	}
	return r, st, nil
}
