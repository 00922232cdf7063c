package fecheck

import (
	"bytes"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestDeckNumberFits: every number g writes fits ccx's 20-character field
// and reads back to the precision the field can carry (15 significant
// digits, one fewer for each character a sign or a long exponent takes):
// negative, tiny, huge and subnormal values, and the value that a
// 15-digit mantissa once made ccx read as -4.27.
func TestDeckNumberFits(t *testing.T) {
	for _, x := range []float64{
		0, math.Copysign(0, -1), 1, -1, 0.1, 1.0 / 3, -2.0 / 3,
		-4.26692027087075e-06, 4.26692027087075e-06, -4.270000000000001e-06,
		-1.2345678901234567e-300, 1.2345678901234567e300, -math.MaxFloat64, math.MaxFloat64,
		-math.SmallestNonzeroFloat64, math.SmallestNonzeroFloat64, -2.2250738585072014e-308,
		-123456789012345.67, 1e21, -1e-5, 1.5e9, 0.38, -1e-3 * 0.0123456789,
	} {
		s := g(x)
		assert.LessOrEqual(t, len(s), fieldWidth, "%q is longer than a ccx field", s)
		v, err := strconv.ParseFloat(s, 64)
		require.NoError(t, err, s)
		// digits the field leaves: 15, less what a sign and an exponent beyond
		// e±dd take
		digits := 15
		if strings.HasPrefix(s, "-") && strings.Contains(s, "e") {
			digits--
		}
		if i := strings.Index(s, "e"); i >= 0 && len(s)-i > 4 {
			digits -= len(s) - i - 4
		}
		if math.Abs(x) < 0x1p-1022 { // subnormal: fewer significant bits to keep
			assert.Equal(t, x, v, "%q", s)
			continue
		}
		assert.LessOrEqual(t, math.Abs(v-x), 0.5*math.Pow(10, float64(1-digits))*math.Abs(x)*1.0000001, "%q keeps %d digits of %v", s, digits, x)
	}
	assert.Equal(t, "-4.2669202708707e-06", g(-4.26692027087075e-06))
	assert.Equal(t, "0.333333333333333", g(1.0/3))
}

// TestDeckFieldsFit writes the three decks of a thick-walled convolution
// (the ring deck's prescribed displacements are tiny and negative) and
// checks that no comma-separated field of a data line exceeds ccx's
// 20 characters.
func TestDeckFieldsFit(t *testing.T) {
	rg := ringGeometries[3]
	spec := rg.spec(ringMaterial)
	spec.mesh.Along, spec.around = 8, 6
	rm, err := spec.build()
	require.NoError(t, err)
	var ring, shell, axi bytes.Buffer
	require.NoError(t, writeRingDeck(&ring, rm, "ring"))
	w := bellowsWall(rg.geometry())
	sh := shellSpec{wall: w, mat: wallMaterial{Es: 2.1e9, Et: 1.3e9, nu: 0.36, t: rg.geometry().Wall}, pitches: 4, around: 8, perPitch: 8, ringA: 1, ring: 2}
	require.NoError(t, writeShellDeck(&shell, sh.build(), "shell"))
	so := solidFor(w, sh.mat, draft)
	require.NoError(t, writeAxiDeck(&axi, so.build(), "solid"))
	for name, deck := range map[string]string{"ring": ring.String(), "shell": shell.String(), "solid": axi.String()} {
		negExp := 0
		for n, line := range strings.Split(deck, "\n") {
			if line == "" || strings.HasPrefix(line, "*") || n < 4 {
				continue // comments, keywords, heading
			}
			for _, f := range strings.Split(line, ",") {
				f = strings.TrimSpace(f)
				assert.LessOrEqual(t, len(f), fieldWidth, "%s deck line %d: field %q", name, n+1, f)
				if strings.HasPrefix(f, "-") && strings.Contains(f, "e-") {
					negExp++
				}
			}
		}
		if name == "ring" {
			assert.Positive(t, negExp, "the ring deck has negative values with exponents")
		}
	}
}
