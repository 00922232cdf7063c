package gotable

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
)

// The formats the generated tables rely on: axes exact (strconv's
// shortest representation, Go standard library), values at 7 significant
// digits, NaN as the identifier nan, eight values per line.
func TestFormats(t *testing.T) {
	assert.Equal(t, "0.1, 1e-05, 2", Join([]float64{0.1, 1e-5, 2}))
	v := []float64{1.234567891, math.NaN(), 3, 4, 5, 6, 7, 8, 9}
	assert.Equal(t, "\t\t1.234568, nan, 3, 4, 5, 6, 7, 8, \n\t\t9, \n", Rows(v))
}
