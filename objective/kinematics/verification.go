package kinematics

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
)

// VerificationCase is a published (or derived) value that this package's
// production code must reproduce. plica verify prints it (package
// results/verify gathers the cases of every model package) and the
// package's tests run it; the value is written here and nowhere else.
type VerificationCase struct {
	Area      string // the heading plica verify lists it under
	Name      string
	Unit      string
	Published float64
	Tolerance float64 // relative to |Published| when Relative, else absolute
	Relative  bool
	Source    string // where Published comes from: author, title, year, equation or table
	Slow      bool   // left out by plica verify -quick and go test -short
	Compute   func() (float64, error)
}

// VerificationCases returns the package's verification cases: closed-form
// arcs, link curvature, segmentation and snap-through stability.
func VerificationCases() []VerificationCase {
	return []VerificationCase{verifyCC1, verifyCC4, verifyCC5, verifyExp, verifyTR3, verifySEG1, verifyST1, verifyST2}
}

// verificationTube is a plain tube with isotropic bending stiffness ei,
// pre-curved by kappa toward its own +x.
func verificationTube(ls, lc, kappa, ei, gj float64) Tube {
	return Tube{StraightLength: ls, CurvedLength: lc, Precurvature: [2]float64{0, kappa},
		Bending: [2][2]float64{{ei, 0}, {0, ei}}, Torsion: gj}
}

var (
	verifyCC1 = VerificationCase{Area: "kinematics", Name: "CC-1 quarter arc u=(0,10,0), s=π/20: tip x", Unit: "m",
		Published: 0.1, Tolerance: 1e-12,
		Source:  "derived from the SE(3) exponential (Lynch & Park, Modern Robotics, 2017); objective/kinematics/REFERENCE.md §5.2",
		Compute: func() (float64, error) { return LinkTransform([3]float64{0, 10, 0}, math.Pi/20).P[0], nil }}

	verifyCC4 = VerificationCase{Area: "kinematics", Name: "CC-4 near-zero curvature u=(0,1e-6,0), s=0.1: tip x", Unit: "m",
		Published: 5.000000000e-9, Tolerance: 1e-9, Relative: true,
		Source:  "derived (the (1 − cos x)/k² form gives 4.996e-9); objective/kinematics/REFERENCE.md §5.2",
		Compute: func() (float64, error) { return LinkTransform([3]float64{0, 1e-6, 0}, 0.1).P[0], nil }}

	verifyCC5 = VerificationCase{Area: "kinematics", Name: "CC-5 full circle u=(0,10,0), s=2π/10: |T − I|",
		Published: 0, Tolerance: 1e-15,
		Source: "derived; objective/kinematics/REFERENCE.md §5.2",
		Compute: func() (float64, error) {
			p := LinkTransform([3]float64{0, 10, 0}, 2*math.Pi/10)
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
		}}

	verifyExp = VerificationCase{Area: "kinematics", Name: "closed-form arc vs gonum mat.Exp of the twist, 200 random twists: max difference",
		Published: 0, Tolerance: 1e-12,
		Source: "general-purpose reference library: gonum mat.Exp",
		Compute: func() (float64, error) {
			rng := rand.New(rand.NewPCG(1, 2))
			worst := 0.0
			for range 200 {
				u := [3]float64{rng.NormFloat64() * 10, rng.NormFloat64() * 10, rng.NormFloat64() * 5}
				s := rng.Float64() * 0.3
				tw := mat.NewDense(4, 4, []float64{0, -u[2] * s, u[1] * s, 0, u[2] * s, 0, -u[0] * s, 0, -u[1] * s, u[0] * s, 0, s, 0, 0, 0, 0})
				var e mat.Dense
				e.Exp(tw)
				p := LinkTransform(u, s)
				for i := range 3 {
					for j := range 3 {
						worst = math.Max(worst, math.Abs(p.R[i][j]-e.At(i, j)))
					}
					worst = math.Max(worst, math.Abs(p.P[i]-e.At(i, 3)))
				}
			}
			return worst, nil
		}}

	verifyTR3 = VerificationCase{Area: "kinematics", Name: "TR-3 anisotropic pair (θA, θB) = (π/4, 0): u_y", Unit: "1/m",
		Published: 8.848845590, Tolerance: 1e-9, Relative: true,
		Source: "derived from (3.1); objective/kinematics/REFERENCE.md §5.3",
		Compute: func() (float64, error) {
			u, _, err := EquilibriumCurvature([]LinkTube{
				{Theta: math.Pi / 4, Bending: [2][2]float64{{1, 0}, {0, 3}}, Torsion: 50, Precurvature: [3]float64{0, 10, 0}},
				{Theta: 0, Bending: [2][2]float64{{2, 0}, {0, 0.5}}, Torsion: 50, Precurvature: [3]float64{0, 8, 0}},
			})
			return u[1], err
		}}

	verifySEG1 = VerificationCase{Area: "kinematics", Name: "SEG-1 two tubes (θ1, θ2) = (0, 0): tip x", Unit: "m",
		Published: 0.0541691566, Tolerance: 1e-9, Relative: true,
		Source: "derived from objective/kinematics/REFERENCE.md §3.2; objective/kinematics/REFERENCE.md §5.4",
		Compute: func() (float64, error) {
			r := &Robot{Tubes: []Tube{verificationTube(0.35, 0.10, 10, 1, 1), verificationTube(0.15, 0.10, 5, 2, 2)}}
			p, err := r.Tip(Actuation{Theta: []float64{0, 0}, Beta: []float64{-0.25, -0.10}})
			return p.P[0], err
		}}

	verifyST1 = VerificationCase{Area: "stability", Name: "ST-1 κ1 = κ2 = 10/m, ν = 0.3: critical overlap L_crit", Unit: "m",
		Published: 0.13776795, Tolerance: 1e-7, Relative: true,
		Source: "c = (1+ν)κ1κ2 (Dupont et al. 2010; Gilbert, Hendrick & Webster 2016, from memory); numbers derived, objective/kinematics/REFERENCE.md §5.5",
		Compute: func() (float64, error) {
			ps, err := TwoTubeStability(verificationTube(0, 0.1, 10, 1, 1/1.3), verificationTube(0, 0.1, 10, 2, 2/1.3), 0.1, [2]float64{})
			return ps.LCrit, err
		}}

	verifyST2 = VerificationCase{Area: "stability", Name: "ST-2 with transmission β_eff = 0.05 m: L_crit", Unit: "m",
		Published: 0.09232453, Tolerance: 1e-7, Relative: true,
		Source: "derived from √c β_eff tan(√c L) = 1; objective/kinematics/REFERENCE.md §5.5",
		Compute: func() (float64, error) {
			ps, err := TwoTubeStability(verificationTube(0, 0.1, 10, 1, 1/1.3), verificationTube(0, 0.1, 10, 1, 1/1.3), 0.1, [2]float64{0.05, 0.05})
			return ps.LCrit, err
		}}
)
