package objective

import (
	"context"
	"fmt"
	"math"
	"strings"
	"sync"

	"plica/objective/kinematics"
)

// Scores are the numbers a designer decides on, SI.
type Scores struct {
	// TipSag is the worst tip displacement along gravity over the sampled
	// workspace, between the shape loaded by self-weight and payload and
	// the shape without gravity, from the geometrically exact rod model, m.
	TipSag float64
	// TipSagLinear is the small-load linear estimate at the same
	// configuration, m.
	TipSagLinear float64
	// SagActuation is where the worst sag occurs.
	SagActuation kinematics.Actuation
	// SagIterations is the number of Newton iterations of the sag solve.
	SagIterations int

	Reach          float64 // largest lateral tip distance from the base axis, m
	BendAngleMin   float64 // smallest angle of the tip tangent from the base axis, rad
	BendAngleMax   float64 // largest, rad
	BendAngleRange float64 // BendAngleMax − BendAngleMin, rad
	// DOF is the number of actuation parameters (relative rotations, common
	// rotation, insertions).
	DOF int
	// SurfaceArea is the area of the surface the tip sweeps (DOF = 2), m².
	SurfaceArea float64
	// Volume is the voxel volume of the tip point cloud (DOF ≥ 3), m³.
	Volume float64
	// VoxelSize is the voxel edge used for Volume, m.
	VoxelSize float64
	// TaskCoverage is the fraction of task points reached (1 without tasks).
	TaskCoverage float64
	// TaskReached lists, per task point, whether it is reached.
	TaskReached []bool
	// TaskMiss is the largest miss over the task points (0 when every
	// point is reached, or without task points), m.
	TaskMiss float64
	// TaskMisses gives, per task point, the closest tip and its miss.
	TaskMisses []TaskMiss

	// The curvature scores look at the nested section: links where two or
	// more bellows are present (all links for a single bellows). A curved
	// tip that sticks out of the nest shows in StraightTipOffset or
	// StraightTipAngle.
	ResidualCurvature float64 // largest nested-section curvature at the straightest configuration, 1/m
	StraightTipOffset float64 // tip lateral offset at the straightest configuration, m
	// StraightTipAngle is the angle of the tip tangent from the base axis
	// at the straightest configuration, rad: a nest that bends back under
	// a curved tip sticking out of it puts the tip on the axis (small
	// StraightTipOffset) while the tip still points off it.
	StraightTipAngle float64
	CurvatureMin     float64 // smallest (over the workspace) of the largest nested-section curvature, 1/m
	CurvatureMax     float64 // largest nested-section curvature over the workspace, 1/m

	// PeakStrain is the largest meridional wall strain over the workspace
	// and all bellows with a wall model (NaN when no bellows has one).
	PeakStrain float64
	// StrainPerBellows is the peak strain of each bellows (NaN: measured).
	StrainPerBellows []float64
	// AllowableStrain is the smallest allowable strain divided by the
	// safety factor, over the bellows with a wall model.
	AllowableStrain float64
	// StrainRatio is the largest ratio of a bellows' peak strain to its own
	// allowable strain (after the safety factor), over the bellows with a
	// wall model (NaN when none has one). With mixed materials it is not
	// PeakStrain/AllowableStrain: those two may come from different bellows.
	StrainRatio float64

	// StabilityMargin is the smallest 1 − L/L_crit over neighbouring pairs
	// (1 when no pair overlaps in its curved parts).
	StabilityMargin float64
	// Stability lists each neighbouring pair's stability.
	Stability []PairMargin

	Mass            float64 // bellows mass, kg
	PayloadToWeight float64 // payload mass / bellows mass
	MinClearance    float64 // smallest radial clearance between neighbours, m (NaN: unknown)
}

// PairMargin is the snap-stability of bellows Inner and Inner+1.
type PairMargin struct {
	Inner   int     // 0-based
	Overlap float64 // overlapping curved length, m
	Lambda  float64 // L·sqrt(c_eff)
	LCrit   float64 // critical overlap length, m
	Margin  float64 // 1 − L/L_crit
}

