package problems

import (
	"fmt"
	"math"
	"reflect"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/BurntSushi/toml"

	"plica/objective"
	"plica/surrogate"
)

// A problem file is a design file in which any design variable may be a
// range [lo, hi] (numbers) or a list of options (strings), plus the
// objectives, extra constraints and search settings. The file's own units
// apply to ranges.

// numericVariables are the [[bellows]] keys that may be a range: their
// unit, what the reader expects, and the sign a value must have.
var numericVariables = map[string]numericKey{
	"outer_diameter_mm":  {"mm", "a diameter in mm", positiveValue},
	"depth_mm":           {"mm", "a convolution depth in mm", positiveValue},
	"pitch_mm":           {"mm", "a convolution pitch in mm", positiveValue},
	"wall_mm":            {"mm", "a wall thickness in mm", positiveValue},
	"crest_radius_mm":    {"mm", "a crest radius in mm", positiveValue},
	"flat_fraction":      {"", "a fraction of the pitch in [0, 1)", anyValue},
	"spine_width_mm":     {"mm", "an arc width in mm", nonNegativeValue},
	"spine_angle_deg":    {"deg", "an angle in degrees from the bellows' own +x", anyValue},
	"straight_length_mm": {"mm", "a length in mm", nonNegativeValue},
	"curved_length_mm":   {"mm", "a length in mm", nonNegativeValue},
	"precurvature_per_m": {"1/m", "a curvature in 1/m (bends toward the bellows' own +x)", anyValue},
}

type numericKey struct {
	unit, what string
	sign       int
}

const (
	anyValue = iota
	nonNegativeValue
	positiveValue
)

// check returns the reader's message for a value the key does not accept.
func (k numericKey) check(x float64) (string, bool) {
	switch {
	case math.IsNaN(x) || math.IsInf(x, 0):
		return fmt.Sprintf("%s is not a finite number (expected %s)", nonFiniteName(x), k.what), false
	case k.sign == positiveValue && x <= 0:
		return fmt.Sprintf("%s is out of range (expected %s, > 0)", fmtNum(x), k.what), false
	case k.sign == nonNegativeValue && x < 0:
		return fmt.Sprintf("%s is out of range (expected %s, >= 0)", fmtNum(x), k.what), false
	}
	return "", true
}

// categoricalVariables are the [[bellows]] keys that may be a list of options.
var categoricalVariables = map[string]bool{"material": true, "profile": true, "winding": true}

var (
	problemOnlyKeys = []string{"objective", "constraint", "search"}
	objectiveKeys   = []string{"score", "goal", "quantile"}
	constraintKeys  = []string{"score", "min", "max"}
	searchKeys      = []string{"method", "population", "evaluations", "time", "seed", "workers",
		"stall_generations", "stall_tolerance", "checkpoint_every", "weights"}
)

// Variable is one design variable of a problem.
type Variable struct {
	Table int    // bellows index, 0-based (innermost first)
	Key   string // key in the [[bellows]] table, e.g. "wall_mm"
	Unit  string // unit of Lower and Upper, as in the key name
	// Lower and Upper bound a numeric variable, in the file's units.
	Lower, Upper float64
	// Options lists the choices of a categorical variable (nil: numeric).
	Options []string
}

// Path is the variable's key path, e.g. "bellows[2].wall_mm".
func (v Variable) Path() string { return fmt.Sprintf("bellows[%d].%s", v.Table+1, v.Key) }

// OptionIndex returns the index of a categorical option, or -1.
func (v Variable) OptionIndex(name string) int {
	for i, o := range v.Options {
		if o == name {
			return i
		}
	}
	return -1
}

// Midpoint is the candidate at the middle of every range, with the first
// option of every choice.
func (s *Spec) Midpoint() []float64 {
	x := make([]float64, len(s.Variables))
	for i, v := range s.Variables {
		if v.Options == nil {
			x[i] = (v.Lower + v.Upper) / 2
		}
	}
	return x
}

// Objective is one score to minimise or maximise.
type Objective struct {
	Score    string
	Maximize bool
	// Quantile, in (0, 1), makes the objective the score's quantile under
	// the problem's [scatter] instead of its nominal value (0: nominal).
	Quantile float64
}

// Column is the objective's column name: the score, or the score and
// its quantile in percent ("tip_sag_mm_q95", "reach_mm_q2.5").
func (o Objective) Column() string {
	if o.Quantile == 0 {
		return o.Score
	}
	return o.Score + "_q" + strconv.FormatFloat(o.Quantile*100, 'g', 6, 64)
}

