package kinematics_test

import (
	"fmt"
	"math"

	"plica/objective/kinematics"
)

// Two superelastic tubes (E = 60 GPa, ν = 0.3, OD/ID 1.0/0.8 and 1.4/1.1 mm)
// pre-curved by 10 /m: c = (1+ν)κ1κ2 = 130 /m² and L_crit = 0.1378 m without
// transmission (check case ST-1 of the physics reference); 50 mm of
// transmission on each tube lowers it to 0.0923 m (ST-2).
func ExampleTwoTubeStability() {
	tube := func(od, id float64) kinematics.Tube {
		ei := 60e9 * math.Pi * (math.Pow(od, 4) - math.Pow(id, 4)) / 64
		return kinematics.Tube{Precurvature: [2]float64{0, 10},
			Bending: [2][2]float64{{ei, 0}, {0, ei}}, Torsion: ei / 1.3}
	}
	inner, outer := tube(1.0e-3, 0.8e-3), tube(1.4e-3, 1.1e-3)
	for _, tr := range []float64{0, 0.05} {
		ps, err := kinematics.TwoTubeStability(inner, outer, 0.1, [2]float64{tr, tr})
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("transmission %.2f m: c = %.4g /m², lambda = %.4f, L_crit = %.4f m, margin %+.3f, snap-free %v\n",
			tr, ps.C, ps.Lambda, ps.LCrit, ps.Margin, ps.SnapFree)
	}
	// Output:
	// transmission 0.00 m: c = 130 /m², lambda = 1.1402, L_crit = 0.1378 m, margin +0.274, snap-free true
	// transmission 0.05 m: c = 130 /m², lambda = 1.1402, L_crit = 0.0923 m, margin -0.083, snap-free false
}