// Check is one requirement with its value and limit.
type Check struct {
	Name  string  // e.g. "tip_sag"
	Value float64 // in Unit
	Limit float64 // in Unit
	Unit  string  // e.g. "mm"
	// Max is true when Value must not exceed Limit, false when it must
	// reach it.
	Max  bool
	Pass bool
	// Warn marks a check that warns without failing the design
	// (Result.Pass ignores it); a search still treats it as a constraint.
	Warn bool
	Note string
}

// Result is the evaluation of one design.
type Result struct {
	Pass    bool
	Scores  Scores
	Bellows []Stiffness
	Checks  []Check
	// Models says which models and fidelity produced the numbers.
	Models []string
	// Warnings are findings that do not fail a check but need attention.
	Warnings []string
	// MisorderedPairs lists, by their inner bellows (1-based), the
	// neighbouring pairs whose nesting clearance fails by more than the
	// outer bellows' wall: too much for a tight fit, as when the bellows
	// are listed outermost first (Warnings carries the hint).
	MisorderedPairs []int
}

type evaluator struct {
	d                  *Design
	sc                 *Scenario
	robot              *kinematics.Robot
	st                 []Stiffness
	payload            float64 // kg
	strainPerCurvature []float64
	nodes              []gaussNode
	pieces             []gaussPiece
	// fine makes the workspace compliance use fineRule instead of rankRule.
	fine bool
	// tipsOnly skips the compliance of the shapes (WorkspaceTips).
	tipsOnly bool
	// screen makes evalShape compute the sag bound of a shape instead of
	// its compliance, which the sag scan then computes where the bound
	// can reach the worst sag (screenSag); gravity is the scenario's.
	screen  bool
	gravity [3]float64
	// |g| and the parts of ĝ along and across the base axis (sagBound)
	gravityNorm, gravityZ, gravityXY float64
	linkStarts                       [][3]float64 // link start positions of the shape being sampled
	precurv                          [][2]float64 // turned pre-curvatures of the shape being sampled
	order                            []int        // scratch of the sag scan
	shapes                           []*shape
	slab                             []shape   // storage of shapes (newShape)
	strainSlab                       []float64 // storage of their strains
	shapePtrs                        []*shape  // storage of the list of shapes
	voxels                           []uint64  // bitset of voxelVolume, all zero between uses
	touched                          []int32   // words of voxels set during one count
	solver                           *kinematics.Solver
	linkBuf                          []kinematics.Link
	share                            linkShare    // link solutions shared across samples (linkshare.go)
	boundStarts                      [][3]float64 // link starts of the shapes, for refineBound
	boundLam                         []float64    // link stiffness eigenvalues of the shapes, for refineBound
	hh                               [][6]float64 // gravity products of the common rotations (sag)
	stabActs                         []kinematics.Actuation
	stabKey                          []byte
	lastPlan                         lastPlan           // the plan of the evaluation before (workspace)
	scr                              *scratch           // the storage taken (takeScratch)
	spare                            *kinematics.Solver // the pooled solver, until workspace resets it

	ctx      context.Context // nil: never cancelled
	progress func(Progress)
	stage    string // the stage running, for internal-error messages
}

// Progress is how far an evaluation has come: Done of Total work units of
// the named stage (actuation samples, or samples times common rotations).
type Progress struct {
	Stage       string
	Done, Total int
}

// Stage names, as progress reports and internal-error messages give them.
const (
	StageStiffness = "stiffness"
	StageWorkspace = "workspace sampling"
	StageTasks     = "task points"
	StageSag       = "tip sag"
	StageVolume    = "workspace volume"
	StageMargins   = "margins"
	StageChecks    = "checks"
)

// batch is the number of work units between two looks at the context and
// two progress reports: cheap against the work, frequent enough that a
// cancelled evaluation stops within milliseconds.
const batch = 256

// stageHook, when set (by tests), runs at the start of every stage.
var stageHook func(stage string)

// InternalError is a failure of plica itself inside an evaluation (a
// panic), turned into an error that names the stage.
type InternalError struct {
	Stage string
	Value any
}

func (e *InternalError) Error() string {
	msg := strings.Join(strings.Fields(fmt.Sprint(e.Value)), " ")
	return fmt.Sprintf("internal error in %s: %s", e.Stage, msg)
}

