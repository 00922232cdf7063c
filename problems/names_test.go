package problems

import (
	"encoding"
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective"
	"plica/surrogate"
)

// TestTypedEnumNames: every typed name of the files (goal, method, calibration
// source, FE mesh, printing process, stiffness source) writes and reads
// back through MarshalText and UnmarshalText from its one name list, and
// an unknown name is an input error at its key that lists the names.
func TestTypedEnumNames(t *testing.T) {
	type enum interface {
		encoding.TextMarshaler
		String() string
	}
	cases := []struct {
		key   string
		names []string
		value func(i int) enum
		fresh func() encoding.TextUnmarshaler
		read  func(u encoding.TextUnmarshaler) string
	}{
		{"goal", goalNames, func(i int) enum { return Goal(i) }, func() encoding.TextUnmarshaler { return new(Goal) },
			func(u encoding.TextUnmarshaler) string { return u.(*Goal).String() }},
		{"method", methodNames, func(i int) enum { return Method(i) }, func() encoding.TextUnmarshaler { return new(Method) },
			func(u encoding.TextUnmarshaler) string { return u.(*Method).String() }},
		{"source", calibrationSourceNames, func(i int) enum { return CalibrationSource(i) }, func() encoding.TextUnmarshaler { return new(CalibrationSource) },
			func(u encoding.TextUnmarshaler) string { return u.(*CalibrationSource).String() }},
		{"fe_mesh", feMeshNames, func(i int) enum { return FEMesh(i) }, func() encoding.TextUnmarshaler { return new(FEMesh) },
			func(u encoding.TextUnmarshaler) string { return u.(*FEMesh).String() }},
		{"process", objective.ProcessNames(), func(i int) enum { return objective.Process(i) }, func() encoding.TextUnmarshaler { return new(objective.Process) },
			func(u encoding.TextUnmarshaler) string { return u.(*objective.Process).String() }},
		{"stiffness_source", []string{"strip", "shell", "measured", "calibrated"}, func(i int) enum { return objective.Source(i) },
			func() encoding.TextUnmarshaler { return new(objective.Source) },
			func(u encoding.TextUnmarshaler) string { return u.(*objective.Source).String() }},
	}
	for _, c := range cases {
		for i, name := range c.names {
			b, err := c.value(i).MarshalText()
			require.NoError(t, err, c.key)
			assert.Equal(t, name, string(b), c.key)
			assert.Equal(t, name, c.value(i).String(), c.key)
			u := c.fresh()
			require.NoError(t, u.UnmarshalText(b), c.key)
			assert.Equal(t, name, c.read(u), c.key)
		}
		err := c.fresh().UnmarshalText([]byte("bogus"))
		require.Error(t, err, c.key)
		assert.Contains(t, messageOf(err), `"bogus" is not allowed (expected one of: `, c.key)
		var e *Error
		var ie *surrogate.InputError
		switch {
		case errors.As(err, &e):
			assert.Equal(t, c.key, e.Key)
		case errors.As(err, &ie):
			assert.Equal(t, c.key, ie.Key)
		default:
			t.Errorf("%s: %v is not an input error with a key", c.key, err)
		}
	}
}

// TestTypedNamesInFiles: a bad process or calibration source is reported
// at its key with the names allowed.
func TestTypedNamesInFiles(t *testing.T) {
	_, _, err := ParseDesign([]byte("[[bellows]]\nstraight_length_mm = 1.0\ncurved_length_mm = 1.0\nprecurvature_per_m = 1.0\n"+
		"bending_stiffness_n_mm2 = [1.0e6, 1.0e6]\ntorsional_stiffness_n_mm2 = 5.0e7\nlinear_density_kg_per_m = 0.05\n"+
		"[printer]\nprocess = \"sla\"\n"), "d.toml")
	assert.ErrorContains(t, err, `d.toml:9:1: printer.process: "sla" is not allowed (expected one of: fff|resin|powder)`)
	_, err = ParseCalibration([]byte("source = \"guess\"\n"), "c.toml")
	assert.ErrorContains(t, err, `c.toml:1:1: source: "guess" is not allowed (expected one of: bench|fe)`)
}

// TestObjectiveGoal: an objective's goal is written with the file's word.
func TestObjectiveGoal(t *testing.T) {
	assert.Equal(t, "maximize", Objective{Score: "reach_mm", Maximize: true}.Goal().String())
	assert.Equal(t, "minimize", Objective{Score: "tip_sag_mm"}.Goal().String())
}

// TestSpecRequirements: the [requirements] of a problem, typed, in key
// order, with the unit each key names; the shipped search problem is read.
func TestSpecRequirements(t *testing.T) {
	s, err := LoadProblem("examples/boom-search.toml")
	require.NoError(t, err)
	reqs := s.Requirements()
	require.NotEmpty(t, reqs)
	for i, r := range reqs {
		assert.Contains(t, requirementKeys, r.Key)
		assert.NotEmpty(t, r.Value, r.Key)
		if i > 0 {
			assert.Less(t, reqs[i-1].Key, r.Key, "key order")
		}
	}
	text := string(s.Text) + "\n"
	s, err = ParseProblem([]byte(strings.Replace(text, "[requirements]", "[requirements]\nwithin_validated_range = false\nmin_stability_margin = 0.25", 1)), "p.toml")
	require.NoError(t, err)
	var got []Requirement
	for _, r := range s.Requirements() {
		if r.Key == "within_validated_range" || r.Key == "min_stability_margin" || r.Key == "max_tip_sag_mm" {
			got = append(got, r)
		}
	}
	assert.Contains(t, got, Requirement{Key: "within_validated_range", Value: "false"})
	assert.Contains(t, got, Requirement{Key: "min_stability_margin", Value: "0.25"})
	assert.Contains(t, got, Requirement{Key: "max_tip_sag_mm", Value: "4", Unit: "mm"})
	assert.Equal(t, "mm", keyUnit("max_tip_sag_mm"))
	assert.Equal(t, "g", keyUnit("max_mass_g"))
	assert.Equal(t, "1/m", keyUnit("max_residual_curvature_per_m"))
	assert.Equal(t, "", keyUnit("min_payload_to_weight"))
}
