// Package objective turns one manipulator design into the numbers a
// designer decides on. It knows nothing of files: the problems package
// builds a Design from a file, in SI units.
//
// All quantities are SI: metres, radians, newtons, N·m², kg/m.
package objective

import (
	"fmt"

	"plica/objective/kinematics"
	"plica/surrogate"
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
	// Source says where the numbers come from: "strip", "shell",
	// "measured" or "calibrated" (surrogate with a calibration factor).
	Source string
	// Section is the full surrogate output; nil for measured stiffness.
	Section *surrogate.Section
}

// BellowsError is a failure that belongs to one bellows of a design.
type BellowsError struct {
	Index int // 0-based, innermost first
	Err   error
}

func (e *BellowsError) Error() string {
	return fmt.Sprintf("bellows %d: %v", e.Index+1, e.Err)
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
				return nil, &BellowsError{Index: i, Err: err}
			}
			src := "strip"
			if sec.Fidelity == surrogate.Shell {
				src = "shell"
			}
			c := b.Model.Calibration
			if (c[0] != 0 && c[0] != 1) || (c[1] != 0 && c[1] != 1) {
				src = "calibrated"
			}
			out[i] = Stiffness{EI: sec.EI, GJ: sec.GJ, EA: sec.EA, AxialRate: sec.AxialRatePerConvolution,
				LinearDensity: sec.MassPerLength, Source: src, Section: &sec}
		case b.Measured != nil:
			m := b.Measured
			out[i] = Stiffness{EI: [2][2]float64{{m.EI[0], 0}, {0, m.EI[1]}}, GJ: m.GJ,
				LinearDensity: m.LinearDensity, Source: "measured"}
		default:
			return nil, &BellowsError{Index: i, Err: fmt.Errorf("neither geometry nor measured stiffness given")}
		}
	}
	return out, nil
}

// Robot builds the nested-tube model of the design.
func (d *Design) Robot() (*kinematics.Robot, []Stiffness, error) {
	st, err := d.Stiffness()
	if err != nil {
		return nil, nil, err
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
