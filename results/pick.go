package results

import (
	"cmp"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"plica/search/front"

	"plica/problems"
)

// PickedDir is the folder of a run folder where pick writes its designs.
const PickedDir = "picked"

// Condition is one filter of pick -where, COLUMN OP VALUE, on a column of
// front.csv: a number column compared with a number, or any column
// compared for equality with a word (true, false, an option name).
type Condition struct {
	Column string
	Op     string // one of <, <=, >, >=, ==, !=
	Value  string
	num    float64
	isNum  bool
}

func (c Condition) String() string { return c.Column + c.Op + c.Value }

var conditionOps = []string{"<=", ">=", "==", "!=", "<", ">"}

// ParseCondition reads an expression such as "tip_sag_mm<2",
// "reach_mm >= 10" or "pass==true". A single "=" means "==".
func ParseCondition(s string) (Condition, error) {
	expected := "expected COLUMN OP VALUE with OP one of < <= > >= == !=, e.g. tip_sag_mm<2"
	t := strings.TrimSpace(s)
	if t == "" {
		return Condition{}, inputErrorf("empty expression (%s)", expected)
	}
	at := strings.IndexAny(t, "<>=!")
	if at < 0 {
		return Condition{}, inputErrorf("%q has no comparison (%s)", s, expected)
	}
	col, rest := strings.TrimSpace(t[:at]), t[at:]
	for _, wrong := range []string{"=<", "=>"} {
		if strings.HasPrefix(rest, wrong) {
			return Condition{}, inputErrorf("%q: %q is not an operator (did you mean %c=?)", s, wrong, wrong[1])
		}
	}
	op, width := "", 0
	for _, o := range conditionOps {
		if strings.HasPrefix(rest, o) {
			op, width = o, len(o)
			break
		}
	}
	if op == "" {
		if rest[0] != '=' {
			return Condition{}, inputErrorf("%q: %q is not an operator (%s)", s, rest[:1], expected)
		}
		op, width = "==", 1 // "=" means "=="
	}
	val := strings.TrimSpace(rest[width:])
	switch {
	case col == "":
		return Condition{}, inputErrorf("%q has no column before %s (%s)", s, op, expected)
	case val == "":
		return Condition{}, inputErrorf("%q has no value after %s (%s)", s, op, expected)
	case strings.ContainsAny(val, "<>=!"):
		return Condition{}, inputErrorf("%q has more than one comparison (give each as its own -where; they are ANDed)", s)
	case !isWord(col):
		return Condition{}, inputErrorf("%q: %q is not a column name (expected letters, digits, _ and [])", s, col)
	case !isWord(val):
		return Condition{}, inputErrorf("%q: %q is not a value (expected a number or a word)", s, val)
	}
	c := Condition{Column: col, Op: op, Value: val}
	if v, err := strconv.ParseFloat(val, 64); err == nil && !math.IsNaN(v) {
		c.num, c.isNum = v, true
	}
	return c, nil
}

func isWord(s string) bool {
	for _, r := range s {
		if !(r == '_' || r == '.' || r == '-' || r == '+' || r == '[' || r == ']' || r >= '0' && r <= '9' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z') {
			return false
		}
	}
	return s != ""
}

// boundCondition is a condition checked against a front.csv header.
type boundCondition struct {
	Condition
	col     int
	numeric bool // the column holds numbers
}

// bind finds the condition's column and checks that the comparison suits
// it.
func (c Condition) bind(header []string, rows [][]string, file string) (boundCondition, error) {
	col := headerColumn(header, c.Column)
	if col < 0 {
		hint := ""
		if near := problems.Nearest(c.Column, header); near != "" {
			hint = fmt.Sprintf("did you mean %q? ", near)
		}
		return boundCondition{}, inputErrorf("-where %s: %s has no column %q (%sexpected a column of its header)", c, file, c.Column, hint)
	}
	numeric := true
	for _, r := range rows {
		if _, err := strconv.ParseFloat(r[col], 64); err != nil {
			numeric = false
			break
		}
	}
	switch {
	case numeric && !c.isNum:
		return boundCondition{}, inputErrorf("-where %s: column %s holds numbers, %q is not one", c, c.Column, c.Value)
	case !numeric && c.Op != "==" && c.Op != "!=":
		return boundCondition{}, inputErrorf("-where %s: column %s holds words (expected == or !=)", c, c.Column)
	}
	return boundCondition{Condition: c, col: col, numeric: numeric}, nil
}