// Evaluate scores one design in a scenario: workspace, straightening,
// tip sag under payload and margins, each against the scenario's
// requirements. It is EvaluateContext without cancellation.
func Evaluate(d *Design, sc *Scenario) (*Result, error) {
	return EvaluateProgress(context.Background(), d, sc, nil)
}

// EvaluateContext is Evaluate that stops, returning ctx.Err(), soon after
// ctx is cancelled.
func EvaluateContext(ctx context.Context, d *Design, sc *Scenario) (*Result, error) {
	return EvaluateProgress(ctx, d, sc, nil)
}

// EvaluateProgress is EvaluateContext that also reports its progress to
// progress (when not nil), every few hundred work units, from the calling
// goroutine.
//
// A design whose physics leaves floating point (a non-finite stiffness,
// tip, curvature, strain, compliance or sag) fails with an error naming
// what was not finite; a panic inside the evaluation is returned as an
// *InternalError naming the stage. Neither prints NaN nor stops the
// caller.
func EvaluateProgress(ctx context.Context, d *Design, sc *Scenario, progress func(Progress)) (res *Result, err error) {
	if sc == nil {
		sc = &Scenario{}
	}
	e := &evaluator{d: d, sc: sc, payload: sc.Load.PayloadMass, ctx: ctx, progress: progress}
	e.takeScratch()
	defer e.putScratch()
	defer func() {
		if r := recover(); r != nil {
			res, err = nil, &InternalError{Stage: e.stage, Value: r}
		}
	}()
	if err := sc.Workspace.check(); err != nil {
		return nil, err
	}
	e.enter(StageStiffness)
	robot, st, err := d.Robot()
	if err != nil {
		return nil, err
	}
	e.robot, e.st = robot, st
	e.strainPerCurvature = growTo(e.strainPerCurvature, len(st))
	for i, s := range st {
		e.strainPerCurvature[i] = 0
		if s.Section != nil {
			e.strainPerCurvature[i] = s.Section.StrainPerCurvature
		}
	}
	res = &Result{Bellows: st}
	w := defaults(sc.Workspace)
	if err := e.workspace(w, res); err != nil {
		return nil, err
	}
	e.enter(StageSag)
	if err := e.sag(res); err != nil {
		return nil, err
	}
	e.enter(StageMargins)
	if err := e.margins(res); err != nil {
		return nil, err
	}
	e.enter(StageChecks)
	e.checks(res)
	e.models(res)
	if err := finiteScores(d, res); err != nil {
		return nil, err
	}
	return res, nil
}

// scratch is the storage an evaluation reuses from the one before it, so
// that a search does not allocate per sample: shape and compliance
// buffers. Nothing of it is part of a Result.
type scratch struct {
	nodes       []gaussNode
	pieces      []gaussPiece
	slab        []shape
	strainSlab  []float64
	shapePtrs   []*shape
	linkBuf     []kinematics.Link
	voxels      []uint64
	touched     []int32
	linkStarts  [][3]float64
	precurv     [][2]float64
	order       []int
	share       linkShare
	boundStarts [][3]float64
	boundLam    []float64
	spc         []float64
	hh          [][6]float64
	stabActs    []kinematics.Actuation
	stabKey     []byte
	plan        lastPlan
	solver      *kinematics.Solver
}

var scratchPool = sync.Pool{New: func() any { return new(scratch) }}

func (e *evaluator) takeScratch() {
	s := scratchPool.Get().(*scratch)
	e.scr = s
	e.spare = s.solver
	e.strainPerCurvature, e.hh, e.stabActs, e.stabKey, e.lastPlan = s.spc, s.hh, s.stabActs, s.stabKey, s.plan
	e.nodes, e.pieces, e.slab, e.strainSlab, e.shapePtrs, e.linkBuf = s.nodes, s.pieces, s.slab, s.strainSlab, s.shapePtrs, s.linkBuf
	e.voxels, e.touched = s.voxels, s.touched
	e.linkStarts, e.precurv, e.order = s.linkStarts, s.precurv, s.order
	e.share = s.share
	e.share.ready = false
	e.boundStarts, e.boundLam = s.boundStarts[:0], s.boundLam[:0]
}

