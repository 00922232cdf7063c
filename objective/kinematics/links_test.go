package kinematics

import (
	"fmt"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// seg1Robot is SEG-1 of objective/kinematics/REFERENCE.md §5.4: tube 1 (inner) L = 0.45, Ls = 0.35,
// EI = 1, κ = 10; tube 2 (outer) L = 0.25, Ls = 0.15, EI = 2, κ = 5. GJ is
// EI/(1+ν) with ν = 0.3 (plain tube, objective/kinematics/REFERENCE.md §1.2, derived); it does not
// enter planar kinematics. Linear densities are demo values.
func seg1Robot() *Robot {
	return &Robot{Tubes: []Tube{
		{StraightLength: 0.35, CurvedLength: 0.10, Precurvature: [2]float64{0, 10}, Bending: isoEI(1), Torsion: 1 / 1.3, LinearDensity: 0.01},
		{StraightLength: 0.15, CurvedLength: 0.10, Precurvature: [2]float64{0, 5}, Bending: isoEI(2), Torsion: 2 / 1.3, LinearDensity: 0.02},
	}}
}

var seg1Beta = []float64{-0.25, -0.10}

// rotZVec returns R_z(θ)(0, κ, 0) = κ(−sin θ, cos θ, 0).
func rotZVec(theta, kappa float64) [3]float64 {
	s, c := math.Sincos(theta)
	return [3]float64{-kappa * s, kappa * c, 0}
}

func TestLinksSEG1(t *testing.T) {
	// SEG-1, objective/kinematics/REFERENCE.md §5.4, derived from (3.1)–(3.2): four links
	// [0, 0.05] both straight (u = 0), [0.05, 0.10] tube 2 curved and tube 1
	// straight but present (u = R_z(θ2)(0, 10/3, 0)), [0.10, 0.15] both curved
	// (u = (R_z(θ1)(0, 10, 0) + R_z(θ2)(0, 10, 0))/3), [0.15, 0.20] tube 1
	// only (u = R_z(θ1)(0, 10, 0)). Tolerance 1e-12 (closed forms of O(10)).
	gj1, gj2 := 1/1.3, 2/1.3
	for _, th := range [][2]float64{{0, 0}, {0, math.Pi}, {0.4, -1.3}, {2.5, 1}} {
		a := Actuation{Theta: th[:], Beta: seg1Beta}
		mid := rotZVec(th[0], 10)
		mid2 := rotZVec(th[1], 10)
		want := []Link{
			{Start: 0, End: 0.05, K: [3][3]float64{{3, 0, 0}, {0, 3, 0}, {0, 0, gj1 + gj2}}, MassPerLength: 0.03, Present: 0b11, Curved: 0b00},
			{Start: 0.05, End: 0.10, U: rotZVec(th[1], 10.0/3), K: [3][3]float64{{3, 0, 0}, {0, 3, 0}, {0, 0, gj1 + gj2}}, MassPerLength: 0.03, Present: 0b11, Curved: 0b10},
			{Start: 0.10, End: 0.15, U: [3]float64{(mid[0] + mid2[0]) / 3, (mid[1] + mid2[1]) / 3, 0}, K: [3][3]float64{{3, 0, 0}, {0, 3, 0}, {0, 0, gj1 + gj2}}, MassPerLength: 0.03, Present: 0b11, Curved: 0b11},
			{Start: 0.15, End: 0.20, U: rotZVec(th[0], 10), K: [3][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, gj1}}, MassPerLength: 0.01, Present: 0b01, Curved: 0b01},
		}
		s, err := NewSolver(seg1Robot())
		require.NoError(t, err)
		robotLinks, err := seg1Robot().Links(a, nil)
		require.NoError(t, err, "Links(θ=%v)", th)
		solverLinks, err := s.Links(a.Theta, a.Beta, make([]Link, 0, 8))
		require.NoError(t, err, "Solver.Links(θ=%v)", th)
		for name, got := range map[string][]Link{"Robot.Links": robotLinks, "Solver.Links": solverLinks} {
			require.Len(t, got, len(want), "%s(θ=%v)", name, th)
			for j, w := range want {
				g := got[j]
				msg := func(field string) string { return fmt.Sprintf("%s(θ=%v) link %d %s", name, th, j+1, field) }
				assert.InDelta(t, w.Start, g.Start, 1e-15, msg("Start"))
				assert.InDelta(t, w.End, g.End, 1e-15, msg("End"))
				for i := range 3 {
					assert.InDelta(t, w.U[i], g.U[i], 1e-12, msg("U"))
					for k := range 3 {
						assert.InDelta(t, w.K[i][k], g.K[i][k], 1e-14, msg("K"))
					}
				}
				assert.InDelta(t, w.MassPerLength, g.MassPerLength, 1e-16, msg("MassPerLength"))
				assert.Equal(t, w.Present, g.Present, msg("Present"))
				assert.Equal(t, w.Curved, g.Curved, msg("Curved"))
			}
		}
	}
}

