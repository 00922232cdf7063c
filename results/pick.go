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

	"gonum.org/v1/gonum/mat"
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
		if near := nearest(c.Column, header); near != "" {
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

// nearest returns the first name of names that starts with s, else the
// name closest to s (Levenshtein distance at most a third of its length),
// or "".
func nearest(s string, names []string) string {
	for _, n := range names {
		if strings.HasPrefix(n, s) {
			return n
		}
	}
	best, bestD := "", len(s)/3+1
	for _, n := range names {
		if d := levenshtein(s, n); d < bestD {
			best, bestD = n, d
		}
	}
	return best
}

func levenshtein(a, b string) int {
	prev := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur := make([]int, len(b)+1)
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev = cur
	}
	return prev[len(b)]
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
		var note string
		score, note = KneeDistances(pts)
		if note != "" && len(cand) > 0 {
			res.Notes = append(res.Notes, note)
		}
		better = func(a, b float64) int { return cmp.Compare(b, a) } // larger first
	case PickPseudoWeights:
		res.Method = fmt.Sprintf("pseudo-weights closest (L1) to %s (Deb 2001)", weightsText(opt.Weights))
		res.ScoreName = "weights_distance"
		pw = PseudoWeights(pts)
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
		score = CompromiseValues(pts, scaled(opt.Weights))
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

// normaliseSet maps points onto [0, 1] between their own ideal and nadir
// points and lists the objectives with a range (the others map to 0).
func normaliseSet(points [][]float64) ([][]float64, []int) {
	if len(points) == 0 {
		return nil, nil
	}
	m := len(points[0])
	n := Normalization{Ideal: make([]float64, m), Nadir: make([]float64, m)}
	for k := range m {
		n.Ideal[k], n.Nadir[k] = math.Inf(1), math.Inf(-1)
		for _, p := range points {
			n.Ideal[k], n.Nadir[k] = min(n.Ideal[k], p[k]), max(n.Nadir[k], p[k])
		}
	}
	var varying []int
	for k := range m {
		if n.Nadir[k] > n.Ideal[k] {
			varying = append(varying, k)
		}
	}
	return n.Apply(points), varying
}

// KneeDistances returns, for each point (objectives minimised), its
// distance from the hyperplane through the extreme points, measured in
// objectives normalised over the set and positive on the side of the ideal
// point: the knee is the point of largest distance (Das, Struct. Optim.
// 18:107–115, 1999; Branke, Deb, Dierolf and Osswald, PPSN 2004; from
// memory (verify); SEARCH.md §9 item 7). The extreme point of axis k is
// the point of least max_j f̂_j/w_j with w = e_k, zeros replaced by 1e-6,
// as NSGA-III finds its extreme points (Deb and Jain, IEEE TEC 18(4),
// 2014; from memory (verify)): the point best in every other objective.
// With two objectives these are the points best in each objective (the
// ends of the front); with more they stay distinct where a front has flat
// edges (several points equally best in one objective). Guards for degenerate sets, each explained in note: one point, or no
// objective with a range, gives distances 0; objectives without a range are
// left out; with one objective left the distance is 1 − f̂ (the best point);
// when the extreme points do not span a hyperplane (two objectives share an
// extreme point) the distance is −‖f̂‖, so the pick is the point closest to
// the ideal point.
func KneeDistances(points [][]float64) (dist []float64, note string) {
	dist = make([]float64, len(points))
	if len(points) <= 1 {
		return dist, "one design: it is the pick"
	}
	all, varying := normaliseSet(points)
	if len(varying) == 0 {
		return dist, "every design has the same objectives: the first is the pick"
	}
	pts := make([][]float64, len(all))
	for i, p := range all {
		q := make([]float64, len(varying))
		for j, k := range varying {
			q[j] = p[k]
		}
		pts[i] = q
	}
	m := len(varying)
	if len(varying) < len(points[0]) {
		note = fmt.Sprintf("%d of %d objectives have no range over these designs and are left out", len(points[0])-m, len(points[0]))
	}
	joinNote := func(s string) {
		if note != "" {
			note += "; "
		}
		note += s
	}
	if m == 1 {
		for i, p := range pts {
			dist[i] = 1 - p[0]
		}
		joinNote("one objective varies: the knee is the best design in it")
		return dist, note
	}
	closest := func(why string) ([]float64, string) {
		for i, p := range pts {
			s := 0.0
			for _, v := range p {
				s += v * v
			}
			dist[i] = -math.Sqrt(s)
		}
		joinNote(why + ": picked the design closest to the ideal point instead")
		return dist, note
	}
	// extreme points: for axis k, the design of least max_j f̂_j/w_j with
	// w = e_k (zeros replaced by 1e-6), i.e. nearest the axis
	a := mat.NewDense(m, m+1, nil)
	for k := range m {
		best, bestV := 0, math.Inf(1)
		for i, p := range pts {
			v := 0.0
			for j, x := range p {
				w := 1e-6
				if j == k {
					w = 1
				}
				v = max(v, x/w)
			}
			if v < bestV {
				best, bestV = i, v
			}
		}
		for j := range m {
			a.Set(k, j, pts[best][j])
		}
		a.Set(k, m, 1)
	}
	// the hyperplane n·f + c = 0 through them is the null space of [E 1]
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDFull) {
		return closest("the extreme designs do not define a hyperplane")
	}
	sv := svd.Values(nil)
	if sv[m-1] <= 1e-10*sv[0] {
		return closest("the extreme designs do not span a hyperplane (one design is extreme on two axes)")
	}
	var v mat.Dense
	svd.VTo(&v)
	nrm, c := make([]float64, m), v.At(m, m)
	norm := 0.0
	for j := range m {
		nrm[j] = v.At(j, m)
		norm += nrm[j] * nrm[j]
	}
	norm = math.Sqrt(norm)
	if norm == 0 || math.Abs(c) <= 1e-12*norm {
		return closest("the hyperplane through the extreme designs passes through the ideal point")
	}
	if c > 0 { // orient so that the ideal point (0) is on the positive side
		c = -c
		for j := range nrm {
			nrm[j] = -nrm[j]
		}
	}
	maxD := math.Inf(-1)
	for i, p := range pts {
		s := c
		for j := range m {
			s += nrm[j] * p[j]
		}
		dist[i] = -s / norm
		maxD = max(maxD, dist[i])
	}
	if maxD <= 1e-12 {
		joinNote("no design lies on the ideal side of the hyperplane through the extreme designs (a linear or concave front has no knee); the pick is the design nearest to it")
	}
	return dist, note
}