func (e *evaluator) putScratch() {
	clear(e.shapePtrs[:cap(e.shapePtrs)])
	clear(e.slab[:cap(e.slab)]) // drop the actuations it points to
	*e.scr = scratch{nodes: e.nodes[:0], pieces: e.pieces[:0], slab: e.slab[:0], strainSlab: e.strainSlab[:0],
		shapePtrs: e.shapePtrs[:0], linkBuf: e.linkBuf[:0], voxels: e.voxels, touched: e.touched[:0],
		linkStarts: e.linkStarts[:0], precurv: e.precurv, order: e.order[:0], share: e.share,
		boundStarts: e.boundStarts[:0], boundLam: e.boundLam[:0],
		spc: e.strainPerCurvature[:0], hh: e.hh[:0], stabActs: e.stabActs[:0], stabKey: e.stabKey[:0], plan: e.lastPlan,
		solver: e.solver}
	if e.solver == nil {
		e.scr.solver = e.spare
	}
	scratchPool.Put(e.scr)
	e.scr = nil
	e.shapes = nil
}

// enter starts a stage.
func (e *evaluator) enter(stage string) {
	e.stage = stage
	if stageHook != nil {
		stageHook(stage)
	}
}

// tick is called once per work unit k of total in the running stage: every
// batch units it reports progress and returns the context's error once
// cancelled.
func (e *evaluator) tick(k, total int) error {
	if k%batch != 0 {
		return nil
	}
	if e.ctx != nil {
		if err := e.ctx.Err(); err != nil {
			return err
		}
	}
	if e.progress != nil {
		e.progress(Progress{Stage: e.stage, Done: k, Total: total})
	}
	return nil
}

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// nonFinite is the reason of a design whose physics left floating point.
func nonFinite(what string) error {
	return fmt.Errorf("%s is not finite (the design is beyond what the model computes: lengths, curvatures or stiffnesses too large or too small)", what)
}

// workspace samples the actuation space and fills the workspace,
// straightening and strain scores.
func (e *evaluator) workspace(w Workspace, res *Result) error {
	e.enter(StageWorkspace)
	n := len(e.robot.Tubes)
	p := e.lastPlan.get(n, w)
	sc := &res.Scores
	sc.DOF = p.dof
	e.gravity = e.sc.Load.GravityVector()
	e.screen = screenSag && e.gravity != ([3]float64{})
	if e.screen {
		g := e.gravity
		e.gravityNorm = math.Sqrt(g[0]*g[0] + g[1]*g[1] + g[2]*g[2])
		e.gravityZ = math.Abs(g[2]) / e.gravityNorm
		e.gravityXY = math.Hypot(g[0], g[1]) / e.gravityNorm
	}
	e.reserve(len(p.acts))
	if cap(e.shapePtrs) < len(p.acts) {
		e.shapePtrs = make([]*shape, 0, len(p.acts))
	}
	shapes := e.shapePtrs[:0]
	if e.solver == nil && e.spare != nil {
		// the pooled solver, made the solver of this robot
		if err := e.spare.Reset(e.robot); err != nil {
			return err
		}
		e.solver, e.spare = e.spare, nil
	}
	if e.solver == nil {
		solver, err := kinematics.NewSolver(e.robot)
		if err != nil {
			return err
		}
		e.solver = solver
	}
	share := e.shareUsable()
	e.share.ready = false
	e.boundStarts, e.boundLam = e.boundStarts[:0], e.boundLam[:0]
	for k, a := range p.acts {
		if err := e.tick(k, len(p.acts)); err != nil {
			return err
		}
		var sh *shape
		var err error
		if share {
			sh, err = e.evalShared(&p, k)
		} else {
			sh, err = e.evalShape(a)
		}
		if err != nil {
			return err
		}
		if sh != nil {
			shapes = append(shapes, sh)
		}
	}
	if len(shapes) == 0 {
		return fmt.Errorf("no sampled actuation satisfies the nesting rules")
	}
	e.shapes = shapes
	sc.BendAngleMin = math.Inf(1)
	sc.CurvatureMin = math.Inf(1)
	sc.StraightTipOffset = math.Inf(1)
	sc.StrainPerBellows = make([]float64, n)
	straightest := shapes[0]
	for _, sh := range shapes {
		rho := sh.rho
		sc.Reach = fmax(sc.Reach, rho)
		bend := math.Acos(clamp(sh.tip.R[2][2], -1, 1))
		sc.BendAngleMin = fmin(sc.BendAngleMin, bend)
		sc.BendAngleMax = fmax(sc.BendAngleMax, bend)
		sc.CurvatureMin = fmin(sc.CurvatureMin, sh.kmax)
		sc.CurvatureMax = fmax(sc.CurvatureMax, sh.kmax)
		if rho < sc.StraightTipOffset {
			sc.StraightTipOffset = rho
			straightest = sh
		}
		for i, s := range sh.strain {
			sc.StrainPerBellows[i] = fmax(sc.StrainPerBellows[i], s)
		}
	}
	sc.BendAngleRange = sc.BendAngleMax - sc.BendAngleMin
	sc.ResidualCurvature = straightest.kmax
	sc.StraightTipAngle = math.Acos(clamp(straightest.tip.R[2][2], -1, 1))
	sc.PeakStrain = math.NaN()
	for i, s := range e.st {
		if s.Section == nil {
			sc.StrainPerBellows[i] = math.NaN()
			continue
		}
		if math.IsNaN(sc.PeakStrain) || sc.StrainPerBellows[i] > sc.PeakStrain {
			sc.PeakStrain = sc.StrainPerBellows[i]
		}
	}
	if p.grid2 {
		sc.SurfaceArea = revolvedArea(shapes)
	} else if p.dof >= 3 {
		e.enter(StageVolume)
		sc.VoxelSize = w.VoxelSize
		v, err := e.voxelVolume(shapes, w.BaseSteps, w.VoxelSize)
		if err != nil {
			return err
		}
		sc.Volume = v
	}
	e.enter(StageTasks)
	return e.tasks(shapes, res)
}

