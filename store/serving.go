package store

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"syscall"
)

// One server per database: two servers on one file would each remember
// rows the other changes (cache.go), so one would show a revoked expert
// their page or a closed round as open. `parley serve` claims the file
// with ClaimServing, which takes an exclusive flock(2) on PATH.lock beside
// it and writes its process id there. The kernel drops the lock when the
// process ends, however it ends, so a crash leaves no stale claim. Other
// commands (export, backup, import, facilitator-reset) do not claim the
// file: they read, or only add rows and secrets, which the server does
// not remember. They do refuse, as serve does, a file with more than one
// name (Open, oneName): SQLite would keep a second journal for it.

// ServingClaim is a server's hold on its database file.
type ServingClaim struct {
	f    *os.File
	lock string // the lock file's name, as ours records it
}

// ours are the lock files this process holds through ClaimServing: a
// server's own Open may upgrade the file it claimed (servedElsewhere).
var ours = struct {
	sync.Mutex
	m map[string]bool
}{m: map[string]bool{}}

// HeldError says the database is already served by another process.
type HeldError struct {
	Database string // the database file
	LockFile string
	PID      int // the holder's process id, 0 when unknown
}

func (e *HeldError) Error() string {
	return fmt.Sprintf("%s is already being served by another Parley server (%s holds %s); "+
		"stop that server first, or serve another file with --db", e.Database, holder(e.PID), e.LockFile)
}

// LockFile is the lock file beside the database at path.
func LockFile(path string) string { return path + ".lock" }

// ManyNamesError says the database file has more than one name (hard
// links). SQLite names a database's journal files after the name it was
// opened by, so a server and a command opening one file by two names keep
// two journals of one database: each misses the other's commits and the
// file can be corrupted (SQLite's own "How To Corrupt An SQLite Database
// File", §2.5). Nor would two servers see each other's claim.
type ManyNamesError struct {
	Database string
	Links    uint64
}

func (e *ManyNamesError) Error() string {
	return fmt.Sprintf("%s is one file with %d names (hard links); SQLite names its journal files (-wal, -shm) "+
		"after the name a database is opened by, so two names could corrupt it: remove the other names, "+
		"or copy the file (cp) while nothing has it open", e.Database, e.Links)
}

// ClaimServing claims the database at path for this process until
// Release (or the process ends). When another process holds it, the
// error is a *HeldError naming that process. The claim is on the file,
// not on its name: a symbolic link is followed to the file it names, and
// a file with several hard links is refused (*ManyNamesError), so that a
// second server cannot start on the same file under another name.
func ClaimServing(path string) (*ServingClaim, error) {
	real, err := realName(path)
	if err != nil {
		return nil, err
	}
	if err := oneName(path); err != nil {
		return nil, err
	}
	lock := LockFile(real)
	f, err := os.OpenFile(lock, os.O_RDWR|os.O_CREATE, 0o644)
	if err != nil {
		return nil, fmt.Errorf("store: lock file %s: %w", lock, err)
	}
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		defer f.Close()
		if errors.Is(err, syscall.EWOULDBLOCK) {
			return nil, &HeldError{Database: path, LockFile: lock, PID: readPID(f)}
		}
		return nil, fmt.Errorf("store: lock %s: %w", lock, err)
	}
	// A failure to write our process id is a failure to claim: the
	// write's error is the one checked.
	err = f.Truncate(0)
	if err == nil {
		_, err = f.WriteAt([]byte(strconv.Itoa(os.Getpid())+"\n"), 0)
	}
	if err != nil {
		f.Close()
		return nil, fmt.Errorf("store: lock file %s: %w", lock, err)
	}
	ours.Lock()
	ours.m[lock] = true
	ours.Unlock()
	return &ServingClaim{f: f, lock: lock}, nil
}

// servedElsewhere reports whether another process serves the database at
// path (holds its lock file's flock), with that process's id when it
// wrote it. A claim of this process's own is not another's. It takes a
// shared lock for an instant, which a server's exclusive claim refuses.
func servedElsewhere(path string) (pid int, held bool, err error) {
	real, err := realName(path)
	if err != nil {
		return 0, false, err
	}
	lock := LockFile(real)
	ours.Lock()
	mine := ours.m[lock]
	ours.Unlock()
	if mine {
		return 0, false, nil
	}
	f, err := os.Open(lock)
	if errors.Is(err, fs.ErrNotExist) {
		return 0, false, nil // never served
	}
	if err != nil {
		return 0, false, fmt.Errorf("store: lock file %s: %w", lock, err)
	}
	defer f.Close()
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_SH|syscall.LOCK_NB); err != nil {
		if errors.Is(err, syscall.EWOULDBLOCK) {
			return readPID(f), true, nil
		}
		return 0, false, fmt.Errorf("store: lock %s: %w", lock, err)
	}
	return 0, false, nil // closing the file drops the shared lock
}

// ServedUpgradeError says a command would upgrade the schema of a
// database that another process, a server of an older Parley, is
// serving: the server would go on writing its own schema's rows into the
// upgraded file.
type ServedUpgradeError struct {
	Database string
	From, To int // schema versions: the file's, and this Parley's
	PID      int // the server's process id, 0 when unknown
}

func (e *ServedUpgradeError) Error() string {
	return fmt.Sprintf("%s is being served by %s at schema version %d, and this Parley would upgrade it to %d "+
		"underneath that server; nothing was changed. Stop the server first (this version's `parley serve` "+
		"upgrades the file when it starts), or use the Parley that serves it", e.Database, holder(e.PID), e.From, e.To)
}

