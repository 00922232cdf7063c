package objective

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective/kinematics"
	"plica/surrogate"
	"plica/surrogate/shell"
)

// boomPair is a two-bellows design with measured stiffness, the numbers
// invented for the tests.
func boomPair() *Design {
	return &Design{Bellows: []Bellows{
		measuredBellows(0.35, 0.1, 10, 1, 50, 0.05),
		measuredBellows(0.35, 0.1, 5, 2, 100, 0.08),
	}}
}

// TestOutOfRangeDesign: lengths, pre-curvatures and stiffnesses far beyond
// any bellows are refused by Robot, each naming the design-file key, before
// any physics runs (these values used to crash the evaluation).
func TestOutOfRangeDesign(t *testing.T) {
	for _, c := range []struct {
		key  string
		edit func(b *Bellows)
	}{
		{"straight_length_mm", func(b *Bellows) { b.StraightLength = 1e117 }},
		{"curved_length_mm", func(b *Bellows) { b.CurvedLength = math.NaN() }},
		{"precurvature_per_m", func(b *Bellows) { b.Precurvature = [2]float64{0, 1e300} }},
		{"precurvature_xy_per_m", func(b *Bellows) { b.Precurvature = [2]float64{3e4, 1} }},
		{"bending_stiffness_n_mm2", func(b *Bellows) { b.Measured.EI = [2]float64{1e294, 1e294} }},
		{"bending_stiffness_n_mm2", func(b *Bellows) { b.Measured.EI = [2]float64{1e-306, 1e-306} }},
		{"bending_stiffness_n_mm2", func(b *Bellows) { b.Measured.EI = [2]float64{1, 5e-324} }},
		{"torsional_stiffness_n_mm2", func(b *Bellows) { b.Measured.GJ = 1e294 }},
		{"torsional_stiffness_n_mm2", func(b *Bellows) { b.Measured.GJ = 1e-306 }},
		{"linear_density_kg_per_m", func(b *Bellows) { b.Measured.LinearDensity = 1e300 }},
		{"thread_lead_mm", func(b *Bellows) { b.ThreadLead = 1e200 }},
	} {
		d := boomPair()
		c.edit(&d.Bellows[1])
		_, _, err := d.Robot()
		var be *BellowsError
		require.ErrorAs(t, err, &be, c.key)
		assert.Equal(t, 1, be.Index, c.key)
		assert.True(t, strings.HasPrefix(be.Err.Error(), c.key+": "), "%s: %v", c.key, err)
		assert.Contains(t, err.Error(), "out of range (expected", c.key)
		_, err = Evaluate(d, nil)
		assert.ErrorAs(t, err, &be, "Evaluate refuses it too: %s", c.key)
	}
	// At the limits the design is accepted.
	d := boomPair()
	d.Bellows[0].StraightLength, d.Bellows[1].StraightLength = MaxLength, MaxLength
	_, _, err := d.Robot()
	assert.NoError(t, err)
	d = boomPair()
	d.Bellows[0].Measured.EI = [2]float64{MinStiffness, MinStiffness}
	d.Bellows[0].Measured.GJ = MinStiffness
	_, _, err = d.Robot()
	assert.NoError(t, err)
}

// TestNonFiniteShapeIsAReason: a robot whose numbers pass validation but
// overflow in the kinematics (a pre-curvature of 1e300 1/m, beyond the
// design ranges, given to the evaluator directly) fails the workspace with
// a reason naming what is not finite. Every sampled tip is NaN there; the
// straightest-configuration pointer used to be nil and crash.
func TestNonFiniteShapeIsAReason(t *testing.T) {
	d := boomPair()
	robot := &kinematics.Robot{}
	for _, b := range d.Bellows {
		robot.Tubes = append(robot.Tubes, kinematics.Tube{StraightLength: b.StraightLength, CurvedLength: b.CurvedLength,
			Precurvature: [2]float64{0, 1e300}, Bending: [2][2]float64{{1, 0}, {0, 1}}, Torsion: 50, LinearDensity: 0.05})
	}
	require.NoError(t, robot.Validate(), "finite numbers pass validation")
	e := &evaluator{d: d, sc: &Scenario{}, robot: robot, st: make([]Stiffness, 2), strainPerCurvature: make([]float64, 2)}
	err := e.workspace(defaults(Workspace{}), &Result{})
	require.Error(t, err)
	assert.Contains(t, err.Error(), "is not finite")
	assert.Contains(t, err.Error(), "at angles")
}