func TestTipSEG1(t *testing.T) {
	// SEG-1 tip, objective/kinematics/REFERENCE.md §5.4 table (derived): 10 significant digits, so
	// tolerance 1e-10 m on p and 1e-9 on R.
	cases := []struct {
		name  string
		theta []float64
		p     [3]float64
		bend  float64 // tip R = R_y(bend)
	}{
		// p_x aligned is verifySEG1 of verification.go.
		{"aligned", []float64{0, 0}, [3]float64{verifySEG1.Published, 0, 0.1830027953}, 1.0},
		{"opposed", []float64{0, math.Pi}, [3]float64{-0.0083332086, 0, 0.1983850843}, 1.0 / 3},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := Actuation{Theta: tc.theta, Beta: seg1Beta}
			robotTip, err := seg1Robot().Tip(a)
			require.NoError(t, err, "Tip(θ=%v)", tc.theta)
			s, err := NewSolver(seg1Robot())
			require.NoError(t, err)
			solverTip, err := s.Tip(a.Theta, a.Beta)
			require.NoError(t, err, "Solver.Tip(θ=%v)", tc.theta)
			want := Pose{R: rotYMat(tc.bend), P: tc.p}
			for name, got := range map[string]Pose{"Robot.Tip": robotTip, "Solver.Tip": solverTip} {
				for i := range 3 {
					assert.InDelta(t, want.P[i], got.P[i], 1e-10, "%s(θ=%v).P[%d]", name, tc.theta, i)
					for j := range 3 {
						assert.InDelta(t, want.R[i][j], got.R[i][j], 1e-9, "%s(θ=%v).R[%d][%d]", name, tc.theta, i, j)
					}
				}
			}
		})
	}
}

func TestLinksEdgeCases(t *testing.T) {
	cases := []struct {
		name  string
		robot func() *Robot
		beta  []float64
		want  [][2]float64
	}{
		// Innermost tube ends at the base plane: no link at all.
		{"fully retracted", seg1Robot, []float64{-0.45, -0.25}, nil},
		// Fully overlapping curved tubes starting at the base: one link.
		{"single link", func() *Robot {
			r := seg1Robot()
			r.Tubes[0].StraightLength, r.Tubes[0].CurvedLength = 0, 0.1
			r.Tubes[1].StraightLength, r.Tubes[1].CurvedLength = 0, 0.1
			return r
		}, []float64{0, 0}, [][2]float64{{0, 0.1}}},
		// Breakpoints closer than 1e-12·max L merge (objective/kinematics/REFERENCE.md §3.2): the outer
		// tube's curved part starts 1e-14 m after the inner tube's end of
		// straight part; the tip stays exact.
		{"merge", seg1Robot, []float64{-0.25, -0.1 - 1e-14}, [][2]float64{{0, 0.05}, {0.05, 0.1}, {0.1, 0.15}, {0.15, 0.2}}},
		// Tubes reaching exactly to the same end: no zero-length link.
		{"equal ends", seg1Robot, []float64{-0.3, -0.1}, [][2]float64{{0, 0.05}, {0.05, 0.15}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := tc.robot()
			a := Actuation{Theta: []float64{0.3, 1.2}, Beta: tc.beta}
			links, err := r.Links(a, nil)
			require.NoError(t, err, "Links(β=%v)", tc.beta)
			bounds := linkBounds(links)
			require.Len(t, bounds, len(tc.want), "Links(β=%v): %v", tc.beta, bounds)
			for i := range tc.want {
				assert.InDelta(t, tc.want[i][0], bounds[i][0], 1e-13, "Links(β=%v) link %d start", tc.beta, i+1)
				assert.InDelta(t, tc.want[i][1], bounds[i][1], 1e-13, "Links(β=%v) link %d end", tc.beta, i+1)
			}
			if len(links) > 0 {
				assert.Equal(t, tc.beta[0]+r.Tubes[0].Length(), links[len(links)-1].End, "Links(β=%v): tip is β_1 + L_1 exactly", tc.beta)
			}
			tip, err := r.Tip(a)
			require.NoError(t, err)
			s, err := NewSolver(r)
			require.NoError(t, err)
			stip, err := s.Tip(a.Theta, a.Beta)
			require.NoError(t, err)
			assertPose(t, tip, stip, withinAbs(1e-14), "Solver.Tip vs Robot.Tip (β=%v)", tc.beta)
			if tc.want == nil {
				assertPose(t, Identity(), tip, withinAbs(0), "Tip(β=%v)", tc.beta)
				ss, poses, err := r.Backbone(a, 1e-3)
				require.NoError(t, err)
				assert.Equal(t, []float64{0}, ss, "Backbone(β=%v) arc lengths", tc.beta)
				assert.Equal(t, []Pose{Identity()}, poses, "Backbone(β=%v) poses", tc.beta)
			}
		})
	}
}

