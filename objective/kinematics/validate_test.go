package kinematics

import (
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// threeTubes is a demo robot (invented numbers): lengths 300, 200 and
// 100 mm, innermost first.
func threeTubes() *Robot {
	return &Robot{Tubes: []Tube{
		{StraightLength: 0.2, CurvedLength: 0.1, Precurvature: [2]float64{0, 10}, Bending: isoEI(1), Torsion: 0.8, LinearDensity: 0.01},
		{StraightLength: 0.12, CurvedLength: 0.08, Precurvature: [2]float64{0, 6}, Bending: isoEI(2), Torsion: 1.6, LinearDensity: 0.02},
		{StraightLength: 0.05, CurvedLength: 0.05, Precurvature: [2]float64{0, 4}, Bending: isoEI(4), Torsion: 3.2, LinearDensity: 0.04},
	}}
}

func TestValidate(t *testing.T) {
	cases := []struct {
		name   string
		modify func(r *Robot)
		want   string // substring of the error; empty for a valid robot
	}{
		{"valid", func(*Robot) {}, ""},
		{"straight tube", func(r *Robot) { r.Tubes[2].CurvedLength = 0 }, ""},
		{"fully curved tube", func(r *Robot) { r.Tubes[0].StraightLength = 0 }, ""},
		{"symmetric off-diagonal", func(r *Robot) { r.Tubes[1].Bending = [2][2]float64{{2, 0.5}, {0.5, 1}} }, ""},
		{"threaded", func(r *Robot) { r.Threads = []Thread{{Inner: 0, Lead: 0.002}, {Inner: 1, Lead: -0.003}} }, ""},
		{"no tubes", func(r *Robot) { r.Tubes = nil }, "robot has no tubes"},
		{"too many tubes", func(r *Robot) { r.Tubes = make([]Tube, 65) }, "65 tubes (expected at most 64)"},
		{"negative straight", func(r *Robot) { r.Tubes[1].StraightLength = -0.01 }, "tube 2: straight length -10 mm"},
		{"NaN curved", func(r *Robot) { r.Tubes[0].CurvedLength = math.NaN() }, "tube 1 (innermost): curved length NaN mm"},
		{"infinite straight", func(r *Robot) { r.Tubes[2].StraightLength = math.Inf(1) }, "tube 3 (outermost): straight length +Inf mm"},
		{"zero length", func(r *Robot) { r.Tubes[2].StraightLength, r.Tubes[2].CurvedLength = 0, 0 }, "tube 3 (outermost): total length 0 mm (expected > 0)"},
		{"NaN precurvature", func(r *Robot) { r.Tubes[0].Precurvature[1] = math.NaN() }, "tube 1 (innermost): precurvature"},
		{"asymmetric EI", func(r *Robot) { r.Tubes[1].Bending = [2][2]float64{{2, 0.5}, {0.4, 1}} }, "tube 2: bending stiffness [[2 0.5] [0.4 1]] N·m² is not symmetric"},
		{"indefinite EI", func(r *Robot) { r.Tubes[1].Bending = [2][2]float64{{1, 2}, {2, 1}} }, "tube 2: bending stiffness [[1 2] [2 1]] N·m² is not positive definite"},
		{"zero EI", func(r *Robot) { r.Tubes[0].Bending = [2][2]float64{} }, "not positive definite"},
		{"NaN EI", func(r *Robot) { r.Tubes[0].Bending[1][1] = math.NaN() }, "is not finite"},
		{"zero GJ", func(r *Robot) { r.Tubes[2].Torsion = 0 }, "tube 3 (outermost): torsional stiffness GJ 0 N·m² (expected finite, > 0)"},
		{"negative density", func(r *Robot) { r.Tubes[2].LinearDensity = -1 }, "linear density -1 kg/m"},
		{"thread into nothing", func(r *Robot) { r.Threads = []Thread{{Inner: 2, Lead: 0.002}} }, "inner tube index 2 (expected 0 to 1"},
		{"negative thread index", func(r *Robot) { r.Threads = []Thread{{Inner: -1, Lead: 0.002}} }, "inner tube index -1"},
		{"zero lead", func(r *Robot) { r.Threads = []Thread{{Inner: 1, Lead: 0}} }, "thread 1 between tube 2 and tube 3: lead 0 mm"},
		{"double thread", func(r *Robot) { r.Threads = []Thread{{Inner: 0, Lead: 0.002}, {Inner: 0, Lead: 0.001}} }, "threaded into tube 2 twice"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := threeTubes()
			tc.modify(r)
			err := r.Validate()
			if tc.want == "" {
				assert.NoError(t, err, "Validate(%s)", tc.name)
				return
			}
			require.Error(t, err, "Validate(%s)", tc.name)
			assert.Contains(t, err.Error(), tc.want, "Validate(%s)", tc.name)
		})
	}
}

