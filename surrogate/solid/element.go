package solid

import "math"

// Local node order of the 8-node serendipity quadrilateral: corners
// counter-clockwise, then the midside nodes of edges 0–1, 1–2, 2–3, 3–0.
// ξ runs from corner 0 to corner 1, η from corner 1 to corner 2.
var (
	nodeXi  = [8]float64{-1, 1, 1, -1, 0, 1, 0, -1}
	nodeEta = [8]float64{-1, -1, 1, 1, -1, 0, 1, 0}
)

// shape returns the Q8 shape functions and their ξ and η derivatives at
// (ξ, η) (Zienkiewicz & Taylor, The Finite Element Method, vol. 1, the
// serendipity family; common practice).
func shape(xi, eta float64) (n, dxi, deta [8]float64) {
	for a := range 4 {
		xa, ya := nodeXi[a], nodeEta[a]
		p, q := 1+xi*xa, 1+eta*ya
		n[a] = p * q * (xi*xa + eta*ya - 1) / 4
		dxi[a] = xa * q * (2*xi*xa + eta*ya) / 4
		deta[a] = ya * p * (xi*xa + 2*eta*ya) / 4
	}
	for a := 4; a < 8; a++ {
		xa, ya := nodeXi[a], nodeEta[a]
		if xa == 0 {
			n[a] = (1 - xi*xi) * (1 + eta*ya) / 2
			dxi[a] = -xi * (1 + eta*ya)
			deta[a] = ya * (1 - xi*xi) / 2
		} else {
			n[a] = (1 + xi*xa) * (1 - eta*eta) / 2
			dxi[a] = xa * (1 - eta*eta) / 2
			deta[a] = -eta * (1 + xi*xa)
		}
	}
	return n, dxi, deta
}

// quadPoint is one point of a tensor-product Gauss rule with its shape
// functions tabulated.
type quadPoint struct {
	w          float64
	n, dxi, de [8]float64
}

// gaussRule returns the order×order Gauss–Legendre rule on the square
// (Abramowitz & Stegun, Handbook of Mathematical Functions, 1964,
// Table 25.4).
func gaussRule(order int) []quadPoint {
	var x, w []float64
	switch order {
	case 2:
		g := 1 / math.Sqrt(3)
		x, w = []float64{-g, g}, []float64{1, 1}
	default:
		g := math.Sqrt(0.6)
		x, w = []float64{-g, 0, g}, []float64{5.0 / 9, 8.0 / 9, 5.0 / 9}
	}
	var pts []quadPoint
	for i := range x {
		for j := range x {
			n, dx, de := shape(x[i], x[j])
			pts = append(pts, quadPoint{w: w[i] * w[j], n: n, dxi: dx, de: de})
		}
	}
	return pts
}

var (
	rule2 = gaussRule(2)
	rule3 = gaussRule(3)
	// nodePoints tabulates the shape functions at the element's own nodes
	// for strain recovery.
	nodePoints = func() (p [8]quadPoint) {
		for a := range 8 {
			n, dx, de := shape(nodeXi[a], nodeEta[a])
			p[a] = quadPoint{w: 1, n: n, dxi: dx, de: de}
		}
		return p
	}()
	// edgeGauss is the 3-point rule on [−1, 1] for edge loads.
	edgeGauss = [3][2]float64{{-math.Sqrt(0.6), 5.0 / 9}, {0, 8.0 / 9}, {math.Sqrt(0.6), 5.0 / 9}}
)

// kinematics evaluates the geometry at one point: x-derivatives of the
// shape functions, the Jacobian determinant and the radius (first
// coordinate) there. ok is false for a degenerate or inverted mapping.
func kinematics(p *quadPoint, x, y *[8]float64) (dx, dy [8]float64, det, r float64, ok bool) {
	var j11, j12, j21, j22 float64
	for a := range 8 {
		j11 += p.dxi[a] * x[a]
		j12 += p.dxi[a] * y[a]
		j21 += p.de[a] * x[a]
		j22 += p.de[a] * y[a]
		r += p.n[a] * x[a]
	}
	det = j11*j22 - j12*j21
	if !(det > 0) {
		return dx, dy, det, r, false
	}
	for a := range 8 {
		dx[a] = (j22*p.dxi[a] - j12*p.de[a]) / det
		dy[a] = (-j21*p.dxi[a] + j11*p.de[a]) / det
	}
	return dx, dy, det, r, true
}

// strainMatrix fills b (rows = engineering strain components of the mode,
// columns = element dofs, node-major) at one point. r is the radius, used
// only by the axisymmetric modes.
//
//	plane:        εx, εy, γxy                       dofs ux, uy
//	axisymmetric: εr, εz, εθ, γrz                   dofs ur, uz
//	harmonic 1:   εr, εz, εθ, γrz, γrθ, γzθ         dofs U, W, V
//
// In harmonic 1 the displacements are ur = U cos θ, uz = W cos θ,
// uθ = V sin θ; the first four strains vary as cos θ and the last two
// as sin θ (Zienkiewicz & Taylor, The Finite Element Method, vol. 1,
// axisymmetric solids under non-symmetric loads; from memory).
func strainMatrix(mode Mode, b *[6][24]float64, n, dx, dy *[8]float64, r float64) {
	*b = [6][24]float64{}
	switch mode {
	case PlaneStress, PlaneStrain:
		for a := range 8 {
			c := 2 * a
			b[0][c] = dx[a]
			b[1][c+1] = dy[a]
			b[2][c] = dy[a]
			b[2][c+1] = dx[a]
		}
	case Axisymmetric:
		for a := range 8 {
			c := 2 * a
			b[0][c] = dx[a]
			b[1][c+1] = dy[a]
			b[2][c] = n[a] / r
			b[3][c] = dy[a]
			b[3][c+1] = dx[a]
		}
	case Harmonic1:
		for a := range 8 {
			c := 3 * a
			nr := n[a] / r
			b[0][c] = dx[a]
			b[1][c+1] = dy[a]
			b[2][c] = nr
			b[2][c+2] = nr
			b[3][c] = dy[a]
			b[3][c+1] = dx[a]
			b[4][c] = -nr
			b[4][c+2] = dx[a] - nr
			b[5][c+1] = -nr
			b[5][c+2] = dy[a]
		}
	}
}

// elasticity returns the material matrix for the strain components of the
// mode (see strainMatrix) and the number of components.
func elasticity(mode Mode, m Material) (d [6][6]float64, ne int) {
	e, nu := m.E, m.Nu
	g := e / (2 * (1 + nu))
	lam := e * nu / ((1 + nu) * (1 - 2*nu))
	switch mode {
	case PlaneStress:
		c := e / (1 - nu*nu)
		d[0][0], d[0][1], d[1][0], d[1][1], d[2][2] = c, c*nu, c*nu, c, g
		return d, 3
	case PlaneStrain:
		d[0][0], d[0][1], d[1][0], d[1][1], d[2][2] = lam+2*g, lam, lam, lam+2*g, g
		return d, 3
	}
	for i := range 3 {
		for j := range 3 {
			d[i][j] = lam
		}
		d[i][i] = lam + 2*g
	}
	d[3][3] = g
	ne = 4
	if mode == Harmonic1 {
		d[4][4], d[5][5] = g, g
		ne = 6
	}
	return d, ne
}
