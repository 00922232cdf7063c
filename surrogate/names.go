package surrogate

import (
	"fmt"
	"strconv"
	"strings"
)

// The names of the enumerations as design files, calibration files and
// messages write them: one list per type, indexed by its value.
var (
	profileNames  = []string{Sinusoid: "sinusoid", UShape: "u", Trapezoid: "trapezoid"}
	fidelityNames = []string{Strip: "strip", Shell: "shell"}
	windingNames  = []string{Revolved: "revolved", Helical: "helical"}
)

// Winding is how the convolutions run: revolved rings or one helical
// thread (Geometry.Helical).
type Winding int

const (
	// Revolved: axisymmetric convolutions.
	Revolved Winding = iota
	// Helical: single-start helical convolutions (lead = pitch).
	Helical
)

// ProfileNames, FidelityNames and WindingNames list the names of each
// enumeration in the order of its values.
func ProfileNames() []string  { return append([]string(nil), profileNames...) }
func FidelityNames() []string { return append([]string(nil), fidelityNames...) }
func WindingNames() []string  { return append([]string(nil), windingNames...) }

func name(names []string, v int, kind string) string {
	if v >= 0 && v < len(names) {
		return names[v]
	}
	return kind + "(" + strconv.Itoa(v) + ")"
}

// parseName finds text among names; the error is an *InputError under key
// whose message says what is allowed.
func parseName(names []string, text []byte, key string) (int, error) {
	for i, n := range names {
		if string(text) == n {
			return i, nil
		}
	}
	return 0, &InputError{Key: key, Msg: fmt.Sprintf("%q is not allowed (expected one of: %s)", text, strings.Join(names, "|"))}
}

func marshalName(names []string, v int, kind string) ([]byte, error) {
	if v < 0 || v >= len(names) {
		return nil, fmt.Errorf("%s(%d) has no name", kind, v)
	}
	return []byte(names[v]), nil
}

// String returns the profile's name as used in messages and design files.
func (p Profile) String() string { return name(profileNames, int(p), "profile") }

// MarshalText writes the profile's name.
func (p Profile) MarshalText() ([]byte, error) { return marshalName(profileNames, int(p), "profile") }

// UnmarshalText reads a profile name; an unknown name is an *InputError
// (key "profile") listing the allowed names.
func (p *Profile) UnmarshalText(text []byte) error {
	v, err := parseName(profileNames, text, "profile")
	if err == nil {
		*p = Profile(v)
	}
	return err
}

// String returns "strip" or "shell".
func (f Fidelity) String() string { return name(fidelityNames, int(f), "fidelity") }

// MarshalText writes the fidelity's name.
func (f Fidelity) MarshalText() ([]byte, error) {
	return marshalName(fidelityNames, int(f), "fidelity")
}

// UnmarshalText reads a fidelity name; an unknown name is an *InputError
// (key "fidelity") listing the allowed names.
func (f *Fidelity) UnmarshalText(text []byte) error {
	v, err := parseName(fidelityNames, text, "fidelity")
	if err == nil {
		*f = Fidelity(v)
	}
	return err
}

// String returns "revolved" or "helical".
func (w Winding) String() string { return name(windingNames, int(w), "winding") }

// MarshalText writes the winding's name.
func (w Winding) MarshalText() ([]byte, error) { return marshalName(windingNames, int(w), "winding") }

// UnmarshalText reads a winding name; an unknown name is an *InputError
// (key "winding") listing the allowed names.
func (w *Winding) UnmarshalText(text []byte) error {
	v, err := parseName(windingNames, text, "winding")
	if err == nil {
		*w = Winding(v)
	}
	return err
}
