package front

// Dominates reports whether a Pareto-dominates b (minimisation): a_k ≤ b_k
// for all k and a_k < b_k for some k.
func Dominates(a, b []float64) bool {
	strict := false
	for k := range a {
		if a[k] > b[k] {
			return false
		}
		if a[k] < b[k] {
			strict = true
		}
	}
	return strict
}

// WeaklyDominates reports whether a weakly dominates b (minimisation):
// a_k ≤ b_k for all k (search/REFERENCE.md §1.3).
func WeaklyDominates(a, b []float64) bool {
	for k := range a {
		if a[k] > b[k] {
			return false
		}
	}
	return true
}