// PseudoWeights returns the pseudo-weight vector of each point (objectives
// minimised): w_i = ((f_i^max − f_i)/(f_i^max − f_i^min)) / Σ_j (…), where
// the extremes are over the set (Deb, Multi-Objective Optimization using
// Evolutionary Algorithms, 2001; from memory (verify); SEARCH.md §9 item
// 7). w_i near 1 means the point is near the best in objective i. An
// objective without a range contributes 0; a point with every term 0 gets
// equal weights.
func PseudoWeights(points [][]float64) [][]float64 {
	all, varying := normaliseSet(points)
	out := make([][]float64, len(points))
	for i, p := range all {
		w := make([]float64, len(p))
		s := 0.0
		for _, k := range varying {
			w[k] = 1 - p[k] // (f_max − f)/(f_max − f_min)
			s += w[k]
		}
		for k := range w {
			if s > 0 {
				w[k] /= s
			} else {
				w[k] = 1 / float64(len(w))
			}
		}
		out[i] = w
	}
	return out
}

// CompromiseValues returns, for each point (objectives minimised),
// max_i w_i·f̂_i + ρ Σ_i f̂_i with f̂ normalised over the set and
// ρ = 1e-4: an augmented weighted Chebyshev distance to the ideal point
// (Steuer and Choo, Math. Program. 26:326–344, 1983; Wierzbicki 1980; from
// memory (verify); SEARCH.md §9 item 7). The weights multiply, so a larger
// weight makes that objective matter more; the least value is the pick.
func CompromiseValues(points [][]float64, weights []float64) []float64 {
	const rho = 1e-4
	all, _ := normaliseSet(points)
	out := make([]float64, len(points))
	for i, p := range all {
		worst, s := 0.0, 0.0
		for k, v := range p {
			worst = max(worst, weights[k]*v)
			s += v
		}
		out[i] = worst + rho*s
	}
	return out
}

// WritePicks writes each picked design as a design file dir/pick-NNN.toml
// (NNN the front id), atomically, from its variables in front.csv, and
// sets Picked.File. check and pose accept the files; refine accepts the
// ids.
func (rf *RunFront) WritePicks(dir string, res *PickResult) error {
	if len(res.Picked) == 0 {
		return nil
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("cannot create %s: %w", dir, err)
	}
	f := &Folder{Dir: rf.Dir}
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
			fmt.Fprintf(&b, "%s = %.6g\n", o.Score, p.Objectives[k])
		}
		fmt.Fprintf(&b, "Check it with: plica check THIS_FILE; polish it with: plica refine %s -design %d\n", rf.Dir, p.ID)
		b.WriteString(Caution)
		text, err := rf.Spec.DesignTOML(x, b.String())
		if err != nil {
			return err
		}
		path := filepath.Join(dir, fmt.Sprintf("pick-%03d.toml", p.ID))
		if err := WriteAtomic(path, text); err != nil {
			return err
		}
		p.File = path
	}
	return nil
}
