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
	form := s.form
	form.Bellows = cloneBellows(form.Bellows)
	for i := range form.Bellows {
		b := &form.Bellows[i]
		if b.CalibrationFile == nil {
			continue
		}
		rel := *b.CalibrationFile
		if renamed[rel] == "" {
			f := s.cals[s.resolveRel(rel)]
			if f == nil || f.err != nil {
				return nil, nil, fmt.Errorf("calibration file %s was not read with the problem", rel)
			}
			name := "calibration/" + filepath.Base(rel)
			for k := 2; used[name]; k++ {
				name = fmt.Sprintf("calibration/%d-%s", k, filepath.Base(rel))
			}
			used[name] = true
			renamed[rel] = name
			files[name] = f.data
		}
		name := renamed[rel]
		b.CalibrationFile = &name
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
	form := s.form
	form.Bellows = cloneBellows(form.Bellows)
	for i := range form.Bellows {
		b := &form.Bellows[i]
		if b.CalibrationFile == nil {
			continue
		}
		if f := s.cals[s.resolveRel(*b.CalibrationFile)]; f != nil {
			h := sha256.Sum256(f.data)
			ref := "sha256:" + hex.EncodeToString(h[:])
			b.CalibrationFile = &ref
		}
	}
	var buf bytes.Buffer
	if err := encodeForm(&buf, form); err != nil {
		buf.WriteString(err.Error())
	}
	h := sha256.Sum256(buf.Bytes())
	return hex.EncodeToString(h[:8])
}