// Goal is the objective's goal, whose String is the file's word
// ("minimize" or "maximize"): what every output writes.
func (o Objective) Goal() Goal {
	if o.Maximize {
		return Maximize
	}
	return Minimize
}

// Constraint is an extra limit on a score, beyond [requirements].
type Constraint struct {
	Score    string
	Min, Max float64 // NaN when not given
}

// SearchSettings are the [search] table, file units.
type SearchSettings struct {
	Method           Method
	Population       int   // 0: default
	Evaluations      int64 // 0: default
	Time             time.Duration
	Seed             uint64
	Workers          int // 0: all cores
	StallGenerations int
	StallTolerance   float64
	CheckpointEvery  int       // generations; 0: default 5
	Weights          []float64 // GA: one per objective
}

// Spec is a decoded problem file.
type Spec struct {
	File        string
	Text        []byte
	Variables   []Variable
	Objectives  []Objective
	Constraints []Constraint
	Search      SearchSettings
	// Scatter is the problem's [scatter] (nil: none). Its Seed is the
	// file's, or 0 when the file gives none: ScatterSeeded fills in the
	// run's seed.
	Scatter *objective.Scatter
	// MinPassProbability is [requirements] min_pass_probability (0: none):
	// every check must pass with at least this probability under Scatter.
	MinPassProbability float64
	// Checks are the requirement checks of every candidate (constraint
	// slots), from objective.CheckNames; CheckUnits their units.
	Checks     []string
	CheckUnits []string

	loc  *locator
	form problemForm // the file as typed values, file units
	cals calibrations
	// ties copies the outer bellows' pitch into a threaded inner bellows
	// that gives none (a threaded pair shares one pitch): inner, outer.
	ties [][2]int
	tmpl template
}

// LoadProblem reads and checks a problem file.
func LoadProblem(path string) (*Spec, error) {
	data, err := readInput(path, "problem file")
	if err != nil {
		return nil, err
	}
	return ParseProblem(data, path)
}

