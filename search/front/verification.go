package front

// VerificationCase is a published (or derived) value that this package's
// production code must reproduce. plica verify prints it (package
// results/verify gathers the cases of every model package) and the
// package's tests run it; the value is written here and nowhere else.
type VerificationCase struct {
	Area      string // the heading plica verify lists it under
	Name      string
	Unit      string
	Published float64
	Tolerance float64 // relative to |Published| when Relative, else absolute
	Relative  bool
	Source    string // where Published comes from: author, title, year, equation or table
	Slow      bool   // left out by plica verify -quick and go test -short
	Compute   func() (float64, error)
}

// VerificationCases returns the package's verification cases: the exact
// hypervolume of hand-checkable sets in two, three and four objectives.
func VerificationCases() []VerificationCase {
	return []VerificationCase{
		{Area: "indicators", Name: "hypervolume {(1,3),(2,2),(3,1)} at (4,4)",
			Published: 6, Tolerance: 1e-12,
			Source: "derived by strips 3·1 + 2·1 + 1·1; search/front/REFERENCE.md §1.1",
			Compute: func() (float64, error) {
				return Hypervolume([][]float64{{1, 3}, {2, 2}, {3, 1}}, []float64{4, 4}), nil
			}},
		// Slicing = WFG = inclusion–exclusion.
		{Area: "indicators", Name: "hypervolume {(1,2,3),(2,3,1),(3,1,2),(2,2,2)} at (4,4,4)",
			Published: 14, Tolerance: 1e-12,
			Source: "derived by inclusion–exclusion; search/front/REFERENCE.md §1.1",
			Compute: func() (float64, error) {
				return Hypervolume([][]float64{{1, 2, 3}, {2, 3, 1}, {3, 1, 2}, {2, 2, 2}}, []float64{4, 4, 4}), nil
			}},
		// 24 + 24 + 81 − 4 − 18 − 18 + 4.
		{Area: "indicators", Name: "hypervolume {(1,2,3,4),(4,3,2,1),(2,2,2,2)} at (5,5,5,5) (WFG)",
			Published: 93, Tolerance: 1e-12,
			Source: "derived by inclusion–exclusion; search/front/REFERENCE.md §1.1",
			Compute: func() (float64, error) {
				return Hypervolume([][]float64{{1, 2, 3, 4}, {4, 3, 2, 1}, {2, 2, 2, 2}}, []float64{5, 5, 5, 5}), nil
			}},
	}
}
