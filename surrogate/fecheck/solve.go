package fecheck

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"time"

	"gonum.org/v1/gonum/mat"
)

// ringMotion is the rigid motion that best fits (least squares, each
// node weighted by the arc of its grid column, so a graded mesh weights
// the circumference evenly) the displacements of one ring of nodes: axial
// translation a and rotations θx, θy from u_z = a + θx·y − θy·x; lateral
// translation and twist θz from (u_x, u_y) = (tx − θz·y, ty + θz·x).
type ringMotion struct{ a, thx, thy, thz float64 }

func fitRing(m *shellMesh, ids []int, u map[int][3]float64) (ringMotion, error) {
	n := len(ids)
	az := mat.NewDense(n, 3, nil)
	bz := mat.NewVecDense(n, nil)
	axy := mat.NewDense(2*n, 3, nil)
	bxy := mat.NewVecDense(2*n, nil)
	for i, id := range ids {
		d, ok := u[id]
		if !ok {
			return ringMotion{}, fmt.Errorf("%w: no displacement of ring node %d", errNoResult, id)
		}
		p := m.node(id)
		w := math.Sqrt(m.weight[p.col])
		az.Set(i, 0, w)
		az.Set(i, 1, w*p.y)
		az.Set(i, 2, -w*p.x)
		bz.SetVec(i, w*d[2])
		axy.Set(2*i, 0, w)
		axy.Set(2*i, 2, -w*p.y)
		bxy.SetVec(2*i, w*d[0])
		axy.Set(2*i+1, 1, w)
		axy.Set(2*i+1, 2, w*p.x)
		bxy.SetVec(2*i+1, w*d[1])
	}
	var cz, cxy mat.VecDense
	if err := cz.SolveVec(az, bz); err != nil {
		return ringMotion{}, err
	}
	if err := cxy.SolveVec(axy, bxy); err != nil {
		return ringMotion{}, err
	}
	return ringMotion{a: cz.AtVec(0), thx: cz.AtVec(1), thy: cz.AtVec(2), thz: cxy.AtVec(2)}, nil
}

// runJob writes the deck JOB.inp into the private folder dir, runs ccx on
// it and reads back JOB.dat (printed node and force sets) and JOB.frd
// (nodal strains).
func runJob(ctx context.Context, dir, job string, deck func(io.Writer) error, opt Options, onLine func(string)) ([]datBlock, *frdResult, time.Duration, error) {
	if err := writeScratch(filepath.Join(dir, job+".inp"), deck); err != nil {
		return nil, nil, 0, err
	}
	dur, err := runCCX(ctx, opt.CCX, dir, job, opt.Threads, onLine)
	if err != nil {
		return nil, nil, 0, err
	}
	df, err := os.Open(filepath.Join(dir, job+".dat"))
	if err != nil {
		return nil, nil, 0, err
	}
	blocks, err := readDat(df)
	df.Close()
	if err != nil {
		return nil, nil, 0, fmt.Errorf("%s.dat: %w", job, err)
	}
	ff, err := os.Open(filepath.Join(dir, job+".frd"))
	if err != nil {
		return nil, nil, 0, err
	}
	frd, err := readFrd(ff)
	ff.Close()
	if err != nil {
		return nil, nil, 0, fmt.Errorf("%s.frd: %w", job, err)
	}
	return blocks, frd, dur, nil
}

// solveShell writes and runs the shell deck in dir and extracts the
// section properties (see REFERENCE.md).
func solveShell(ctx context.Context, dir string, s *shellSpec, title string, opt Options) (*ShellResult, error) {
	m := s.build()
	blocks, frd, dur, err := runJob(ctx, dir, "shell", func(w io.Writer) error { return writeShellDeck(w, m, title) },
		opt, opt.steps("shell", shellCaseNames()))
	if err != nil {
		return nil, err
	}
	r, err := extractShell(m, blocks, frd)
	if err != nil {
		return nil, fmt.Errorf("shell: %w", err)
	}
	r.RunTimeS = dur.Seconds()
	return r, nil
}

// caseResult holds one load case's measured generalized strains between
// the measuring rings (per unit length) and its peak meridional surface
// strain between them.
type caseResult struct {
	eps0, ux, uy, twist float64
	peak                float64
}

