package problems

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"path/filepath"
)

// resolveRel resolves a path written in the file relative to the file.
func (s *Spec) resolveRel(rel string) string {
	if filepath.IsAbs(rel) {
		return rel
	}
	return filepath.Join(filepath.Dir(s.File), rel)
}

// Portable returns the problem as a problem file with every
// calibration_file pointing into a calibration/ folder beside it, and the
// calibration files to put there (by their new relative path; the content
// read when the problem was parsed). A run folder that stores both loads
// wherever it is moved. A problem that names no calibration file is its
// own text; one that does is written from its typed form (comments are
// not kept).
func (s *Spec) Portable() (text []byte, files map[string][]byte, err error) {
	files = map[string][]byte{}
	if len(s.cals) == 0 {
		return s.Text, files, nil
	}
	renamed := map[string]string{}
	used := map[string]bool{}
	form, err := s.formWithCalibrations(func(rel string) (string, error) {
		if renamed[rel] == "" {
			f := s.cals[s.resolveRel(rel)]
			if f == nil || f.err != nil {
				return "", fmt.Errorf("calibration file %s was not read with the problem", rel)
			}
			name := "calibration/" + filepath.Base(rel)
			for k := 2; used[name]; k++ {
				name = fmt.Sprintf("calibration/%d-%s", k, filepath.Base(rel))
			}
			used[name] = true
			renamed[rel] = name
			files[name] = f.data
		}
		return renamed[rel], nil
	})
	if err != nil {
		return nil, nil, err
	}
	var buf bytes.Buffer
	buf.WriteString("# plica problem, as read from the file the run was started with; calibration files in calibration/.\n")
	if err := encodeForm(&buf, form); err != nil {
		return nil, nil, err
	}
	return buf.Bytes(), files, nil
}

// Hash identifies the problem for checkpoints: a resumed run must use the
// same problem. It covers the problem's typed form with each
// calibration_file path replaced by the hash of that file's content (as
// read when the problem was parsed), so the portable copy in a run folder
// hashes like the original, wherever the folder is moved, and a changed
// calibration changes the hash. Comments and layout do not count.
func (s *Spec) Hash() string {
	form, _ := s.formWithCalibrations(func(rel string) (string, error) { // never fails
		if f := s.cals[s.resolveRel(rel)]; f != nil {
			h := sha256.Sum256(f.data)
			return "sha256:" + hex.EncodeToString(h[:]), nil
		}
		return rel, nil
	})
	var buf bytes.Buffer
	if err := encodeForm(&buf, form); err != nil {
		buf.WriteString(err.Error())
	}
	h := sha256.Sum256(buf.Bytes())
	return hex.EncodeToString(h[:8])
}

// formWithCalibrations is a copy of the problem's typed form in which the
// calibration_file of every bellows that names one is replaced by what
// replace returns for it (the path as written); the first error stops it.
func (s *Spec) formWithCalibrations(replace func(rel string) (string, error)) (problemForm, error) {
	form := s.form
	form.Bellows = cloneBellows(form.Bellows)
	for i := range form.Bellows {
		b := &form.Bellows[i]
		if b.CalibrationFile == nil {
			continue
		}
		name, err := replace(*b.CalibrationFile)
		if err != nil {
			return problemForm{}, err
		}
		b.CalibrationFile = &name
	}
	return form, nil
}
