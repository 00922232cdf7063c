package fecheck

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"math"

	"plica/surrogate/solid"
)

// RingResult is the 3-D solid model of half a convolution of an
// infinitely repeated bellows (ring.inp): C3D20 bricks through the wall,
// the full circumference, the mirror conditions of package solid applied
// to the 3-D body.
type RingResult struct {
	Elements int `json:"elements"`
	Nodes    int `json:"nodes"`
	// EINm2 = M·q/θ under a bending moment (θ the rotation between the end
	// planes of one convolution).
	EINm2 float64 `json:"ei_n_m2"`
	// GJNm2 = T·q/φ under a torque (φ the twist of one convolution).
	GJNm2 float64 `json:"gj_n_m2"`
	// StrainPerCurvatureM is the peak meridional surface strain per unit
	// curvature of the bellows axis.
	StrainPerCurvatureM float64 `json:"strain_per_curvature_m"`
	RunTimeS            float64 `json:"run_time_s"`
}

// ringSpec is a ring model: the convolution, an isotropic material, the
// meridional mesh (package solid's wall mesh) and the elements around.
type ringSpec struct {
	conv   solid.Convolution
	e, nu  float64
	mesh   solid.MeshSize
	around int
}

type ringNode struct {
	id      int
	x, y, z float64
	k, j, l int
	t       [3]float64 // meridional unit tangent
}

type ringMesh struct {
	spec        *ringSpec
	nodes       []ringNode
	elems       [][20]int
	root, crest []int
	fix1, fix2  int
	surf        []int // indices into nodes on the two surfaces
	along, thru int
}

// build revolves the solid model's Q8 wall mesh into C3D20 bricks: grid
// positions (k, j, l) with at most one odd index are nodes (l counts half
// elements around, periodic).
func (s *ringSpec) build() (*ringMesh, error) {
	wm, err := s.conv.Mesh(s.mesh)
	if err != nil {
		return nil, err
	}
	na, nt, nl := wm.Along, wm.Through, s.around
	m := &ringMesh{spec: s, along: na, thru: nt}
	idx := map[[3]int]int{}
	for k := 0; k <= 2*na; k++ {
		for j := 0; j <= 2*nt; j++ {
			n2 := wm.Node(k, j)
			for l := 0; l < 2*nl; l++ {
				if k%2+j%2+l%2 > 1 {
					continue
				}
				th := math.Pi * float64(l) / float64(nl)
				sn, cs := math.Sincos(th)
				r, z := wm.X[n2], wm.Y[n2]
				tg := wm.Tangent[k]
				n := ringNode{id: len(m.nodes) + 1, x: r * cs, y: r * sn, z: z, k: k, j: j, l: l,
					t: [3]float64{tg[0] * cs, tg[0] * sn, tg[1]}}
				// snap round-off about the axes (see REFERENCE.md, ccx practicalities)
				if math.Abs(n.x) < 1e-12*r {
					n.x = 0
				}
				if math.Abs(n.y) < 1e-12*r {
					n.y = 0
				}
				idx[[3]int{k, j, l}] = n.id
				m.nodes = append(m.nodes, n)
				if j == 0 || j == 2*nt {
					m.surf = append(m.surf, len(m.nodes)-1)
				}
				switch k {
				case 0:
					m.root = append(m.root, n.id)
				case 2 * na:
					m.crest = append(m.crest, n.id)
				}
				if k == 0 && j == 2*(nt/2) && l == 0 {
					m.fix1 = n.id
				}
				if k == 0 && j == 2*(nt/2) && l == nl {
					m.fix2 = n.id
				}
			}
		}
	}
	// C3D20 local positions (ξ, η, ζ) in the order of the element
	corner := [20][3]int{
		{-1, -1, -1}, {1, -1, -1}, {1, 1, -1}, {-1, 1, -1},
		{-1, -1, 1}, {1, -1, 1}, {1, 1, 1}, {-1, 1, 1},
		{0, -1, -1}, {1, 0, -1}, {0, 1, -1}, {-1, 0, -1},
		{0, -1, 1}, {1, 0, 1}, {0, 1, 1}, {-1, 0, 1},
		{-1, -1, 0}, {1, -1, 0}, {1, 1, 0}, {-1, 1, 0},
	}
	pos := func(n int) [3]float64 { p := m.nodes[n-1]; return [3]float64{p.x, p.y, p.z} }
	for a := range na {
		for b := range nt {
			for c := range nl {
				for _, flip := range []int{1, -1} {
					var el [20]int
					ok := true
					for i, lc := range corner {
						k, j := 2*a+1+lc[0], 2*b+1+lc[1]
						l := ((2*c+1+flip*lc[2])%(2*nl) + 2*nl) % (2 * nl)
						id, found := idx[[3]int{k, j, l}]
						if !found {
							return nil, fmt.Errorf("ring mesh: no node at (%d, %d, %d)", k, j, l)
						}
						el[i] = id
					}
					// orientation: positive Jacobian at the centre
					var d [3][3]float64
					for i := range 8 {
						p := pos(el[i])
						for ax := range 3 {
							for q := range 3 {
								d[ax][q] += float64(corner[i][ax]) * p[q] / 8
							}
						}
					}
					det := d[0][0]*(d[1][1]*d[2][2]-d[1][2]*d[2][1]) - d[0][1]*(d[1][0]*d[2][2]-d[1][2]*d[2][0]) + d[0][2]*(d[1][0]*d[2][1]-d[1][1]*d[2][0])
					if det <= 0 {
						ok = false
					}
					if ok {
						m.elems = append(m.elems, el)
						break
					}
					if flip == -1 {
						return nil, fmt.Errorf("ring mesh: element (%d, %d, %d) inverted either way", a, b, c)
					}
				}
			}
		}
	}
	return m, nil
}

