package problems

import (
	"fmt"
	"strconv"
	"strings"
)

// Goal says whether an objective is minimised or maximised.
type Goal int

const (
	Minimize Goal = iota
	Maximize
)

// Method is the search method of a problem's [search] table.
type Method int

const (
	NSGA2 Method = iota // the default
	GA
)

// CalibrationSource says where a calibration file's stiffness comes from.
type CalibrationSource int

const (
	SourceBench CalibrationSource = iota // cantilever bench test (plica calibrate); the default
	SourceFE                             // finite-element cross-check (plica fe)
)

// FEMesh is the mesh of a finite-element calibration.
type FEMesh int

const (
	MeshCoarse FEMesh = iota
	MeshFine
)

// The names as the files write them: one list per type, indexed by its
// value.
var (
	goalNames              = []string{Minimize: "minimize", Maximize: "maximize"}
	methodNames            = []string{NSGA2: "nsga2", GA: "ga"}
	calibrationSourceNames = []string{SourceBench: "bench", SourceFE: "fe"}
	feMeshNames            = []string{MeshCoarse: "coarse", MeshFine: "fine"}
)

func (g Goal) String() string              { return enumName(goalNames, int(g), "goal") }
func (m Method) String() string            { return enumName(methodNames, int(m), "method") }
func (s CalibrationSource) String() string { return enumName(calibrationSourceNames, int(s), "source") }
func (m FEMesh) String() string            { return enumName(feMeshNames, int(m), "fe_mesh") }

// MarshalText writes the calibration source's name.
func (s CalibrationSource) MarshalText() ([]byte, error) {
	return marshalEnum(calibrationSourceNames, int(s), "source")
}

// MarshalText writes the mesh's name.
func (m FEMesh) MarshalText() ([]byte, error) { return marshalEnum(feMeshNames, int(m), "fe_mesh") }

// UnmarshalText reads a calibration source name; an unknown one is an
// *Error (key "source", no position) that lists the allowed names.
func (s *CalibrationSource) UnmarshalText(text []byte) error {
	v, err := parseEnum(calibrationSourceNames, text, "source")
	if err == nil {
		*s = CalibrationSource(v)
	}
	return err
}

// UnmarshalText reads a mesh name; an unknown one is an *Error (key
// "fe_mesh", no position) that lists the allowed names.
func (m *FEMesh) UnmarshalText(text []byte) error {
	v, err := parseEnum(feMeshNames, text, "fe_mesh")
	if err == nil {
		*m = FEMesh(v)
	}
	return err
}

// MarshalText writes the goal's name.
func (g Goal) MarshalText() ([]byte, error) { return marshalEnum(goalNames, int(g), "goal") }

// MarshalText writes the method's name.
func (m Method) MarshalText() ([]byte, error) { return marshalEnum(methodNames, int(m), "method") }

// UnmarshalText reads a goal name; an unknown one is an *Error (key
// "goal", no position) that lists the allowed names.
func (g *Goal) UnmarshalText(text []byte) error {
	v, err := parseEnum(goalNames, text, "goal")
	if err == nil {
		*g = Goal(v)
	}
	return err
}

// UnmarshalText reads a method name; an unknown one is an *Error (key
// "method", no position) that lists the allowed names.
func (m *Method) UnmarshalText(text []byte) error {
	v, err := parseEnum(methodNames, text, "method")
	if err == nil {
		*m = Method(v)
	}
	return err
}

func enumName(names []string, v int, kind string) string {
	if v >= 0 && v < len(names) {
		return names[v]
	}
	return kind + "(" + strconv.Itoa(v) + ")"
}

func marshalEnum(names []string, v int, kind string) ([]byte, error) {
	if v < 0 || v >= len(names) {
		return nil, fmt.Errorf("%s(%d) has no name", kind, v)
	}
	return []byte(names[v]), nil
}

func parseEnum(names []string, text []byte, key string) (int, error) {
	for i, n := range names {
		if string(text) == n {
			return i, nil
		}
	}
	return 0, &Error{Key: key, Msg: fmt.Sprintf("%q is not allowed (expected one of: %s)", text, strings.Join(names, "|"))}
}