func extractShell(m *shellMesh, blocks []datBlock, frd *frdResult) (*ShellResult, error) {
	// per case: RINGS displacements, END1 reaction forces
	if len(blocks) != 2*len(shellCases) {
		return nil, fmt.Errorf("%w: %d result blocks in the .dat file, expected %d", errNoResult, len(blocks), 2*len(shellCases))
	}
	if len(frd.strains) != len(shellCases) {
		return nil, fmt.Errorf("%w: %d strain blocks in the .frd file, expected %d", errNoResult, len(frd.strains), len(shellCases))
	}
	surf := m.surfaceNodes(frd)
	length := float64(m.spec.ring) * m.spec.wall.pitch
	var cr [4]caseResult
	for k, c := range shellCases {
		disp, rf := blocks[2*k], blocks[2*k+1]
		if disp.set != "RINGS" || rf.set != "END1" {
			return nil, fmt.Errorf("%w: load case %s: unexpected .dat blocks", errNoResult, c.name)
		}
		// equilibrium: the forces on the end-1 ring (about the origin,
		// the end-1 reference point) balance the applied load
		var react [6]float64
		for _, row := range rf.rows {
			if len(row) != 4 {
				return nil, fmt.Errorf("%w: reaction row of %d values", errNoResult, len(row))
			}
			p := m.node(int(row[0]))
			fx, fy, fz := row[1], row[2], row[3]
			react[0] += fx
			react[1] += fy
			react[2] += fz
			react[3] += p.y*fz - p.z*fy
			react[4] += p.z*fx - p.x*fz
			react[5] += p.x*fy - p.y*fx
		}
		var applied [6]float64
		applied[3*c.node+c.dof-1] = c.val
		scale := [6]float64{1, 1, 1, 1 / m.spec.wall.rMean, 1 / m.spec.wall.rMean, 1 / m.spec.wall.rMean}
		if c.node == 1 {
			scale = [6]float64{m.spec.wall.rMean, m.spec.wall.rMean, m.spec.wall.rMean, 1, 1, 1}
		}
		for i := 0; i < 6; i++ {
			if math.Abs(react[i]+applied[i])*scale[i] > 1e-4*math.Abs(c.val) {
				return nil, fmt.Errorf("load case %s: the end reactions %v do not balance the load %v", c.name, react, applied)
			}
		}
		u := map[int][3]float64{}
		for _, row := range disp.rows {
			if len(row) != 4 {
				return nil, fmt.Errorf("%w: displacement row of %d values", errNoResult, len(row))
			}
			u[int(row[0])] = [3]float64{row[1], row[2], row[3]}
		}
		ra, err := fitRing(m, m.ringA, u)
		if err != nil {
			return nil, err
		}
		rb, err := fitRing(m, m.ringB, u)
		if err != nil {
			return nil, err
		}
		r := caseResult{eps0: (rb.a - ra.a) / length, ux: (rb.thx - ra.thx) / length,
			uy: (rb.thy - ra.thy) / length, twist: (rb.thz - ra.thz) / length}
		r.peak = m.peakStrain(surf, frd.strains[k])
		cr[k] = r
	}
	ax, tor, bx, by := cr[0], cr[1], cr[2], cr[3]
	// compliance: (ε0, u_x, u_y) per unit (F, M_x, M_y), at the axis
	c := mat.NewDense(3, 3, []float64{
		ax.eps0 / loadForce, bx.eps0 / loadMoment, by.eps0 / loadMoment,
		ax.ux / loadForce, bx.ux / loadMoment, by.ux / loadMoment,
		ax.uy / loadForce, bx.uy / loadMoment, by.uy / loadMoment,
	})
	var k mat.Dense
	if err := k.Inverse(c); err != nil {
		return nil, fmt.Errorf("measured compliance is singular: %v", err)
	}
	ea := k.At(0, 0)
	// bending stiffness about the neutral axis: Schur complement
	ei := func(i, j int) float64 { return k.At(i, j) - k.At(i, 0)*k.At(0, j)/ea }
	eixy := (ei(1, 2) + ei(2, 1)) / 2
	q := m.spec.wall.pitch
	res := &ShellResult{
		Elements: len(m.elems), Nodes: len(m.nodes),
		Convolutions: m.spec.pitches, MeasuredConvolutions: m.spec.ring, PitchM: q,
		EAN: ea, AxialRateNPerM: ea / q,
		EIxNm2: ei(1, 1), EIyNm2: ei(2, 2), EIxyNm2: eixy,
		GJNm2:                 loadMoment / tor.twist,
		AxialTwistRadPerMPerN: ax.twist / loadForce,
	}
	kx, ky := math.Hypot(bx.ux, bx.uy), math.Hypot(by.ux, by.uy)
	res.StrainPerCurvatureM = math.Max(bx.peak/kx, by.peak/ky)
	res.StrainPerExtensionPM = ax.peak / (ax.eps0 * q)
	return res, nil
}

// surfNode is an expanded-shell node on the top or bottom surface,
// between the measuring rings, with the meridional tangent of its shell
// node.
type surfNode struct {
	id int
	t  [3]float64
}

