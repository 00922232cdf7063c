package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"text/tabwriter"

	"plica/results"
)

func init() {
	register(&command{
		name:  "pick",
		usage: "RUN [-knee | -weights W1,W2,... [-by pseudo|compromise]] [-where EXPR ...] [-n N] [-o DIR] [-json]",
		short: "choose designs from a run's front and write them as design files",
		long: `-where EXPR keeps the front designs whose front.csv column passes a
comparison: COLUMN OP VALUE with OP one of < <= > >= == != (quote it in the
shell: -where 'tip_sag_mm<2'); repeat it to AND several. Then, among those:
  -knee     the design farthest from the hyperplane through the extreme
            designs, towards the ideal point, in normalised objectives
            (Das 1999; Branke et al. 2004);
  -weights  one weight per objective, in problem order: a larger weight
            favours designs better in that objective. -by pseudo (default)
            picks the design whose pseudo-weights (Deb 2001) are closest
            to the weights; -by compromise the least weighted Chebyshev
            distance to the ideal point.
Without -knee or -weights every design that passes -where is picked. -n
picks the N best. Each pick is written as DIR/pick-ID.toml (default
RUN/picked), which check and pose accept; refine RUN -design ID polishes it.
Exit status 1 when no design passes the filters.`,
		run: runPick,
	})
}

// stringList is a repeatable string flag.
type stringList []string

func (s *stringList) String() string     { return strings.Join(*s, " ") }
func (s *stringList) Set(v string) error { *s = append(*s, v); return nil }

func runPick(ctx context.Context, fs *flag.FlagSet, args []string, stdout, stderr io.Writer) error {
	var where stringList
	fs.Var(&where, "where", "keep designs whose front.csv column passes `EXPR`, e.g. 'tip_sag_mm<2' (repeatable, ANDed)")
	knee := fs.Bool("knee", false, "pick the knee of the front")
	weights := fs.String("weights", "", "pick by `W1,W2,...`, one weight per objective (larger: that objective matters more)")
	by := fs.String("by", "pseudo", "how -weights picks: `pseudo` (pseudo-weights, Deb 2001) or compromise (weighted Chebyshev)")
	n := fs.Int("n", 1, "number of designs -knee or -weights picks, best first")
	out := fs.String("o", "", "`folder` for the design files (default RUN/picked)")
	asJSON := fs.Bool("json", false, "print JSON instead of a table")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("pick: expected one run folder, got %d arguments", len(pos))
	}
	opt := results.PickOptions{Count: *n}
	for _, w := range where {
		c, err := results.ParseCondition(w)
		if err != nil {
			return usagef("-where: %v", err)
		}
		opt.Where = append(opt.Where, c)
	}
	switch {
	case *knee && *weights != "":
		return usagef("pick: -knee and -weights exclude each other (expected one of them, or neither with -where)")
	case *knee:
		opt.Method = results.PickKnee
	case *weights != "":
		w, err := floatList("weights", *weights)
		if err != nil {
			return err
		}
		opt.Weights = w
		switch *by {
		case "pseudo":
			opt.Method = results.PickPseudoWeights
		case "compromise":
			opt.Method = results.PickCompromise
		default:
			return usagef("-by: %q is not a method (expected: pseudo|compromise)", *by)
		}
	case len(where) == 0:
		return usagef("pick: expected -knee, -weights or -where")
	}
	if *n < 1 {
		return usagef("-n: expected a number of designs >= 1")
	}
	if err := emptyFlags(fs, "o"); err != nil {
		return err
	}
	if *out != "" && !results.SamePath(*out, filepath.Join(pos[0], results.PickedDir)) {
		if err := results.CheckOutput("-o", *out, pos, nil); err != nil {
			return err
		}
		if st, err := os.Stat(*out); err == nil && !st.IsDir() {
			return usagef("-o %s is a file (expected a folder for the design files)", *out)
		}
	}
	// pick reads front.csv and copies designs/front-NNN.toml, which a live
	// search rewrites between generations: the two could disagree. Writing
	// into the run folder (RUN/picked) it holds the lock, as a search does;
	// writing elsewhere it only checks that no live process holds it.
	if *out == "" || results.SamePath(*out, filepath.Join(pos[0], results.PickedDir)) {
		folder := &results.Folder{Dir: filepath.Clean(pos[0])}
		if results.Exists(folder.Path(results.RunFile)) {
			if err := folder.Lock(); err != nil {
				return err
			}
			defer folder.Unlock()
			if n := folder.LockNote(); n != "" {
				fmt.Fprintf(stderr, "plica: note: %s\n", n)
			}
		}
	} else if err := results.CheckUnlocked(pos[0]); err != nil {
		return err
	}
	rf, err := results.LoadRunFrontContext(ctx, pos[0])
	if err != nil {
		return err
	}
	res, err := rf.Pick(opt)
	if err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	dir := *out
	if dir == "" {
		dir = filepath.Join(rf.Dir, results.PickedDir)
	}
	if err := rf.WritePicks(dir, res); err != nil {
		return err
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(res); err != nil {
			return err
		}
	} else {
		writePick(stdout, res)
	}
	if len(res.Picked) == 0 {
		return &failure{msg: fmt.Sprintf("no front design of %s passes %s", rf.Dir, strings.Join(res.Where, " and "))}
	}
	return nil
}

func writePick(w io.Writer, res *results.PickResult) {
	fmt.Fprintf(w, "picked %d of %d front designs of %s; %s\n", len(res.Picked), res.FrontSize, res.Run, res.Method)
	if len(res.Where) > 0 {
		fmt.Fprintf(w, "filters: %s (%d designs pass)\n", strings.Join(res.Where, " and "), res.Candidates)
	}
	if len(res.Picked) == 0 {
		return
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	scoreName := res.ScoreName
	if scoreName == "" {
		scoreName = "score"
	}
	fmt.Fprintf(tw, "id\t%s\t%s\tfile\n", strings.Join(res.Objectives, "\t"), scoreName)
	for _, p := range res.Picked {
		cells := make([]string, len(p.Objectives))
		for i, v := range p.Objectives {
			cells[i] = fmt.Sprintf("%.6g", v)
		}
		score := "-"
		if s := float64(p.Score); s == s {
			score = fmt.Sprintf("%.4g", s)
		}
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\n", p.ID, strings.Join(cells, "\t"), score, p.File)
	}
	tw.Flush()
	for _, n := range res.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	p := res.Picked[0]
	fmt.Fprintf(w, "check with: plica check %s; polish with: plica refine %s -design %d\n", p.File, res.Run, p.ID)
}
