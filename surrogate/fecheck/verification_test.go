package fecheck

import (
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/surrogate"
)

// TestVerificationCaseList checks the FE cases plica verify -fe runs
// without running ccx (the cases themselves run in cmd/plica's
// TestFEVerify): every ring geometry named is one TestFESolidVsCalculiX
// checks, names are unique, each case has a source and a relative
// tolerance.
func TestVerificationCaseList(t *testing.T) {
	var names []string
	for _, c := range ringGeometries {
		names = append(names, c.name)
	}
	for _, n := range verifyRings {
		assert.Contains(t, names, n)
	}
	seen := map[string]bool{}
	cases := VerificationCases()
	assert.Len(t, cases, 3+4*len(verifyRings)+4)
	for _, c := range cases {
		assert.False(t, seen[c.Name], "%s: name used twice", c.Name)
		seen[c.Name] = true
		assert.Equal(t, "fe", c.Area)
		assert.NotEmpty(t, c.Source, c.Name)
		assert.NotNil(t, c.Compute, c.Name)
		assert.True(t, c.Relative && c.Tolerance > 0 && c.Below >= 0 && c.Below < 1, c.Name)
	}
	assert.True(t, slices.ContainsFunc(cases, func(c VerificationCase) bool { return c.Below > 0 }), "the strain band is asymmetric")
	sec, err := spineVerify().Section(surrogate.Strip)
	assert.NoError(t, err)
	require.Len(t, sec.OutOfRange, 1, "the spined verification bellows lies inside the validated range of its stiffness")
	assert.Equal(t, surrogate.QuantitySpineStrain, sec.OutOfRange[0].Quantity, "only its wall strain is unvalidated (every spined bellows)")
}
