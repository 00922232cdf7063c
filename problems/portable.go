package problems

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
)

// calibrationLine matches a one-line calibration_file = "PATH" assignment.
var calibrationLine = regexp.MustCompile(`(?m)^(\s*calibration_file\s*=\s*)"([^"\\]*)"`)

// resolveRel resolves a path written in the file relative to the file.
func (s *Spec) resolveRel(rel string) string {
	if filepath.IsAbs(rel) {
		return rel
	}
	return filepath.Join(filepath.Dir(s.File), rel)
}

// Portable returns the problem text with every calibration_file pointing
// into a calibration/ folder beside it, and the calibration files to put
// there (by their new relative path). A run folder that stores both loads
// wherever it is moved.
func (s *Spec) Portable() (text []byte, files map[string][]byte, err error) {
	files = map[string][]byte{}
	renamed := map[string]string{}
	used := map[string]bool{}
	for _, m := range s.bellowsTables() {
		rel, ok := m["calibration_file"].(string)
		if !ok || renamed[rel] != "" {
			continue
		}
		data, err := os.ReadFile(s.resolveRel(rel))
		if err != nil {
			return nil, nil, fmt.Errorf("calibration file %s: %w", rel, err)
		}
		name := "calibration/" + filepath.Base(rel)
		for k := 2; used[name]; k++ {
			name = fmt.Sprintf("calibration/%d-%s", k, filepath.Base(rel))
		}
		used[name] = true
		renamed[rel] = name
		files[name] = data
	}
	out := calibrationLine.ReplaceAllStringFunc(string(s.Text), func(line string) string {
		m := calibrationLine.FindStringSubmatch(line)
		if n, ok := renamed[m[2]]; ok {
			return m[1] + `"` + n + `"`
		}
		return line
	})
	return []byte(out), files, nil
}

func (s *Spec) bellowsTables() []map[string]any {
	bs, _ := s.base["bellows"].([]map[string]any)
	return bs
}

// Hash identifies the problem for checkpoints: a resumed run must use the
// same problem. It covers the file text with each calibration_file path
// replaced by the hash of that file's content, so the portable copy in a
// run folder has the same hash as the original.
func (s *Spec) Hash() string {
	text := calibrationLine.ReplaceAllStringFunc(string(s.Text), func(line string) string {
		m := calibrationLine.FindStringSubmatch(line)
		data, err := os.ReadFile(s.resolveRel(m[2]))
		if err != nil {
			return line
		}
		h := sha256.Sum256(data)
		return m[1] + `"sha256:` + hex.EncodeToString(h[:]) + `"`
	})
	h := sha256.Sum256([]byte(text))
	return hex.EncodeToString(h[:8])
}

// inlineCalibration replaces calibration_file in a resolved design map by
// the calibration_factor it stands for, so a written design needs no other
// file. It returns the files it inlined.
func (s *Spec) inlineCalibration(m map[string]any) []string {
	var names []string
	bs, _ := m["bellows"].([]map[string]any)
	for _, b := range bs {
		rel, ok := b["calibration_file"].(string)
		if !ok {
			continue
		}
		c, err := cachedCalibration(s.resolveRel(rel))
		if err != nil {
			continue // the design would not have loaded; leave the reference
		}
		delete(b, "calibration_file")
		b["calibration_factor"] = []any{roundSig(c.Factor[0].Value, 9), roundSig(c.Factor[1].Value, 9)}
		names = append(names, rel)
	}
	return names
}

func joinNames(names []string) string { return strings.Join(names, ", ") }
