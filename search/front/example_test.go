package front_test

import (
	"fmt"
	"math"

	"plica/search/front"
)

// Two fronts of search/front/REFERENCE.md §1.2: A1 dominates A2, IGD ranks them the wrong
// way round, IGD+ and the ε-indicator do not.
func ExampleIGDPlus() {
	a1 := [][]float64{{2, 4}, {3, 3}, {4, 2}}
	a2 := [][]float64{{2, 8}, {4, 4}, {8, 2}}
	z := [][]float64{{0, 10}, {1, 6}, {2, 2}, {6, 1}, {10, 0}}
	fmt.Printf("IGD:  A1 %.4f  A2 %.4f\n", front.IGD(a1, z), front.IGD(a2, z))
	fmt.Printf("IGD+: A1 %.4f  A2 %.4f\n", front.IGDPlus(a1, z), front.IGDPlus(a2, z))
	fmt.Printf("I_eps+(A1, A2) = %g, I_eps+(A2, A1) = %g\n", front.EpsilonAdditive(a1, a2), front.EpsilonAdditive(a2, a1))
	fmt.Printf("C(A1, A2) = %g, C(A2, A1) = %g\n", front.Coverage(a1, a2), front.Coverage(a2, a1))
	// Output:
	// IGD:  A1 3.7071  A2 2.5915
	// IGD+: A1 1.4828  A2 2.2601
	// I_eps+(A1, A2) = 0, I_eps+(A2, A1) = 2
	// C(A1, A2) = 1, C(A2, A1) = 0
}

// The knee of a front on a line with one bulge towards the ideal point.
func ExampleKneeDistances() {
	set := [][]float64{{0, 1}, {0.25, 0.75}, {0.4, 0.4}, {0.75, 0.25}, {1, 0}}
	d, _ := front.KneeDistances(set)
	for i, p := range set {
		v := d[i]
		if math.Abs(v) < 5e-5 {
			v = 0 // rounding noise of points on the line must not print as -0.0000
		}
		fmt.Printf("%v %.4f\n", p, v)
	}
	// Output:
	// [0 1] 0.0000
	// [0.25 0.75] 0.0000
	// [0.4 0.4] 0.1414
	// [0.75 0.25] 0.0000
	// [1 0] 0.0000
}
