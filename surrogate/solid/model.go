package solid

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// Mode selects the two-dimensional idealisation.
type Mode int

const (
	// PlaneStress: coordinates (x, y), dofs (ux, uy), σzz = 0.
	PlaneStress Mode = iota
	// PlaneStrain: coordinates (x, y), dofs (ux, uy), εzz = 0.
	PlaneStrain
	// Axisymmetric: coordinates (r, z), dofs (ur, uz), harmonic n = 0.
	Axisymmetric
	// Harmonic1: coordinates (r, z), dofs (U, W, V) with ur = U cos θ,
	// uz = W cos θ, uθ = V sin θ — the first Fourier harmonic of a body of
	// revolution, which carries bending about the axis θ = ±π/2.
	Harmonic1
)

// String names the mode.
func (m Mode) String() string {
	switch m {
	case PlaneStress:
		return "plane stress"
	case PlaneStrain:
		return "plane strain"
	case Axisymmetric:
		return "axisymmetric"
	case Harmonic1:
		return "harmonic 1"
	}
	return fmt.Sprintf("mode(%d)", int(m))
}

// Dofs returns the displacement components per node.
func (m Mode) Dofs() int {
	if m == Harmonic1 {
		return 3
	}
	return 2
}

// Displacement components of a node (in the harmonic mode, amplitudes).
const (
	DofX     = 0 // ux, ur or U
	DofY     = 1 // uy, uz or W
	DofTheta = 2 // V (harmonic 1 only)
)

// Material is a linear elastic isotropic solid.
type Material struct {
	E  float64 // Young's modulus, Pa
	Nu float64 // Poisson's ratio
}

func (m Material) validate() error {
	if !(m.E > 0) || math.IsInf(m.E, 0) {
		return fmt.Errorf("solid: Young's modulus %g Pa, want a positive finite value", m.E)
	}
	if !(m.Nu > -1 && m.Nu < 0.5) {
		return fmt.Errorf("solid: Poisson's ratio %g, want −1 < ν < 0.5", m.Nu)
	}
	return nil
}

// Mesh is a set of Q8 elements. In the axisymmetric modes X is the radius
// and Y the axial coordinate.
type Mesh struct {
	X, Y  []float64
	Elems [][8]int // local order: corners counter-clockwise, then midsides 0–1, 1–2, 2–3, 3–0
}

// Model is a mesh, a mode and a material.
type Model struct {
	Mesh      *Mesh
	Mode      Mode
	Material  Material
	Thickness float64 // out-of-plane thickness in the plane modes, m (0 means 1)
	// Gauss is the order of the Gauss rule per direction: 3 (full, the
	// default when 0) or 2 (reduced).
	Gauss int
}

// Fixed prescribes one displacement component of a node.
type Fixed struct {
	Node, Dof int
	Value     float64
}

// Force is a nodal force. In the axisymmetric mode it is the total force
// of the ring of the node; in harmonic 1 the generalised force conjugate to
// the amplitude, π·r times the amplitude of a line load per unit length of
// circumference.
type Force struct {
	Node, Dof int
	Value     float64
}

// Pressure is a uniform normal pressure, Pa, pushing on the element edge
// whose three nodes are given in the counter-clockwise order of their
// element (corner, midside, corner). In harmonic 1 it is the amplitude of
// a pressure varying as cos θ.
type Pressure struct {
	Edge [3]int
	P    float64
}

// Loads are the boundary conditions of one solve.
type Loads struct {
	Fixed     []Fixed
	Forces    []Force
	Pressures []Pressure
}

// Solution is the displacement field of a solve and the support
// reactions.
type Solution struct {
	model *Model
	// U holds the nodal displacements, node-major (node·Dofs + component).
	U []float64
	// Reaction is the generalised force the supports apply at each
	// prescribed component (zero elsewhere), in the units of Force.
	Reaction []float64
}

