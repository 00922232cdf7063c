// Package verify holds plica's built-in verification cases: values that the
// production code of kinematics, statics, surrogate, stability, calibration,
// front indicators and search computes, each beside the published (or
// derived) value it must match, its tolerance and its source. plica verify
// prints them and TestVerificationCases runs them.
package verify

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"

	"plica/objective/kinematics"
	"plica/search"
	"plica/surrogate"

	"plica/search/front"

	"plica/objective/statics"
)

// Case is one built-in verification case: a value plica computes with its
// production code, the published (or derived) value it must match, the
// tolerance and where the value comes from.
type Case struct {
	Area      string // kinematics, surrogate, elastica, stability, calibration, indicators, search
	Name      string
	Unit      string
	Computed  float64
	Published float64
	// Tolerance is relative to |Published| when Relative, else absolute.
	Tolerance float64
	Relative  bool
	Source    string
	Err       error
}

// Pass reports whether the computed value is within tolerance.
func (c Case) Pass() bool {
	if c.Err != nil || math.IsNaN(c.Computed) {
		return false
	}
	d := math.Abs(c.Computed - c.Published)
	if c.Relative {
		return d <= c.Tolerance*math.Abs(c.Published)
	}
	return d <= c.Tolerance
}

type caseDef struct {
	area, name, unit string
	published, tol   float64
	relative         bool
	source           string
	compute          func() (float64, error)
	slow             bool
}

// Run runs the built-in verification cases. With quick, the slow cases
// (a full NSGA-II run) are left out.
func Run(quick bool) []Case {
	var out []Case
	for _, d := range caseDefs {
		if quick && d.slow {
			continue
		}
		v, err := d.compute()
		out = append(out, Case{Area: d.area, Name: d.name, Unit: d.unit, Computed: v, Published: d.published,
			Tolerance: d.tol, Relative: d.relative, Source: d.source, Err: err})
	}
	return out
}

func isoTube(ls, lc, kappa, ei, gj float64) kinematics.Tube {
	return kinematics.Tube{StraightLength: ls, CurvedLength: lc, Precurvature: [2]float64{0, kappa},
		Bending: [2][2]float64{{ei, 0}, {0, ei}}, Torsion: gj}
}

// elastica solves a straight cantilever (EI = 1, L = 1) under a dead tip
// load α perpendicular to it.
func elastica(alpha float64) (*statics.Shape, error) {
	r := &kinematics.Robot{Tubes: []kinematics.Tube{isoTube(1, 0, 0, 1, 1)}}
	links, err := r.Links(kinematics.Actuation{Theta: []float64{0}, Beta: []float64{0}}, nil)
	if err != nil {
		return nil, err
	}
	return statics.Solve(links, statics.Load{TipForce: [3]float64{0, alpha, 0}}, nil)
}

