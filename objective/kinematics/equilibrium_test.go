package kinematics

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

func isoEI(ei float64) [2][2]float64 { return [2][2]float64{{ei, 0}, {0, ei}} }

func planarTube(theta float64, bending [2][2]float64, gj, kappa float64) LinkTube {
	return LinkTube{Theta: theta, Bending: bending, Torsion: gj, Precurvature: [3]float64{0, kappa, 0}}
}

func TestEquilibriumCurvatureCheckValues(t *testing.T) {
	// objective/kinematics/REFERENCE.md §5.3 (TR-1, TR-2, TR-3), derived from (3.1); TR-1 and TR-2 also
	// agree with the isotropic closed form (from memory: Webster, Romano &
	// Cowan 2009; Dupont et al. 2010). Tolerance: 1e-9 relative to |u|
	// (closed forms, objective/kinematics/REFERENCE.md §5.1), 1e-12 absolute where u = 0.
	cases := []struct {
		name  string
		tubes []LinkTube
		want  [3]float64
	}{
		{"TR-1 (0,0)", []LinkTube{planarTube(0, isoEI(1), 1, 10), planarTube(0, isoEI(1), 1, 10)}, [3]float64{0, 10, 0}},
		{"TR-1 (0,pi/2)", []LinkTube{planarTube(0, isoEI(1), 1, 10), planarTube(math.Pi/2, isoEI(1), 1, 10)}, [3]float64{-5, 5, 0}},
		{"TR-1 (0,pi)", []LinkTube{planarTube(0, isoEI(1), 1, 10), planarTube(math.Pi, isoEI(1), 1, 10)}, [3]float64{0, 0, 0}},
		{"TR-2 dtheta=pi", []LinkTube{planarTube(0, isoEI(2), 1, 5), planarTube(math.Pi, isoEI(1), 1, 10)}, [3]float64{0, 0, 0}},
		{"TR-2 dtheta=0", []LinkTube{planarTube(0, isoEI(2), 1, 5), planarTube(0, isoEI(1), 1, 10)}, [3]float64{0, 20.0 / 3, 0}},
		{"TR-3 (0,0)", []LinkTube{
			planarTube(0, [2][2]float64{{1, 0}, {0, 3}}, 50, 10), planarTube(0, [2][2]float64{{2, 0}, {0, 0.5}}, 50, 8),
		}, [3]float64{0, 9.714285714, 0}},
		{"TR-3 (0,pi/2)", []LinkTube{
			planarTube(0, [2][2]float64{{1, 0}, {0, 3}}, 50, 10), planarTube(math.Pi/2, [2][2]float64{{2, 0}, {0, 0.5}}, 50, 8),
		}, [3]float64{-2.666666667, 6, 0}},
		{"TR-3 (pi/4,0)", []LinkTube{
			planarTube(math.Pi/4, [2][2]float64{{1, 0}, {0, 3}}, 50, 10), planarTube(0, [2][2]float64{{2, 0}, {0, 0.5}}, 50, 8),
		}, [3]float64{-3.091089461, verifyTR3.Published, 0}}, // u_y is verifyTR3 of verification.go
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			u, _, err := EquilibriumCurvature(tc.tubes)
			require.NoError(t, err, "EquilibriumCurvature(%+v)", tc.tubes)
			norm := math.Hypot(tc.want[0], tc.want[1])
			for i := range 3 {
				// The table gives 10 significant digits: 1e-9 relative.
				assert.InDelta(t, tc.want[i], u[i], math.Max(1e-9*norm, 1e-12), "EquilibriumCurvature(%+v): u[%d]", tc.tubes, i)
			}
		})
	}
}

func TestEquilibriumCurvatureIsotropicClosedForm(t *testing.T) {
	// Isotropic two-tube closed form, objective/kinematics/REFERENCE.md §3.1 (from memory: Webster,
	// Romano & Cowan 2009; Dupont et al. 2010):
	// |u| = sqrt(k1²κ1² + k2²κ2² + 2 k1k2κ1κ2 cos Δ)/(k1 + k2).
	rng := rand.New(rand.NewPCG(11, 12))
	for range 200 {
		k1, k2 := 0.1+rng.Float64(), 0.1+rng.Float64()
		c1, c2 := rng.Float64()*20, rng.Float64()*20
		t1, t2 := rng.Float64()*2*math.Pi, rng.Float64()*2*math.Pi
		u, _, err := EquilibriumCurvature([]LinkTube{planarTube(t1, isoEI(k1), 1, c1), planarTube(t2, isoEI(k2), 1, c2)})
		require.NoError(t, err)
		want := math.Sqrt(k1*k1*c1*c1+k2*k2*c2*c2+2*k1*k2*c1*c2*math.Cos(t2-t1)) / (k1 + k2)
		assert.InDelta(t, want, math.Hypot(u[0], u[1]), 1e-12*(c1+c2), "k=(%g,%g) κ=(%g,%g) θ=(%g,%g)", k1, k2, c1, c2, t1, t2)
	}
}

