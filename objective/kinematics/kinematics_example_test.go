package kinematics_test

import (
	"fmt"
	"math"

	"plica/objective/kinematics"
)

// Two nested tubes (check case SEG-1 of the physics reference): the inner
// one is 450 mm long with a 100 mm tip pre-curved by 10 /m, the outer one
// 250 mm long with a 100 mm tip pre-curved by 5 /m and twice as stiff.
// Aligned, the curvatures add up; opposed, the two curved parts cancel where
// they overlap.
func ExampleRobot_Tip() {
	tube := func(ls, lc, kappa, ei float64) kinematics.Tube {
		return kinematics.Tube{StraightLength: ls, CurvedLength: lc, Precurvature: [2]float64{0, kappa},
			Bending: [2][2]float64{{ei, 0}, {0, ei}}, Torsion: ei / 1.3}
	}
	robot := &kinematics.Robot{Tubes: []kinematics.Tube{tube(0.35, 0.10, 10, 1), tube(0.15, 0.10, 5, 2)}}
	for _, theta := range [][]float64{{0, 0}, {0, math.Pi}} {
		a := kinematics.Actuation{Theta: theta, Beta: []float64{-0.25, -0.10}}
		links, err := robot.Links(a, nil)
		if err != nil {
			fmt.Println(err)
			return
		}
		tip, err := robot.Tip(a)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("theta_deg = (%.0f, %.0f): tip at (%.2f, %.2f, %.2f) mm\n",
			theta[0]*180/math.Pi, theta[1]*180/math.Pi, tip.P[0]*1e3, tip.P[1]*1e3, tip.P[2]*1e3)
		for _, l := range links {
			fmt.Printf("  %3.0f–%3.0f mm  |u| = %.3f /m  tubes %02b curved %02b\n",
				l.Start*1e3, l.End*1e3, math.Hypot(l.U[0], l.U[1]), l.Present, l.Curved)
		}
	}
	// Output:
	// theta_deg = (0, 0): tip at (54.17, 0.00, 183.00) mm
	//     0– 50 mm  |u| = 0.000 /m  tubes 11 curved 00
	//    50–100 mm  |u| = 3.333 /m  tubes 11 curved 10
	//   100–150 mm  |u| = 6.667 /m  tubes 11 curved 11
	//   150–200 mm  |u| = 10.000 /m  tubes 01 curved 01
	// theta_deg = (0, 180): tip at (-8.33, 0.00, 198.39) mm
	//     0– 50 mm  |u| = 0.000 /m  tubes 11 curved 00
	//    50–100 mm  |u| = 3.333 /m  tubes 11 curved 10
	//   100–150 mm  |u| = 0.000 /m  tubes 11 curved 11
	//   150–200 mm  |u| = 10.000 /m  tubes 01 curved 01
}

// A Solver evaluates tip poses of one robot without allocating, for sweeps
// over many actuations. Here two fully overlapping curved tubes are rotated
// against each other: the tip sweeps from fully bent (|u| = 20/3 /m) through
// |u| = 4.714 /m in the 45° plane to straight.
func ExampleSolver_Tip() {
	tube := func(kappa, ei float64) kinematics.Tube {
		return kinematics.Tube{CurvedLength: 0.1, Precurvature: [2]float64{0, kappa},
			Bending: [2][2]float64{{ei, 0}, {0, ei}}, Torsion: ei / 1.3}
	}
	// EI·κ equal for both tubes: opposed, they straighten completely.
	s, err := kinematics.NewSolver(&kinematics.Robot{Tubes: []kinematics.Tube{tube(10, 1), tube(5, 2)}})
	if err != nil {
		fmt.Println(err)
		return
	}
	beta := []float64{0, 0}
	for _, deg := range []float64{0, 90, 180} {
		tip, err := s.Tip([]float64{0, deg * math.Pi / 180}, beta)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("relative angle %3.0f deg: tip (%6.2f, %6.2f, %6.2f) mm\n", deg, tip.P[0]*1e3, tip.P[1]*1e3, tip.P[2]*1e3)
	}
	// Output:
	// relative angle   0 deg: tip ( 32.12,   0.00,  92.76) mm
	// relative angle  90 deg: tip ( 16.36,  16.36,  96.34) mm
	// relative angle 180 deg: tip (  0.00,   0.00, 100.00) mm
}