// revolvedArea is the area of the surface swept by the tip of a pair: the
// tip curve over a full turn of relative rotation, revolved about the base
// axis by the common rotation. A full turn traces the curve out and back
// (mirror images for bellows whose stiffness axes are the bending axes), so
// the area is half the revolved area of the whole closed sweep: A =
// ½ Σ 2π ρ̄ |Δ(ρ, z)| (Pappus' centroid theorem, applied per segment).
func revolvedArea(shapes []*shape) float64 {
	area := 0.0
	for k := range shapes {
		a := shapes[k].tip.P
		b := shapes[(k+1)%len(shapes)].tip.P
		ra, rb := math.Hypot(a[0], a[1]), math.Hypot(b[0], b[1])
		ds := math.Hypot(rb-ra, b[2]-a[2])
		area += 2 * math.Pi * (ra + rb) / 2 * ds
	}
	return area / 2
}

// tasks decides for every task point whether some actuation reaches it,
// and how far it misses otherwise (task.go).
func (e *evaluator) tasks(shapes []*shape, res *Result) error {
	sc := &res.Scores
	if len(e.sc.Tasks) == 0 {
		sc.TaskCoverage = 1
		return nil
	}
	misses, err := e.taskMisses(shapes)
	if err != nil {
		return err
	}
	sc.TaskMisses = misses
	sc.TaskReached = make([]bool, len(misses))
	reached := 0
	for i, m := range misses {
		sc.TaskReached[i] = m.Reached
		if m.Reached {
			reached++
		}
		sc.TaskMiss = math.Max(sc.TaskMiss, m.Miss+e.armLength()*m.AngleMiss)
	}
	sc.TaskCoverage = float64(reached) / float64(len(misses))
	return nil
}

func clamp(x, lo, hi float64) float64 { return fmax(lo, fmin(hi, x)) }

// fmax is math.Max, with the comparison inline: only equal values (signed
// zeros) and NaN go to math.Max.
func fmax(x, y float64) float64 {
	if x > y {
		return x
	}
	if y > x {
		return y
	}
	return math.Max(x, y)
}

// fmin is math.Min, as fmax is math.Max.
func fmin(x, y float64) float64 {
	if x < y {
		return x
	}
	if y < x {
		return y
	}
	return math.Min(x, y)
}
