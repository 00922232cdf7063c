package fecheck

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
)

// Load magnitudes of the shell deck: the *GREEN procedure solves for a
// unit load per *CLOAD line whatever value it carries, so the deck writes
// 1 and the extraction divides by these.
const (
	loadForce  = 1.0 // axial force, N
	loadMoment = 1.0 // torque and bending moments, N·m
)

// loadCase is one load case of the shell deck.
type loadCase struct {
	name string
	node int // 0: end-2 reference node, 1: end-2 rotation node
	dof  int
	val  float64
}

var shellCases = []loadCase{
	{"axial", 0, 3, loadForce},
	{"torsion", 1, 3, loadMoment},
	{"bending_x", 1, 1, loadMoment},
	{"bending_y", 1, 2, loadMoment},
}

// fieldWidth is the number of characters ccx reads of one field of a
// data line; it silently cuts a longer number (-4.27000000000001e-06
// would be read as -4.27000000000001e-0, i.e. -4.27).
const fieldWidth = 20

// g formats a number for a deck: 15 significant digits, or as many as fit
// in fieldWidth characters (fewer for a negative value with an exponent:
// 14 for -4.27e-06, 13 for -1.2e-300), never fewer than one.
func g(x float64) string {
	for p := 15; p > 1; p-- {
		if s := strconv.FormatFloat(x, 'g', p, 64); len(s) <= fieldWidth {
			return s
		}
	}
	return strconv.FormatFloat(x, 'g', 1, 64)
}

// writeIDs writes ids, 8 per line (the limit of ccx's set and element
// lines is 16 entries).
func writeIDs(w *bufio.Writer, ids []int) {
	for i, n := range ids {
		if i > 0 {
			if i%8 == 0 {
				w.WriteString("\n")
			} else {
				w.WriteString(", ")
			}
		}
		w.WriteString(strconv.Itoa(n))
	}
	w.WriteString("\n")
}

// writeMaterial writes the wall material. Isotropic walls get *ELASTIC;
// orthotropic walls get engineering constants in the cylindrical system
// CYL (1 radial, 2 hoop, 3 axial): the radial and axial directions, which
// span every meridian, take Es; the hoop direction Et; the Poisson
// coupling is the geometric-mean one of the surrogate's shell model
// (ν_ij = ν·sqrt(E_i/E_j)), and every shear modulus is Es/(2(1+ν)).
// hoopAxis names the hoop direction: 2 for the cylindrical system of the
// shell model, 3 for the axisymmetric model (x radial, y axial, z hoop).
func writeMaterial(w *bufio.Writer, m wallMaterial, hoopAxis int) {
	w.WriteString("*MATERIAL, NAME=WALL\n")
	if m.Es == m.Et {
		fmt.Fprintf(w, "*ELASTIC\n%s, %s\n", g(m.Es), g(m.nu))
		return
	}
	e := [3]float64{m.Es, m.Es, m.Es}
	e[hoopAxis-1] = m.Et
	nu := func(i, j int) float64 { return m.nu * math.Sqrt(e[i]/e[j]) }
	gm := m.Es / (2 * (1 + m.nu))
	fmt.Fprintf(w, "*ELASTIC, TYPE=ENGINEERING CONSTANTS\n%s, %s, %s, %s, %s, %s, %s, %s\n%s\n",
		g(e[0]), g(e[1]), g(e[2]), g(nu(0, 1)), g(nu(0, 2)), g(nu(1, 2)), g(gm), g(gm), g(gm))
}

