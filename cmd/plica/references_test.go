package main

import (
	"bytes"
	"fmt"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// The repository documents itself: code, tests, README, DEVELOPERS.md and
// `plica verify` cite the model references that live beside the packages
// (objective/kinematics/REFERENCE.md and friends) by their path from the
// module root followed by "§N". TestReferenceCitations checks every such citation in every tracked file:
// the file must exist and have a numbered heading "## N." / "### N.M …" for
// the section. It also fails on citations of documents kept outside the
// repository, which a user who clones plica cannot read.

// citeRe matches a REFERENCE.md path with at least one directory, optionally followed (across a comment
// line break) by "§N(.N)*" and further ", §N" / " and §N" / "/§N" items.
var (
	citeRe = regexp.MustCompile(`([A-Za-z0-9_.-]+(?:/[A-Za-z0-9_.-]+)*/REFERENCE\.md)` +
		`((?:[ \t]*\n[ \t]*(?://|#|\*)?[ \t]*| )§ ?[0-9]+(?:\.[0-9]+)*(?:(?:,[ \t]*|[ \t]+and[ \t]+|/)§ ?[0-9]+(?:\.[0-9]+)*)*)?`)
	sectionRe = regexp.MustCompile(`§ ?([0-9]+(?:\.[0-9]+)*)`)
	headingRe = regexp.MustCompile(`(?m)^#{2,6}[ \t]+([0-9]+(?:\.[0-9]+)*)\.?[ \t]`)
	// Documents outside the repository (spelled in pieces so that this file
	// does not cite them itself).
	outsideRe = regexp.MustCompile(`\b` + "PHYS" + `ICS\b|\b` + "SEAR" + `CH\.md\b|\b` + "STY" + `LE\.md\b`)
)

// moduleRoot is the directory holding go.mod, two levels above cmd/plica.
func moduleRoot(t *testing.T) string {
	t.Helper()
	root, err := filepath.Abs(filepath.Join("..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(root, "go.mod")); err != nil {
		t.Fatalf("module root not found above cmd/plica: %v", err)
	}
	return root
}

// trackedFiles lists the repository's files relative to root: git ls-files
// when git knows the tree, otherwise a walk that skips .git.
func trackedFiles(t *testing.T, root string) []string {
	t.Helper()
	cmd := exec.Command("git", "-C", root, "ls-files", "-z")
	if out, err := cmd.Output(); err == nil && len(out) > 0 {
		var files []string
		for _, f := range bytes.Split(out, []byte{0}) {
			if len(f) > 0 {
				files = append(files, filepath.ToSlash(string(f)))
			}
		}
		return files
	}
	var files []string
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && d.Name() == ".git" {
			return filepath.SkipDir
		}
		if d.Type().IsRegular() {
			rel, err := filepath.Rel(root, p)
			if err != nil {
				return err
			}
			files = append(files, filepath.ToSlash(rel))
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return files
}

// referenceSections returns the numbered headings of a REFERENCE.md, or
// nil and false if the file does not exist.
func referenceSections(root, rel string, cache map[string]map[string]bool) (map[string]bool, bool) {
	if s, ok := cache[rel]; ok {
		return s, s != nil
	}
	data, err := os.ReadFile(filepath.Join(root, filepath.FromSlash(rel)))
	if err != nil {
		cache[rel] = nil
		return nil, false
	}
	s := map[string]bool{}
	for _, m := range headingRe.FindAllSubmatch(data, -1) {
		s[string(m[1])] = true
	}
	cache[rel] = s
	return s, true
}

// lineOf returns the 1-based line of byte offset off in data.
func lineOf(data []byte, off int) int { return bytes.Count(data[:off], []byte{'\n'}) + 1 }

// checkCitations returns one message "file:line: …" per bad citation in the
// text of file rel.
func checkCitations(root, rel string, data []byte, cache map[string]map[string]bool) []string {
	var bad []string
	for _, m := range citeRe.FindAllSubmatchIndex(data, -1) {
		target := string(data[m[2]:m[3]])
		line := lineOf(data, m[0])
		secs, ok := referenceSections(root, target, cache)
		if !ok {
			bad = append(bad, fmt.Sprintf("%s:%d: cites %s, which does not exist", rel, line, target))
			continue
		}
		if m[4] < 0 {
			continue // the file as a whole
		}
		for _, s := range sectionRe.FindAllSubmatch(data[m[4]:m[5]], -1) {
			if !secs[string(s[1])] {
				bad = append(bad, fmt.Sprintf("%s:%d: cites %s §%s, which has no such section heading", rel, line, target, s[1]))
			}
		}
	}
	for _, m := range outsideRe.FindAllIndex(data, -1) {
		end := bytes.IndexByte(data[m[0]:], '\n')
		if end < 0 {
			end = len(data) - m[0]
		}
		ctx := strings.TrimSpace(string(data[m[0] : m[0]+min(end, 60)]))
		bad = append(bad, fmt.Sprintf("%s:%d: cites a document outside the repository: %s", rel, lineOf(data, m[0]), ctx))
	}
	return bad
}

func TestReferenceCitations(t *testing.T) {
	root := moduleRoot(t)
	cache := map[string]map[string]bool{}
	var bad []string
	checked := 0
	for _, rel := range trackedFiles(t, root) {
		data, err := os.ReadFile(filepath.Join(root, filepath.FromSlash(rel)))
		if err != nil {
			if os.IsNotExist(err) {
				continue // deleted in the work tree, still in the index
			}
			t.Fatal(err)
		}
		if bytes.IndexByte(data, 0) >= 0 {
			continue // binary
		}
		checked++
		bad = append(bad, checkCitations(root, rel, data, cache)...)
	}
	if checked == 0 {
		t.Fatal("no files checked")
	}
	for _, b := range bad {
		t.Error(b)
	}
}

// TestReferenceCitationChecker feeds the checker known good and bad text, so
// the repository-wide test cannot pass by matching nothing.
func TestReferenceCitationChecker(t *testing.T) {
	root := t.TempDir()
	if err := os.MkdirAll(filepath.Join(root, "pkg"), 0o755); err != nil {
		t.Fatal(err)
	}
	ref := "# Title\n\n## 1. One\n\n### 1.1 Sub\n\n## 2. Two\n"
	if err := os.WriteFile(filepath.Join(root, "pkg", "REFERENCE.md"), []byte(ref), 0o644); err != nil {
		t.Fatal(err)
	}
	// The citations are assembled at run time so that this file does not
	// itself cite the temporary reference.
	pkg, other := "pkg/REFERENCE"+".md", "other/REFERENCE"+".md"
	sect := "\u00a7" // the section sign, kept out of the outside names below
	cases := []struct {
		text string
		bad  int
	}{
		{"// see " + pkg + " §1.1 and " + pkg + " §2.", 0},
		{"// see " + pkg + "\n// §1.1, §2 and §1", 0},
		{"// see " + pkg + " for the model", 0},
		{"// see " + pkg + " §1.2", 1},
		{"// see " + pkg + " §1, §3/§4", 2},
		{"// see " + other + " §1", 1},
		{"// see " + other, 1},
		{"// see " + "PHYS" + "ICS " + sect + "3.2 and " + "SEAR" + "CH.md " + sect + "1 and " + "STY" + "LE.md", 3},
	}
	for _, c := range cases {
		got := checkCitations(root, "x.go", []byte(c.text), map[string]map[string]bool{})
		if len(got) != c.bad {
			t.Errorf("%q: %d findings %v, want %d", c.text, len(got), got, c.bad)
		}
	}
}