func (m *Model) check() error {
	if m.Mesh == nil || len(m.Mesh.Elems) == 0 {
		return errors.New("solid: empty mesh")
	}
	if len(m.Mesh.X) != len(m.Mesh.Y) {
		return errors.New("solid: mesh has unequal X and Y")
	}
	if m.Mode < PlaneStress || m.Mode > Harmonic1 {
		return fmt.Errorf("solid: unknown %v", m.Mode)
	}
	if m.Gauss != 0 && m.Gauss != 2 && m.Gauss != 3 {
		return fmt.Errorf("solid: Gauss order %d, want 2 or 3", m.Gauss)
	}
	if m.Thickness < 0 || math.IsNaN(m.Thickness) {
		return fmt.Errorf("solid: thickness %g, want ≥ 0", m.Thickness)
	}
	nn := len(m.Mesh.X)
	for e, el := range m.Mesh.Elems {
		for _, n := range el {
			if n < 0 || n >= nn {
				return fmt.Errorf("solid: element %d refers to node %d of %d", e, n, nn)
			}
		}
	}
	return m.Material.validate()
}

func (m *Model) rule() []quadPoint {
	if m.Gauss == 2 {
		return rule2
	}
	return rule3
}

// weight returns the integration factor of the mode at radius r: the
// out-of-plane thickness, 2π·r (n = 0) or π·r (n = 1, ∫cos²θ dθ = π).
func (m *Model) weight(r float64) float64 {
	switch m.Mode {
	case Axisymmetric:
		return 2 * math.Pi * r
	case Harmonic1:
		return math.Pi * r
	}
	if m.Thickness > 0 {
		return m.Thickness
	}
	return 1
}

func (m *Model) coords(e int) (x, y [8]float64) {
	for a, n := range m.Mesh.Elems[e] {
		x[a], y[a] = m.Mesh.X[n], m.Mesh.Y[n]
	}
	return x, y
}

// elementStiffness writes the element matrix (8·Dofs square, row stride
// 24) into ke.
func (m *Model) elementStiffness(e int, d *[6][6]float64, ne int, ke *[24][24]float64) error {
	nd := m.Mode.Dofs()
	nk := 8 * nd
	x, y := m.coords(e)
	var b [6][24]float64
	var db [6][24]float64
	*ke = [24][24]float64{}
	for i := range m.rule() {
		p := &m.rule()[i]
		dx, dy, det, r, ok := kinematics(p, &x, &y)
		if !ok {
			return fmt.Errorf("solid: element %d is inverted or degenerate (det J = %g)", e, det)
		}
		if m.Mode >= Axisymmetric && !(r > 0) {
			return fmt.Errorf("solid: element %d reaches radius %g, want > 0", e, r)
		}
		strainMatrix(m.Mode, &b, &p.n, &dx, &dy, r)
		f := p.w * det * m.weight(r)
		for i := range ne {
			for k := range nk {
				var s float64
				for j := range ne {
					s += d[i][j] * b[j][k]
				}
				db[i][k] = s * f
			}
		}
		for k := range nk {
			for l := k; l < nk; l++ {
				var s float64
				for i := range ne {
					s += b[i][k] * db[i][l]
				}
				ke[k][l] += s
			}
		}
	}
	for k := range nk {
		for l := range k {
			ke[k][l] = ke[l][k]
		}
	}
	return nil
}

// bandwidth returns the number of super-diagonals of the stiffness matrix.
func (m *Model) bandwidth() int {
	nd := m.Mode.Dofs()
	kd := 0
	for _, el := range m.Mesh.Elems {
		lo, hi := el[0], el[0]
		for _, n := range el {
			lo, hi = min(lo, n), max(hi, n)
		}
		kd = max(kd, (hi-lo)*nd+nd-1)
	}
	return kd
}

