package kinematics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// benchPair is two fully overlapping curved tubes (demo values): both start
// at the base plane with no straight part, so the backbone is one link.
func benchPair() *Robot {
	return &Robot{Tubes: []Tube{
		{CurvedLength: 0.1, Precurvature: [2]float64{0, 10}, Bending: [2][2]float64{{1, 0}, {0, 1}}, Torsion: 0.8},
		{CurvedLength: 0.1, Precurvature: [2]float64{0, 8}, Bending: [2][2]float64{{1.5, 0}, {0, 1.5}}, Torsion: 1.2},
	}}
}

// benchAngles returns a table of angle pairs, so that every iteration
// evaluates a different pose (and the branch predictor cannot learn one).
func benchAngles() [][2]float64 {
	rng := rand.New(rand.NewPCG(1, 2))
	th := make([][2]float64, 4096)
	for i := range th {
		th[i] = [2]float64{2 * math.Pi * rng.Float64(), 2 * math.Pi * rng.Float64()}
	}
	return th
}

func BenchmarkTipTwoTubeSingleLink(b *testing.B) {
	for _, tc := range []struct {
		name  string
		aniso bool
	}{{"isotropic", false}, {"anisotropic", true}} {
		b.Run(tc.name, func(b *testing.B) {
			r := benchPair()
			if tc.aniso {
				r.Tubes[0].Bending = [2][2]float64{{1, 0.1}, {0.1, 1.4}}
				r.Tubes[1].Bending = [2][2]float64{{2, 0}, {0, 1.2}}
			}
			s, err := NewSolver(r)
			if err != nil {
				b.Fatal(err)
			}
			angles := benchAngles()
			theta := make([]float64, 2)
			beta := []float64{-0, 0}
			var sink float64
			// A plain b.N loop: b.Loop costs about 3 ns per iteration here,
			// a tenth of the time being measured.
			b.ResetTimer()
			for i := range b.N {
				a := &angles[i&4095]
				theta[0], theta[1] = a[0], a[1]
				p, err := s.Tip(theta, beta)
				if err != nil {
					b.Fatal(err)
				}
				sink += p.P[0]
			}
			if math.IsNaN(sink) {
				b.Fatal("NaN tip")
			}
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "tips/s")
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N), "ns/tip")
		})
	}
}

// bench3Tube is a three-tube robot (demo values, lengths 400/250/150 mm)
// inserted so that its backbone has six links and is about 200 mm long.
func bench3Tube() (*Robot, Actuation) {
	r := &Robot{Tubes: []Tube{
		{StraightLength: 0.3, CurvedLength: 0.1, Precurvature: [2]float64{0, 12}, Bending: [2][2]float64{{0.8, 0}, {0, 0.8}}, Torsion: 0.6},
		{StraightLength: 0.17, CurvedLength: 0.08, Precurvature: [2]float64{0, 8}, Bending: [2][2]float64{{1.6, 0.1}, {0.1, 1.2}}, Torsion: 1.2},
		{StraightLength: 0.1, CurvedLength: 0.05, Precurvature: [2]float64{0, 5}, Bending: [2][2]float64{{3, 0}, {0, 3}}, Torsion: 2.3},
	}}
	return r, Actuation{Theta: []float64{0.3, 2.1, -1.2}, Beta: []float64{-0.2, -0.12, -0.06}}
}

func BenchmarkBackbone3Tube(b *testing.B) {
	r, a := bench3Tube()
	const step = 1e-3 // one sample per mm
	b.Run("Robot", func(b *testing.B) {
		n := 0
		for b.Loop() {
			ss, _, err := r.Backbone(a, step)
			if err != nil {
				b.Fatal(err)
			}
			n += len(ss)
		}
		b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "backbones/s")
		b.ReportMetric(float64(n)/float64(b.N), "samples/op")
	})
	b.Run("Solver", func(b *testing.B) {
		s, err := NewSolver(r)
		if err != nil {
			b.Fatal(err)
		}
		var ss []float64
		var poses []Pose
		n := 0
		for b.Loop() {
			ss, poses, err = s.Backbone(a.Theta, a.Beta, step, ss, poses)
			if err != nil {
				b.Fatal(err)
			}
			n += len(ss)
		}
		b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "backbones/s")
		b.ReportMetric(float64(n)/float64(b.N), "samples/op")
	})
}

func BenchmarkTipThreeTubeMultiLink(b *testing.B) {
	r, a := bench3Tube()
	s, err := NewSolver(r)
	if err != nil {
		b.Fatal(err)
	}
	angles := benchAngles()
	theta := append([]float64(nil), a.Theta...)
	var sink float64
	b.ResetTimer()
	for i := range b.N {
		theta[0], theta[1] = angles[i&4095][0], angles[i&4095][1]
		p, err := s.Tip(theta, a.Beta)
		if err != nil {
			b.Fatal(err)
		}
		sink += p.P[0]
	}
	if math.IsNaN(sink) {
		b.Fatal("NaN tip")
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "tips/s")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N), "ns/tip")
}

// BenchmarkStability times one pair test with an anisotropic c_eff.
func BenchmarkStability(b *testing.B) {
	in := Tube{Precurvature: [2]float64{1, 7}, Bending: [2][2]float64{{0.01, 0.002}, {0.002, 0.012}}, Torsion: 0.3}
	out := Tube{Precurvature: [2]float64{0, 5}, Bending: [2][2]float64{{0.02, 0}, {0, 0.025}}, Torsion: 0.5}
	n := 0
	var ps PairStability
	for b.Loop() {
		var err error
		if ps, err = TwoTubeStability(in, out, 0.1, [2]float64{0.2, 0.1}); err != nil {
			b.Fatal(err)
		}
		n++
	}
	if math.IsNaN(ps.Margin) {
		b.Fatal("NaN margin")
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/1e3/float64(n), "us/test")
}
