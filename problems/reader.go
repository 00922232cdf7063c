package problems

import (
	"encoding"
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"plica/surrogate"
)

// reader walks a decoded TOML document and collects every problem with its
// position; nothing stops at the first error.
type reader struct {
	file string
	loc  *locator
	errs Errors
	cals calibrations // the calibration files read so far
	// calSE is the relative standard error of each calibrated bellows'
	// factors, by bellows table path (for [scatter]).
	calSE map[string][2]float64
}

func (r *reader) errorf(path, format string, args ...any) {
	pos := r.loc.find(path)
	if pos.Line == 0 {
		pos = position{1, 1} // a key missing from the top level: the file as a whole
	}
	r.errs = append(r.errs, &Error{File: r.file, Line: pos.Line, Col: pos.Col, Key: path, Msg: fmt.Sprintf(format, args...)})
}

// table is one TOML table being read; it remembers which keys were used so
// that the rest can be reported as unknown.
type table struct {
	r    *reader
	path string
	m    map[string]any
	used map[string]bool
}

func (r *reader) root(m map[string]any) *table {
	return &table{r: r, m: m, used: map[string]bool{}}
}

func (t *table) key(k string) string { return join(t.path, k) }

func (t *table) has(k string) bool {
	_, ok := t.m[k]
	return ok
}

func (t *table) get(k string) (any, bool) {
	v, ok := t.m[k]
	t.used[k] = true
	return v, ok
}

func describe(v any) string {
	switch x := v.(type) {
	case string:
		return "string " + strconv.Quote(x)
	case bool:
		return fmt.Sprintf("boolean %v", x)
	case int64:
		return fmt.Sprintf("number %d", x)
	case float64:
		return "number " + strconv.FormatFloat(x, 'g', -1, 64)
	case []any, []map[string]any:
		return "an array"
	case map[string]any:
		return "a table"
	}
	return fmt.Sprintf("%T", v)
}

// notFinite says why an array element is not a finite number: "is nan,
// not a finite number", "is string "x", not a number".
func notFinite(v any) string {
	if x, ok := asFloat(v); ok {
		return fmt.Sprintf("is %s, not a finite number", nonFiniteName(x))
	}
	return fmt.Sprintf("is %s, not a number", describe(v))
}

// nonFiniteName writes nan, inf and -inf as TOML does, other numbers as fmtNum.
func nonFiniteName(x float64) string {
	switch {
	case math.IsNaN(x):
		return "nan"
	case math.IsInf(x, 1):
		return "inf"
	case math.IsInf(x, -1):
		return "-inf"
	}
	return fmtNum(x)
}

func asFloat(v any) (float64, bool) {
	switch x := v.(type) {
	case int64:
		return float64(x), true
	case float64:
		return x, true
	}
	return 0, false
}

// number reads a finite number. what describes the expected value, e.g.
// "a length in mm". ok is false when the key is absent or wrong (already
// reported if required or wrong).
func (t *table) number(k, what string, required bool) (float64, bool) {
	v, ok := t.get(k)
	if !ok {
		if required {
			t.r.errorf(t.key(k), "missing (expected %s)", what)
		}
		return 0, false
	}
	x, ok := asFloat(v)
	if !ok {
		if arr, isArr := v.([]any); isArr && len(arr) == 2 {
			t.r.errorf(t.key(k), "found a range (expected %s: a design fixes every value; ranges belong in a problem file for plica search)", what)
			return 0, false
		}
		t.r.errorf(t.key(k), "found %s (expected %s)", describe(v), what)
		return 0, false
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		t.r.errorf(t.key(k), "%s is not a finite number (expected %s)", nonFiniteName(x), what)
		return 0, false
	}
	return x, true
}

// positive reads a number that must be > 0 (or ≥ 0 when allowZero).
func (t *table) positive(k, what string, required, allowZero bool) (float64, bool) {
	x, ok := t.number(k, what, required)
	if !ok {
		return 0, false
	}
	if x < 0 || (x == 0 && !allowZero) {
		cmp := "> 0"
		if allowZero {
			cmp = ">= 0"
		}
		t.r.errorf(t.key(k), "%s is out of range (expected %s, %s)", fmtNum(x), what, cmp)
		return 0, false
	}
	return x, true
}

// numbers reads an array of exactly n finite numbers.
func (t *table) numbers(k string, n int, what string, required bool) ([]float64, bool) {
	v, ok := t.get(k)
	if !ok {
		if required {
			t.r.errorf(t.key(k), "missing (expected %s)", what)
		}
		return nil, false
	}
	arr, ok := v.([]any)
	if !ok || len(arr) != n {
		t.r.errorf(t.key(k), "found %s (expected %s)", describe(v), what)
		return nil, false
	}
	out := make([]float64, n)
	for i, e := range arr {
		if _, ok := finiteNumber(arr, i); !ok {
			t.r.errorf(t.key(k), "element %d %s (expected %s)", i+1, notFinite(e), what)
			return nil, false
		}
		x, _ := asFloat(e)
		out[i] = x
	}
	return out, true
}