// Solve assembles the banded stiffness matrix, applies the loads and the
// prescribed displacements and solves with a banded Cholesky
// factorisation (LAPACK dpbtrf/dpbtrs through gonum). Number the nodes
// so that the nodes of each element are close in index (the grids of
// NewGrid are): the cost grows as dofs × bandwidth².
func (m *Model) Solve(l Loads) (*Solution, error) {
	if err := m.check(); err != nil {
		return nil, err
	}
	nd := m.Mode.Dofs()
	n := len(m.Mesh.X) * nd
	kd := min(m.bandwidth(), n-1)
	ld := kd + 1
	band := make([]float64, n*ld)
	d, ne := elasticity(m.Mode, m.Material)
	var ke [24][24]float64
	var dof [24]int
	for e, el := range m.Mesh.Elems {
		if err := m.elementStiffness(e, &d, ne, &ke); err != nil {
			return nil, err
		}
		for a, node := range el {
			for c := range nd {
				dof[a*nd+c] = node*nd + c
			}
		}
		for k := range 8 * nd {
			for j := range 8 * nd {
				if gi, gj := dof[k], dof[j]; gj >= gi {
					band[gi*ld+gj-gi] += ke[k][j]
				}
			}
		}
	}

	f := make([]float64, n)
	for _, fo := range l.Forces {
		i, err := m.dofIndex(fo.Node, fo.Dof)
		if err != nil {
			return nil, err
		}
		f[i] += fo.Value
	}
	for _, p := range l.Pressures {
		if err := m.addPressure(f, p); err != nil {
			return nil, err
		}
	}
	fExt := append([]float64(nil), f...)

	// Prescribed components: keep their rows for the reactions, move the
	// known columns to the right-hand side, then replace the rows and
	// columns by the identity.
	fixed := make(map[int]float64, len(l.Fixed))
	order := make([]int, 0, len(l.Fixed))
	for _, fx := range l.Fixed {
		i, err := m.dofIndex(fx.Node, fx.Dof)
		if err != nil {
			return nil, err
		}
		if v, dup := fixed[i]; dup && v != fx.Value {
			return nil, fmt.Errorf("solid: node %d component %d prescribed twice (%g and %g)", fx.Node, fx.Dof, v, fx.Value)
		} else if !dup {
			order = append(order, i)
		}
		fixed[i] = fx.Value
	}
	at := func(i, j int) float64 {
		if j < i {
			i, j = j, i
		}
		if j-i > kd {
			return 0
		}
		return band[i*ld+j-i]
	}
	rows := make([][]float64, len(order))
	for r, i := range order {
		row := make([]float64, 2*kd+1)
		for j := max(0, i-kd); j <= min(n-1, i+kd); j++ {
			row[j-i+kd] = at(i, j)
		}
		rows[r] = row
	}
	for r, i := range order {
		g := fixed[i]
		for j := max(0, i-kd); j <= min(n-1, i+kd); j++ {
			if _, isFixed := fixed[j]; !isFixed {
				f[j] -= rows[r][j-i+kd] * g
			}
		}
	}
	for _, i := range order {
		for j := i; j <= min(n-1, i+kd); j++ {
			band[i*ld+j-i] = 0
		}
		for j := max(0, i-kd); j < i; j++ {
			band[j*ld+i-j] = 0
		}
		band[i*ld] = 1
		f[i] = fixed[i]
	}

	t, ok := lapack64.Pbtrf(blas64.SymmetricBand{Uplo: blas.Upper, N: n, K: kd, Data: band, Stride: ld})
	if !ok {
		return nil, errors.New("solid: stiffness matrix not positive definite (is a rigid-body motion unrestrained?)")
	}
	lapack64.Pbtrs(t, blas64.General{Rows: n, Cols: 1, Data: f, Stride: 1})

	s := &Solution{model: m, U: f, Reaction: make([]float64, n)}
	for r, i := range order {
		var sum float64
		for j := max(0, i-kd); j <= min(n-1, i+kd); j++ {
			sum += rows[r][j-i+kd] * f[j]
		}
		s.Reaction[i] = sum - fExt[i]
	}
	return s, nil
}

func (m *Model) dofIndex(node, dof int) (int, error) {
	nd := m.Mode.Dofs()
	if node < 0 || node >= len(m.Mesh.X) || dof < 0 || dof >= nd {
		return 0, fmt.Errorf("solid: node %d component %d outside the model (%d nodes, %d components)", node, dof, len(m.Mesh.X), nd)
	}
	return node*nd + dof, nil
}