func TestCheckActuationNesting(t *testing.T) {
	// Nesting inequalities of objective/kinematics/REFERENCE.md §3.2 (derived from the geometry;
	// discussed in Grassmann, Senyk & Burgner-Kahrs, "On the Disentanglement
	// of Tube Inequalities in Concentric Tube Continuum Robots", preprint,
	// 2024). Lengths of threeTubes: 300, 200, 100 mm.
	two := func() *Robot {
		r := threeTubes()
		r.Tubes = r.Tubes[:2]
		return r
	}
	cases := []struct {
		name  string
		robot *Robot
		beta  []float64
		want  string // full message; empty if feasible
		tube  int    // ActuationError.Tube
	}{
		{"feasible", threeTubes(), []float64{-0.2, -0.1, -0.05}, "", 0},
		{"all at the base plane", threeTubes(), []float64{0, 0, 0}, "", 0},
		{"equal ends", threeTubes(), []float64{-0.25, -0.15, -0.05}, "", 0},
		{"outermost ends at the base plane", threeTubes(), []float64{-0.3, -0.2, -0.1}, "", 0},
		{"inner starts in front", threeTubes(), []float64{-0.05, -0.1, -0.05},
			"tube 1 (innermost) starts at -50 mm but tube 2 around it at -100 mm (inner tubes must start at least as far back)", 0},
		{"outermost in front of base", threeTubes(), []float64{-0.2, -0.1, 0.01},
			"tube 3 (outermost) starts 10 mm in front of the base plane (insertion must be ≤ 0: every tube starts at or behind the base plane)", 2},
		{"outermost behind base", threeTubes(), []float64{-0.3, -0.25, -0.12},
			"tube 3 (outermost) ends 20 mm behind the base plane (every tube must reach at least the base plane)", 2},
		{"outer reaches further", two(), []float64{-0.2, -0.08},
			"tube 2 (outermost) reaches 120 mm beyond the base but tube 1 (innermost) inside it only 100 mm (inner tubes must reach at least as far)", 0},
		{"middle reaches further", threeTubes(), []float64{-0.2, -0.09, -0.05},
			"tube 2 reaches 110 mm beyond the base but tube 1 (innermost) inside it only 100 mm (inner tubes must reach at least as far)", 0},
		{"wrong count", threeTubes(), []float64{-0.2, -0.1},
			"actuation has 3 angles and 2 insertions for 3 tubes (expected one of each per tube, innermost first)", -1},
		{"NaN insertion", threeTubes(), []float64{-0.2, math.NaN(), -0.05},
			"tube 2: insertion NaN m is not finite", 1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			a := Actuation{Theta: []float64{0.1, 0.2, 0.3}[:len(tc.robot.Tubes)], Beta: tc.beta}
			if tc.name == "wrong count" {
				a.Theta = []float64{0.1, 0.2, 0.3}
			}
			require.NoError(t, tc.robot.Validate())
			err := tc.robot.CheckActuation(a)
			if tc.want == "" {
				assert.NoError(t, err, "CheckActuation(β=%v)", tc.beta)
				return
			}
			require.Error(t, err, "CheckActuation(β=%v)", tc.beta)
			assert.Equal(t, tc.want, err.Error(), "CheckActuation(β=%v)", tc.beta)
			var ae *ActuationError
			require.True(t, errors.As(err, &ae), "CheckActuation(β=%v): error type %T", tc.beta, err)
			assert.Equal(t, tc.tube, ae.Tube, "CheckActuation(β=%v): ActuationError.Tube", tc.beta)
			// Links, Tip, Backbone and the Solver report the same error.
			_, lerr := tc.robot.Links(a, nil)
			assert.EqualError(t, lerr, tc.want, "Links(β=%v)", tc.beta)
			_, terr := tc.robot.Tip(a)
			assert.EqualError(t, terr, tc.want, "Tip(β=%v)", tc.beta)
			_, _, berr := tc.robot.Backbone(a, 1e-3)
			assert.EqualError(t, berr, tc.want, "Backbone(β=%v)", tc.beta)
			s, err := NewSolver(tc.robot)
			require.NoError(t, err)
			_, serr := s.Tip(a.Theta, a.Beta)
			assert.EqualError(t, serr, tc.want, "Solver.Tip(β=%v)", tc.beta)
		})
	}
	t.Run("NaN angle", func(t *testing.T) {
		r := threeTubes()
		a := Actuation{Theta: []float64{0, math.Inf(1), 0}, Beta: []float64{-0.2, -0.1, -0.05}}
		want := "tube 2: angle +Inf rad is not finite"
		assert.EqualError(t, r.CheckActuation(a), want)
		s, err := NewSolver(r)
		require.NoError(t, err)
		_, err = s.Tip(a.Theta, a.Beta)
		assert.EqualError(t, err, want, "Solver.Tip")
	})
}

// linkBounds returns the Start, End pairs of links.
func linkBounds(links []Link) [][2]float64 {
	out := make([][2]float64, len(links))
	for i, l := range links {
		out[i] = [2]float64{l.Start, l.End}
	}
	return out
}