// choice reads a string from a fixed set.
func (t *table) choice(k string, allowed []string, def string) string {
	v, ok := t.get(k)
	if !ok {
		return def
	}
	s, ok := v.(string)
	if !ok {
		t.r.errorf(t.key(k), "found %s (expected one of: %s)", describe(v), strings.Join(allowed, "|"))
		return def
	}
	for _, a := range allowed {
		if s == a {
			return s
		}
	}
	t.r.errorf(t.key(k), "%q is not allowed (expected one of: %s)", s, strings.Join(allowed, "|"))
	return def
}

// enum reads a name into v, an enumeration whose UnmarshalText knows its
// names; absent leaves v as it is. names lists them for a value that is
// not a string. A refused name is reported at the key with the message of
// UnmarshalText (an *Error or a *surrogate.InputError without position).
func (t *table) enum(k string, v encoding.TextUnmarshaler, names []string) {
	raw, ok := t.get(k)
	if !ok {
		return
	}
	s, ok := raw.(string)
	if !ok {
		t.r.errorf(t.key(k), "found %s (expected one of: %s)", describe(raw), strings.Join(names, "|"))
		return
	}
	if err := v.UnmarshalText([]byte(s)); err != nil {
		t.r.errorf(t.key(k), "%s", messageOf(err))
	}
}

// messageOf is the message of an input error without its key.
func messageOf(err error) string {
	var e *Error
	var ie *surrogate.InputError
	switch {
	case errors.As(err, &e):
		return e.Msg
	case errors.As(err, &ie):
		return ie.Msg
	}
	return err.Error()
}

// text reads a free string.
func (t *table) text(k string) (string, bool) {
	v, ok := t.get(k)
	if !ok {
		return "", false
	}
	s, ok := v.(string)
	if !ok {
		t.r.errorf(t.key(k), "found %s (expected a string)", describe(v))
		return "", false
	}
	return s, true
}

// boolean reads true or false.
func (t *table) boolean(k string) (bool, bool) {
	v, ok := t.get(k)
	if !ok {
		return false, false
	}
	b, ok := v.(bool)
	if !ok {
		t.r.errorf(t.key(k), "found %s (expected true or false)", describe(v))
		return false, false
	}
	return b, true
}

// tables reads an array of tables ([[k]]); element paths count from 1.
func (t *table) tables(k string) []*table {
	v, ok := t.get(k)
	if !ok {
		return nil
	}
	var ms []map[string]any
	switch x := v.(type) {
	case []map[string]any:
		ms = x
	case []any:
		for _, e := range x {
			m, ok := e.(map[string]any)
			if !ok {
				t.r.errorf(t.key(k), "found %s in an array (expected tables, written [[%s]])", describe(e), k)
				return nil
			}
			ms = append(ms, m)
		}
	default:
		t.r.errorf(t.key(k), "found %s (expected tables, written [[%s]])", describe(v), k)
		return nil
	}
	out := make([]*table, len(ms))
	for i, m := range ms {
		out[i] = &table{r: t.r, path: fmt.Sprintf("%s[%d]", t.key(k), i+1), m: m, used: map[string]bool{}}
	}
	return out
}

// sub reads a table ([k]); absent gives an empty table.
func (t *table) sub(k string) *table {
	v, ok := t.get(k)
	m, isMap := v.(map[string]any)
	if ok && !isMap {
		t.r.errorf(t.key(k), "found %s (expected a table, written [%s])", describe(v), k)
	}
	if m == nil {
		m = map[string]any{}
	}
	return &table{r: t.r, path: t.key(k), m: m, used: map[string]bool{}}
}

// finish reports every key that was not read, with the nearest known key.
func (t *table) finish(known []string) {
	var unknown []string
	for k := range t.m {
		if !t.used[k] {
			unknown = append(unknown, k)
		}
	}
	sort.Strings(unknown)
	where := "at top level"
	if t.path != "" {
		where = "in [" + t.path + "]"
	}
	for _, k := range unknown {
		msg := fmt.Sprintf("unknown key %q %s", k, where)
		if s := Nearest(k, known); s != "" {
			msg += fmt.Sprintf(" (did you mean %q?)", s)
		}
		t.r.errorf(t.key(k), "%s", msg)
	}
}

func fmtNum(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }
