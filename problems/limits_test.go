package problems

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// nestedInline is a = {b = {b = ... 1 ...}} with n inline tables.
func nestedInline(n int) []byte {
	return []byte("a = " + strings.Repeat("{b = ", n) + "1" + strings.Repeat("}", n) + "\n")
}

// TestDepthLimitBeforeDecoding: a file nested 3000 deep (minutes and
// gigabytes inside the TOML decoder before the limit) is refused by every
// TOML reader with one positioned line, as is a 300 kB one.
func TestDepthLimitBeforeDecoding(t *testing.T) {
	for _, data := range [][]byte{nestedInline(3000), nestedInline(300 << 10 / 6)} {
		_, _, errD := ParseDesign(data, "d.toml")
		_, errP := ParseProblem(data, "p.toml")
		_, errC := ParseCalibration(data, "c.toml")
		for _, err := range []error{errD, errP, errC} {
			var e *Error
			require.True(t, errors.As(err, &e), "%v", err)
			assert.True(t, IsInputError(err))
			assert.Equal(t, 1, e.Line)
			assert.Equal(t, 4+5*(MaxDepth-1)+4, e.Col, "at the '=' of the key one level too deep")
			assert.Equal(t, "a", e.Key)
			assert.Contains(t, e.Msg, "nested deeper than 32 levels (expected")
			assert.NotContains(t, err.Error(), "\n")
		}
	}
}

// TestDepthLimitEdge: exactly MaxDepth levels decode; one more does not,
// however the levels are made (inline tables, arrays, dotted keys, table
// headers); strings and comments do not count.
func TestDepthLimitEdge(t *testing.T) {
	deep := func(open, close string, n int) string {
		return "a = " + strings.Repeat(open, n) + "1" + strings.Repeat(close, n) + "\n"
	}
	dotted := func(n int) string { return strings.Repeat("k.", n-1) + "k = 1\n" }
	header := func(n int) string { return "[" + strings.Repeat("t.", n-1) + "t]\nx = 1\n" }
	for _, c := range []struct {
		name     string
		ok, fail string
	}{
		{"inline tables", deep("{b = ", "}", MaxDepth-1), deep("{b = ", "}", MaxDepth)},
		{"arrays", deep("[", "]", MaxDepth-1), deep("[", "]", MaxDepth)},
		{"dotted keys", dotted(MaxDepth), dotted(MaxDepth + 1)},
		{"headers", header(MaxDepth - 1), header(MaxDepth)},
		{"dotted keys in inline tables", "a = {" + strings.TrimSuffix(dotted(MaxDepth-1), "\n") + "}\n", "a = {" + strings.TrimSuffix(dotted(MaxDepth), "\n") + "}\n"},
	} {
		t.Run(c.name, func(t *testing.T) {
			assert.NoError(t, checkTOMLBounds([]byte(c.ok), "f.toml", "TOML file"), c.ok)
			assert.Error(t, checkTOMLBounds([]byte(c.fail), "f.toml", "TOML file"), c.fail)
		})
	}
	quoted := "a = \"" + strings.Repeat("{[", 100) + "\"\nb = '" + strings.Repeat("[", 100) + "'\n# " + strings.Repeat("{", 100) +
		"\nc = \"\"\"\n" + strings.Repeat("[", 100) + "\n\"\"\"\nd = '''" + strings.Repeat("{", 100) + "'''\ne.\"x.y.z\" = 1\n"
	assert.NoError(t, checkTOMLBounds([]byte(quoted), "f.toml", "TOML file"))
	for _, f := range append(globT(t, "examples/*.toml"), globT(t, "testdata/calibration/*.toml")...) {
		data, err := os.ReadFile(f)
		require.NoError(t, err)
		assert.NoError(t, checkTOMLBounds(data, f, "TOML file"), f)
	}
}

func globT(t *testing.T, pattern string) []string {
	files, err := filepath.Glob(pattern)
	require.NoError(t, err)
	require.NotEmpty(t, files)
	return files
}

// TestSizeLimit: files above 8 MB are refused, read or given as bytes, by
// every reader, with one line naming the file.
func TestSizeLimit(t *testing.T) {
	dir := t.TempDir()
	big := bytes.Repeat([]byte("# padding padding padding padding\n"), MaxFileSize/34+1)
	require.Greater(t, len(big), MaxFileSize)
	path := filepath.Join(dir, "big.toml")
	require.NoError(t, os.WriteFile(path, big, 0o644))
	csvPath := filepath.Join(dir, "big.csv")
	require.NoError(t, os.WriteFile(csvPath, big, 0o644))
	_, _, e1 := LoadDesign(path)
	_, e2 := LoadProblem(path)
	_, e3 := LoadCalibration(path)
	_, e4 := LoadBench(csvPath)
	_, _, e5 := ParseDesign(big, "x.toml")
	_, e6 := ParseBench(big, "x.csv")
	for i, err := range []error{e1, e2, e3, e4, e5, e6} {
		require.Error(t, err, "reader %d", i+1)
		assert.True(t, IsInputError(err))
		assert.Regexp(t, `^[^\n]*(big|x)\.(toml|csv): \d+ bytes is too large \(expected an? [A-Za-z ]+ of at most 8388608 bytes, 8 MB\)$`, err.Error())
	}
	// At the limit a file is read.
	ok := append(bytes.Repeat([]byte("#"), MaxFileSize-1), '\n')
	require.NoError(t, os.WriteFile(path, ok, 0o644))
	data, err := readInput(path, "design file")
	require.NoError(t, err)
	assert.Len(t, data, MaxFileSize)
	// A device is not a regular file.
	if _, err := os.Stat("/dev/zero"); err == nil {
		_, _, err := LoadDesign("/dev/zero")
		assert.EqualError(t, err, "/dev/zero: cannot read: not a regular file (expected a design file)")
	}
}