func (b boundCondition) match(row []string) bool {
	cell := row[b.col]
	if !b.numeric {
		return (cell == b.Value) == (b.Op == "==")
	}
	v, err := strconv.ParseFloat(cell, 64)
	if err != nil || math.IsNaN(v) {
		return false
	}
	switch b.Op {
	case "<":
		return v < b.num
	case "<=":
		return v <= b.num
	case ">":
		return v > b.num
	case ">=":
		return v >= b.num
	case "==":
		return v == b.num
	}
	return v != b.num
}

// PickMethod says how Pick chooses among the designs that pass the filters.
type PickMethod int

const (
	// PickFiltered picks every design that passes the filters.
	PickFiltered PickMethod = iota
	// PickKnee picks the knee (KneeDistances).
	PickKnee
	// PickPseudoWeights picks the design whose pseudo-weights are closest
	// to the given weights (PseudoWeights).
	PickPseudoWeights
	// PickCompromise picks the design of least weighted Chebyshev distance
	// to the ideal point (CompromiseValues).
	PickCompromise
)

// PickOptions controls Pick.
type PickOptions struct {
	Where  []Condition
	Method PickMethod
	// Weights, one per objective, say how much each objective matters for
	// PickPseudoWeights and PickCompromise: a larger weight favours designs
	// that are better in that objective. They are scaled to sum to 1.
	Weights []float64
	// Count is the number of designs PickKnee, PickPseudoWeights and
	// PickCompromise return, best first; zero means 1.
	Count int
}

// Picked is one chosen design.
type Picked struct {
	ID int `json:"id"`
	// Objectives in the scores' own signs and units, in problem order.
	Objectives []float64 `json:"objectives"`
	// Score is the knee distance (normalised, positive towards the ideal
	// point), the L1 distance of the pseudo-weights to the weights, or
	// the compromise value; NaN for PickFiltered.
	Score         jsonNum   `json:"score"`
	PseudoWeights []float64 `json:"pseudo_weights,omitempty"`
	File          string    `json:"file,omitempty"`
}

// PickResult is what Pick chose.
type PickResult struct {
	Run        string   `json:"run"`
	Objectives []string `json:"objectives"`
	Method     string   `json:"method"`
	// ScoreName names Picked.Score: knee_distance, weights_distance or
	// compromise_value; empty for PickFiltered.
	ScoreName  string   `json:"score_name,omitempty"`
	Where      []string `json:"where,omitempty"`
	FrontSize  int      `json:"front_size"`
	Candidates int      `json:"candidates"`
	Picked     []Picked `json:"picked"`
	Notes      []string `json:"notes,omitempty"`
}

