package results

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"

	"plica/problems"
)

// LockFile is the lock of a run folder in use. search, resume and merge
// -o hold it while they write the folder; it names the process holding it.
const LockFile = "run.lock"

// lockInfo is the content of run.lock. BootID and StartTicks identify the
// process beyond its id (ids are reused, after a reboot especially): on
// Linux the boot id of /proc/sys/kernel/random/boot_id and the process
// start time, field 22 of /proc/PID/stat, in clock ticks since boot. They
// are empty where /proc is missing, and in locks of older plica versions.
type lockInfo struct {
	PID        int       `json:"pid"`
	Host       string    `json:"host"`
	Started    time.Time `json:"started"`
	BootID     string    `json:"boot_id,omitempty"`
	StartTicks uint64    `json:"start_ticks,omitempty"`
}

// procDir is where process information is read; a test may point it
// elsewhere to act as a system without /proc.
var procDir = "/proc"

// bootID is this boot's id, "" if unknown.
func bootID() string {
	b, err := os.ReadFile(filepath.Join(procDir, "sys", "kernel", "random", "boot_id"))
	if err != nil {
		return ""
	}
	return strings.TrimSpace(string(b))
}

// startTicks is the start time of process pid in clock ticks since boot
// (field 22 of /proc/PID/stat), and false if unknown.
func startTicks(pid int) (uint64, bool) {
	b, err := os.ReadFile(filepath.Join(procDir, strconv.Itoa(pid), "stat"))
	if err != nil {
		return 0, false
	}
	// The command name (field 2) is in parentheses and may hold spaces:
	// fields are counted after its closing parenthesis, from field 3.
	i := bytes.LastIndexByte(b, ')')
	if i < 0 {
		return 0, false
	}
	f := strings.Fields(string(b[i+1:]))
	if len(f) < 22-2 {
		return 0, false
	}
	t, err := strconv.ParseUint(f[22-3], 10, 64)
	return t, err == nil
}

// stale reports whether a lock of this host names a process that no
// longer holds it, and why: the process does not run, or the machine was
// restarted since (another boot id), or the id now names another process
// (another start time). Without /proc (or in a lock without them) only
// the process id is checked.
func stale(holder lockInfo) (bool, string) {
	if !processAlive(holder.PID) {
		return true, "that process no longer runs: it was killed or crashed"
	}
	if now := bootID(); holder.BootID != "" && now != "" && now != holder.BootID {
		return true, "the machine has restarted since: process " + strconv.Itoa(holder.PID) + " now is another process"
	}
	if holder.StartTicks != 0 {
		if t, ok := startTicks(holder.PID); ok && t != holder.StartTicks {
			return true, "process " + strconv.Itoa(holder.PID) + " now is another process, started at another time: its id was reused"
		}
	}
	return false, ""
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
// by a process of this host that no longer runs (killed with kill -9, say),
// or whose id now names another process (another boot id or start time)
// is stale: it is taken over and LockNote says so. A lock held by a live
// process, one of another host, or one that cannot be read is a
// *LockedError. Unlock releases it.
func (f *Folder) Lock() error {
	if f.lock != nil {
		return nil
	}
	me := lockInfo{PID: os.Getpid(), Host: hostname(), Started: time.Now().UTC(), BootID: bootID()}
	me.StartTicks, _ = startTicks(me.PID)
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
		if holder.Host != me.Host {
			return &LockedError{Dir: f.Dir, Holder: holder.String()}
		}
		isStale, why := stale(holder)
		if !isStale {
			return &LockedError{Dir: f.Dir, Holder: holder.String()}
		}
		// Stale: remove it only if it is still the same lock.
		if now, err := os.ReadFile(path); err == nil && bytes.Equal(now, old) {
			if err := os.Remove(path); err != nil && !errors.Is(err, os.ErrNotExist) {
				return fmt.Errorf("cannot remove the stale lock of %s: %w", f.Dir, err)
			}
		}
		note = fmt.Sprintf("took over the stale lock of %s in %s (%s)", holder, f.Dir, why)
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
	if holder.Host != hostname() {
		return &LockedError{Dir: dir, Holder: holder.String()}
	}
	if isStale, _ := stale(holder); !isStale {
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