// holder names the process holding a lock file: by its id when it wrote
// one.
func holder(pid int) string {
	if pid > 0 {
		return "process " + strconv.Itoa(pid)
	}
	return "another process"
}

// oneName refuses a database file with more than one name (hard links)
// with a *ManyNamesError naming path; a symbolic link is followed, and a
// file not there yet is no error. Open calls it too, so that no command
// reads or writes a database through a second name while a server keeps
// its journal under the first.
func oneName(path string) error {
	var st syscall.Stat_t
	if err := syscall.Stat(path, &st); err == nil && st.Nlink > 1 {
		return &ManyNamesError{Database: path, Links: uint64(st.Nlink)}
	} else if err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("store: %s: %w", path, err)
	}
	return nil
}

// realName is the name of the file at path with every symbolic link
// resolved: the file's own when it exists, else its folder's resolved and
// the last name kept (a server creates the file there).
func realName(path string) (string, error) {
	real, err := filepath.EvalSymlinks(path)
	if err == nil {
		return real, nil
	}
	if !errors.Is(err, fs.ErrNotExist) {
		return "", fmt.Errorf("store: %s: %w", path, err)
	}
	dir, err := filepath.EvalSymlinks(filepath.Dir(path))
	if err != nil {
		return "", fmt.Errorf("store: %s: %w", path, err)
	}
	return filepath.Join(dir, filepath.Base(path)), nil
}

// readPID reads the holder's process id from the lock file; 0 when it
// has not written it yet.
func readPID(f *os.File) int {
	b := make([]byte, 32)
	n, _ := f.ReadAt(b, 0)
	pid, err := strconv.Atoi(strings.TrimSpace(string(b[:n])))
	if err != nil || pid <= 0 {
		return 0
	}
	return pid
}

// Release gives the claim up. The lock file stays: removing it would let
// a server that opened it a moment before lock a file no longer there
// while a third locks a new one.
func (c *ServingClaim) Release() error {
	if c == nil || c.f == nil {
		return nil
	}
	err := c.f.Close() // closing the descriptor drops the flock
	c.f = nil
	ours.Lock()
	delete(ours.m, c.lock)
	ours.Unlock()
	return err
}

// NotWritableError says why Parley cannot write the database at Path.
type NotWritableError struct {
	Path    string
	Problem string // what is wrong, in words
	Err     error  // the system's error, when there is one
}

func (e *NotWritableError) Error() string { return "cannot write " + e.Path + ": " + e.Problem }

func (e *NotWritableError) Unwrap() error { return e.Err }

// CheckWritable checks, before a server starts, that the database at
// path can be written: its folder exists, new files can be made there
// (SQLite keeps its journal, PATH-wal and PATH-shm, beside the database),
// and the file and its journal files, where they exist, open for writing.
// A *NotWritableError says exactly what is wrong: a missing folder, a
// read-only filesystem, a read-only file or folder, or a full disk.
// Without it a read-only database went unnoticed until the first save.
//
// A symbolic link is followed: SQLite keeps the journal beside the file
// the link names, so that file's folder is the one checked.
func CheckWritable(path string) error {
	real, err := realName(path)
	if err != nil {
		real = path // a folder that cannot be reached is said below
	}
	dir := filepath.Dir(real)
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return &NotWritableError{Path: path, Err: err,
			Problem: "the folder " + dir + " does not exist; create it, or give --db a file in an existing folder"}
	case err != nil:
		return &NotWritableError{Path: path, Err: err, Problem: "the folder " + dir + " cannot be read: " + err.Error()}
	case !fi.IsDir():
		return &NotWritableError{Path: path, Problem: dir + " is not a folder"}
	}
	probe, err := os.CreateTemp(dir, ".parley-write-check-*")
	if err == nil {
		// An empty file takes no room: a full disk makes one, and is
		// found only by a byte written and synced.
		if _, err = probe.Write([]byte{0}); err == nil {
			err = probe.Sync()
		}
		probe.Close()
		os.Remove(probe.Name())
	}
	if err != nil {
		return &NotWritableError{Path: path, Err: err, Problem: "the folder " + dir + " (where SQLite keeps the database's journal, " +
			filepath.Base(real) + "-wal and -shm) " + whyNot(err, dir)}
	}
	for _, name := range []string{real, real + "-wal", real + "-shm"} {
		f, err := os.OpenFile(name, os.O_RDWR, 0)
		if errors.Is(err, fs.ErrNotExist) {
			continue
		}
		if err != nil {
			what := "the file"
			if name != real {
				what = "its journal file " + name
			}
			return &NotWritableError{Path: path, Err: err, Problem: what + " " + whyNot(err, name)}
		}
		f.Close()
	}
	return nil
}

// whyNot says in words why name cannot be written.
func whyNot(err error, name string) string {
	switch {
	case errors.Is(err, syscall.EROFS):
		return "is on a read-only filesystem; copy the database to a writable disk (parley backup --out), or remount the disk writable"
	case errors.Is(err, syscall.ENOSPC), errors.Is(err, syscall.EDQUOT):
		return "is on a full disk; free some space"
	case errors.Is(err, fs.ErrPermission):
		mode := ""
		if fi, err := os.Stat(name); err == nil {
			mode = fi.Mode().String() + ", "
			if st, ok := fi.Sys().(*syscall.Stat_t); ok {
				mode += "owner uid " + strconv.Itoa(int(st.Uid)) + ", "
			}
		}
		return "is read-only for this user (" + mode + "Parley runs as uid " + strconv.Itoa(os.Geteuid()) +
			"); give write permission (chmod u+w), or serve a copy"
	}
	return "cannot be written: " + err.Error()
}