// surfaceNodes maps the expanded nodes of the .frd file (ccx turns each
// S8R element into a 20-node brick through the thickness) to the shell
// nodes they came from, and returns those on the top or bottom surface
// between the measuring rings. A frd node belongs to the shell node m
// whose point m + s·(t/2)·n (s ∈ {−1, 0, 1}) is nearest.
func (m *shellMesh) surfaceNodes(frd *frdResult) []surfNode {
	t := m.spec.mat.t
	cell := t
	type key [3]int
	grid := map[key][]int{}
	kf := func(x, y, z float64) key {
		return key{int(math.Floor(x / cell)), int(math.Floor(y / cell)), int(math.Floor(z / cell))}
	}
	for i := range m.nodes {
		n := &m.nodes[i]
		if n.row < m.rowA || n.row > m.rowB {
			continue
		}
		k := kf(n.x, n.y, n.z)
		grid[k] = append(grid[k], i)
	}
	var out []surfNode
	for id, p := range frd.nodes {
		k := kf(p[0], p[1], p[2])
		best, bi, bs := math.Inf(1), -1, 0.0
		for dx := -1; dx <= 1; dx++ {
			for dy := -1; dy <= 1; dy++ {
				for dz := -1; dz <= 1; dz++ {
					for _, i := range grid[key{k[0] + dx, k[1] + dy, k[2] + dz}] {
						n := &m.nodes[i]
						for _, s := range [3]float64{-1, 0, 1} {
							h := s * t / 2
							d := math.Hypot(math.Hypot(p[0]-n.x-h*n.n[0], p[1]-n.y-h*n.n[1]), p[2]-n.z-h*n.n[2])
							if d < best {
								best, bi, bs = d, i, s
							}
						}
					}
				}
			}
		}
		if bi < 0 || bs == 0 || best > t/4 {
			continue
		}
		out = append(out, surfNode{id: id, t: m.nodes[bi].t})
	}
	return out
}

// meridional returns t·E·t for the strain tensor components (εxx, εyy,
// εzz, εxy, εyz, εzx) of ccx (tensor, not engineering, shear).
func meridional(e [6]float64, t [3]float64) float64 {
	return t[0]*t[0]*e[0] + t[1]*t[1]*e[1] + t[2]*t[2]*e[2] +
		2*(t[0]*t[1]*e[3]+t[1]*t[2]*e[4]+t[2]*t[0]*e[5])
}

func (m *shellMesh) peakStrain(surf []surfNode, strain map[int][6]float64) float64 {
	var peak float64
	for _, s := range surf {
		if e, ok := strain[s.id]; ok {
			peak = math.Max(peak, math.Abs(meridional(e, s.t)))
		}
	}
	return peak
}

// solveSolid writes and runs the axisymmetric deck in dir and extracts
// the axial rate and the peak meridional surface strain per unit
// extension of the pitch.
func solveSolid(ctx context.Context, dir string, s *axiSpec, title string, opt Options) (*SolidResult, error) {
	m := s.build()
	blocks, frd, dur, err := runJob(ctx, dir, "solid", func(w io.Writer) error { return writeAxiDeck(w, m, title) },
		opt, opt.steps("solid", []string{"axial extension"}))
	if err != nil {
		return nil, err
	}
	r, err := extractSolid(m, blocks, frd)
	if err != nil {
		return nil, fmt.Errorf("solid: %w", err)
	}
	r.RunTimeS = dur.Seconds()
	return r, nil
}

// axiSegment is the factor from the reaction totals ccx prints for
// axisymmetric elements (those of a 2° segment) to the full ring.
const axiSegment = 180

func extractSolid(m *axiMesh, blocks []datBlock, frd *frdResult) (*SolidResult, error) {
	if len(blocks) != 1 || blocks[0].set != "TOP" || len(blocks[0].rows) != 1 || len(blocks[0].rows[0]) < 2 {
		return nil, fmt.Errorf("%w: expected one reaction total for set TOP in the .dat file", errNoResult)
	}
	if len(frd.strains) != 1 {
		return nil, fmt.Errorf("%w: %d strain blocks in the .frd file, expected 1", errNoResult, len(frd.strains))
	}
	delta := axiDelta * m.spec.wall.pitch
	f := blocks[0].rows[0][1] * axiSegment
	var peak float64
	for _, n := range m.nodes {
		if n.k != 0 && n.k != m.layers-1 {
			continue
		}
		e, ok := frd.strains[0][n.id]
		if !ok {
			return nil, fmt.Errorf("%w: no strain at node %d", errNoResult, n.id)
		}
		// in-plane meridional strain: (x, y) = (r, z)
		ess := n.tr*n.tr*e[0] + n.tz*n.tz*e[1] + 2*n.tr*n.tz*e[3]
		peak = math.Max(peak, math.Abs(ess))
	}
	return &SolidResult{Elements: len(m.elems), Nodes: len(m.nodes), ThroughWall: m.spec.through,
		AxialRateNPerM: f / delta, StrainPerExtensionPM: peak / delta}, nil
}