// TestNonFiniteStiffnessIsAReason: a surrogate geometry so large that the
// stiffness model would overflow (an outer diameter of 1e96 m) is refused
// as out of range before any model runs, and the last guard behind that
// range, checkFinite, names a non-finite section instead of passing it on.
func TestNonFiniteStiffnessIsAReason(t *testing.T) {
	petg, ok := surrogate.LookupMaterial("petg")
	require.True(t, ok)
	huge := func(od float64) *surrogate.Bellows {
		return &surrogate.Bellows{Geometry: surrogate.Geometry{OuterDiameter: od, Depth: 3e-3, Pitch: 1e47, Wall: 0.5e-3}, Material: petg}
	}
	d := &Design{Bellows: []Bellows{
		{Model: huge(1e96), StraightLength: 0.15, CurvedLength: 0.1, Precurvature: [2]float64{0, 4}},
		{Model: huge(1e97), StraightLength: 0.15, CurvedLength: 0.1, Precurvature: [2]float64{0, 1.3}},
	}}
	res, err := Evaluate(d, &Scenario{Workspace: Workspace{RelativeSteps: 8, BaseSteps: 4}})
	require.Error(t, err, "scores %+v", res)
	assert.Contains(t, err.Error(), "outer_diameter_mm: 1e+99 is out of range (expected at most 10000 mm)")
	var ie *surrogate.InputError
	assert.ErrorAs(t, err, &ie, "positioned at a key")

	for _, s := range []Stiffness{
		{EI: [2][2]float64{{math.Inf(1), 0}, {0, 1}}, GJ: 1, LinearDensity: 1, Source: SourceStrip},
		{EI: [2][2]float64{{1, 0}, {0, 1}}, GJ: math.NaN(), LinearDensity: 1, Source: SourceStrip},
		{EI: [2][2]float64{{1, 0}, {0, 1}}, GJ: 1, LinearDensity: math.Inf(1), Source: SourceStrip},
	} {
		assert.ErrorContains(t, s.checkFinite(), "non-finite")
	}
}

// TestFiniteScoresGuard: the last guard names a non-finite score, and lets
// the documented NaN (strain without a wall model, unknown clearance)
// through.
func TestFiniteScoresGuard(t *testing.T) {
	d := boomPair()
	res, err := Evaluate(d, &Scenario{Workspace: Workspace{RelativeSteps: 8, BaseSteps: 4}})
	require.NoError(t, err)
	assert.True(t, math.IsNaN(res.Scores.PeakStrain), "measured stiffness: no wall strain")
	assert.True(t, math.IsNaN(res.Scores.MinClearance), "measured stiffness: clearance unknown")
	require.NoError(t, finiteScores(d, res))
	res.Scores.TipSag = math.Inf(1)
	err = finiteScores(d, res)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "tip_sag_mm is not finite")
	res.Scores.TipSag = 0
	res.Checks = append(res.Checks, Check{Name: "mass", Value: math.NaN()})
	assert.ErrorContains(t, finiteScores(d, res), "check mass is not finite")
}

// TestPanicBecomesInternalError: a panic in any stage of an evaluation is
// an *InternalError naming the stage, one line, without a goroutine trace.
func TestPanicBecomesInternalError(t *testing.T) {
	defer func() { stageHook = nil }()
	d := boomPair()
	sc := &Scenario{Workspace: Workspace{RelativeSteps: 8, BaseSteps: 4}}
	for _, stage := range []string{StageStiffness, StageWorkspace, StageTasks, StageSag, StageMargins, StageChecks} {
		stageHook = func(s string) {
			if s == stage {
				panic(fmt.Sprintf("forced\nin %s", s))
			}
		}
		res, err := Evaluate(d, sc)
		assert.Nil(t, res)
		var ie *InternalError
		require.ErrorAs(t, err, &ie, stage)
		assert.Equal(t, stage, ie.Stage)
		assert.Equal(t, "internal error in "+stage+": forced in "+stage, err.Error())
	}
	stageHook = func(s string) {
		if s == StageWorkspace {
			var p *shape
			_ = p.kmax // a nil pointer, as the straightest shape used to be
		}
	}
	_, err := Evaluate(d, sc)
	assert.EqualError(t, err, "internal error in workspace sampling: runtime error: invalid memory address or nil pointer dereference")
}

