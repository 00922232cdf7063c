package main

import (
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"plica/objective"
)

// taskPointLine is one entry of check -json "task_points" (a contract:
// fields may be added, none renamed or removed).
type taskPointLine struct {
	Index      int    `json:"index"`
	Reached    bool   `json:"reached"`
	Distance   num    `json:"distance_mm"`
	Miss       num    `json:"miss_mm"`
	AngleMiss  num    `json:"angle_miss_deg"`
	ClosestTip [3]num `json:"closest_tip_mm"`
	Angles     []num  `json:"angles_deg"`
	Insertions []num  `json:"insertions_mm"`
	Loaded     bool   `json:"loaded"`
}

func taskPointLines(sc *objective.Scores) []taskPointLine {
	out := make([]taskPointLine, len(sc.TaskMisses))
	for i, m := range sc.TaskMisses {
		l := taskPointLine{Index: i + 1, Reached: m.Reached, Distance: num(m.Distance * 1e3), Miss: num(m.Miss * 1e3),
			AngleMiss: num(m.AngleMiss * 180 / math.Pi), Loaded: m.Loaded, Angles: []num{}, Insertions: []num{}}
		for k := range 3 {
			l.ClosestTip[k] = num(m.ClosestTip[k] * 1e3)
		}
		for _, th := range m.Actuation.Theta {
			l.Angles = append(l.Angles, num(math.Mod(math.Mod(th*180/math.Pi, 360)+360, 360)))
		}
		for _, b := range m.Actuation.Beta {
			l.Insertions = append(l.Insertions, num(b*1e3))
		}
		out[i] = l
	}
	return out
}

// writeTaskPoints prints the task point table of check.
func writeTaskPoints(w io.Writer, sc *objective.Scores) {
	if len(sc.TaskMisses) == 0 {
		return
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "task point\treached\tdistance mm\tmiss mm\tangle miss deg\tclosest tip mm\tangles deg\tshape")
	for _, l := range taskPointLines(sc) {
		shape := "unloaded"
		if l.Loaded {
			shape = "loaded (exact rod model)"
		}
		ang := ""
		for k, a := range l.Angles {
			if k > 0 {
				ang += ","
			}
			ang += fmt.Sprintf("%.1f", float64(a))
		}
		fmt.Fprintf(tw, "%d\t%v\t%s\t%s\t%s\t[%.4g, %.4g, %.4g]\t%s\t%s\n", l.Index, l.Reached, fmtNum(float64(l.Distance)), fmtNum(float64(l.Miss)),
			fmtNum(float64(l.AngleMiss)), float64(l.ClosestTip[0]), float64(l.ClosestTip[1]), float64(l.ClosestTip[2]), ang, shape)
	}
	tw.Flush()
	fmt.Fprintln(w)
}

// limitSentences says, one line per failed check, what limits the design
// and by how much.
func limitSentences(res *objective.Result) []string {
	var out []string
	for _, c := range res.Checks {
		if c.Pass || c.Warn {
			continue
		}
		short := c.Limit - c.Value
		word := "short of"
		if c.Max {
			short, word = c.Value-c.Limit, "over"
		}
		unit := ""
		if c.Unit != "" {
			unit = " " + c.Unit
		}
		out = append(out, fmt.Sprintf("limited by %s: %s%s, %s the limit %s%s by %s%s", c.Name, fmtNum(c.Value), unit, word, fmtNum(c.Limit), unit, fmtNum(short), unit))
	}
	return out
}
