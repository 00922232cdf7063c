package front

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

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
// memory (verify); search/front/REFERENCE.md §3). The extreme point of axis k is
// the point of least max_j f̂_j/w_j with w = e_k, zeros replaced by 1e-6,
// as NSGA-III finds its extreme points (Deb and Jain, IEEE TEC 18(4),
// 2014; from memory): the point best in every other objective.
// With two objectives these are the points best in each objective (the
// ends of the front); with more they stay distinct where a front has flat
// edges (several points equally best in one objective). Where they span no
// hyperplane (no point lies near an axis), the hyperplane runs through the
// individual minima instead, the point best in each objective, as in
// normal-boundary intersection (Das 1999).
//
// Guards for degenerate sets, each explained in note: one point, or no
// objective with a range, gives distances 0; objectives without a range are
// left out; with one objective left the distance is 1 − f̂ (the best point);
// when the extreme points do not span a hyperplane (two objectives share an
// extreme point) the distance is −‖f̂‖, so the pick is the point closest to
// the ideal point.
func KneeDistances(points [][]float64) (dist []float64, note string) {
	k := FindKnee(points)
	return k.Distances, k.Note
}

// KneeTolerance is the least knee distance (normalised objectives) of a
// knee: a set whose largest distance is smaller has no knee (a linear or
// concave front, up to rounding).
const KneeTolerance = 1e-9

// Knee is the knee of a set of points, by KneeDistances.
type Knee struct {
	// Index is the point of largest knee distance, the lowest index among
	// equals; −1 for an empty set.
	Index int
	// Found says that the set has a knee: Index lies more than
	// KneeTolerance on the ideal side of the hyperplane through the
	// extreme points. Otherwise Index is only the fallback pick that Note
	// explains (one point, a degenerate or flat set, a linear or concave
	// front).
	Found bool
	// Distances holds the knee distance of every point.
	Distances []float64
	// Note explains a degenerate set, an objective left out, or a front
	// without knee; empty for a regular front.
	Note string
}

// FindKnee returns the knee of points (objectives minimised): the one
// definition of the knee that plica pick and the report share. See
// KneeDistances for the distances and their guards.
func FindKnee(points [][]float64) Knee {
	dist, note, found := kneeDistances(points)
	k := Knee{Index: -1, Distances: dist, Note: note}
	for i, d := range dist {
		if k.Index < 0 || d > dist[k.Index] {
			k.Index = i
		}
	}
	k.Found = found && k.Index >= 0 && dist[k.Index] > KneeTolerance
	if !k.Found && found && k.Index >= 0 {
		k.Note = joinNote(k.Note, "no design lies on the ideal side of the hyperplane through the extreme designs (a linear or concave front has no knee); the pick is the design nearest to it")
	}
	return k
}

func joinNote(note, s string) string {
	if note != "" {
		note += "; "
	}
	return note + s
}

// kneeDistances computes KneeDistances; found is false where a guard gave
// the distances (the set has no hyperplane of extreme points).
func kneeDistances(points [][]float64) (dist []float64, note string, found bool) {
	dist = make([]float64, len(points))
	if len(points) <= 1 {
		return dist, "one design: it is the pick", false
	}
	all, varying := normaliseSet(points)
	if len(varying) == 0 {
		return dist, "every design has the same objectives: the first is the pick", false
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
	if m == 1 {
		for i, p := range pts {
			dist[i] = 1 - p[0]
		}
		return dist, joinNote(note, "one objective varies: the knee is the best design in it"), false
	}
	closest := func(why string) ([]float64, string, bool) {
		for i, p := range pts {
			s := 0.0
			for _, v := range p {
				s += v * v
			}
			dist[i] = -math.Sqrt(s)
		}
		return dist, joinNote(note, why+": picked the design closest to the ideal point instead"), false
	}
	// extreme points: for axis k, the design of least max_j f̂_j/w_j with
	// w = e_k (zeros replaced by 1e-6), i.e. nearest the axis; where these
	// span no hyperplane, the best design of each objective
	nrm, c, why := hyperplane(pts, asfExtremes(pts))
	if why != "" {
		if n2, c2, why2 := hyperplane(pts, individualMinima(pts)); why2 == "" {
			nrm, c, why = n2, c2, ""
		}
	}
	if why != "" {
		return closest(why)
	}
	norm := 0.0
	for _, v := range nrm {
		norm += v * v
	}
	norm = math.Sqrt(norm)
	for i, p := range pts {
		s := c
		for j := range m {
			s += nrm[j] * p[j]
		}
		dist[i] = -s / norm
	}
	return dist, note, true
}

// asfExtremes returns, for each axis k, the index of the point of least
// max_j f̂_j/w_j with w = e_k, zeros replaced by 1e-6 (the first of equals).
func asfExtremes(pts [][]float64) []int {
	m := len(pts[0])
	ext := make([]int, m)
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
		ext[k] = best
	}
	return ext
}

// individualMinima returns, for each objective, the index of the point best
// in it (the first of equals): the individual minima of normal-boundary
// intersection (Das 1999).
func individualMinima(pts [][]float64) []int {
	ext := make([]int, len(pts[0]))
	for k := range ext {
		for i, p := range pts {
			if p[k] < pts[ext[k]][k] {
				ext[k] = i
			}
		}
	}
	return ext
}

// hyperplane returns the hyperplane n·f + c = 0 through the points ext of
// pts, oriented so that the ideal point (0) is on its positive side (c < 0),
// or why it has none.
func hyperplane(pts [][]float64, ext []int) (nrm []float64, c float64, why string) {
	m := len(ext)
	a := mat.NewDense(m, m+1, nil)
	for k, i := range ext {
		for j := range m {
			a.Set(k, j, pts[i][j])
		}
		a.Set(k, m, 1)
	}
	// the hyperplane is the null space of [E 1]
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDFull) {
		return nil, 0, "the extreme designs do not define a hyperplane"
	}
	sv := svd.Values(nil)
	if sv[m-1] <= 1e-10*sv[0] {
		return nil, 0, "the extreme designs do not span a hyperplane (one design is extreme on two axes)"
	}
	var v mat.Dense
	svd.VTo(&v)
	nrm, c = make([]float64, m), v.At(m, m)
	norm := 0.0
	for j := range m {
		nrm[j] = v.At(j, m)
		norm += nrm[j] * nrm[j]
	}
	norm = math.Sqrt(norm)
	if norm == 0 || math.Abs(c) <= 1e-12*norm {
		return nil, 0, "the hyperplane through the extreme designs passes through the ideal point"
	}
	if c > 0 {
		c = -c
		for j := range nrm {
			nrm[j] = -nrm[j]
		}
	}
	return nrm, c, ""
}

// PseudoWeights returns the pseudo-weight vector of each point (objectives
// minimised): w_i = ((f_i^max − f_i)/(f_i^max − f_i^min)) / Σ_j (…), where
// the extremes are over the set (Deb, Multi-Objective Optimization using
// Evolutionary Algorithms, 2001; from memory; search/front/REFERENCE.md §3.2).
// w_i near 1 means the point is near the best in objective i. An
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
// memory (verify); search/front/REFERENCE.md §3). The weights multiply, so a larger
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