// TestEvaluateContext: a cancelled context stops an evaluation with the
// context's error; progress is reported by stage and never runs past its
// total; Evaluate and EvaluateContext with a live context agree.
func TestEvaluateContext(t *testing.T) {
	d := boomPair()
	big := &Scenario{Workspace: Workspace{RelativeSteps: MaxRelativeSteps, BaseSteps: MaxBaseSteps}}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := EvaluateContext(ctx, d, big)
	assert.ErrorIs(t, err, context.Canceled)

	// Cancelled from the progress callback, in the middle of sampling.
	ctx, cancel = context.WithCancel(context.Background())
	defer cancel()
	var seen []Progress
	_, err = EvaluateProgress(ctx, d, big, func(p Progress) {
		seen = append(seen, p)
		if p.Stage == StageWorkspace && p.Done >= 4*batch {
			cancel()
		}
	})
	assert.ErrorIs(t, err, context.Canceled)
	require.NotEmpty(t, seen)
	last := seen[len(seen)-1]
	assert.Equal(t, StageWorkspace, last.Stage)
	assert.Equal(t, 4*batch, last.Done, "stopped at the next batch after the cancel")
	assert.Equal(t, MaxRelativeSteps, last.Total)

	small := &Scenario{Workspace: Workspace{RelativeSteps: 16, BaseSteps: 8}}
	stages := map[string]bool{}
	a, err := EvaluateProgress(context.Background(), d, small, func(p Progress) {
		stages[p.Stage] = true
		assert.LessOrEqual(t, p.Done, p.Total, p.Stage)
	})
	require.NoError(t, err)
	assert.True(t, stages[StageWorkspace] && stages[StageSag] && stages[StageMargins], "stages %v", stages)
	b, err := Evaluate(d, small)
	require.NoError(t, err)
	assert.Equal(t, fmt.Sprintf("%v", a.Scores), fmt.Sprintf("%v", b.Scores), "NaN-safe comparison")
}

// TestCancelledDeadline: a deadline is honoured like a cancel (the search
// gives each evaluation one).
func TestCancelledDeadline(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), time.Nanosecond)
	defer cancel()
	<-ctx.Done()
	_, err := EvaluateContext(ctx, boomPair(), nil)
	assert.True(t, errors.Is(err, context.DeadlineExceeded), "%v", err)
}

// TestWorkspaceCaps: sample counts above the caps, or negative, are
// refused before any work.
func TestWorkspaceCaps(t *testing.T) {
	for _, w := range []Workspace{
		{Samples: MaxSamples + 1}, {RelativeSteps: MaxRelativeSteps + 1}, {BaseSteps: MaxBaseSteps + 1},
		{InsertionSteps: MaxInsertionSteps + 1}, {BaseSteps: -1}, {VoxelSize: math.Inf(1)},
	} {
		_, err := Evaluate(boomPair(), &Scenario{Workspace: w})
		require.Error(t, err, "%+v", w)
		assert.Contains(t, err.Error(), "out of range", "%+v", w)
	}
}

// TestModelFailureWording: a stiffness-model failure reaches the user
// without the model package's prefix; an input error keeps its key.
func TestModelFailureWording(t *testing.T) {
	err := modelFailure(&shell.SolveError{Reason: "stiffness matrix is not positive definite"})
	assert.EqualError(t, err, "the stiffness model cannot compute this geometry: stiffness matrix is not positive definite")
	err = modelFailure(errors.New("another model's reason"))
	assert.EqualError(t, err, "the stiffness model cannot compute this geometry: another model's reason")
	in := &surrogate.InputError{Key: "wall_mm", Msg: "0 is not a positive finite number (expected > 0)"}
	assert.Same(t, in, modelFailure(in))
}
