package results

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// runNames are the files and folders plica writes in a run folder.
var runNames = []string{RunFile, ProblemFile, EvaluationsFile, HistoryFile, FrontFile, DesignsDir, CheckpointFile, PrevCheckpoint,
	LockFile, "calibration", "plots", "report.html", PickedDir, ClosestDir}

// SamePath reports whether a and b name the same file or folder: the
// same file when both exist (links followed), else the same absolute
// path.
func SamePath(a, b string) bool {
	if a == "" || b == "" {
		return false
	}
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	if errA == nil && errB == nil {
		return os.SameFile(sa, sb)
	}
	pa, errA := filepath.Abs(a)
	pb, errB := filepath.Abs(b)
	return errA == nil && errB == nil && pa == pb
}

// RunFileName says whether path is (or lies in) one of the files or
// folders plica writes inside the run folder dir, and which: "" when it
// is not.
func RunFileName(dir, path string) string {
	da, err1 := filepath.Abs(dir)
	pa, err2 := filepath.Abs(path)
	if err1 != nil || err2 != nil {
		return ""
	}
	if rd, err := filepath.EvalSymlinks(da); err == nil {
		da = rd
	}
	if rp, err := filepath.EvalSymlinks(filepath.Dir(pa)); err == nil {
		pa = filepath.Join(rp, filepath.Base(pa))
	}
	rel, err := filepath.Rel(da, pa)
	if err != nil || rel == "." || strings.HasPrefix(rel, "..") {
		return ""
	}
	first := strings.SplitN(filepath.ToSlash(rel), "/", 2)[0]
	if slices.Contains(runNames, first) {
		return filepath.ToSlash(rel)
	}
	return ""
}

// CheckOutput refuses an output path (of the flag named, e.g. "-o") that
// is empty or names one of the inputs: the same file, or a file of an
// input run folder. Inputs that are run folders are given in runs, other
// input files in files. The error is an *InputError.
func CheckOutput(flag, out string, runs, files []string) error {
	if out == "" {
		return inputErrorf("%s: the name is empty (expected a path)", flag)
	}
	for _, in := range files {
		if SamePath(out, in) {
			return inputErrorf("%s %s is an input of this command (expected a new file, never one of its inputs)", flag, out)
		}
	}
	for _, r := range runs {
		if SamePath(out, r) {
			return inputErrorf("%s %s is the run folder given (expected a path outside it, or a new name)", flag, out)
		}
		if name := RunFileName(r, out); name != "" {
			return inputErrorf("%s %s is %s of the run folder %s, an input of this command (expected another path)", flag, out, name, r)
		}
	}
	return nil
}

// ProbeOutput checks, before any work, that a file can be written at
// path: it is not a folder and its folder exists and accepts files. The
// error is an *InputError naming the flag.
func ProbeOutput(flag, path string) error {
	if path == "" {
		return inputErrorf("%s: the name is empty (expected a path)", flag)
	}
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return inputErrorf("%s %s is a folder (expected a file name)", flag, path)
	}
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, ".probe-*")
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return inputErrorf("%s %s cannot be written: folder %s: %v", flag, path, dir, err)
	}
	name := tmp.Name()
	tmp.Close()
	return os.Remove(name)
}

// WriteAtomicAll writes several files as WriteAtomic does, all or none:
// every file goes to a temporary file first, and only when all are
// written are they renamed into place. On failure before the renames no
// target is touched.
func WriteAtomicAll(paths []string, data [][]byte) error {
	if len(paths) != len(data) {
		return fmt.Errorf("results: %d paths for %d contents", len(paths), len(data))
	}
	ps := make([]*pending, 0, len(paths))
	defer func() {
		for _, p := range ps {
			p.Abort() // nothing once renamed
		}
	}()
	for i, path := range paths {
		p, err := create(path)
		if err != nil {
			return err
		}
		ps = append(ps, p)
		_, err = p.Write(data[i])
		if err == nil {
			err = p.finish()
		}
		if err != nil {
			return fmt.Errorf("%s: %w", path, err)
		}
	}
	for i, p := range ps {
		if err := p.rename(); err != nil {
			if i > 0 {
				return fmt.Errorf("%w (written before it: %s)", err, strings.Join(paths[:i], ", "))
			}
			return err
		}
	}
	return nil
}

// CheckOutputFolder refuses a run folder to create (of the flag named)
// that is one of the input files, or would overwrite one: an input at a
// path plica writes inside the folder (DIR/problem.toml, say). The error
// is an *InputError.
func CheckOutputFolder(flag, dir string, inputs []string) error {
	if dir == "" {
		return inputErrorf("%s: the name is empty (expected a folder)", flag)
	}
	for _, in := range inputs {
		if SamePath(dir, in) {
			return inputErrorf("%s %s is an input of this command (expected a new folder)", flag, dir)
		}
		if name := RunFileName(dir, in); name != "" {
			return inputErrorf("%s %s would overwrite the input %s: the run writes its own %s there (expected another folder)", flag, dir, in, name)
		}
	}
	return nil
}
