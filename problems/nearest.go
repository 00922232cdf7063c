package problems

import "strings"

// Nearest returns the name of known that the user probably meant by s, for
// a "did you mean" hint: the first name that extends s by an underscore
// part (wall → wall_mm), else the name of least edit distance to s when
// that distance is at most 3 or at most a third of len(s); "" when no name
// is that close.
func Nearest(s string, known []string) string {
	best, bestD := "", 1<<30
	for _, c := range known {
		if strings.HasPrefix(c, s+"_") {
			return c
		}
		if d := editDistance(s, c); d < bestD {
			best, bestD = c, d
		}
	}
	if bestD <= 3 || bestD*3 <= len(s) {
		return best
	}
	return ""
}

// editDistance is the Levenshtein distance of a and b (insertions,
// deletions and substitutions of bytes, each costing 1).
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			c := 1
			if a[i-1] == b[j-1] {
				c = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+c)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
