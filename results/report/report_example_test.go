package report_test

import (
	"fmt"

	"plica/results/report"
)

// A two-objective front (both minimised): the report shows the best
// design of each objective and the knee, the design farthest on the ideal
// side of the line through the two best.
func ExampleRepresentative() {
	front := [][]float64{
		{1.0, 9.0},
		{2.0, 4.0},
		{3.0, 2.5},
		{6.0, 2.0},
		{9.0, 1.0},
	}
	for _, i := range report.Representative(front) {
		fmt.Printf("design %d: %v\n", i+1, front[i])
	}
	// Output:
	// design 1: [1 9]
	// design 5: [9 1]
	// design 3: [3 2.5]
}
