package results

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"syscall"
	"time"

	"plica/problems"
)

// LockFile is the lock of a run folder in use. search, resume and merge
// -o hold it while they write the folder; it names the process holding it.
const LockFile = "run.lock"

// lockInfo is the content of run.lock.
type lockInfo struct {
	PID     int       `json:"pid"`
	Host    string    `json:"host"`
	Started time.Time `json:"started"`
}

func (l lockInfo) String() string {
	return fmt.Sprintf("process %d on host %s, started %s", l.PID, l.Host, l.Started.Local().Format("2006-01-02 15:04:05"))
}

// heldLock is a lock this process holds.
type heldLock struct {
	path string
	data []byte // what this process wrote, to release only its own lock
	note string // set when a stale lock was taken over
}

// LockedError is a run folder locked by another process (exit status 2).
type LockedError struct {
	Dir    string
	Holder string // "process 123 on host h, started …", or why the lock is unreadable
}

func (e *LockedError) Error() string {
	return fmt.Sprintf("%s is in use by another plica (%s): wait for it to finish, or if no plica is running there delete %s", e.Dir, e.Holder, LockFile)
}

// Is makes a locked folder an input error.
func (e *LockedError) Is(target error) bool { return target == problems.ErrInput }

// hostname is the host written into locks; a test may replace it.
var hostname = func() string {
	h, err := os.Hostname()
	if err != nil {
		return "unknown"
	}
	return h
}

// processAlive reports whether a process of this host with the given id
// exists (signal 0 checks without signalling; EPERM means it exists but
// belongs to someone else).
func processAlive(pid int) bool {
	if pid <= 0 {
		return false
	}
	p, err := os.FindProcess(pid)
	if err != nil {
		return false
	}
	err = p.Signal(syscall.Signal(0))
	return err == nil || errors.Is(err, syscall.EPERM)
}

// Lock takes the folder's lock: it writes run.lock with this process's id,
// host and start time, atomically and only if no lock exists. A lock left
// by a process of this host that no longer runs (killed with kill -9, say)
// is stale: it is taken over and LockNote says so. A lock held by a live
// process, one of another host, or one that cannot be read is a
// *LockedError. Unlock releases it.
func (f *Folder) Lock() error {
	if f.lock != nil {
		return nil
	}
	me := lockInfo{PID: os.Getpid(), Host: hostname(), Started: time.Now().UTC()}
	data, err := json.Marshal(me)
	if err != nil {
		return err
	}
	data = append(data, '\n')
	path := f.Path(LockFile)
	note := ""
	for attempt := 0; attempt < 3; attempt++ {
		err := linkNew(f.Dir, path, data)
		if err == nil {
			f.lock = &heldLock{path: path, data: data, note: note}
			return nil
		}
		if !errors.Is(err, os.ErrExist) {
			return fmt.Errorf("cannot lock run folder %s: %w", f.Dir, err)
		}
		old, rerr := os.ReadFile(path)
		if errors.Is(rerr, os.ErrNotExist) {
			continue // released meanwhile
		}
		var holder lockInfo
		if rerr != nil || json.Unmarshal(old, &holder) != nil || holder.PID <= 0 || holder.Host == "" {
			return &LockedError{Dir: f.Dir, Holder: fmt.Sprintf("%s cannot be read", LockFile)}
		}
		if holder.Host != me.Host || processAlive(holder.PID) {
			return &LockedError{Dir: f.Dir, Holder: holder.String()}
		}
		// Stale: remove it only if it is still the same lock.
		if now, err := os.ReadFile(path); err == nil && bytes.Equal(now, old) {
			if err := os.Remove(path); err != nil && !errors.Is(err, os.ErrNotExist) {
				return fmt.Errorf("cannot remove the stale lock of %s: %w", f.Dir, err)
			}
		}
		note = fmt.Sprintf("took over the stale lock of %s in %s (that process no longer runs: it was killed or crashed)", holder, f.Dir)
	}
	return &LockedError{Dir: f.Dir, Holder: "another process keeps taking the lock"}
}

// linkNew creates path with data only if path does not exist: the data
// goes to a temporary file first and is hard-linked into place, so the
// lock never exists half-written.
func linkNew(dir, path string, data []byte) error {
	tmp, err := os.CreateTemp(dir, ".lock-*")
	if err != nil {
		return err
	}
	name := tmp.Name()
	defer os.Remove(name)
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	if err := os.Link(name, path); err != nil {
		var le *os.LinkError
		if errors.As(err, &le) && errors.Is(le.Err, syscall.EEXIST) {
			return os.ErrExist
		}
		return err
	}
	return nil
}

// CheckUnlocked is for verbs that read a run folder without writing it
// (pick -o elsewhere): a folder locked by a live process (a search
// rewriting its files) is a *LockedError; no lock, or a stale one left by a
// process of this host that no longer runs, is not. It needs no write
// access and takes no lock.
func CheckUnlocked(dir string) error {
	old, err := os.ReadFile(filepath.Join(dir, LockFile))
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	var holder lockInfo
	if err != nil || json.Unmarshal(old, &holder) != nil || holder.PID <= 0 || holder.Host == "" {
		return &LockedError{Dir: dir, Holder: fmt.Sprintf("%s cannot be read", LockFile)}
	}
	if holder.Host != hostname() || processAlive(holder.PID) {
		return &LockedError{Dir: dir, Holder: holder.String()}
	}
	return nil
}

// LockNote is the note of a stale lock taken over by Lock ("" if none).
func (f *Folder) LockNote() string {
	if f.lock == nil {
		return ""
	}
	return f.lock.note
}

// Unlock releases the lock if this folder holds it; a lock file that is
// no longer this process's (taken over meanwhile) is left alone.
func (f *Folder) Unlock() error {
	if f.lock == nil {
		return nil
	}
	l := f.lock
	f.lock = nil
	now, err := os.ReadFile(l.path)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil
		}
		return err
	}
	if !bytes.Equal(now, l.data) {
		return nil
	}
	return os.Remove(l.path)
}
