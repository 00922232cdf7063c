package objective

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/objective/kinematics"
)

// threeBellows and fourBellows are demo nested sets (invented values) for
// the growth benchmarks and the equality tests of the shortcuts.
func threeBellows() *Design {
	return &Design{Bellows: []Bellows{
		measuredBellows(0.2, 0.08, 14, 0.3, 20, 0.01),
		measuredBellows(0.15, 0.1, 6, 0.8, 35, 0.02),
		measuredBellows(0.12, 0.06, 3, 1.5, 60, 0.03),
	}}
}

func fourBellows() *Design {
	d := threeBellows()
	d.Bellows = append([]Bellows{measuredBellows(0.25, 0.06, 18, 0.15, 12, 0.006)}, d.Bellows...)
	return d
}

// TestRigidCommonRotation: a common rotation φ of a torsionally rigid set
// turns the unloaded shape rigidly about the base axis
// (objective/kinematics/REFERENCE.md §3.1: the link curvatures turn with
// the bending planes), so the workspace samples only relative rotations and
// insertions. Every tip WorkspaceTips draws equals the tip of the full
// actuation (relative angles plus φ on every bellows) solved from scratch,
// and the compliance of the turned shape is R_z(φ) C R_z(φ)ᵀ, which the sag
// scan uses with gravity fixed in the base frame.
func TestRigidCommonRotation(t *testing.T) {
	for name, d := range map[string]*Design{"two": {Bellows: []Bellows{
		measuredBellows(0.15, 0.11, 9, 0.6, 30, 0.02),
		measuredBellows(0.15, 0.10, 4, 1.1, 45, 0.03),
	}}, "three": threeBellows()} {
		robot, _, err := d.Robot()
		require.NoError(t, err)
		n := len(d.Bellows)
		w := defaults(Workspace{RelativeSteps: 6, BaseSteps: 5})
		tips, err := WorkspaceTips(robot, w)
		require.NoError(t, err)
		acts := buildPlan(n, w).acts
		require.Len(t, tips, len(acts)*w.BaseSteps)
		k := 0
		for _, a := range acts {
			for j := range w.BaseSteps {
				phi := 2 * math.Pi * float64(j) / float64(w.BaseSteps)
				full := kinematics.Actuation{Theta: make([]float64, n), Beta: a.Beta}
				for i := range n {
					full.Theta[i] = a.Theta[i] + phi
				}
				tip, err := robot.Tip(full)
				require.NoError(t, err)
				for c := range 3 {
					assert.InDelta(t, tip.P[c], tips[k][c], 1e-14, "%s: tip %d component %d", name, k, c)
				}
				if j == 2 {
					e := &evaluator{robot: robot, payload: 0.05}
					l0, err := robot.Links(a, nil)
					require.NoError(t, err)
					l1, err := robot.Links(full, nil)
					require.NoError(t, err)
					C0, C1 := e.compliance(l0, &fineRule), e.compliance(l1, &fineRule)
					s, c := math.Sincos(phi)
					Rz := [3][3]float64{{c, -s, 0}, {s, c, 0}, {0, 0, 1}}
					var turned [3][3]float64
					for p := range 3 {
						for q := range 3 {
							for r := range 3 {
								for u := range 3 {
									turned[p][q] += Rz[p][r] * C0[r][u] * Rz[q][u]
								}
							}
						}
					}
					assert.Less(t, maxRelDiff(turned, C1), 1e-12, "%s: compliance of the turned shape", name)
				}
				k++
			}
		}
	}
}