// writeShellDeck writes the CalculiX input of the shell model: S8R
// elements on the wall midsurface, both end rings rigid (*RIGID BODY with
// a reference and a rotation node each), end 1 fixed, and one *GREEN step
// with one *CLOAD line per load case at end 2: ccx factorizes the
// stiffness once and solves the unit load of each line as its own right-
// hand side, in the order of the lines (the four results equal those of
// four *STATIC steps, at a quarter of the factorizations). Measuring-ring
// displacements and the reaction forces of the end-1 ring nodes go to the
// .dat file, strains on the expanded shell (top, middle and bottom
// surfaces) to the .frd file, one block of each per load case.
func writeShellDeck(out io.Writer, m *shellMesh, title string) error {
	w := bufio.NewWriter(out)
	s := &m.spec
	fmt.Fprintf(w, "** %s\n** S8R shell model: %d pitches, %d elements around, %d per pitch; ", title, s.pitches, s.around, len(s.wall.points(s.perPitch))/2)
	fmt.Fprintf(w, "measuring rings at pitches %d and %d\n", s.ringA, s.ringA+s.ring)
	w.WriteString("*HEADING\n" + title + "\n*NODE, NSET=NALL\n")
	for _, n := range m.nodes {
		fmt.Fprintf(w, "%d, %s, %s, %s\n", n.id, g(n.x), g(n.y), g(n.z))
	}
	zTop := 0.0
	for _, id := range m.end2 {
		zTop = math.Max(zTop, m.node(id).z)
	}
	fmt.Fprintf(w, "%d, 0, 0, 0\n%d, 0, 0, 0\n%d, 0, 0, %s\n%d, 0, 0, %s\n", m.refA, m.rotA, m.refB, g(zTop), m.rotB, g(zTop))
	w.WriteString("*ELEMENT, TYPE=S8R, ELSET=WALL\n")
	for i, e := range m.elems {
		fmt.Fprintf(w, "%d", i+1)
		for _, n := range e {
			fmt.Fprintf(w, ", %d", n)
		}
		w.WriteString("\n")
	}
	for _, set := range []struct {
		name string
		ids  []int
	}{{"END1", m.end1}, {"END2", m.end2}, {"RINGS", append(append([]int(nil), m.ringA...), m.ringB...)}} {
		fmt.Fprintf(w, "*NSET, NSET=%s\n", set.name)
		writeIDs(w, set.ids)
	}
	writeMaterial(w, s.mat, 2)
	orient := ""
	if s.mat.Es != s.mat.Et {
		w.WriteString("*ORIENTATION, NAME=CYL, SYSTEM=CYLINDRICAL\n0, 0, 0, 0, 0, 1\n")
		orient = ", ORIENTATION=CYL"
	}
	fmt.Fprintf(w, "*SHELL SECTION, ELSET=WALL, MATERIAL=WALL%s\n%s\n", orient, g(s.mat.t))
	fmt.Fprintf(w, "*RIGID BODY, NSET=END1, REF NODE=%d, ROT NODE=%d\n", m.refA, m.rotA)
	fmt.Fprintf(w, "*RIGID BODY, NSET=END2, REF NODE=%d, ROT NODE=%d\n", m.refB, m.rotB)
	fmt.Fprintf(w, "*BOUNDARY\n%d, 1, 3\n%d, 1, 3\n", m.refA, m.rotA)
	w.WriteString("*STEP\n*GREEN\n*CLOAD\n")
	for _, c := range shellCases {
		node := m.refB
		if c.node == 1 {
			node = m.rotB
		}
		fmt.Fprintf(w, "** load case %s\n%d, %d, %s\n", c.name, node, c.dof, g(c.val))
	}
	w.WriteString("*NODE PRINT, NSET=RINGS\nU\n*NODE PRINT, NSET=END1\nRF\n")
	w.WriteString("*EL FILE, OUTPUT=3D\nE\n")
	w.WriteString("*END STEP\n")
	return w.Flush()
}

// axiDelta is the axial extension of one pitch imposed on the
// axisymmetric model, as a fraction of the pitch (linear model: any small
// value).
const axiDelta = 1e-4

// writeAxiDeck writes the CalculiX input of the axisymmetric solid model
// of one pitch: CAX8 elements (x radius, y axis) through the wall, both
// cut faces at root apexes (planes of symmetry of the periodic wall) held
// axially, the top one displaced by δ; the top reaction total is printed
// to the .dat file and the strains to the .frd file.
func writeAxiDeck(out io.Writer, m *axiMesh, title string) error {
	w := bufio.NewWriter(out)
	s := &m.spec
	fmt.Fprintf(w, "** %s\n** CAX8 axisymmetric model of one pitch: %d elements along, %d through the wall\n", title, (m.rows-1)/2, s.through)
	w.WriteString("*HEADING\n" + title + "\n*NODE, NSET=NALL\n")
	for _, n := range m.nodes {
		fmt.Fprintf(w, "%d, %s, %s, 0\n", n.id, g(n.r), g(n.z))
	}
	w.WriteString("*ELEMENT, TYPE=CAX8, ELSET=WALL\n")
	for i, e := range m.elems {
		fmt.Fprintf(w, "%d", i+1)
		for _, n := range e {
			fmt.Fprintf(w, ", %d", n)
		}
		w.WriteString("\n")
	}
	w.WriteString("*NSET, NSET=BOT\n")
	writeIDs(w, m.bot)
	w.WriteString("*NSET, NSET=TOP\n")
	writeIDs(w, m.top)
	writeMaterial(w, s.mat, 3)
	w.WriteString("*SOLID SECTION, ELSET=WALL, MATERIAL=WALL\n")
	w.WriteString("*BOUNDARY\nBOT, 2, 2\n")
	fmt.Fprintf(w, "*STEP\n*STATIC\n*BOUNDARY\nTOP, 2, 2, %s\n", g(axiDelta*s.wall.pitch))
	w.WriteString("*NODE PRINT, NSET=TOP, TOTALS=ONLY\nRF\n*EL FILE\nE\n*END STEP\n")
	return w.Flush()
}
