package results

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"plica/problems"
)

// TestWriteAtomicCalibration: plica calibrate writes its calibration file
// through WriteAtomic: the old file is replaced whole, readable by all
// (0644), no temporary file is left, and the file loads back.
func TestWriteAtomicCalibration(t *testing.T) {
	c, err := problems.LoadCalibration("../problems/testdata/calibration/petg-sinusoid.toml")
	require.NoError(t, err)
	dir := t.TempDir()
	path := filepath.Join(dir, "cal.toml")
	require.NoError(t, os.WriteFile(path, []byte("old content that is longer than nothing"), 0o600))
	require.NoError(t, WriteAtomic(path, c.Format()))
	got, err := os.ReadFile(path)
	require.NoError(t, err)
	assert.Equal(t, string(c.Format()), string(got), "file replaced by the formatted calibration")
	st, err := os.Stat(path)
	require.NoError(t, err)
	assert.Equal(t, os.FileMode(0o644), st.Mode().Perm(), "mode 0644")
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 1, "no temporary file left behind")
	_, err = problems.LoadCalibration(path)
	assert.NoError(t, err, "written file loads")

	bad := filepath.Join(dir, "missing-dir", "cal.toml")
	assert.Error(t, WriteAtomic(bad, c.Format()), "directory does not exist")
	_, err = os.Stat(bad)
	assert.True(t, os.IsNotExist(err), "nothing written on failure")
}

// TestWriteAtomicStreamFailure: when the streaming writer fails half-way,
// the old file stays and no temporary file is left.
func TestWriteAtomicStreamFailure(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, EvaluationsFile)
	require.NoError(t, os.WriteFile(path, []byte("old"), 0o644))
	boom := errors.New("disk full")
	err := WriteAtomicStream(path, func(w io.Writer) error {
		if _, err := io.WriteString(w, "half a file"); err != nil {
			return err
		}
		return boom
	})
	assert.ErrorIs(t, err, boom, "the writer's error comes back")
	got, err := os.ReadFile(path)
	require.NoError(t, err)
	assert.Equal(t, "old", string(got), "old file untouched")
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 1, "no temporary file left behind")
}

// TestWriteAtomicAll: a set of files is written all or none through the
// shared atomic write: when one target's folder is missing, no other
// target is touched and no temporary file is left; when all can be
// written, each has its content and mode 0644.
func TestWriteAtomicAll(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a.toml"), filepath.Join(dir, "b.toml")
	require.NoError(t, os.WriteFile(a, []byte("old a"), 0o600))
	err := WriteAtomicAll([]string{a, filepath.Join(dir, "missing", "x.toml")}, [][]byte{[]byte("new a"), []byte("x")})
	require.Error(t, err)
	got, err := os.ReadFile(a)
	require.NoError(t, err)
	assert.Equal(t, "old a", string(got), "first target untouched when a later one fails")
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 1, "no temporary file left behind")

	require.NoError(t, WriteAtomicAll([]string{a, b}, [][]byte{[]byte("new a"), []byte("new b")}))
	for path, want := range map[string]string{a: "new a", b: "new b"} {
		got, err := os.ReadFile(path)
		require.NoError(t, err)
		assert.Equal(t, want, string(got))
		st, err := os.Stat(path)
		require.NoError(t, err)
		assert.Equal(t, os.FileMode(0o644), st.Mode().Perm(), "mode 0644")
	}
	entries, err = os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 2, "no temporary file left behind")
}