// TestVoxelBitsetEqualsMap: the bitset count (counted over the whole box
// and over the words set) and the hash-set count of the same tips are the
// same number of voxels, with the dense kernel of the machine (ringAVX on
// amd64 with AVX) and the plain loop, for three and four bellows (one with
// an odd number of common rotations), a threaded pair with an insertion range and
// a voxel edge small enough that the box exceeds the bitset bound (hash
// set on both sides).
func TestVoxelBitsetEqualsMap(t *testing.T) {
	cases := []struct {
		name string
		d    *Design
		w    Workspace
	}{
		{"three", threeBellows(), Workspace{RelativeSteps: 16, BaseSteps: 32}},
		{"four", fourBellows(), Workspace{RelativeSteps: 8, BaseSteps: 16, VoxelSize: 1e-3}},
		{"three fine", threeBellows(), Workspace{RelativeSteps: 8, BaseSteps: 8, VoxelSize: 5e-5}},
		{"three insertion", threeBellows(), Workspace{RelativeSteps: 8, BaseSteps: 16, InsertionSteps: 3, Insertion: [][2]float64{{-0.03, 0}}}},
		{"three odd base steps", threeBellows(), Workspace{RelativeSteps: 12, BaseSteps: 15}},
	}
	for _, c := range cases {
		robot, st, err := c.d.Robot()
		require.NoError(t, err)
		w := defaults(c.w)
		e := &evaluator{d: c.d, robot: robot, st: st, strainPerCurvature: make([]float64, len(st))}
		var shapes []*shape
		for _, a := range buildPlan(len(st), w).acts {
			sh, err := e.evalShape(a)
			require.NoError(t, err)
			if sh != nil {
				shapes = append(shapes, sh)
			}
		}
		want, err := voxelVolumeMap(shapes, w.BaseSteps, w.VoxelSize, func(int, int) error { return nil })
		require.NoError(t, err)
		assert.Greater(t, want, 0.0, c.name)
		// the bitset counted whole (dense), by the words set, and as
		// chosen, with the dense kernel of the machine and the plain loop
		chosen := ringDense
		for _, kernel := range []string{"chosen", "plain"} {
			if kernel == "plain" {
				ringDense = ringDenseGo
			}
			for _, mode := range []int{1, 2, 0} {
				voxelMode = mode
				got, err := e.voxelVolume(shapes, w.BaseSteps, w.VoxelSize)
				voxelMode = 0
				require.NoError(t, err)
				assert.Equal(t, want, got, "%s mode %d kernel %s: bitset vs hash set", c.name, mode, kernel)
				for _, v := range e.voxels {
					require.Zero(t, v, "%s mode %d kernel %s: the bitset is left clear", c.name, mode, kernel)
				}
			}
			ringDense = chosen
		}
	}
}

// benchEvaluate reports wall-clock and process CPU milliseconds per
// evaluation (on a shared machine the CPU time leaves out the waits for a
// core).
func benchEvaluate(b *testing.B, d *Design, sc *Scenario) {
	cpu0 := processCPU()
	for b.Loop() {
		if _, err := Evaluate(d, sc); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(b.Elapsed().Seconds()*1e3/float64(b.N), "ms/eval")
	if cpu := processCPU() - cpu0; cpu > 0 {
		b.ReportMetric(cpu.Seconds()*1e3/float64(b.N), "cpu-ms/eval")
	}
}

// BenchmarkEvaluateGrowth is the cost of one evaluation by bellows count
// and relative steps (default base steps and sample cap, payload 50 g).
func BenchmarkEvaluateGrowth(b *testing.B) {
	designs := []struct {
		name string
		d    *Design
	}{
		{"bellows=2", &Design{Bellows: []Bellows{
			measuredBellows(0.15, 0.11, 9, 0.6, 30, 0.02),
			measuredBellows(0.15, 0.10, 4, 1.1, 45, 0.03),
		}}},
		{"bellows=3", threeBellows()},
		{"bellows=4", fourBellows()},
	}
	for _, dc := range designs {
		for _, steps := range []int{16, 32, 64} {
			b.Run(dc.name+"/steps="+itoa(steps), func(b *testing.B) {
				benchEvaluate(b, dc.d, &Scenario{Load: Load{PayloadMass: 0.05}, Workspace: Workspace{RelativeSteps: steps}})
			})
		}
	}
}

func itoa(n int) string {
	if n < 10 {
		return string(rune('0' + n))
	}
	return itoa(n/10) + string(rune('0'+n%10))
}
