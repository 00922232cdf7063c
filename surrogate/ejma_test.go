package surrogate

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
)

// TestEJMAWorkedExampleS1 recomputes worked example S1 of surrogate/REFERENCE.md §5.2:
// EJMA Standards equations (surrogate/REFERENCE.md §2.11) as applied in a published worked
// calculation for an unreinforced U-bellows; published outputs
// f_iu = 23 010.85 lbf/in, K_x = 3835.14 lbf/in, S5 = 307.17 psi,
// S6 = 38 386.29 psi; tolerance 0.1 % (the published sheet rounds).
func TestEJMAWorkedExampleS1(t *testing.T) {
	const (
		in  = 0.0254          // m, exact
		psi = 6894.757293168  // Pa, exact by definition of lbf and in
		lbf = 4.4482216152605 // N, exact
	)
	db, th, w, rm := 38*in, 0.03*in, 1.095*in, 0.25*in
	eb := 29.0e6 * psi
	const plies, n = 1, 6
	e := 0.315 * in / n
	cf, cd := 1.65, 1.63

	dm := EJMAMeanDiameter(db, w, th, plies)
	tp := EJMAFormedThickness(th, db, dm)
	fiu := EJMAAxialRate(dm, eb, tp, plies, w, cf)
	kx := fiu / n
	s5 := EJMAMembraneStress(eb, tp, e, w, cf)
	s6 := EJMABendingStress(eb, tp, e, w, cd)

	cases := []struct {
		name      string
		got, want float64
	}{
		// f_iu in SI is verifyEJMA of verification.go.
		{"K_x SI", kx, 6.71636e5},
		{"S5 SI", s5, 2.1178e6},
		{"S6 SI", s6, 264.66e6},
		{"f_iu lbf/in", fiu * in / lbf, 23010.85},
		{"K_x lbf/in", kx * in / lbf, 3835.14},
		{"S5 psi", s5 / psi, 307.17},
		{"S6 psi", s6 / psi, 38386.29},
	}
	for _, c := range cases {
		assert.InEpsilon(t, c.want, c.got, 1e-3, "EJMA S1 %s", c.name)
	}
	c1, c2 := EJMAShapeFactors(rm, w, dm, tp)
	// C1 = 2·0.25/1.095 and C2 = 1.82·rm/sqrt(Dm·tp) [derived from the inputs].
	assert.InEpsilon(t, 0.456621, c1, 1e-5, "C1")
	assert.InEpsilon(t, 1.82*rm/sqrtf(dm*tp), c2, 1e-12, "C2")
}

func sqrtf(x float64) float64 { return math.Sqrt(x) }