// Prescribed end-plane motions of the ring deck (linear model: any size).
const (
	ringBeta = 1e-3 // rotation of the crest plane about y, bending
	ringPhi  = 1e-3 // rotation of the crest plane about z, torsion
)

// writeRingDeck writes two static steps. Bending: the root plane held
// axially, the crest plane turned rigidly about y (uz = β·x), in-plane
// motion free on both (the mirror conditions of solid.Analyze); one root
// node held in x and y and the opposite one in y remove the rigid
// in-plane motions. Torsion: the mirror planes are planes of
// antisymmetry, so the root plane is held in its plane (ux = uy = 0)
// and the crest plane turned in its plane by φ, axial motion free, one
// root node held axially.
func writeRingDeck(out io.Writer, m *ringMesh, title string) error {
	w := bufio.NewWriter(out)
	s := m.spec
	fmt.Fprintf(w, "** %s\n** C3D20 ring of half a convolution: %d along, %d through, %d around\n", title, m.along, m.thru, s.around)
	w.WriteString("*HEADING\n" + title + "\n*NODE, NSET=NALL\n")
	for _, n := range m.nodes {
		fmt.Fprintf(w, "%d, %s, %s, %s\n", n.id, g(n.x), g(n.y), g(n.z))
	}
	w.WriteString("*ELEMENT, TYPE=C3D20, ELSET=WALL\n")
	for i, e := range m.elems {
		fmt.Fprintf(w, "%d", i+1)
		for q, n := range e {
			if q == 15 {
				w.WriteString(",\n")
				fmt.Fprintf(w, "%d", n)
				continue
			}
			fmt.Fprintf(w, ", %d", n)
		}
		w.WriteString("\n")
	}
	w.WriteString("*NSET, NSET=ROOT\n")
	writeIDs(w, m.root)
	w.WriteString("*NSET, NSET=CREST\n")
	writeIDs(w, m.crest)
	writeMaterial(w, wallMaterial{Es: s.e, Et: s.e, nu: s.nu}, 3)
	w.WriteString("*SOLID SECTION, ELSET=WALL, MATERIAL=WALL\n")

	w.WriteString("*STEP\n*STATIC\n*BOUNDARY, OP=NEW\nROOT, 3, 3\n")
	fmt.Fprintf(w, "%d, 1, 2\n%d, 2, 2\n", m.fix1, m.fix2)
	for _, id := range m.crest {
		n := &m.nodes[id-1]
		fmt.Fprintf(w, "%d, 3, 3, %s\n", id, g(ringBeta*n.x))
	}
	w.WriteString("*NODE PRINT, NSET=CREST\nRF\n*EL FILE\nE\n*END STEP\n")

	w.WriteString("*STEP\n*STATIC\n*BOUNDARY, OP=NEW\nROOT, 1, 2\n")
	fmt.Fprintf(w, "%d, 3, 3\n", m.fix1)
	for _, id := range m.crest {
		n := &m.nodes[id-1]
		fmt.Fprintf(w, "%d, 1, 1, %s\n%d, 2, 2, %s\n", id, g(-ringPhi*n.y), id, g(ringPhi*n.x))
	}
	w.WriteString("*NODE PRINT, NSET=CREST\nRF\n*EL FILE\nE\n*END STEP\n")
	return w.Flush()
}

// solveRing writes ring.inp in dir, runs ccx and extracts EI, GJ and the
// peak meridional surface strain per unit curvature.
func solveRing(ctx context.Context, dir string, s *ringSpec, title string, opt Options) (*RingResult, error) {
	m, err := s.build()
	if err != nil {
		return nil, err
	}
	blocks, frd, dur, err := runJob(ctx, dir, "ring", func(w io.Writer) error { return writeRingDeck(w, m, title) }, opt, nil)
	if err != nil {
		return nil, err
	}
	var forces []datBlock
	for _, b := range blocks {
		if b.kind == "forces" && b.set == "CREST" {
			forces = append(forces, b)
		}
	}
	if len(forces) != 2 || len(frd.strains) < 1 {
		return nil, fmt.Errorf("%w: ring: %d force blocks and %d strain blocks, expected 2 and at least 1", errNoResult, len(forces), len(frd.strains))
	}
	var moment, torque float64
	for _, r := range forces[0].rows {
		n := &m.nodes[int(r[0])-1]
		moment += r[3] * n.x
	}
	for _, r := range forces[1].rows {
		n := &m.nodes[int(r[0])-1]
		torque += n.x*r[2] - n.y*r[1]
	}
	q := s.conv.Pitch
	var peak float64
	for _, i := range m.surf {
		n := &m.nodes[i]
		if e, ok := frd.strains[0][n.id]; ok {
			peak = math.Max(peak, math.Abs(meridional(e, n.t)))
		}
	}
	return &RingResult{Elements: len(m.elems), Nodes: len(m.nodes),
		EINm2: moment * q / (2 * ringBeta), GJNm2: torque * q / (2 * ringPhi),
		StrainPerCurvatureM: peak / (2 * ringBeta / q), RunTimeS: dur.Seconds()}, nil
}
