package problems

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"

	"plica/objective"
)

// seedCorpus adds every TOML file of the shipped examples and the bad-input
// corpus.
func seedCorpus(f *testing.F) {
	for _, pattern := range []string{"examples/*.toml", "starter.toml", "testdata/design-errors/*.toml", "testdata/problem-errors/*.toml"} {
		files, _ := filepath.Glob(pattern)
		for _, name := range files {
			b, err := os.ReadFile(name)
			if err == nil {
				f.Add(b)
			}
		}
	}
}

// checkParseError: a failure is an input error (ours or the TOML
// library's), with a position inside the input when it has one; never a
// panic.
func checkParseError(t *testing.T, data []byte, err error) {
	if err == nil {
		return
	}
	if !IsInputError(err) {
		var pe toml.ParseError
		if !errors.As(err, &pe) {
			t.Fatalf("error is neither *problems.Error nor toml.ParseError: %T %v", err, err)
		}
	}
	var e *Error
	if errors.As(err, &e) && e.Line > 0 {
		lines := 1
		for _, c := range data {
			if c == '\n' {
				lines++
			}
		}
		if e.Line > lines {
			t.Fatalf("error line %d beyond the input's %d lines: %v", e.Line, lines, err)
		}
	}
}

// FuzzParseDesign: the design parser never panics, and a design it accepts,
// whatever its values, builds a robot and evaluates without a panic: either
// a failure with a one-line reason, or a result whose every printed score
// is finite (NaN only where the model documents it: the wall strain of
// bellows without a wall model, a clearance with an unknown diameter).
func FuzzParseDesign(f *testing.F) {
	seedCorpus(f)
	// Values the range checks and the physics must handle.
	for _, v := range []string{"1e120", "1e300", "1e-300", "99999", "1e5"} {
		f.Add([]byte("[[bellows]]\nstraight_length_mm = " + v + "\ncurved_length_mm = 100.0\nprecurvature_per_m = 10.0\n" +
			"bending_stiffness_n_mm2 = [1.0e6, " + v + "]\ntorsional_stiffness_n_mm2 = 5.0e7\nlinear_density_kg_per_m = 0.05\n"))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		d, sc, err := ParseDesign(data, "fuzz.toml")
		checkParseError(t, data, err)
		if err != nil {
			return
		}
		if sc == nil {
			t.Fatal("a parsed design has a scenario")
		}
		if _, _, err := d.Robot(); err != nil {
			t.Fatalf("an accepted design must build: %v", err)
		}
		checkEvaluation(t, d, sc)
	})
}

// checkEvaluation evaluates a design on a coarse workspace (the values of
// the design are the fuzzer's): a failure says why in one line without an
// internal error, and a result without a failure holds no NaN or Inf but
// the documented ones.
func checkEvaluation(t *testing.T, d *objective.Design, sc *objective.Scenario) {
	t.Helper()
	coarse := *sc
	coarse.Workspace.RelativeSteps, coarse.Workspace.BaseSteps = 4, 2
	coarse.Workspace.InsertionSteps, coarse.Workspace.Samples = 2, 16
	res, err := objective.Evaluate(d, &coarse)
	if err != nil {
		msg := err.Error()
		if msg == "" || strings.Contains(msg, "\n") || strings.Contains(msg, "internal error") {
			t.Fatalf("a failed evaluation says why in one line, without an internal error: %q", msg)
		}
		return
	}
	for _, s := range objective.AllScores() {
		v := s.Value(&res.Scores)
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			continue
		}
		documented := math.IsNaN(v) && (s.Name == "min_clearance_mm" ||
			((s.Name == "peak_strain" || s.Name == "allowable_strain" || s.Name == "strain_ratio") && !hasWallModel(d)))
		if !documented {
			t.Fatalf("score %s is %v in a result without a failure", s.Name, v)
		}
	}
	for _, c := range res.Checks {
		if math.IsNaN(c.Value) || math.IsInf(c.Value, 0) {
			t.Fatalf("check %s is %v in a result without a failure", c.Name, c.Value)
		}
	}
}

func hasWallModel(d *objective.Design) bool {
	for _, b := range d.Bellows {
		if b.Model != nil {
			return true
		}
	}
	return false
}

