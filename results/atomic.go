package results

import (
	"io"
	"os"
	"path/filepath"
)

// pending is a file being written atomically: content goes to a temporary
// file in the target's folder (create), which Commit syncs, makes 0644 and
// renames over the target, and Abort removes. WriteAtomic,
// WriteAtomicStream and WriteAtomicAll are built on it: the one place
// where plica's atomic writes are made.
type pending struct {
	path string
	tmp  *os.File
	done bool
}

// createTemp makes the temporary files of atomic writes; a test may
// replace it to fail as a full disk does.
var createTemp = os.CreateTemp

// create starts an atomic write of path.
func create(path string) (*pending, error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := createTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return nil, err
	}
	return &pending{path: path, tmp: tmp}, nil
}

// Write writes to the temporary file.
func (p *pending) Write(b []byte) (int, error) { return p.tmp.Write(b) }

// finish syncs, sets the mode of and closes the temporary file: after it
// only the rename is left.
func (p *pending) finish() error {
	err := p.tmp.Sync()
	if err == nil {
		err = p.tmp.Chmod(0o644)
	}
	if cerr := p.tmp.Close(); err == nil {
		err = cerr
	}
	return err
}

// rename puts the finished temporary file in place of the target.
func (p *pending) rename() error {
	if err := os.Rename(p.tmp.Name(), p.path); err != nil {
		return err
	}
	p.done = true
	return nil
}

// Commit puts the content in place of the target; on failure the target
// is untouched and the temporary file removed.
func (p *pending) Commit() error {
	if err := p.finish(); err != nil {
		p.Abort()
		return err
	}
	if err := p.rename(); err != nil {
		p.Abort()
		return err
	}
	return nil
}

// Abort drops the temporary file (nothing once committed).
func (p *pending) Abort() {
	if p.done {
		return
	}
	p.tmp.Close()
	os.Remove(p.tmp.Name())
}

// WriteAtomic writes data to path through a temporary file in the same
// directory, synced, made 0644, then renamed over path: a reader never sees
// half a file and a crash leaves the old one. On failure path is untouched.
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
func WriteAtomicStream(path string, write func(w io.Writer) error) error {
	p, err := create(path)
	if err != nil {
		return err
	}
	if err := write(p); err != nil {
		p.Abort()
		return err
	}
	return p.Commit()
}