// TestSyntaxErrorsSayWhatWasExpected: every syntax error of the TOML
// decoder, reworded where needed, says what was expected, on one line.
func TestSyntaxErrorsSayWhatWasExpected(t *testing.T) {
	for _, text := range []string{
		"a = ", "a = [1, 2", "x = 1 1", "a = \"abc", "a = 1\na = 2", "a = {b = 1", "a = 1979-05-", "a = tru", "= 1",
		"a = 0x\n", "a = [1,,2]", "a = 'x", "a = 1__0", "a = \"\\q\"", "a = 99999999999999999999", "a = 0o9",
		"[a]\n[a]", "a = 1.e5", "a = +0x1", "a = \"\x01\"", "a = \"\xff\"", "[[a]]\n[a]", "a = 1\n[a]",
		"[a\n", "[[a]\n", "a = 1e", "a = .5", "a = \"\"\"x",
	} {
		_, _, err := ParseDesign([]byte(text), "s.toml")
		var e *Error
		require.True(t, errors.As(err, &e), "%q: %v", text, err)
		assert.True(t, strings.HasPrefix(e.Msg, "syntax error: "), "%q: %v", text, err)
		assert.Regexp(t, `\bexpected\b`, e.Msg, "%q", text)
		assert.NotContains(t, err.Error(), "\n", "%q", text)
		assert.Greater(t, e.Line, 0, "%q", text)
	}
}

// TestSyntaxErrorPositions: a syntax error names the array-table element
// it is in (the decoder gives "bellows.wall_mm"), and a control character is
// reported where it is, not where the decoder's token ended.
func TestSyntaxErrorPositions(t *testing.T) {
	for _, c := range []struct{ text, want string }{
		{"[[bellows]]\nwall_mm = 1\n[[bellows]]\nwall_mm = = 3\n", "s.toml:4:11: bellows[2].wall_mm: syntax error: expected value"},
		{"[[bellows]]\n[bellows.calibration]\nx = = 1\n", "s.toml:3:5: bellows[1].calibration.x: syntax error: expected value"},
		{"[load]\npayload_g = = 3\n", "s.toml:2:13: load.payload_g: syntax error: expected value"},
		{"name = \"x\"\n\n[[bellows]]\n\x01straight_length_mm = 1\n", "s.toml:4:1: bellows[1]: syntax error: control character '0x01'"},
		{"a = 1\r\nb = \"x\x7f\"\n", "s.toml:2:7: b: syntax error: control character '0x7f'"},
	} {
		_, _, err := ParseDesign([]byte(c.text), "s.toml")
		require.Error(t, err, "%q", c.text)
		assert.True(t, strings.HasPrefix(err.Error(), c.want), "%q: got %v", c.text, err)
	}
}

// TestSyntaxMessages checks the rewording of the decoder's messages that
// do not say what was expected.
func TestSyntaxMessages(t *testing.T) {
	for in, want := range map[string]string{
		"Key 'a.b' has already been defined.": "key a.b is defined twice (expected each key once in a table)",
		"not a hexadecimal number: '0x\n'":    `not a hexadecimal number: '0x\n' (expected a number such as 12, -0.5 or 1e-3)`,
		"expected value but found '\\n'":      `expected value but found '\n'`,
		"something new":                       "something new (expected TOML: key = value lines, [table] and [[array of tables]] headers, # comments)",
		"unexpected comma":                    "unexpected comma (expected a value or key between commas)",
	} {
		assert.Equal(t, want, syntaxMessage(in), "%q", in)
	}
}

// TestUTF16TOML: a TOML file saved as UTF-16 gets one line saying so.
func TestUTF16TOML(t *testing.T) {
	data := []byte{0xFF, 0xFE, 'a', 0, ' ', 0, '=', 0, ' ', 0, '1', 0}
	_, _, err := ParseDesign(data, "u.toml")
	assert.EqualError(t, err, "u.toml:1:1: the file is UTF-16LE encoded (expected UTF-8 text; save the design file as UTF-8)")
	assert.Equal(t, "UTF-16BE", utf16Name([]byte{0, 'a', 0, ',', 0, 'b', 0, 'c'}))
	assert.Equal(t, "", utf16Name([]byte("load_n,deflection_mm")))
}