// ParseProblem decodes a problem file. Every problem found is reported at
// once, each with file:line:col, key and what was expected.
func ParseProblem(data []byte, file string) (*Spec, error) {
	r, root, err := decode(data, file, "problem file")
	if err != nil {
		return nil, err
	}
	s := &Spec{File: file, Text: data, loc: r.loc, cals: r.cals}
	s.readObjectives(root)
	s.readConstraints(root)
	s.readSearch(root.sub("search"))
	base := map[string]any{}
	for k, v := range root.m {
		if !contains(problemOnlyKeys, k) {
			base[k] = v
		}
	}
	s.findVariables(r, root)
	if len(r.errs) > 0 {
		return nil, r.errs.sorted()
	}
	// Check the rest of the file with every variable at its lower and at
	// its upper bound (field-level checks; the physics of each candidate is
	// checked when it is evaluated).
	seen := map[string]bool{}
	var lo, hi []float64
	for _, v := range s.Variables {
		if v.Options != nil {
			lo, hi = append(lo, 0), append(hi, float64(len(v.Options)-1))
		} else {
			lo, hi = append(lo, v.Lower), append(hi, v.Upper)
		}
	}
	var tmpl, top *objective.Design
	var sc *objective.Scenario
	var materials map[string]surrogate.Material
	for pass, x := range [][]float64{lo, hi} {
		rr := &reader{file: file, loc: r.loc, cals: r.cals}
		t := rr.root(s.atBounds(base, x))
		d, ins, ms := readDesign(rr, t)
		scn := readScenario(t)
		scn.Workspace.Insertion = ins
		if pass == 0 {
			scn.Scatter = readScatter(t)
		} else {
			// variables are bellows keys: [scatter] is the same at both
			// bounds, read (and its problems reported) once
			t.get("scatter")
		}
		t.finish(append(append(append([]string{}, topKeys...), problemOnlyKeys...), scatterTopKeys...))
		for _, e := range rr.errs {
			if !seen[e.Error()] {
				seen[e.Error()] = true
				r.errs = append(r.errs, e)
			}
		}
		if pass == 0 {
			tmpl, sc, materials = d, &scn, ms
		} else {
			top = d
		}
	}
	if len(r.errs) == 0 {
		checkNesting(r, tmpl, top, sc.Workspace.Insertion)
	}
	if len(r.errs) > 0 {
		return nil, r.errs.sorted()
	}
	if _, err := toml.Decode(string(data), &s.form); err != nil {
		return nil, &Error{File: file, Msg: "cannot read the checked file back: " + err.Error()}
	}
	s.Scatter = sc.Scatter
	s.MinPassProbability = sc.Requirements.MinPassProbability
	s.checkRobust(r, root)
	if len(r.errs) > 0 {
		return nil, r.errs.sorted()
	}
	if err := s.compile(tmpl, sc, materials); err != nil {
		return nil, err
	}
	for _, c := range objective.CheckList(tmpl, sc) {
		s.Checks = append(s.Checks, c.Name)
		s.CheckUnits = append(s.CheckUnits, c.Unit)
	}
	return s, nil
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func (s *Spec) readObjectives(root *table) {
	for _, t := range root.tables("objective") {
		var o Objective
		name, ok := t.text("score")
		if !ok {
			if !t.has("score") {
				t.r.errorf(t.key("score"), "missing (expected one of: %s)", strings.Join(objective.ScoreNames(), "|"))
			}
		} else if _, known := objective.LookupScore(name); !known {
			t.r.errorf(t.key("score"), "%s", unknownScore(name))
		}
		o.Score = name
		var goal Goal
		t.enum("goal", &goal, goalNames)
		o.Maximize = goal == Maximize
		if q, ok := t.number("quantile", "a probability strictly between 0 and 1, e.g. 0.95", false); ok {
			if q <= 0 || q >= 1 {
				t.r.errorf(t.key("quantile"), "%s is out of range (expected a probability strictly between 0 and 1, e.g. 0.95)", fmtNum(q))
			} else {
				o.Quantile = q
			}
		}
		for j, prev := range s.Objectives {
			if ok && prev.Score == name {
				var how string
				if prev.Maximize != o.Maximize {
					how = fmt.Sprintf("%s is %s in objective[%d] and %s here", name, goalWord(prev.Maximize), j+1, goalWord(o.Maximize))
				} else {
					how = fmt.Sprintf("%s is already %s in objective[%d]", name, goalWord(prev.Maximize), j+1)
				}
				t.r.errorf(t.key("score"), "%s (expected each score in one [[objective]] only)", how)
				break
			}
		}
		t.finish(objectiveKeys)
		s.Objectives = append(s.Objectives, o)
	}
	if len(s.Objectives) == 0 && !root.has("objective") {
		root.r.errorf("objective", "no objectives (expected at least one [[objective]] table with score = one of: %s)", strings.Join(objective.ScoreNames(), "|"))
	}
}

func goalWord(maximize bool) string {
	if maximize {
		return "maximized"
	}
	return "minimized"
}

func unknownScore(name string) string {
	msg := fmt.Sprintf("%q is not a score", name)
	if n := Nearest(name, objective.ScoreNames()); n != "" {
		msg += fmt.Sprintf(" (did you mean %q?)", n)
	}
	return msg + " (expected one of: " + strings.Join(objective.ScoreNames(), "|") + ")"
}

func (s *Spec) readConstraints(root *table) {
	for _, t := range root.tables("constraint") {
		c := Constraint{Min: math.NaN(), Max: math.NaN()}
		name, ok := t.text("score")
		if !ok && !t.has("score") {
			t.r.errorf(t.key("score"), "missing (expected one of: %s)", strings.Join(objective.ScoreNames(), "|"))
		} else if _, known := objective.LookupScore(name); ok && !known {
			t.r.errorf(t.key("score"), "%s", unknownScore(name))
		}
		c.Score = name
		if v, ok := t.number("min", "a lower limit in the score's unit", false); ok {
			c.Min = v
		}
		if v, ok := t.number("max", "an upper limit in the score's unit", false); ok {
			c.Max = v
		}
		switch {
		case math.IsNaN(c.Min) && math.IsNaN(c.Max) && !t.has("min") && !t.has("max"):
			t.r.errorf(t.key("score"), "constraint without a limit (expected min = ... or max = ...)")
		case c.Min > c.Max:
			t.r.errorf(t.key("min"), "%s is above max %s (expected min <= max)", fmtNum(c.Min), fmtNum(c.Max))
		}
		t.finish(constraintKeys)
		s.Constraints = append(s.Constraints, c)
	}
}

func (s *Spec) readSearch(t *table) {
	st := &s.Search
	t.enum("method", &st.Method, methodNames)
	st.Population = t.count("population", 4, 100000)
	if v, ok := t.number("evaluations", "a whole number of evaluations >= 1", false); ok {
		if v < 1 || v != math.Trunc(v) {
			t.r.errorf(t.key("evaluations"), "%s is out of range (expected a whole number of evaluations >= 1)", fmtNum(v))
		}
		st.Evaluations = int64(v)
	}
	if v, ok := t.text("time"); ok {
		d, err := time.ParseDuration(v)
		if err != nil || d <= 0 {
			t.r.errorf(t.key("time"), "%q is not a duration (expected e.g. \"90s\", \"20m\" or \"8h\")", v)
		}
		st.Time = d
	}
	if v, ok := t.number("seed", "a whole number >= 0", false); ok {
		if v < 0 || v != math.Trunc(v) {
			t.r.errorf(t.key("seed"), "%s is out of range (expected a whole number >= 0)", fmtNum(v))
		}
		st.Seed = uint64(v)
	}
	st.Workers = t.count("workers", 1, 4096)
	st.StallGenerations = t.count("stall_generations", 1, 1000000)
	if v, ok := t.positive("stall_tolerance", "a relative hypervolume improvement, e.g. 1e-4", false, false); ok {
		st.StallTolerance = v
	}
	st.CheckpointEvery = t.count("checkpoint_every", 1, 1000000)
	if t.has("weights") {
		v, ok := t.get("weights")
		arr, isArr := v.([]any)
		if !ok || !isArr || len(arr) != len(s.Objectives) {
			t.r.errorf(t.key("weights"), "found %s (expected one weight per objective, %d numbers >= 0)", describe(v), len(s.Objectives))
		} else {
			sum, bad := 0.0, false
			for i, e := range arr {
				x, ok := asFloat(e)
				if !ok || x < 0 || math.IsNaN(x) || math.IsInf(x, 0) {
					t.r.errorf(t.key("weights"), "element %d is %s (expected a weight >= 0)", i+1, describe(e))
					bad = true
				}
				sum += x
				st.Weights = append(st.Weights, x)
			}
			if !bad && len(arr) > 0 && sum == 0 {
				t.r.errorf(t.key("weights"), "every weight is 0 (expected at least one weight > 0)")
			}
		}
	}
	if st.Method == GA && !t.has("weights") {
		t.r.errorf(t.key("method"), "\"ga\" optimizes one weighted sum of the objectives but [search] gives no weights (expected weights = [...], one number >= 0 per objective, %d here; or method = \"nsga2\")", len(s.Objectives))
	}
	t.finish(searchKeys)
}

// findVariables finds the ranges and option lists in the [[bellows]]
// tables.
func (s *Spec) findVariables(r *reader, root *table) {
	raw, _ := root.m["bellows"].([]map[string]any)
	for i, b := range raw {
		keys := make([]string, 0, len(b))
		for k := range b {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		path := fmt.Sprintf("bellows[%d]", i+1)
		for _, k := range keys {
			arr, isArr := b[k].([]any)
			if !isArr {
				continue
			}
			if nk, ok := numericVariables[k]; ok {
				unit := nk.unit
				v := Variable{Table: i, Key: k, Unit: unit}
				lo, ok1 := finiteNumber(arr, 0)
				hi, ok2 := finiteNumber(arr, 1)
				switch {
				case len(arr) != 2:
					r.errorf(path+"."+k, "found an array of %d values (expected a number or a range [lo, hi] in %s)", len(arr), unitOr(unit))
					continue
				case !ok1 || !ok2:
					bad := 0
					if ok1 {
						bad = 1
					}
					r.errorf(path+"."+k, "element %d of the range %s (expected a range [lo, hi] of finite numbers in %s)", bad+1, notFinite(arr[bad]), unitOr(unit))
					continue
				case lo > hi:
					r.errorf(path+"."+k, "range [%s, %s] has lo > hi (expected lo <= hi)", fmtNum(lo), fmtNum(hi))
					continue
				}
				v.Lower, v.Upper = lo, hi
				s.Variables = append(s.Variables, v)
				continue
			}
			if categoricalVariables[k] {
				v := Variable{Table: i, Key: k}
				allowed := map[string][]string{"profile": surrogate.ProfileNames(), "winding": surrogate.WindingNames(), "material": s.materialNames(root)}[k]
				for _, e := range arr {
					str, ok := e.(string)
					if !ok {
						r.errorf(path+"."+k, "found %s in the options (expected a list of names)", describe(e))
						v.Options = nil
						break
					}
					if !contains(allowed, str) {
						r.errorf(path+"."+k, "option %q is not allowed (expected: %s)", str, strings.Join(allowed, "|"))
					}
					v.Options = append(v.Options, str)
				}
				if len(arr) == 0 {
					r.errorf(path+"."+k, "empty list of options (expected at least one name)")
				}
				if len(v.Options) > 0 {
					s.Variables = append(s.Variables, v)
				}
			}
		}
		if th, _ := b["threaded"].(bool); th {
			if _, has := b["pitch_mm"]; !has && i+1 < len(raw) {
				s.ties = append(s.ties, [2]int{i, i + 1})
			}
		}
	}
	if len(s.Variables) == 0 && len(raw) > 0 {
		r.errorf("bellows", "no design variables (expected at least one range such as wall_mm = [0.4, 0.8] or a list of options such as material = [\"pla\", \"petg\"])")
	}
}

// materialNames lists the built-in materials and those the file defines.
func (s *Spec) materialNames(root *table) []string {
	names := surrogate.MaterialNames()
	ms, _ := root.m["material"].([]map[string]any)
	for _, m := range ms {
		if n, ok := m["name"].(string); ok {
			names = append(names, n)
		}
	}
	return names
}

func finiteNumber(arr []any, i int) (float64, bool) {
	if i >= len(arr) {
		return 0, false
	}
	x, ok := asFloat(arr[i])
	return x, ok && !math.IsNaN(x) && !math.IsInf(x, 0)
}

func unitOr(u string) string {
	if u == "" {
		return "the key's unit"
	}
	return u
}

// atBounds returns a copy of the file's design tables with the variables
// set to x (numeric values in file units; categorical values as option
// indices), for the checks of the file at its bounds.
func (s *Spec) atBounds(base map[string]any, x []float64) map[string]any {
	m := deepCopy(base).(map[string]any)
	bs, _ := m["bellows"].([]map[string]any)
	for j, v := range s.Variables {
		if v.Options != nil {
			bs[v.Table][v.Key] = v.Options[int(x[j])]
		} else {
			bs[v.Table][v.Key] = x[j]
		}
	}
	for _, t := range s.ties {
		if p, ok := bs[t[1]]["pitch_mm"]; ok {
			bs[t[0]]["pitch_mm"] = p
		}
	}
	return m
}

func deepCopy(v any) any {
	switch x := v.(type) {
	case map[string]any:
		out := make(map[string]any, len(x))
		for k, e := range x {
			out[k] = deepCopy(e)
		}
		return out
	case []map[string]any:
		out := make([]map[string]any, len(x))
		for i, e := range x {
			out[i] = deepCopy(e).(map[string]any)
		}
		return out
	case []any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = deepCopy(e)
		}
		return out
	}
	return v
}

// Requirement is one key of a problem's [requirements] table as the file
// gives it.
type Requirement struct {
	Key   string // e.g. "max_tip_sag_mm"
	Value string // as written: a number, or true or false
	Unit  string // the unit the key names ("mm", "g", "deg", "1/m"), or "" for a ratio or a flag
}

// Requirements lists the [requirements] the problem file gives, in key
// order; absent keys (their defaults) are not listed.
func (s *Spec) Requirements() []Requirement {
	rf := s.form.Requirements
	if rf == nil {
		return nil
	}
	var out []Requirement
	v := reflect.ValueOf(*rf)
	for i := range v.NumField() {
		f := v.Field(i)
		if f.IsNil() {
			continue
		}
		key, _, _ := strings.Cut(v.Type().Field(i).Tag.Get("toml"), ",")
		r := Requirement{Key: key, Unit: keyUnit(key)}
		switch x := f.Interface().(type) {
		case *num:
			if x.isInt {
				r.Value = strconv.FormatInt(x.i, 10)
			} else {
				r.Value = strconv.FormatFloat(x.f, 'g', -1, 64)
			}
		case *bool:
			r.Value = strconv.FormatBool(*x)
		default:
			panic(fmt.Sprintf("problems: requirement %s has type %T", key, x))
		}
		out = append(out, r)
	}
	return out
}

// keyUnit is the unit a key's suffix names.
func keyUnit(key string) string {
	for _, u := range []struct{ suffix, unit string }{{"_mm", "mm"}, {"_g", "g"}, {"_deg", "deg"}, {"_per_m", "1/m"}} {
		if strings.HasSuffix(key, u.suffix) {
			return u.unit
		}
	}
	return ""
}
