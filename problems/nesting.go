package problems

import (
	"fmt"
	"math"

	"plica/objective"
)

// checkNesting refuses ranges that can never nest: a pair of neighbouring
// bellows for which no candidate in the box nests, in length (at the base
// insertions, as a design file is checked) or in diameter (the inner
// bellows' crowns would cut into the outer bellows' roots, or into its
// crowns when threaded). lo and hi are the design with every variable at
// its lower and at its upper bound; each length and diameter grows with
// its own key only, so the extremes of each pair are at those bounds.
func checkNesting(r *reader, lo, hi *objective.Design, ins [][2]float64) {
	const m2mm = 1 / mm
	for i := 0; i+1 < len(lo.Bellows) && i+1 < len(hi.Bellows); i++ {
		in, out := i, i+1
		// Lengths: the inner bellows must reach at least as far as the
		// outer one (the nesting inequalities of
		// kinematics.Robot.CheckActuation, insertions at the lower ends of
		// their ranges).
		reachIn := ins[in][0] + hi.Bellows[in].StraightLength + hi.Bellows[in].CurvedLength
		reachOut := ins[out][0] + lo.Bellows[out].StraightLength + lo.Bellows[out].CurvedLength
		if reachIn < reachOut-1e-12*math.Max(math.Abs(reachIn), math.Abs(reachOut)) {
			r.errorf(fmt.Sprintf("bellows[%d]", in+1), "the ranges can never nest: bellows %d reaches at most %s mm beyond the base but bellows %d around it at least %s mm (expected ranges in which the inner bellows can reach at least as far as the outer one)",
				in+1, fmtNum(reachIn*m2mm), out+1, fmtNum(reachOut*m2mm))
			continue
		}
		// Diameters, when both are known.
		oLo, oHi := lo.Bellows[out].Model, hi.Bellows[out].Model
		if oLo == nil || oHi == nil {
			continue
		}
		var odIn, depthIn float64 // smallest inner outer diameter, largest inner depth
		switch b := lo.Bellows[in]; {
		case b.Model != nil:
			odIn = b.Model.OuterDiameter
			depthIn = hi.Bellows[in].Model.Depth
		case b.Measured != nil && b.Measured.OuterDiameter > 0:
			odIn = b.Measured.OuterDiameter
		default:
			continue
		}
		// The largest radii of the outer bellows: widest, shallowest, thinnest.
		crownInside := oHi.OuterDiameter/2 - oLo.Wall
		rootInside := crownInside - oLo.Depth
		threaded := lo.Bellows[in].ThreadLead > 0 && lo.Bellows[in].Model != nil
		crest, root := nestGaps(crownInside, rootInside, odIn, depthIn, threaded)
		gap := math.Min(crest, root)
		if gap >= 0 {
			continue
		}
		what := fmt.Sprintf("the inside of its roots at most %s mm across", fmtNum(2*rootInside*m2mm))
		switch {
		case threaded && crest >= 0:
			what = fmt.Sprintf("the inside of its roots at most %s mm across, around inner roots at least %s mm", fmtNum(2*rootInside*m2mm), fmtNum((odIn-2*depthIn)*m2mm))
		case threaded:
			what = fmt.Sprintf("the inside of its crowns at most %s mm across and of its roots %s mm", fmtNum(2*crownInside*m2mm), fmtNum(2*rootInside*m2mm))
		}
		msg := fmt.Sprintf("the ranges can never nest: bellows %d is at least %s mm across but bellows %d around it has %s (expected ranges in which the inner bellows fits inside the outer one)",
			in+1, fmtNum(odIn*m2mm), out+1, what)
		if hint, ok := objective.OrderHint(in+1, gap, oLo.Wall); ok {
			msg += "; even at its best, " + hint
		}
		r.errorf(fmt.Sprintf("bellows[%d].outer_diameter_mm", in+1), "%s", msg)
	}
}

// nestGaps are the radial gaps, m, of an inner bellows of outer diameter
// od and depth depth inside an outer bellows whose inside radii are
// crownInside at its crowns and rootInside at its roots, by the
// inequalities of the clearance check (objective/margins.go). Unthreaded,
// the inner crowns must clear the outer roots (root; crest is +Inf);
// threaded, the inner crowns run in the outer crowns (crest) and the inner
// roots inside the outer roots (root). They nest when both are >= 0.
func nestGaps(crownInside, rootInside, od, depth float64, threaded bool) (crest, root float64) {
	if !threaded {
		return math.Inf(1), rootInside - od/2
	}
	return crownInside - od/2, rootInside - (od/2 - depth)
}
