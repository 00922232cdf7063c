// Package gotable formats float64 slices as Go source for the generated
// table files of package surrogate (written by internal/hoopgen and
// internal/wallgen), so both generators write numbers the same way.
package gotable

import (
	"math"
	"strconv"
	"strings"
)

// Join writes v as a comma-separated list with the shortest exact digits,
// for grid axes.
func Join(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', -1, 64)
	}
	return strings.Join(s, ", ")
}

// Rows writes v as the body of a composite literal, eight values per line
// with 7 significant digits; NaN is written as the identifier nan, which
// the generated file declares.
func Rows(v []float64) string {
	var b strings.Builder
	for i := 0; i < len(v); i += 8 {
		b.WriteString("\t\t")
		for j := i; j < min(i+8, len(v)); j++ {
			if math.IsNaN(v[j]) {
				b.WriteString("nan, ")
				continue
			}
			b.WriteString(strconv.FormatFloat(v[j], 'g', 7, 64))
			b.WriteString(", ")
		}
		b.WriteString("\n")
	}
	return b.String()
}