// referenceEquilibrium solves (3.1) with gonum: K̃_i = R K_i Rᵀ by explicit
// 3×3 products and u = (Σ K̃_i)⁻¹ Σ K̃_i R u*_i by LU (mat.Dense.Solve).
func referenceEquilibrium(t *testing.T, tubes []LinkTube) ([3]float64, *mat.Dense) {
	sum := mat.NewDense(3, 3, nil)
	rhs := mat.NewVecDense(3, nil)
	for _, tb := range tubes {
		s, c := math.Sincos(tb.Theta)
		r := mat.NewDense(3, 3, []float64{c, -s, 0, s, c, 0, 0, 0, 1})
		k := mat.NewDense(3, 3, []float64{
			tb.Bending[0][0], tb.Bending[0][1], 0,
			tb.Bending[1][0], tb.Bending[1][1], 0,
			0, 0, tb.Torsion,
		})
		var rk, kt mat.Dense
		rk.Mul(r, k)
		kt.Mul(&rk, r.T())
		sum.Add(sum, &kt)
		var ut, m mat.VecDense
		ut.MulVec(r, mat.NewVecDense(3, tb.Precurvature[:]))
		m.MulVec(&kt, &ut)
		rhs.AddVec(rhs, &m)
	}
	var u mat.VecDense
	require.NoError(t, u.SolveVec(sum, rhs))
	return [3]float64{u.AtVec(0), u.AtVec(1), u.AtVec(2)}, sum
}

func TestEquilibriumCurvatureAnisotropicReference(t *testing.T) {
	// Full symmetric tensors with off-diagonal EI_xy and pre-twist u*_z,
	// against (3.1) evaluated by gonum's mat (explicit rotations, LU solve; a
	// general-purpose reference library). Tolerance 1e-12 relative.
	rng := rand.New(rand.NewPCG(13, 14))
	for range 300 {
		n := 1 + rng.IntN(5)
		tubes := make([]LinkTube, n)
		for i := range tubes {
			a, b := 0.1+rng.Float64()*3, 0.1+rng.Float64()*3
			q := (rng.Float64()*2 - 1) * 0.9 * math.Sqrt(a*b)
			tubes[i] = LinkTube{
				Theta:        (rng.Float64()*2 - 1) * 7,
				Bending:      [2][2]float64{{a, q}, {q, b}},
				Torsion:      0.1 + rng.Float64(),
				Precurvature: [3]float64{rng.NormFloat64() * 10, rng.NormFloat64() * 10, rng.NormFloat64()},
			}
			if rng.IntN(3) == 0 {
				tubes[i].Precurvature = [3]float64{} // straight in this link
			}
		}
		want, wantK := referenceEquilibrium(t, tubes)
		u, K, err := EquilibriumCurvature(tubes)
		require.NoError(t, err, "EquilibriumCurvature(%+v)", tubes)
		scale := math.Max(1, math.Hypot(math.Hypot(want[0], want[1]), want[2]))
		for i := range 3 {
			assert.InDelta(t, want[i], u[i], 1e-12*scale, "tubes %+v: u[%d]", tubes, i)
			for j := range 3 {
				assert.InDelta(t, wantK.At(i, j), K[i][j], 1e-12*math.Max(1, math.Abs(wantK.At(i, j))), "tubes %+v: K[%d][%d]", tubes, i, j)
			}
		}
	}
}

func TestEquilibriumCurvatureTwist(t *testing.T) {
	// z row of (3.1) [derived]: u_z = Σ GJ_i u*_iz / Σ GJ_i, independent of
	// the bending; planar tubes give 0.
	u, K, err := EquilibriumCurvature([]LinkTube{
		{Theta: 0.3, Bending: isoEI(1), Torsion: 1, Precurvature: [3]float64{0, 4, 1}},
		{Theta: 1.1, Bending: isoEI(2), Torsion: 3, Precurvature: [3]float64{0, 0, 3}},
	})
	require.NoError(t, err)
	assert.InDelta(t, 2.5, u[2], 1e-15, "u_z = (1·1 + 3·3)/(1 + 3)")
	assert.Equal(t, 4.0, K[2][2], "K_zz = Σ GJ")
	u, _, err = EquilibriumCurvature([]LinkTube{planarTube(0.7, isoEI(1), 1, 10)})
	require.NoError(t, err)
	assert.Equal(t, 0.0, u[2], "planar tube: u_z")
}

func TestEquilibriumCurvatureErrors(t *testing.T) {
	cases := []struct {
		name  string
		tubes []LinkTube
		want  string
	}{
		{"no tubes", nil, "no tubes"},
		{"zero bending", []LinkTube{{Bending: [2][2]float64{}, Torsion: 1}}, "not positive definite"},
		{"indefinite bending", []LinkTube{{Bending: [2][2]float64{{1, 2}, {2, 1}}, Torsion: 1}}, "not positive definite"},
		{"zero torsion", []LinkTube{{Bending: isoEI(1), Torsion: 0}}, "not positive definite"},
		{"NaN bending", []LinkTube{{Bending: [2][2]float64{{math.NaN(), 0}, {0, 1}}, Torsion: 1}}, "not positive definite"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := EquilibriumCurvature(tc.tubes)
			require.Error(t, err, "EquilibriumCurvature(%+v)", tc.tubes)
			assert.Contains(t, err.Error(), tc.want, "EquilibriumCurvature(%+v)", tc.tubes)
		})
	}
}
