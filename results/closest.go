package results

import (
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"plica/problems"
	"plica/search"
)

// ClosestDir holds the least-infeasible designs of a run whose front holds
// fewer than FewFeasible designs, as design files.
const ClosestDir = "closest"

// ClosestFileName is the path of least-infeasible design n (from 1, the
// closest first) inside a run folder.
func ClosestFileName(n int) string { return fmt.Sprintf("%s/design-%d.toml", ClosestDir, n) }

// writeClosest writes the least-infeasible designs as design files
// (closest/design-N.toml, all or none), each with its evaluation and
// margins in its comment header, and records each file's name in the
// diagnosis. least are the diagnoser's designs, in d.LeastInfeasible's
// order.
func writeClosest(f *Folder, spec *problems.Spec, info *RunInfo, d *Diagnosis, least []search.Design) error {
	if d == nil || len(least) == 0 {
		return nil
	}
	names := spec.ConstraintNames()
	paths := make([]string, len(least))
	texts := make([][]byte, len(least))
	for i, l := range least {
		var b strings.Builder
		fmt.Fprintf(&b, "plica least-infeasible design %d of a search on %s (seed %d, evaluation %d): it fails, overall violation %.6g.\n",
			i+1, info.ProblemFile, info.Seed, l.Index, finite(l.CV))
		b.WriteString("Constraint margins as the search uses them (<= 0 is satisfied):\n")
		for j, g := range l.G {
			if j >= len(names) {
				break
			}
			verdict := "met"
			if g > 0 {
				verdict = "VIOLATED"
			}
			fmt.Fprintf(&b, "g_%s = %.6g (%s)\n", names[j], g, verdict)
		}
		b.WriteString("See what limits it with: plica check THIS_FILE\n")
		b.WriteString(Caution)
		text, err := spec.DesignTOML(l.X, b.String())
		if err != nil {
			return err
		}
		paths[i], texts[i] = f.Path(ClosestFileName(i+1)), text
	}
	if err := os.MkdirAll(filepath.Join(f.Dir, ClosestDir), 0o755); err != nil {
		return err
	}
	if err := WriteAtomicAll(paths, texts); err != nil {
		return err
	}
	for i := range least {
		f.wrote(ClosestFileName(i + 1))
		if i < len(d.LeastInfeasible) {
			d.LeastInfeasible[i].DesignFile = ClosestFileName(i + 1)
		}
	}
	return nil
}

// removeStaleClosest removes the least-infeasible design files an earlier
// session of a resumed run wrote and this one did not rewrite (the front
// has grown, or fewer designs were kept), so the folder never holds a
// diagnosis file of another front.
func removeStaleClosest(f *Folder, earlier []string) error {
	for _, name := range earlier {
		if !strings.HasPrefix(name, ClosestDir+"/") || f.hasWritten(name) {
			continue
		}
		if err := os.Remove(f.Path(name)); err != nil && !os.IsNotExist(err) {
			return err
		}
	}
	return nil
}

// hasWritten reports whether this process wrote name into the folder.
func (f *Folder) hasWritten(name string) bool {
	return slices.Contains(f.written, filepath.ToSlash(name))
}