// Pick chooses designs of the front: the rows of front.csv that pass every
// condition (ANDed), then, by opt.Method, the knee, the best match of
// pseudo-weights, or the best compromise among them, normalised over the
// designs that passed. An empty choice is not an error: Picked is empty.
func (rf *RunFront) Pick(opt PickOptions) (*PickResult, error) {
	file := filepath.Join(rf.Dir, FrontFile)
	m := len(rf.Spec.Objectives)
	res := &PickResult{Run: rf.Dir, Objectives: ObjectiveLabels(rf.Spec), FrontSize: len(rf.Rows)}
	if rf.Skipped > 0 {
		res.Notes = append(res.Notes, fmt.Sprintf("%d front designs without readable objectives left out", rf.Skipped))
	}
	var conds []boundCondition
	for _, c := range opt.Where {
		b, err := c.bind(rf.Header, rf.Rows, file)
		if err != nil {
			return nil, err
		}
		conds = append(conds, b)
		res.Where = append(res.Where, c.String())
	}
	if opt.Method == PickPseudoWeights || opt.Method == PickCompromise {
		if len(opt.Weights) != m {
			return nil, inputErrorf("%d weights for %d objectives (expected one per objective, in order: %s)", len(opt.Weights), m, strings.Join(res.Objectives, ", "))
		}
		sum := 0.0
		for _, w := range opt.Weights {
			if !(w >= 0) || math.IsInf(w, 0) {
				return nil, inputErrorf("weight %g (expected weights >= 0)", w)
			}
			sum += w
		}
		if sum == 0 {
			return nil, inputErrorf("the weights are all 0 (expected at least one positive weight)")
		}
	}
	var cand []int
	for i, row := range rf.Rows {
		ok := true
		for _, c := range conds {
			if !c.match(row) {
				ok = false
				break
			}
		}
		if ok {
			cand = append(cand, i)
		}
	}
	res.Candidates = len(cand)
	pts := make([][]float64, len(cand))
	for k, i := range cand {
		pts[k] = rf.F[i]
	}
	score := make([]float64, len(cand))
	var pw [][]float64
	better := func(a, b float64) int { return cmp.Compare(a, b) } // smaller first
	switch opt.Method {
	case PickFiltered:
		res.Method = "every design that passes the filters"
		for k := range score {
			score[k] = math.NaN()
		}
		better = func(a, b float64) int { return 0 }
	case PickKnee:
		res.Method = "knee: largest distance, towards the ideal point, from the hyperplane through the extreme designs in normalised objectives (Das 1999; Branke et al. 2004)"
		res.ScoreName = "knee_distance"
		k := front.FindKnee(pts)
		score = k.Distances
		if k.Note != "" && len(cand) > 0 {
			res.Notes = append(res.Notes, k.Note)
		}
		better = func(a, b float64) int { return cmp.Compare(b, a) } // larger first
	case PickPseudoWeights:
		res.Method = fmt.Sprintf("pseudo-weights closest (L1) to %s (Deb 2001)", weightsText(opt.Weights))
		res.ScoreName = "weights_distance"
		pw = front.PseudoWeights(pts)
		w := scaled(opt.Weights)
		for k, p := range pw {
			d := 0.0
			for i := range p {
				d += math.Abs(p[i] - w[i])
			}
			score[k] = d
		}
	case PickCompromise:
		res.Method = fmt.Sprintf("compromise: least weighted Chebyshev distance to the ideal point in normalised objectives, weights %s", weightsText(opt.Weights))
		res.ScoreName = "compromise_value"
		score = front.CompromiseValues(pts, scaled(opt.Weights))
	default:
		return nil, fmt.Errorf("results: unknown pick method %d", opt.Method)
	}
	order := make([]int, len(cand))
	for k := range order {
		order[k] = k
	}
	slices.SortStableFunc(order, func(a, b int) int {
		if c := better(score[a], score[b]); c != 0 {
			return c
		}
		return cmp.Compare(rf.IDs[cand[a]], rf.IDs[cand[b]])
	})
	n := len(order)
	if opt.Method != PickFiltered {
		n = min(n, max(opt.Count, 1))
	}
	for _, k := range order[:n] {
		i := cand[k]
		p := Picked{ID: rf.IDs[i], Objectives: rf.Scores(i), Score: jsonNum(score[k])}
		if pw != nil {
			p.PseudoWeights = pw[k]
		}
		res.Picked = append(res.Picked, p)
	}
	return res, nil
}

func weightsText(w []float64) string {
	parts := make([]string, len(w))
	for i, v := range w {
		parts[i] = strconv.FormatFloat(v, 'g', 4, 64)
	}
	return strings.Join(parts, ",")
}

func scaled(w []float64) []float64 {
	sum := 0.0
	for _, v := range w {
		sum += v
	}
	out := make([]float64, len(w))
	for i, v := range w {
		out[i] = v / sum
	}
	return out
}

// WritePicks writes each picked design as a design file dir/pick-NNN.toml
// (NNN the front id), atomically and all or none, from its variables in
// front.csv, and sets Picked.File. check and pose accept the files; refine
// accepts the ids.
func (rf *RunFront) WritePicks(dir string, res *PickResult) error {
	if len(res.Picked) == 0 {
		return nil
	}
	f := &Folder{Dir: rf.Dir}
	var paths []string
	var texts [][]byte
	for i := range res.Picked {
		p := &res.Picked[i]
		x, err := f.FrontX(rf.Spec, p.ID)
		if err != nil {
			return err
		}
		var b strings.Builder
		fmt.Fprintf(&b, "plica design %d of the front of %s (problem %s), picked by %s.\n", p.ID, rf.Dir, rf.Info.ProblemFile, res.Method)
		if len(res.Where) > 0 {
			fmt.Fprintf(&b, "filters: %s\n", strings.Join(res.Where, " and "))
		}
		for k, o := range rf.Spec.Objectives {
			fmt.Fprintf(&b, "%s = %.6g\n", o.Column(), p.Objectives[k])
		}
		fmt.Fprintf(&b, "Check it with: plica check THIS_FILE; polish it with: plica refine %s -design %d\n", rf.Dir, p.ID)
		b.WriteString(Caution)
		text, err := rf.Spec.DesignTOML(x, b.String())
		if err != nil {
			return err
		}
		paths = append(paths, filepath.Join(dir, fmt.Sprintf("pick-%03d.toml", p.ID)))
		texts = append(texts, text)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("cannot create %s: %w", dir, err)
	}
	if err := WriteAtomicAll(paths, texts); err != nil {
		return err
	}
	for i := range res.Picked {
		res.Picked[i].File = paths[i]
	}
	return nil
}