var caseDefs = []caseDef{
	{"kinematics", "CC-1 quarter arc u=(0,10,0), s=π/20: tip x", "m", 0.1, 1e-12, false,
		"derived from the SE(3) exponential (Lynch & Park, Modern Robotics, 2017); objective/kinematics/REFERENCE.md §5.2",
		func() (float64, error) { return kinematics.LinkTransform([3]float64{0, 10, 0}, math.Pi/20).P[0], nil }, false},
	{"kinematics", "CC-4 near-zero curvature u=(0,1e-6,0), s=0.1: tip x", "m", 5.000000000e-9, 1e-9, true,
		"derived (the (1 − cos x)/k² form gives 4.996e-9); objective/kinematics/REFERENCE.md §5.2",
		func() (float64, error) { return kinematics.LinkTransform([3]float64{0, 1e-6, 0}, 0.1).P[0], nil }, false},
	{"kinematics", "CC-5 full circle u=(0,10,0), s=2π/10: |T − I|", "", 0, 1e-15, false,
		"derived; objective/kinematics/REFERENCE.md §5.2",
		func() (float64, error) {
			p := kinematics.LinkTransform([3]float64{0, 10, 0}, 2*math.Pi/10)
			m := math.Abs(p.P[0]) + math.Abs(p.P[1]) + math.Abs(p.P[2])
			for i := range 3 {
				for j := range 3 {
					id := 0.0
					if i == j {
						id = 1
					}
					m = math.Max(m, math.Abs(p.R[i][j]-id))
				}
			}
			return m, nil
		}, false},
	{"kinematics", "closed-form arc vs gonum mat.Exp of the twist, 200 random twists: max difference", "", 0, 1e-12, false,
		"general-purpose reference library: gonum mat.Exp",
		func() (float64, error) {
			rng := rand.New(rand.NewPCG(1, 2))
			worst := 0.0
			for range 200 {
				u := [3]float64{rng.NormFloat64() * 10, rng.NormFloat64() * 10, rng.NormFloat64() * 5}
				s := rng.Float64() * 0.3
				tw := mat.NewDense(4, 4, []float64{0, -u[2] * s, u[1] * s, 0, u[2] * s, 0, -u[0] * s, 0, -u[1] * s, u[0] * s, 0, s, 0, 0, 0, 0})
				var e mat.Dense
				e.Exp(tw)
				p := kinematics.LinkTransform(u, s)
				for i := range 3 {
					for j := range 3 {
						worst = math.Max(worst, math.Abs(p.R[i][j]-e.At(i, j)))
					}
					worst = math.Max(worst, math.Abs(p.P[i]-e.At(i, 3)))
				}
			}
			return worst, nil
		}, false},
	{"kinematics", "TR-3 anisotropic pair (θA, θB) = (π/4, 0): u_y", "1/m", 8.848845590, 1e-9, true,
		"derived from (3.1); objective/kinematics/REFERENCE.md §5.3",
		func() (float64, error) {
			u, _, err := kinematics.EquilibriumCurvature([]kinematics.LinkTube{
				{Theta: math.Pi / 4, Bending: [2][2]float64{{1, 0}, {0, 3}}, Torsion: 50, Precurvature: [3]float64{0, 10, 0}},
				{Theta: 0, Bending: [2][2]float64{{2, 0}, {0, 0.5}}, Torsion: 50, Precurvature: [3]float64{0, 8, 0}},
			})
			return u[1], err
		}, false},
	{"kinematics", "SEG-1 two tubes (θ1, θ2) = (0, 0): tip x", "m", 0.0541691566, 1e-9, true,
		"derived from objective/kinematics/REFERENCE.md §3.2; objective/kinematics/REFERENCE.md §5.4",
		func() (float64, error) {
			r := &kinematics.Robot{Tubes: []kinematics.Tube{isoTube(0.35, 0.10, 10, 1, 1), isoTube(0.15, 0.10, 5, 2, 2)}}
			p, err := r.Tip(kinematics.Actuation{Theta: []float64{0, 0}, Beta: []float64{-0.25, -0.10}})
			return p.P[0], err
		}, false},
	{"surrogate", "shell element: straight cylinder axial stiffness (R=10, t=0.1, L=5, E=1000)", "", 1256.6370614359173, 1e-9, true,
		"membrane solution 2πREt/L (exact); surrogate/REFERENCE.md §5.3",
		func() (float64, error) { return surrogate.CylinderAxialStiffness(10, 0.1, 5, 1000, 0.3, 37) }, false},
	{"surrogate", "shell element: semi-infinite cylinder radial edge stiffness 2β³D", "", 0.388982, 1e-5, true,
		"Timoshenko & Woinowsky-Krieger, Theory of Plates and Shells, 1959 (from memory); surrogate/REFERENCE.md §5.3",
		func() (float64, error) { return surrogate.CylinderEdgeStiffness(10, 0.1, 1000, 0.3, 480) }, false},
	{"surrogate", "EJMA worked example S1: axial rate per convolution f_iu", "N/m", 4.02982e6, 1e-3, true,
		"EJMA Standards equations as applied in a published worked calculation; surrogate/REFERENCE.md §5.2",
		func() (float64, error) {
			const in = 0.0254
			db, t, w := 38*in, 0.03*in, 1.095*in
			dm := surrogate.EJMAMeanDiameter(db, w, t, 1)
			tp := surrogate.EJMAFormedThickness(t, db, dm)
			return surrogate.EJMAAxialRate(dm, 29.0e6*6894.757293168, tp, 1, w, 1.65), nil
		}, false},
	{"surrogate", "strip model: U-profile Cf_strip(0) (flat flanks)", "", 1, 1e-12, false,
		"derived, guided-cantilever flank; surrogate/REFERENCE.md §2.1, §2.4",
		func() (float64, error) { return surrogate.UCfStrip(0), nil }, false},
	{"elastica", "LD-1 α = PL²/EI = 1: tip angle", "rad", 0.461352, 1e-4, true,
		"Bisshopp & Drucker, Large Deflection of Cantilever Beams, Q. Appl. Math. 3, 1945; objective/statics/REFERENCE.md §5.2",
		func() (float64, error) {
			s, err := elastica(1)
			if err != nil {
				return math.NaN(), err
			}
			return math.Atan2(s.Tip.R[1][2], s.Tip.R[2][2]), nil
		}, false},
	{"elastica", "LD-1 α = 10: deflection along the load δ_y/L", "", 0.810609, 1e-4, true,
		"Bisshopp & Drucker 1945; objective/statics/REFERENCE.md §5.2",
		func() (float64, error) {
			s, err := elastica(10)
			if err != nil {
				return math.NaN(), err
			}
			return s.Tip.P[1], nil
		}, false},
	{"elastica", "small tip load α = 1e-3: δ/L against PL³/3EI", "", 1e-3 / 3, 1e-5, true,
		"Roark's Formulas for Stress and Strain, 7th ed., Table 8.1 case 1a; Gere & Timoshenko, App. G, case 4",
		func() (float64, error) {
			s, err := elastica(1e-3)
			if err != nil {
				return math.NaN(), err
			}
			return s.Tip.P[1], nil
		}, false},
	{"stability", "ST-1 κ1 = κ2 = 10/m, ν = 0.3: critical overlap L_crit", "m", 0.13776795, 1e-7, true,
		"c = (1+ν)κ1κ2 (Dupont et al. 2010; Gilbert, Hendrick & Webster 2016, from memory); numbers derived, objective/kinematics/REFERENCE.md §5.5",
		func() (float64, error) {
			ps, err := kinematics.TwoTubeStability(isoTube(0, 0.1, 10, 1, 1/1.3), isoTube(0, 0.1, 10, 2, 2/1.3), 0.1, [2]float64{})
			return ps.LCrit, err
		}, false},
	{"stability", "ST-2 with transmission β_eff = 0.05 m: L_crit", "m", 0.09232453, 1e-7, true,
		"derived from √c β_eff tan(√c L) = 1; objective/kinematics/REFERENCE.md §5.5",
		func() (float64, error) {
			ps, err := kinematics.TwoTubeStability(isoTube(0, 0.1, 10, 1, 1/1.3), isoTube(0, 0.1, 10, 1, 1/1.3), 0.1, [2]float64{0.05, 0.05})
			return ps.LCrit, err
		}, false},
	{"calibration", "cantilever EI fit of the synthetic vector (L = 100 mm)", "N·mm²", 41084.6, 1e-5, true,
		"derived least squares through the origin; surrogate/REFERENCE.md §4.2, §5.4",
		func() (float64, error) {
			var pts []surrogate.BenchPoint
			for i, p := range []float64{0.05, 0.10, 0.15, 0.20} {
				pts = append(pts, surrogate.BenchPoint{Load: p, Deflection: []float64{0.40, 0.83, 1.21, 1.62}[i] * 1e-3, FreeLength: 0.1})
			}
			f, err := surrogate.FitCantilever(pts, surrogate.FitOptions{})
			return f.EI * 1e6, err
		}, false},
	{"indicators", "hypervolume {(1,3),(2,2),(3,1)} at (4,4)", "", 6, 1e-12, false,
		"derived by strips 3·1 + 2·1 + 1·1; search/front/REFERENCE.md §1.1",
		func() (float64, error) {
			return front.Hypervolume([][]float64{{1, 3}, {2, 2}, {3, 1}}, []float64{4, 4}), nil
		}, false},
	{"indicators", "hypervolume {(1,2,3),(2,3,1),(3,1,2),(2,2,2)} at (4,4,4)", "", 14, 1e-12, false,
		"derived by inclusion–exclusion; search/front/REFERENCE.md §1.1",
		func() (float64, error) {
			return front.Hypervolume([][]float64{{1, 2, 3}, {2, 3, 1}, {3, 1, 2}, {2, 2, 2}}, []float64{4, 4, 4}), nil
		}, false},
	{"indicators", "hypervolume {(1,2,3,4),(4,3,2,1),(2,2,2,2)} at (5,5,5,5) (WFG)", "", 93, 1e-12, false,
		"derived by inclusion–exclusion; search/front/REFERENCE.md §1.1",
		func() (float64, error) {
			return front.Hypervolume([][]float64{{1, 2, 3, 4}, {4, 3, 2, 1}, {2, 2, 2, 2}}, []float64{5, 5, 5, 5}), nil
		}, false},
	{"search", "Nelder–Mead on Rosenbrock from (−1.2, 1): distance to (1, 1)", "", 0, 1e-6, false,
		"Rosenbrock's minimum (1, 1); gonum optimize v0.17.0 Nelder–Mead",
		func() (float64, error) {
			p := search.Rosenbrock([]float64{math.Inf(-1), math.Inf(-1)}, []float64{math.Inf(1), math.Inf(1)})
			res, err := search.Run(context.Background(), p, &search.Settings{MaxEvaluations: 5000}, &search.NelderMead{Initial: []float64{-1.2, 1}})
			if err != nil {
				return math.NaN(), err
			}
			x := res.Population[0].X
			return math.Hypot(x[0]-1, x[1]-1), nil
		}, false},
	{"search", "NSGA-II on ZDT1 (n = 30, N = 100, 25 000 evaluations, seed 1): hypervolume at (1, 1)", "", 2.0 / 3, 0.01, true,
		"Zitzler, Deb & Thiele, Evol. Comput. 8(2), 2000 (front f2 = 1 − sqrt(f1), HV 2/3); Deb et al. 2002",
		func() (float64, error) {
			res, err := search.Run(context.Background(), search.ZDT1(30), &search.Settings{Seed: 1, MaxEvaluations: 25000, Reference: []float64{1, 1}}, &search.NSGA2{})
			if err != nil {
				return math.NaN(), err
			}
			var pts [][]float64
			for _, d := range res.Front {
				pts = append(pts, d.F)
			}
			return front.Hypervolume(pts, []float64{1, 1}), nil
		}, true},
}

// Row renders one case as a row of values for a table.
func (c Case) Row() []string {
	tol := fmt.Sprintf("±%.3g", c.Tolerance)
	if c.Relative {
		tol = fmt.Sprintf("±%.3g rel", c.Tolerance)
	}
	verdict := "PASS"
	if !c.Pass() {
		verdict = "FAIL"
	}
	computed := fmt.Sprintf("%.10g", c.Computed)
	if c.Err != nil {
		computed = "error: " + c.Err.Error()
	}
	return []string{c.Area, c.Name, computed, fmt.Sprintf("%.10g", c.Published), tol, c.Unit, verdict, c.Source}
}
