package search_test

import (
	"context"
	"fmt"

	"plica/search"

	"plica/search/front"
)

// ExampleRun minimises the constrained two-objective BNH problem (Binh and Korn 1997) with NSGA-II
// and measures the front's hypervolume at (140, 50), whose exact value is 15856/3 ≈ 5285.
func ExampleRun() {
	res, err := search.Run(context.Background(), search.BNH(), &search.Settings{
		Seed:           1,
		Population:     40,
		MaxEvaluations: 4000,
	}, &search.NSGA2{})
	if err != nil {
		fmt.Println(err)
		return
	}
	pts := make([][]float64, len(res.Front))
	for i, d := range res.Front {
		pts[i] = d.F
	}
	first, last := res.Front[0], res.Front[len(res.Front)-1]
	fmt.Printf("%v after %d evaluations (%d generations)\n", res.Status, res.Evaluations, res.Generation)
	fmt.Printf("front: %d designs, hypervolume %.4g\n", len(res.Front), front.Hypervolume(pts, []float64{140, 50}))
	fmt.Printf("least f1 at f2 = %.4g; least f2 = %.4g at f1 = %.4g\n", first.F[1], last.F[1], last.F[0])
	// Output:
	// EvaluationLimit after 4000 evaluations (99 generations)
	// front: 80 designs, hypervolume 5251
	// least f1 at f2 = 50; least f2 = 4 at f1 = 136
}

// ExampleHypervolume computes the area dominated by three points of a staircase.
func ExampleHypervolume() {
	hv := front.Hypervolume([][]float64{{1, 3}, {2, 2}, {3, 1}}, []float64{4, 4})
	fmt.Printf("%.4g\n", hv)
	// Output: 6
}