func assertBounds(t *testing.T, want, got [][2]float64, msg string, args ...any) {
	t.Helper()
	require.Lenf(t, got, len(want), msg+": links %v", append(args, got)...)
	for i := range want {
		for j := range 2 {
			assert.InDeltaf(t, want[i][j], got[i][j], 1e-15, msg+": link %d bound %d", append(args, i, j)...)
		}
	}
}

func TestThreads(t *testing.T) {
	// Thread convention (Thread doc): a relative rotation θ_i − θ_{i+1} of
	// 2π advances the inner tube by one lead [derived from the geometry of a
	// single-start helix]. Two tubes: inner L = 300 mm (Ls 200), outer
	// L = 200 mm (Ls 100), β = (−150, −100) mm, lead 10 mm. Without the
	// thread the links end at 50, 100, 150 mm.
	robot := func(lead float64) *Robot {
		return &Robot{
			Tubes: []Tube{
				{StraightLength: 0.2, CurvedLength: 0.1, Precurvature: [2]float64{0, 10}, Bending: isoEI(1), Torsion: 1},
				{StraightLength: 0.1, CurvedLength: 0.1, Precurvature: [2]float64{0, 5}, Bending: isoEI(2), Torsion: 2},
			},
			Threads: []Thread{{Inner: 0, Lead: lead}},
		}
	}
	cases := []struct {
		name  string
		lead  float64
		theta []float64
		want  [][2]float64
	}{
		{"no relative rotation", 0.01, []float64{1, 1}, [][2]float64{{0, 0.05}, {0.05, 0.1}, {0.1, 0.15}}},
		{"inner +2π advances one lead", 0.01, []float64{2 * math.Pi, 0}, [][2]float64{{0, 0.06}, {0.06, 0.1}, {0.1, 0.16}}},
		{"outer −2π is the same relative rotation", 0.01, []float64{0, -2 * math.Pi}, [][2]float64{{0, 0.06}, {0.06, 0.1}, {0.1, 0.16}}},
		{"inner −π retracts half a lead", 0.01, []float64{-math.Pi, 0}, [][2]float64{{0, 0.045}, {0.045, 0.1}, {0.1, 0.145}}},
		{"left-handed thread", -0.01, []float64{2 * math.Pi, 0}, [][2]float64{{0, 0.04}, {0.04, 0.1}, {0.1, 0.14}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := robot(tc.lead)
			a := Actuation{Theta: tc.theta, Beta: []float64{-0.15, -0.1}}
			links, err := r.Links(a, nil)
			require.NoError(t, err, "Links(θ=%v, lead=%g)", tc.theta, tc.lead)
			assertBounds(t, tc.want, linkBounds(links), "Links(θ=%v, lead=%g)", tc.theta, tc.lead)
			s, err := NewSolver(r)
			require.NoError(t, err)
			slinks, err := s.Links(a.Theta, a.Beta, nil)
			require.NoError(t, err)
			assertBounds(t, tc.want, linkBounds(slinks), "Solver.Links(θ=%v, lead=%g)", tc.theta, tc.lead)
		})
	}

	t.Run("chain rides along", func(t *testing.T) {
		// Tube 1 threaded into tube 2, tube 2 into tube 3: turning tubes 1 and
		// 2 together by 2π relative to tube 3 advances both by tube 2's lead.
		r := threeTubes()
		r.Threads = []Thread{{Inner: 0, Lead: 0.004}, {Inner: 1, Lead: 0.01}}
		a := Actuation{Theta: []float64{2 * math.Pi, 2 * math.Pi, 0}, Beta: []float64{-0.2, -0.1, -0.05}}
		got := r.EffectiveInsertion(a)
		want := []float64{-0.19, -0.09, -0.05}
		for i := range want {
			assert.InDelta(t, want[i], got[i], 1e-15, "EffectiveInsertion tube %d", i+1)
		}
		// Tube 1 alone turned by +π relative to tube 2: half of its own lead.
		a.Theta = []float64{math.Pi, 0, 0}
		got = r.EffectiveInsertion(a)
		want = []float64{-0.198, -0.1, -0.05}
		for i := range want {
			assert.InDelta(t, want[i], got[i], 1e-15, "EffectiveInsertion tube %d", i+1)
		}
	})

	t.Run("nesting after threads", func(t *testing.T) {
		// Retracting the inner tube by its thread until it no longer reaches as
		// far as the outer one is infeasible, and the message says so.
		r := robot(0.06)
		a := Actuation{Theta: []float64{-2 * math.Pi, 0}, Beta: []float64{-0.15, -0.1}}
		want := "tube 2 (outermost) reaches 100 mm beyond the base but tube 1 (innermost) inside it only 90 mm, thread included (inner tubes must reach at least as far)"
		assert.EqualError(t, r.CheckActuation(a), want, "CheckActuation(θ=%v)", a.Theta)
		// Without the rotation the same insertions are feasible.
		a.Theta = []float64{0, 0}
		assert.NoError(t, r.CheckActuation(a), "CheckActuation(θ=%v)", a.Theta)
	})
}
