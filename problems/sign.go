package problems

// The search minimises every objective; a maximised score is negated on the
// way in and again on the way out. These are the only places that flip the
// sign.

// Minimised returns score value v as the search minimises it: −v when the
// objective is maximised, else v.
func (o Objective) Minimised(v float64) float64 {
	if o.Maximize {
		return -v
	}
	return v
}

// Natural returns a minimised objective value f in the score's own sign:
// the inverse of Minimised.
func (o Objective) Natural(f float64) float64 { return o.Minimised(f) }

// Minimised returns the objective values f (in the problem's order, the
// scores' own signs) as the search minimises them, in a new slice.
func (s *Spec) Minimised(f []float64) []float64 {
	out := make([]float64, len(f))
	for i, o := range s.Objectives {
		out[i] = o.Minimised(f[i])
	}
	return out
}

// Natural returns minimised objective values f in the scores' own signs,
// in a new slice: the inverse of Spec.Minimised.
func (s *Spec) Natural(f []float64) []float64 {
	out := make([]float64, len(f))
	for i, o := range s.Objectives {
		out[i] = o.Natural(f[i])
	}
	return out
}
