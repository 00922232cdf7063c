package results

import (
	"io"
	"os"
	"path/filepath"
)

// WriteAtomic writes data to path through a temporary file in the same
// directory, synced, made 0644, then renamed over path: a reader never sees
// half a file and a crash leaves the old one. On failure path is untouched.
// Every file plica writes goes through WriteAtomic or WriteAtomicStream.
func WriteAtomic(path string, data []byte) error {
	return WriteAtomicStream(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// WriteAtomicStream is WriteAtomic for content too large to hold in memory
// (a merged evaluations.csv): write streams the content into the temporary
// file. When write returns an error, path is untouched and that error is
// returned.
func WriteAtomicStream(path string, write func(w io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err = write(tmp); err != nil {
		return err
	}
	if err = tmp.Sync(); err != nil {
		return err
	}
	if err = tmp.Chmod(0o644); err != nil {
		return err
	}
	if err = tmp.Close(); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}