// rk4Backbone integrates R' = R û, p' = R e3 (objective/kinematics/REFERENCE.md §1.1) over the links
// with the classical fourth-order Runge–Kutta method, n steps per link, and
// returns the tip pose: a check of the closed form that does not use it.
func rk4Backbone(links []Link, n int) Pose {
	type state struct {
		R [3][3]float64
		P [3]float64
	}
	deriv := func(x state, u [3]float64) state {
		var d state
		for i := range 3 {
			r := x.R[i]
			// (R û)_ij = (r × ... ) row i of R times û.
			d.R[i][0] = r[1]*u[2] - r[2]*u[1]
			d.R[i][1] = r[2]*u[0] - r[0]*u[2]
			d.R[i][2] = r[0]*u[1] - r[1]*u[0]
			d.P[i] = r[2]
		}
		return d
	}
	axpy := func(x state, h float64, d state) state {
		for i := range 3 {
			for j := range 3 {
				x.R[i][j] += h * d.R[i][j]
			}
			x.P[i] += h * d.P[i]
		}
		return x
	}
	x := state{R: Identity().R}
	for _, l := range links {
		h := (l.End - l.Start) / float64(n)
		for range n {
			k1 := deriv(x, l.U)
			k2 := deriv(axpy(x, h/2, k1), l.U)
			k3 := deriv(axpy(x, h/2, k2), l.U)
			k4 := deriv(axpy(x, h, k3), l.U)
			x = axpy(x, h/6, k1)
			x = axpy(x, h/3, k2)
			x = axpy(x, h/3, k3)
			x = axpy(x, h/6, k4)
		}
	}
	return Pose{R: x.R, P: x.P}
}

func TestTipMatchesRK4(t *testing.T) {
	// The chained closed form against RK4 integration of R' = R û, p' = R e3
	// (classical Runge–Kutta; objective/kinematics/REFERENCE.md §5.1: 1e-6 for ODE-based values with
	// ≥ 100 steps per link; 400 steps are used, so 1e-9 holds).
	r := threeTubes()
	r.Tubes[1].Bending = [2][2]float64{{2, 0.3}, {0.3, 1.2}}
	for _, th := range [][]float64{{0, 0, 0}, {0.5, 2, -1}, {3, 1, 0.2}} {
		a := Actuation{Theta: th, Beta: []float64{-0.15, -0.08, -0.03}}
		links, err := r.Links(a, nil)
		require.NoError(t, err)
		require.Greater(t, len(links), 3, "Links(θ=%v)", th)
		tip, err := r.Tip(a)
		require.NoError(t, err)
		assertPose(t, rk4Backbone(links, 400), tip, withinAbs(1e-9), "Tip vs RK4 (θ=%v)", th)
	}
}

