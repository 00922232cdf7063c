package problems

import (
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// threadedProblem has categorical variables of every kind, a custom
// material and a threaded inner bellows that takes the outer one's pitch.
const threadedProblem = `name = "threaded pair"

[[material]]
name = "stiff petg"
modulus_across_layers_mpa = 2100
poisson_ratio = 0.38
density_kg_per_m3 = 1270
allowable_strain = 0.02

[[bellows]]
material = ["petg", "stiff petg", "pla"]
profile = ["sinusoid", "trapezoid"]
winding = "helical"
threaded = true
outer_diameter_mm = [16.0, 20.0]
depth_mm = [2.0, 3.0]
wall_mm = [0.45, 0.7]
straight_length_mm = 150.0
curved_length_mm = [60.0, 100.0]
precurvature_per_m = [1.0, 8.0]
spine_width_mm = [0.0, 2.0]
spine_angle_deg = [-30.0, 30.0]

[[bellows]]
material = "petg"
profile = "sinusoid"
winding = ["helical", "revolved"]
outer_diameter_mm = 30.0
depth_mm = [2.0, 3.2]
pitch_mm = [9.0, 12.0]
wall_mm = [0.45, 0.9]
straight_length_mm = [120.0, 150.0]
curved_length_mm = 100.0
precurvature_per_m = [0.5, 6.0]

[load]
payload_g = 20

[workspace]
relative_steps = 8
base_steps = 4

[[objective]]
score = "reach_mm"
goal = "maximize"

[search]
population = 12
`

// fixedDesign writes the problem's design tables with every variable set
// to its value at x, written exactly ('g', -1), and a threaded inner
// bellows given the outer pitch: the design file the candidate stands for.
func fixedDesign(t *testing.T, s *Spec, text string, x []float64) string {
	t.Helper()
	if i := strings.Index(text, "[[objective]]"); i >= 0 {
		text = text[:i]
	}
	value := map[string]string{} // "table.key" -> TOML value
	for j, v := range s.Variables {
		k := fmt.Sprintf("%d.%s", v.Table, v.Key)
		if v.Options != nil {
			value[k] = strconv.Quote(v.Options[option(v, x[j])])
		} else {
			value[k] = strconv.FormatFloat(x[j], 'g', -1, 64)
		}
	}
	pitch := map[int]string{}
	for _, tie := range s.ties {
		if p, ok := value[fmt.Sprintf("%d.pitch_mm", tie[1])]; ok {
			pitch[tie[0]] = p
		}
	}
	line := regexp.MustCompile(`^([a-z_]+) = `)
	var out []string
	table := -1
	for _, l := range strings.Split(text, "\n") {
		if strings.HasPrefix(l, "[") {
			table = -1
		}
		if strings.HasPrefix(l, "[[bellows]]") {
			n := 0
			for _, o := range out {
				if strings.HasPrefix(o, "[[bellows]]") {
					n++
				}
			}
			table = n
			out = append(out, l)
			if p, ok := pitch[table]; ok {
				out = append(out, "pitch_mm = "+p)
			}
			continue
		}
		if m := line.FindStringSubmatch(l); m != nil && table >= 0 {
			if v, ok := value[fmt.Sprintf("%d.%s", table, m[1])]; ok {
				l = m[1] + " = " + v
			}
		}
		out = append(out, l)
	}
	return strings.Join(out, "\n")
}

// TestSettersMatchDesignFile: the design the setters build for a candidate
// equals, field by field, the design read from the equivalent fixed design
// file, for many random candidates.
func TestSettersMatchDesignFile(t *testing.T) {
	demo, err := os.ReadFile("examples/boom-search.toml")
	require.NoError(t, err)
	for _, c := range []struct{ name, text string }{{"demo", string(demo)}, {"threaded", threadedProblem}} {
		t.Run(c.name, func(t *testing.T) {
			s, err := ParseProblem([]byte(c.text), "p.toml")
			require.NoError(t, err)
			if c.name == "threaded" {
				require.Len(t, s.ties, 1, "the inner bellows takes the outer pitch")
			}
			rng := rand.New(rand.NewPCG(7, 11))
			p := s.SearchProblem()
			loaded := 0
			for n := range 60 {
				x := make([]float64, p.Dim)
				for i := range x {
					x[i] = p.Lower[i] + rng.Float64()*(p.Upper[i]-p.Lower[i])
					if p.Categorical[i] > 0 {
						x[i] = float64(rng.IntN(p.Categorical[i]))
					}
				}
				got, gotSc, err := s.Design(x)
				require.NoError(t, err, "candidate %d", n)
				text := fixedDesign(t, s, c.text, x)
				want, wantSc, err := ParseDesign([]byte(text), "fixed.toml")
				if err != nil {
					// Physics the design file checks and a candidate leaves
					// to its evaluation: the evaluation must fail too.
					_, eerr := s.Evaluate(x)
					require.Error(t, eerr, "candidate %d: the design file fails (%v) but the candidate evaluates", n, err)
					continue
				}
				loaded++
				require.Equal(t, want, got, "candidate %d, design file:\n%s", n, text)
				require.Equal(t, wantSc, gotSc, "candidate %d scenario", n)
			}
			assert.Greater(t, loaded, 15, "enough candidates are valid designs to compare")
		})
	}
}

// TestCandidateChecks: values a candidate can break are reported as the
// design-file reader reports them, at the key.
func TestCandidateChecks(t *testing.T) {
	text := strings.Replace(threadedProblem, `winding = "helical"
threaded = true`, `winding = ["helical", "revolved"]
threaded = true`, 1)
	s, err := ParseProblem([]byte(text), "p.toml")
	require.Error(t, err, "the upper bound (revolved) of a threaded bellows is refused at parse time")
	assert.Contains(t, err.Error(), `p.toml:14:1: bellows[1].threaded: a threaded bellows must have winding = "helical"`)
	assert.Nil(t, s)

	// Three profiles: the middle option is not a bound, so only the
	// candidate that picks it is refused.
	text = strings.Replace(threadedProblem, `profile = ["sinusoid", "trapezoid"]`, `profile = ["u", "sinusoid", "u"]
crest_radius_mm = 0.9`, 1)
	s, err = ParseProblem([]byte(text), "p.toml")
	require.NoError(t, err)
	x := s.Midpoint()
	j := -1
	for i, v := range s.Variables {
		if v.Key == "profile" {
			j = i
		}
	}
	require.GreaterOrEqual(t, j, 0)
	x[j] = 1
	_, _, err = s.Design(x)
	require.Error(t, err)
	assert.True(t, IsInputError(err))
	assert.Equal(t, `p.toml:13:1: bellows[1].crest_radius_mm: only used with profile = "u"`, err.Error())
	x[j] = 2
	_, _, err = s.Design(x)
	assert.NoError(t, err)
}

// writeCalibratedProblem writes the demo problem with its outer bellows
// naming cal.toml in a literal (single-quoted) string, and the shipped
// calibration beside it.
func writeCalibratedProblem(t *testing.T, dir string) string {
	t.Helper()
	cal, err := os.ReadFile("examples/boom-calibration.toml")
	require.NoError(t, err)
	require.NoError(t, os.WriteFile(filepath.Join(dir, "cal.toml"), cal, 0o644))
	text, err := os.ReadFile("examples/boom-search.toml")
	require.NoError(t, err)
	s := strings.Replace(string(text), "outer_diameter_mm = 30.0\n", "outer_diameter_mm = 30.0\ncalibration_file = 'cal.toml'\n", 1)
	require.NotEqual(t, string(text), s)
	path := filepath.Join(dir, "p.toml")
	require.NoError(t, os.WriteFile(path, []byte(s), 0o644))
	return path
}

// TestPortableLiteralString: a calibration_file given as a TOML literal
// string is rewritten into calibration/ like a basic string; the copy
// loads from a moved folder, hashes like the original and writes designs
// with the factors.
func TestPortableLiteralString(t *testing.T) {
	path := writeCalibratedProblem(t, t.TempDir())
	s, err := LoadProblem(path)
	require.NoError(t, err)
	text, files, err := s.Portable()
	require.NoError(t, err)
	assert.Contains(t, string(text), `calibration_file = "calibration/cal.toml"`)
	assert.NotContains(t, string(text), "'cal.toml'")
	require.Contains(t, files, "calibration/cal.toml")

	run := filepath.Join(t.TempDir(), "run")
	require.NoError(t, os.MkdirAll(filepath.Join(run, "calibration"), 0o755))
	require.NoError(t, os.WriteFile(filepath.Join(run, "problem.toml"), text, 0o644))
	require.NoError(t, os.WriteFile(filepath.Join(run, "calibration", "cal.toml"), files["calibration/cal.toml"], 0o644))
	moved := filepath.Join(t.TempDir(), "moved")
	require.NoError(t, os.Rename(run, moved))
	m, err := LoadProblem(filepath.Join(moved, "problem.toml"))
	require.NoError(t, err, "the portable copy loads after the folder moved")
	assert.Equal(t, s.Hash(), m.Hash(), "the copy hashes like the original")

	x := s.Midpoint()
	want, err := s.Evaluate(x)
	require.NoError(t, err)
	got, err := m.Evaluate(x)
	require.NoError(t, err)
	assert.Equal(t, want.Scores, got.Scores, "the copy evaluates like the original")
	design, err := m.DesignTOML(x, "test")
	require.NoError(t, err)
	assert.Contains(t, string(design), "calibration_factor = [")
	assert.NotContains(t, string(design), "calibration_file")
	d, _, err := ParseDesign(design, "front.toml")
	require.NoError(t, err)
	assert.NotZero(t, d.Bellows[1].Model.Calibration)

	// Another calibration content gives another hash.
	c, err := LoadCalibration(filepath.Join(filepath.Dir(path), "cal.toml"))
	require.NoError(t, err)
	halve(c)
	require.NoError(t, os.WriteFile(filepath.Join(filepath.Dir(path), "cal.toml"), c.Format(), 0o644))
	s2, err := LoadProblem(path)
	require.NoError(t, err)
	assert.NotEqual(t, s.Hash(), s2.Hash(), "a changed calibration file changes the hash")
}

func halve(c *Calibration) {
	for axis := range 2 {
		c.FittedEI[axis] /= 2
		c.FittedSE[axis] /= 2
		c.FittedCI[axis] = [2]float64{c.FittedCI[axis][0] / 2, c.FittedCI[axis][1] / 2}
		f := &c.Factor[axis]
		f.Value, f.SE, f.CI = f.Value/2, f.SE/2, [2]float64{f.CI[0] / 2, f.CI[1] / 2}
	}
}

// TestCalibrationEditedAfterParse: the calibration is read when the
// problem is parsed; rewriting (or removing) the file afterwards changes
// no candidate, no written design and no hash.
func TestCalibrationEditedAfterParse(t *testing.T) {
	dir := t.TempDir()
	path := writeCalibratedProblem(t, dir)
	s, err := LoadProblem(path)
	require.NoError(t, err)
	x := s.Midpoint()
	before, err := s.Evaluate(x)
	require.NoError(t, err)
	d0, _, err := s.Design(x)
	require.NoError(t, err)
	text0, err := s.DesignTOML(x, "")
	require.NoError(t, err)
	hash0 := s.Hash()

	calPath := filepath.Join(dir, "cal.toml")
	c, err := LoadCalibration(calPath)
	require.NoError(t, err)
	halve(c)
	require.NoError(t, os.WriteFile(calPath, c.Format(), 0o644))

	after, err := s.Evaluate(x)
	require.NoError(t, err)
	assert.Equal(t, before.Scores, after.Scores, "evaluation is a function of the variables only")
	d1, _, err := s.Design(x)
	require.NoError(t, err)
	assert.Equal(t, d0.Bellows[1].Model.Calibration, d1.Bellows[1].Model.Calibration)
	text1, err := s.DesignTOML(x, "")
	require.NoError(t, err)
	assert.Equal(t, string(text0), string(text1))
	assert.Equal(t, hash0, s.Hash())

	require.NoError(t, os.Remove(calPath))
	_, err = s.Evaluate(x)
	assert.NoError(t, err, "no file is read during a search")
}

// TestEnumNames: every enumeration writes and reads its names, and a
// refused name is reported at its key, with position and the allowed
// names.
func TestEnumNames(t *testing.T) {
	for _, p := range []surrogate.Profile{surrogate.Sinusoid, surrogate.UShape, surrogate.Trapezoid} {
		b, err := p.MarshalText()
		require.NoError(t, err)
		var q surrogate.Profile
		require.NoError(t, q.UnmarshalText(b))
		assert.Equal(t, p, q)
	}
	for _, g := range []Goal{Minimize, Maximize} {
		b, err := g.MarshalText()
		require.NoError(t, err)
		var h Goal
		require.NoError(t, h.UnmarshalText(b))
		assert.Equal(t, g, h)
	}
	var w surrogate.Winding
	err := w.UnmarshalText([]byte("spiral"))
	var ie *surrogate.InputError
	require.True(t, errors.As(err, &ie))
	assert.Equal(t, "winding", ie.Key)
	assert.Equal(t, `"spiral" is not allowed (expected one of: revolved|helical)`, ie.Msg)

	demo, err := os.ReadFile("examples/boom-search.toml")
	require.NoError(t, err)
	cases := []struct{ from, to, want string }{
		{`fidelity = "strip"`, `fidelity = "exact"`, `p.toml:7:1: fidelity: "exact" is not allowed (expected one of: strip|shell)`},
		{"material = \"petg\"\nouter_diameter_mm = [16.0, 21.0]", "material = \"petg\"\nprofile = \"zigzag\"\nouter_diameter_mm = [16.0, 21.0]", `p.toml:11:1: bellows[1].profile: "zigzag" is not allowed (expected one of: sinusoid|u|trapezoid)`},
		{"material = \"petg\"\nouter_diameter_mm = 30.0", "material = \"petg\"\nwinding = 3\nouter_diameter_mm = 30.0", `p.toml:21:1: bellows[2].winding: found number 3 (expected one of: revolved|helical)`},
		{`goal = "minimize"`, `goal = "least"`, `p.toml:55:1: objective[2].goal: "least" is not allowed (expected one of: minimize|maximize)`},
		{`method = "nsga2"`, `method = "de"`, `p.toml:58:1: search.method: "de" is not allowed (expected one of: nsga2|ga)`},
	}
	for _, c := range cases {
		text := strings.Replace(string(demo), c.from, c.to, 1)
		require.NotEqual(t, string(demo), text, c.from)
		_, err := ParseProblem([]byte(text), "p.toml")
		require.Error(t, err)
		assert.Equal(t, c.want, err.Error())
	}
}

// TestInputErrorPredicate: every input error of this package matches
// ErrInput, wrapped or joined; a failure while running does not.
func TestInputErrorPredicate(t *testing.T) {
	e := &Error{File: "a.toml", Line: 1, Col: 1, Key: "k", Msg: "m"}
	assert.True(t, errors.Is(e, ErrInput))
	assert.True(t, errors.Is(Errors{e}, ErrInput))
	assert.True(t, IsInputError(fmt.Errorf("loading: %w", e)))
	assert.True(t, IsInputError(errors.Join(errors.New("other"), Errors{e})))
	_, err := ParseProblem([]byte("[search]\nmethod = 1\n"), "p.toml")
	assert.True(t, IsInputError(err))
	_, err = LoadProblem(filepath.Join(t.TempDir(), "none.toml"))
	assert.True(t, IsInputError(err), "a file that cannot be read")
	assert.False(t, IsInputError(errors.New("the disk is full")))
	assert.False(t, IsInputError(&surrogate.InputError{Key: "wall_mm", Msg: "m"}), "a model's own input check is not a file error until positioned")
	assert.False(t, IsInputError(nil))
}