// addPressure adds the consistent nodal forces of a normal pressure on a
// quadratic edge: f_a = −∫ N_a p n w ds, n the outward normal.
func (m *Model) addPressure(f []float64, p Pressure) error {
	var x, y [3]float64
	for a, node := range p.Edge {
		if node < 0 || node >= len(m.Mesh.X) {
			return fmt.Errorf("solid: pressure edge refers to node %d of %d", node, len(m.Mesh.X))
		}
		x[a], y[a] = m.Mesh.X[node], m.Mesh.Y[node]
	}
	nd := m.Mode.Dofs()
	for _, g := range edgeGauss {
		s, w := g[0], g[1]
		n := [3]float64{s * (s - 1) / 2, 1 - s*s, s * (s + 1) / 2}
		dn := [3]float64{s - 0.5, -2 * s, s + 0.5}
		var r, tx, ty float64
		for a := range 3 {
			r += n[a] * x[a]
			tx += dn[a] * x[a]
			ty += dn[a] * y[a]
		}
		// outward normal × ds/dξ of a counter-clockwise edge: (ty, −tx)
		wt := w * m.weight(r) * p.P
		for a := range 3 {
			f[p.Edge[a]*nd+DofX] -= n[a] * ty * wt
			f[p.Edge[a]*nd+DofY] += n[a] * tx * wt
		}
	}
	return nil
}

// Displacement returns one displacement component of a node.
func (s *Solution) Displacement(node, dof int) float64 {
	return s.U[node*s.model.Mode.Dofs()+dof]
}

// ReactionAt returns the support reaction at one component of a node.
func (s *Solution) ReactionAt(node, dof int) float64 {
	return s.Reaction[node*s.model.Mode.Dofs()+dof]
}

// StrainAt returns the strain at natural coordinates (ξ, η) of element e.
func (s *Solution) StrainAt(e int, xi, eta float64) (Strain, error) {
	n, dxi, de := shape(xi, eta)
	p := quadPoint{w: 1, n: n, dxi: dxi, de: de}
	return s.strain(e, &p)
}

func (s *Solution) strain(e int, p *quadPoint) (Strain, error) {
	m := s.model
	nd := m.Mode.Dofs()
	x, y := m.coords(e)
	dx, dy, det, r, ok := kinematics(p, &x, &y)
	if !ok {
		return Strain{}, fmt.Errorf("solid: element %d is inverted or degenerate (det J = %g)", e, det)
	}
	var b [6][24]float64
	strainMatrix(m.Mode, &b, &p.n, &dx, &dy, r)
	var ue [24]float64
	for a, node := range m.Mesh.Elems[e] {
		for c := range nd {
			ue[a*nd+c] = s.U[node*nd+c]
		}
	}
	var v [6]float64
	for i := range 6 {
		for k := range 8 * nd {
			v[i] += b[i][k] * ue[k]
		}
	}
	nu := m.Material.Nu
	switch m.Mode {
	case PlaneStress:
		return Strain{v[0], v[1], -nu / (1 - nu) * (v[0] + v[1]), v[2], 0, 0}, nil
	case PlaneStrain:
		return Strain{v[0], v[1], 0, v[2], 0, 0}, nil
	case Axisymmetric:
		return Strain{v[0], v[1], v[2], v[3], 0, 0}, nil
	}
	return Strain(v), nil
}

// NodalStrains returns the strain at every node, evaluated from the
// displacement field of each element at the node and averaged over the
// elements sharing it. In harmonic 1 the values are amplitudes (see
// Strain.Harmonic1).
func (s *Solution) NodalStrains() ([]Strain, error) {
	m := s.model
	out := make([]Strain, len(m.Mesh.X))
	count := make([]int32, len(m.Mesh.X))
	for e, el := range m.Mesh.Elems {
		for a, node := range el {
			eps, err := s.strain(e, &nodePoints[a])
			if err != nil {
				return nil, err
			}
			for i := range eps {
				out[node][i] += eps[i]
			}
			count[node]++
		}
	}
	for i := range out {
		if c := count[i]; c > 1 {
			for k := range out[i] {
				out[i][k] /= float64(c)
			}
		}
	}
	return out, nil
}
