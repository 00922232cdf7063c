package solid

import "fmt"

// Grid is a structured Q8 mesh of Along × Through elements. Its nodes sit
// at grid positions (k, j), k = 0 … 2·Along along and j = 0 … 2·Through
// across; positions with k and j both odd (element centres) carry no
// node. Nodes are numbered row by row along, so the stiffness matrix has
// a half-bandwidth of about (3·Through + 3) nodes.
type Grid struct {
	Mesh
	Along, Through int
	index          []int // (k·(2·Through+1) + j) → node, −1 at element centres
}

// Side names a boundary of a grid.
type Side int

const (
	Start Side = iota // k = 0
	End               // k = 2·Along
	Low               // j = 0
	High              // j = 2·Through
)

// NewGrid builds a grid whose node (k, j) is placed at place(k, j). The
// map must keep elements counter-clockwise: the direction of growing k
// turned left by a right angle points to growing j.
func NewGrid(along, through int, place func(k, j int) (x, y float64)) (*Grid, error) {
	if along < 1 || through < 1 {
		return nil, fmt.Errorf("solid: grid of %d × %d elements, want at least 1 × 1", along, through)
	}
	g := &Grid{Along: along, Through: through}
	nk, nj := 2*along+1, 2*through+1
	g.index = make([]int, nk*nj)
	nodes := nk*nj - along*through
	g.X = make([]float64, 0, nodes)
	g.Y = make([]float64, 0, nodes)
	for k := range nk {
		for j := range nj {
			if k%2 == 1 && j%2 == 1 {
				g.index[k*nj+j] = -1
				continue
			}
			g.index[k*nj+j] = len(g.X)
			x, y := place(k, j)
			g.X = append(g.X, x)
			g.Y = append(g.Y, y)
		}
	}
	g.Elems = make([][8]int, 0, along*through)
	for i := range along {
		for l := range through {
			k, j := 2*i, 2*l
			g.Elems = append(g.Elems, [8]int{
				g.Node(k, j), g.Node(k+2, j), g.Node(k+2, j+2), g.Node(k, j+2),
				g.Node(k+1, j), g.Node(k+2, j+1), g.Node(k+1, j+2), g.Node(k, j+1),
			})
		}
	}
	for e := range g.Elems {
		x, y := (&Model{Mesh: &g.Mesh}).coords(e)
		for i := range rule3 {
			if _, _, det, _, ok := kinematics(&rule3[i], &x, &y); !ok {
				return nil, fmt.Errorf("solid: grid element %d is inverted or degenerate (det J = %g)", e, det)
			}
		}
	}
	return g, nil
}

// Node returns the node at grid position (k, j), or −1 at an element
// centre or outside the grid.
func (g *Grid) Node(k, j int) int {
	nj := 2*g.Through + 1
	if k < 0 || j < 0 || k > 2*g.Along || j >= nj {
		return -1
	}
	return g.index[k*nj+j]
}

// Nodes returns the nodes of a side in grid order (growing j on Start and
// End, growing k on Low and High).
func (g *Grid) Nodes(s Side) []int {
	var out []int
	switch s {
	case Start, End:
		k := 0
		if s == End {
			k = 2 * g.Along
		}
		for j := range 2*g.Through + 1 {
			out = append(out, g.Node(k, j))
		}
	default:
		j := 0
		if s == High {
			j = 2 * g.Through
		}
		for k := range 2*g.Along + 1 {
			out = append(out, g.Node(k, j))
		}
	}
	return out
}

// Edges returns the element edges of a side, each in the
// counter-clockwise order of its element, for Pressure loads.
func (g *Grid) Edges(s Side) [][3]int {
	var out [][3]int
	switch s {
	case Start:
		for l := range g.Through {
			out = append(out, [3]int{g.Node(0, 2*l+2), g.Node(0, 2*l+1), g.Node(0, 2*l)})
		}
	case End:
		k := 2 * g.Along
		for l := range g.Through {
			out = append(out, [3]int{g.Node(k, 2*l), g.Node(k, 2*l+1), g.Node(k, 2*l+2)})
		}
	case Low:
		for i := range g.Along {
			out = append(out, [3]int{g.Node(2*i, 0), g.Node(2*i+1, 0), g.Node(2*i+2, 0)})
		}
	case High:
		j := 2 * g.Through
		for i := range g.Along {
			out = append(out, [3]int{g.Node(2*i+2, j), g.Node(2*i+1, j), g.Node(2*i, j)})
		}
	}
	return out
}