func TestBackbone(t *testing.T) {
	r := threeTubes()
	a := Actuation{Theta: []float64{0.2, 1.4, -2}, Beta: []float64{-0.15, -0.08, -0.03}}
	links, err := r.Links(a, nil)
	require.NoError(t, err)
	tip, err := r.Tip(a)
	require.NoError(t, err)
	s, err := NewSolver(r)
	require.NoError(t, err)
	for _, step := range []float64{1e-3, 0.0123, 0.05, math.Inf(1)} {
		ss, poses, err := r.Backbone(a, step)
		require.NoError(t, err, "Backbone(step=%g)", step)
		require.Len(t, poses, len(ss), "Backbone(step=%g)", step)
		assert.Equal(t, 0.0, ss[0], "Backbone(step=%g): first s", step)
		assertPose(t, Identity(), poses[0], withinAbs(0), "Backbone(step=%g): first pose", step)
		assert.Equal(t, links[len(links)-1].End, ss[len(ss)-1], "Backbone(step=%g): last s is the tip", step)
		assertPose(t, tip, poses[len(poses)-1], withinAbs(1e-15), "Backbone(step=%g): last pose is the tip", step)
		set := map[float64]bool{}
		for k := 1; k < len(ss); k++ {
			ds := ss[k] - ss[k-1]
			assert.Greater(t, ds, 0.0, "Backbone(step=%g): s increasing at %d", step, k)
			assert.LessOrEqual(t, ds, step*(1+1e-12), "Backbone(step=%g): step %d", step, k)
			// A chord is not longer than its arc [derived].
			dp := math.Sqrt(sq(poses[k].P[0]-poses[k-1].P[0]) + sq(poses[k].P[1]-poses[k-1].P[1]) + sq(poses[k].P[2]-poses[k-1].P[2]))
			assert.LessOrEqual(t, dp, ds*(1+1e-12), "Backbone(step=%g): chord %d", step, k)
			set[ss[k]] = true
		}
		for _, l := range links {
			assert.True(t, set[l.End], "Backbone(step=%g): link boundary %g sampled", step, l.End)
		}
		if math.IsInf(step, 1) {
			assert.Len(t, ss, len(links)+1, "Backbone(step=+Inf): boundaries only")
		}
		// The Solver samples the same points, without allocating.
		s2, p2, err := s.Backbone(a.Theta, a.Beta, step, nil, nil)
		require.NoError(t, err)
		require.Equal(t, ss, s2, "Solver.Backbone(step=%g) arc lengths", step)
		for k := range poses {
			assertPose(t, poses[k], p2[k], withinAbs(1e-14), "Solver.Backbone(step=%g) pose %d", step, k)
		}
	}
	for _, bad := range []float64{0, -1e-3, math.NaN()} {
		_, _, err := r.Backbone(a, bad)
		assert.ErrorContains(t, err, "backbone step", "Backbone(step=%g)", bad)
		_, _, err = s.Backbone(a.Theta, a.Beta, bad, nil, nil)
		assert.ErrorContains(t, err, "backbone step", "Solver.Backbone(step=%g)", bad)
	}
}

func sq(x float64) float64 { return x * x }

func TestLinks64Tubes(t *testing.T) {
	// MaxTubes = 64 tubes fill the 64-bit Present and Curved sets. Lengths
	// shrink outward by 1 mm; every tube ends 50 mm beyond the base plane
	// and is curved from 10 mm on, so there are two links [0, 10] and
	// [10, 50] mm [derived from objective/kinematics/REFERENCE.md §3.2].
	r := &Robot{Tubes: make([]Tube, MaxTubes)}
	a := Actuation{Theta: make([]float64, MaxTubes), Beta: make([]float64, MaxTubes)}
	for i := range r.Tubes {
		L := 0.1 + 0.001*float64(MaxTubes-i)
		r.Tubes[i] = Tube{StraightLength: L - 0.04, CurvedLength: 0.04, Precurvature: [2]float64{0, 5},
			Bending: isoEI(1), Torsion: 0.8, LinearDensity: 0.001}
		a.Theta[i] = 0.1 * float64(i)
		a.Beta[i] = 0.05 - L
	}
	links, err := r.Links(a, nil)
	require.NoError(t, err)
	require.Len(t, links, 2, "links of 64 tubes")
	all := ^uint64(0)
	assert.InDelta(t, 0.01, links[0].End, 1e-15, "first link end")
	assert.Equal(t, all, links[0].Present, "first link: all 64 tubes present")
	assert.Equal(t, uint64(0), links[0].Curved, "first link: none curved")
	assert.Equal(t, all, links[1].Present, "second link: all 64 tubes present")
	assert.Equal(t, all, links[1].Curved, "second link: all 64 tubes curved")
	assert.InDelta(t, 0.064, links[1].MassPerLength, 1e-15, "second link mass per length")
	assert.InDelta(t, 64, links[1].K[0][0], 1e-12, "second link EI_xx")
	tip, err := r.Tip(a)
	require.NoError(t, err)
	s, err := NewSolver(r)
	require.NoError(t, err)
	stip, err := s.Tip(a.Theta, a.Beta)
	require.NoError(t, err)
	assertPose(t, tip, stip, withinAbs(1e-13), "Solver.Tip vs Robot.Tip, 64 tubes")
}
