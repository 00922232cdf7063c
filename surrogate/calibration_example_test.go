package surrogate_test

import (
	"fmt"

	"plica/surrogate"
)

// ExampleFitCantilever fits EI to the synthetic cantilever test of
// surrogate/REFERENCE.md §5.4 (L = 100 mm, four tip loads, deflection zeroed at no load)
// and turns it into a calibration factor against a predicted EI of
// 45 000 N·mm² (a demo value).
func ExampleFitCantilever() {
	loads := []float64{0.05, 0.10, 0.15, 0.20} // N
	defl := []float64{0.40, 0.83, 1.21, 1.62}  // mm
	pts := make([]surrogate.BenchPoint, len(loads))
	for i := range loads {
		pts[i] = surrogate.BenchPoint{Load: loads[i], Deflection: defl[i] * 1e-3, FreeLength: 0.100}
	}
	f, err := surrogate.FitCantilever(pts, surrogate.FitOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("EI = %.6g N·mm², SE %.4g N·mm², 95 %% interval [%.5g, %.5g] N·mm², t = %.4g, R² = %.5f\n",
		f.EI*1e6, f.SE*1e6, f.CI[0]*1e6, f.CI[1]*1e6, f.T, f.R2)
	c, err := surrogate.CalibrationFactor(f, 45000e-6)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("factor %.4f ± %.4f, 95 %% interval [%.4f, %.4f]\n", c.Value, c.SE, c.CI[0], c.CI[1])
	// Output:
	// EI = 41084.6 N·mm², SE 223.1 N·mm², 95 % interval [40387, 41807] N·mm², t = 3.182, R² = 0.99991
	// factor 0.9130 ± 0.0050, 95 % interval [0.8975, 0.9290]
}
