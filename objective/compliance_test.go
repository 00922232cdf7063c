package objective

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/integrate/quad"

	"plica/objective/kinematics"
	"plica/objective/statics"
)

// complianceQuad is the compliance integral of evaluator.compliance
// evaluated without any of its shortcuts: the pose at every arc length by
// chaining the link transforms, the inner integral ∫_s^L m'(p(σ) − p(s)) dσ
// and the outer one by gonum's fixed Gauss–Legendre quadrature (gonum
// integrate/quad.Fixed, 40 nodes per link), link by link.
func complianceQuad(links []kinematics.Link, mp float64) [3][3]float64 {
	starts := make([]kinematics.Pose, len(links)+1)
	starts[0] = kinematics.Identity()
	for i, l := range links {
		starts[i+1] = starts[i].Mul(kinematics.LinkTransform(l.U, l.End-l.Start))
	}
	pL := starts[len(links)].P
	poseAt := func(i int, s float64) kinematics.Pose {
		return starts[i].Mul(kinematics.LinkTransform(links[i].U, s-links[i].Start))
	}
	const n = 40
	var C [3][3]float64
	for i, l := range links {
		kinv, ok := statics.InvertSPD(l.K)
		if !ok {
			panic("stiffness not positive definite")
		}
		for a := range 3 {
			for b := range 3 {
				f := func(s float64) float64 {
					ps := poseAt(i, s)
					// a(s) = m_p (p_L − p) + ∫_s^L m' (p(σ) − p(s)) dσ
					var av [3]float64
					for r := range 3 {
						av[r] = mp * (pL[r] - ps.P[r])
						for j := i; j < len(links); j++ {
							lo := links[j].Start
							if j == i {
								lo = s
							}
							av[r] += quad.Fixed(func(sig float64) float64 {
								return links[j].MassPerLength * (poseAt(j, sig).P[r] - ps.P[r])
							}, lo, links[j].End, n, nil, 0)
						}
					}
					var c [3]float64
					for r := range 3 {
						c[r] = pL[r] - ps.P[r]
					}
					kin := rkr(ps.R, kinv)
					// −[c]× KIN [a]× entry (a, b), spelled with full matrices
					cx := skew(c)
					ax := skew(av)
					v := 0.0
					for p := range 3 {
						for q := range 3 {
							v -= cx[a][p] * kin[p][q] * ax[q][b]
						}
					}
					return v
				}
				C[a][b] += quad.Fixed(f, l.Start, l.End, n, nil, 0)
			}
		}
	}
	return C
}

func skew(v [3]float64) [3][3]float64 {
	return [3][3]float64{{0, -v[2], v[1]}, {v[2], 0, -v[0]}, {-v[1], v[0], 0}}
}

// complianceTrapezoid is the straightforward path the closed-form link
// integrals replaced: the trapezoid rule on nodes at most L/points apart,
// every link boundary a node, the poses chained step by step.
func complianceTrapezoid(links []kinematics.Link, mp float64, points int) [3][3]float64 {
	type node struct {
		s, w, mpl float64
		p         [3]float64
		kin       [3][3]float64
	}
	L := links[len(links)-1].End
	var nodes []node
	pose := kinematics.Identity()
	sPos := 0.0
	for _, l := range links {
		ll := l.End - l.Start
		m := max(int(math.Ceil(ll/L*float64(points))), 2)
		h := ll / float64(m)
		step := kinematics.LinkTransform(l.U, h)
		kinv, _ := statics.InvertSPD(l.K)
		for j := range m {
			nd := node{s: sPos, p: pose.P, w: h, mpl: l.MassPerLength, kin: rkr(pose.R, kinv)}
			if j == 0 {
				nd.w = h / 2
			}
			nodes = append(nodes, nd)
			pose = pose.Mul(step)
			sPos += h
		}
		sPos = l.End
		nodes = append(nodes, node{s: sPos, p: pose.P, w: h / 2, mpl: l.MassPerLength, kin: rkr(pose.R, kinv)})
	}
	pL := pose.P
	var C [3][3]float64
	W := 0.0
	var Q [3]float64
	for k := len(nodes) - 1; k >= 0; k-- {
		nd := &nodes[k]
		if k < len(nodes)-1 {
			nx := &nodes[k+1]
			if h := nx.s - nd.s; h > 0 {
				W += nd.mpl * h
				for i := range 3 {
					Q[i] += nd.mpl * h * (nx.p[i] + nd.p[i]) / 2
				}
			}
		}
		var a, c [3]float64
		for i := range 3 {
			c[i] = pL[i] - nd.p[i]
			a[i] = mp*c[i] + Q[i] - W*nd.p[i]
		}
		addNode(&C, nd.w, &nd.kin, &a, &c)
	}
	return C
}

func maxRelDiff(a, b [3][3]float64) float64 {
	scale, d := 0.0, 0.0
	for i := range 3 {
		for j := range 3 {
			scale = math.Max(scale, math.Abs(b[i][j]))
			d = math.Max(d, math.Abs(a[i][j]-b[i][j]))
		}
	}
	return d / scale
}

// TestComplianceClosedFormAgainstQuadrature: the per-link compliance with
// the exact inner integral and Gauss–Legendre pieces agrees with the same
// integral by brute-force gonum quadrature (fine rule to 1e-10 relative,
// ranking rule to 2e-4), and the old trapezoid rule converges to it
// (second order: 32 intervals within 2e-3, 2000 within 1e-6), on two- and
// three-bellows shapes with several links, twist-free and curved.
func TestComplianceClosedFormAgainstQuadrature(t *testing.T) {
	designs := map[string]*Design{
		"two": {Bellows: []Bellows{
			measuredBellows(0.15, 0.11, 9, 0.6, 30, 0.02),
			measuredBellows(0.15, 0.10, 4, 1.1, 45, 0.03),
		}},
		"three": {Bellows: []Bellows{
			measuredBellows(0.2, 0.08, 14, 0.3, 20, 0.01),
			measuredBellows(0.15, 0.1, 6, 0.8, 35, 0.02),
			measuredBellows(0.12, 0.06, 3, 1.5, 60, 0.03),
		}},
	}
	for name, d := range designs {
		robot, _, err := d.Robot()
		require.NoError(t, err)
		n := len(d.Bellows)
		for _, th := range [][]float64{{0, 0, 0}, {0.7, -0.4, 2.1}, {3.1, 1.3, -2.5}} {
			a := kinematics.Actuation{Theta: th[:n], Beta: make([]float64, n)}
			links, err := robot.Links(a, nil)
			require.NoError(t, err)
			ref := complianceQuad(links, 0.05)
			e := &evaluator{robot: robot, payload: 0.05}
			fine := e.compliance(links, &fineRule)
			rank := e.compliance(links, &rankRule)
			assert.Less(t, maxRelDiff(fine, ref), 1e-10, "%s %v: fine rule", name, th)
			assert.Less(t, maxRelDiff(rank, ref), 2e-4, "%s %v: ranking rule", name, th)
			assert.Less(t, maxRelDiff(complianceTrapezoid(links, 0.05, 32), ref), 2e-3, "%s %v: trapezoid, 32", name, th)
			assert.Less(t, maxRelDiff(complianceTrapezoid(links, 0.05, 2000), ref), 1e-6, "%s %v: trapezoid, 2000", name, th)
			t.Logf("%s %v: fine %.2g rank %.2g trap32 %.2g", name, th, maxRelDiff(fine, ref), maxRelDiff(rank, ref), maxRelDiff(complianceTrapezoid(links, 0.05, 32), ref))
		}
	}
}
