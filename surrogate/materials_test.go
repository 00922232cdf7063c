package surrogate

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestMaterials checks the generic material table against the ranges of
// surrogate/REFERENCE.md §3.2 (published data sheets; ν from memory) and that every entry
// passes validation.
func TestMaterials(t *testing.T) {
	assert.Equal(t, []string{"pa12", "petg", "pla", "resin", "tpu"}, MaterialNames(), "sorted names")
	ranges := map[string]struct{ eLo, eHi, rhoLo, rhoHi, nuLo, nuHi float64 }{
		"pla":   {1.6e9, 4e9, 1220, 1310, 0.33, 0.36},
		"petg":  {2.0e9, 3.0e9, 1250, 1300, 0.36, 0.40},
		"tpu":   {2.5e6, 247e6, 1200, 1250, 0.45, 0.49},
		"pa12":  {1.4e9, 1.9e9, 880, 1010, 0.43, 0.47},
		"resin": {0.45e9, 2.9e9, 1100, 1200, 0.35, 0.40},
	}
	for _, name := range MaterialNames() {
		m, ok := LookupMaterial(name)
		require.True(t, ok, name)
		assert.Equal(t, name, m.Name, "name field of %s", name)
		require.NoError(t, m.Validate(), name)
		r := ranges[name]
		for _, e := range []float64{m.ModulusAcross, m.ModulusInLayer} {
			assert.GreaterOrEqual(t, e, r.eLo, "%s modulus", name)
			assert.LessOrEqual(t, e, r.eHi, "%s modulus", name)
		}
		assert.LessOrEqual(t, m.ModulusAcross, m.ModulusInLayer, "%s: across-layer modulus is the lower one", name)
		assert.GreaterOrEqual(t, m.Density, r.rhoLo, "%s density", name)
		assert.LessOrEqual(t, m.Density, r.rhoHi, "%s density", name)
		assert.GreaterOrEqual(t, m.Poisson, r.nuLo, "%s Poisson", name)
		assert.LessOrEqual(t, m.Poisson, r.nuHi, "%s Poisson", name)
		assert.Greater(t, m.AllowableStrain, 0.0, "%s allowable strain", name)
	}
	_, ok := LookupMaterial("PLAA")
	assert.False(t, ok, "unknown material")
}