// FuzzParseProblem: the problem parser never panics; an accepted problem
// gives a search problem whose bounds are ordered, and the candidates at
// its lower bounds, upper bounds and midpoint are either refused with an
// input error or built (Robot) and evaluated like a design file's: a
// failure is a one-line reason, never a panic or an undocumented NaN.
func FuzzParseProblem(f *testing.F) {
	seedCorpus(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ParseProblem(data, "fuzz.toml")
		checkParseError(t, data, err)
		if err != nil {
			return
		}
		p := s.SearchProblem()
		for i := range p.Lower {
			if !(p.Lower[i] <= p.Upper[i]) {
				t.Fatalf("variable %d: bounds [%g, %g]", i, p.Lower[i], p.Upper[i])
			}
		}
		for _, x := range [][]float64{p.Lower, p.Upper, s.Midpoint()} {
			d, sc, err := s.Design(x)
			if err != nil {
				if !IsInputError(err) {
					t.Fatalf("candidate %v: %T %v", x, err, err)
				}
				continue
			}
			if _, _, err := d.Robot(); err != nil {
				if msg := err.Error(); msg == "" || strings.Contains(msg, "\n") {
					t.Fatalf("candidate %v: a refused robot says why in one line: %q", x, msg)
				}
				continue
			}
			checkEvaluation(t, d, sc)
		}
	})
}

// FuzzEvaluate evaluates random in-bound designs of the demo problem: the
// evaluator never panics, and every objective and constraint is finite
// unless the evaluation reports why it failed (the search then records the
// design as infeasible with that reason).
func FuzzEvaluate(f *testing.F) {
	s, err := LoadProblem("examples/boom-search.toml")
	if err != nil {
		f.Fatal(err)
	}
	// A coarse workspace keeps each evaluation short.
	s.tmpl.scenario.Workspace.RelativeSteps, s.tmpl.scenario.Workspace.BaseSteps = 8, 4
	p := s.SearchProblem()
	f.Add(0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5)
	f.Add(0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0)
	f.Add(1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0)
	f.Add(1.0, 0.0, 1.0, 0.0, 1.0, 0.0, 1.0, 0.0, 1.0)
	f.Fuzz(func(t *testing.T, u0, u1, u2, u3, u4, u5, u6, u7, u8 float64) {
		u := []float64{u0, u1, u2, u3, u4, u5, u6, u7, u8}
		x := make([]float64, p.Dim)
		for i := range x {
			v := u[i%len(u)]
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return
			}
			v -= math.Floor(v) // any number maps into the unit box
			x[i] = p.Lower[i] + v*(p.Upper[i]-p.Lower[i])
			if p.Categorical[i] > 0 {
				x[i] = math.Floor(v * float64(p.Categorical[i]))
			}
		}
		fv := make([]float64, p.NumObjectives)
		gv := make([]float64, p.NumConstraints)
		if err := p.Evaluate(t.Context(), 0, x, fv, gv); err != nil {
			if err.Error() == "" {
				t.Fatal("a failed evaluation must say why")
			}
			return
		}
		for i, v := range append(fv, gv...) {
			if v != v || v > 1e300 || v < -1e300 {
				t.Fatalf("output %d is %g at x = %v without a failure reason", i, v, x)
			}
		}
	})
}

// FuzzParseCalibration: the calibration parser never panics; a failure is
// a positioned input error inside the input, one line per problem; a file
// it accepts is written back by Format into text that parses again to the
// same text (the writer and the reader agree).
func FuzzParseCalibration(f *testing.F) {
	for _, pattern := range []string{"testdata/calibration/*.toml", "testdata/design-errors/*.toml"} {
		files, _ := filepath.Glob(pattern)
		for _, name := range files {
			if b, err := os.ReadFile(name); err == nil {
				f.Add(b)
			}
		}
	}
	f.Add([]byte("material = \"petg\"\nbellows = " + strings.Repeat("[", 40) + strings.Repeat("]", 40) + "\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := ParseCalibration(data, "fuzz.toml")
		if err != nil {
			checkParseError(t, data, err)
			if !IsInputError(err) {
				t.Fatalf("not an input error: %T %v", err, err)
			}
			for _, line := range strings.Split(err.Error(), "\n") {
				if !strings.HasPrefix(line, "fuzz.toml") {
					t.Fatalf("a line that does not name the file: %q", line)
				}
			}
			return
		}
		text := c.Format()
		c2, err := ParseCalibration(text, "fuzz.toml")
		if err != nil {
			t.Fatalf("the written calibration does not parse: %v\n%s", err, text)
		}
		if again := c2.Format(); !bytes.Equal(again, text) {
			t.Fatalf("written, read and written again differs:\n%s\n---\n%s", text, again)
		}
		if c2.Material != c.Material || c2.Printer != c.Printer || c2.BenchFile != c.BenchFile || c2.DesignFile != c.DesignFile ||
			c2.Bellows != c.Bellows || c2.Profile != c.Profile || c2.Fidelity != c.Fidelity || c2.Points != c.Points || c2.Model != c.Model {
			t.Fatalf("the round trip changed a field: %+v vs %+v", c, c2)
		}
	})
}
