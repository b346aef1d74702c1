package main

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
)

func init() {
	command("export", "write a workshop's record as JSON or CSV, or its agreed priors as CSV (--db, --workshop, --format json|csv|priors, --question, --out)", runExport)
}

func runExport(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("export", stderr)
	dbPath := fs.String("db", "", "database `file`")
	workshopArg := fs.String("workshop", "", "workshop `ID`")
	format := fs.String("format", "json", "json (the whole record), csv (one row per revision) or priors (one row per agreed prior, CSV)")
	questionArg := fs.String("question", "", "export only this question `ID`")
	out := fs.String("out", "", "write to `file` instead of standard output")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	if *format != "json" && *format != "csv" && *format != "priors" {
		return fail(stderr, "export", badInput("format", "must be json, csv or priors, got %q", *format))
	}
	wid, err := id("workshop", *workshopArg)
	if err != nil {
		return fail(stderr, "export", err)
	}
	if wid == 0 {
		return fail(stderr, "export", badInput("workshop", "a workshop ID (a whole number above 0) is required"))
	}
	workshopID := &wid
	qid, err := id("question", *questionArg)
	if err != nil {
		return fail(stderr, "export", err)
	}
	question := &qid
	if *out != "" && *dbPath != "" {
		if beside, ok := overDatabase(*dbPath, *out); ok {
			return fail(stderr, "export", badInput("out", "%s is %s; write the record to a file of its own (export replaces the file --out names)", *out, beside))
		}
	}
	db, err := openForReading(*dbPath, commandLog(stderr))
	if err != nil {
		return fail(stderr, "export", err)
	}
	defer db.Close()
	build := db.Record
	if *format != "json" {
		build = db.RecordHistory // the CSVs need no pool
	}
	rec, err := build(context.Background(), *workshopID, time.Now())
	if errors.Is(err, workshop.ErrNotFound) {
		return fail(stderr, "export", badInput("workshop", "no workshop %d in %s", *workshopID, *dbPath))
	}
	if err != nil {
		return fail(stderr, "export", err)
	}
	if *question != 0 {
		if rec, err = rec.ForQuestion(*question); err != nil {
			return fail(stderr, "export", badInput("question", "no question %d in workshop %d", *question, *workshopID))
		}
	}
	write := func(w io.Writer) error {
		switch *format {
		case "csv":
			return rec.WriteCSV(w)
		case "priors":
			return rec.WritePriorsCSV(w)
		}
		return rec.WriteJSON(w)
	}
	if *out == "" {
		err = writeStdout(stdout, write)
	} else {
		err = writeFileAtomic(*out, write)
	}
	if err != nil {
		return fail(stderr, "export", err)
	}
	return exitOK
}

// writeStdout streams write's output to standard output. Bytes already
// written there cannot be taken back, so when standard output fails part
// way (a full disk under a redirection, a closed pipe) the message says
// how much went out and that it is an incomplete record, not only the
// system's "write /dev/stdout: no space left on device", which a script
// could miss while a file holding half a record stayed behind; --out
// writes a whole record or nothing.
func writeStdout(stdout io.Writer, write func(io.Writer) error) error {
	cw := &countingWriter{w: stdout}
	err := writeBuffered(cw, write)
	if err != nil && cw.err != nil {
		if cw.n == 0 {
			return fmt.Errorf("standard output took nothing (%v): nothing was written; --out FILE writes the whole output or nothing", cw.err)
		}
		return fmt.Errorf("standard output failed after %d bytes (%v): what was written there is cut short, not a whole export; --out FILE writes the whole output or nothing", cw.n, cw.err)
	}
	return err
}

// countingWriter counts the bytes w took and keeps the first error.
type countingWriter struct {
	w   io.Writer
	n   int64
	err error
}

func (c *countingWriter) Write(p []byte) (int, error) {
	n, err := c.w.Write(p)
	c.n += int64(n)
	if err != nil && c.err == nil {
		c.err = err
	}
	return n, err
}

// writeBuffered streams write's output to w through a buffer: a record of
// a large panel is never held whole in memory.
func writeBuffered(w io.Writer, write func(io.Writer) error) error {
	bw := bufio.NewWriterSize(w, 64<<10)
	if err := write(bw); err != nil {
		return err
	}
	return bw.Flush()
}

// writeFileAtomic streams write's output to a new file beside path and
// renames it over path once it is complete, so a failed export never
// leaves a partial file behind. path is followed through its symbolic
// links, as a shell's > follows them: the file they name gets the output
// and the links stay. A path that is neither a regular file nor missing,
// a device or a pipe (/dev/null, /dev/stdout, a FIFO), is written into:
// the rename put a regular file in its place, so that `--out /dev/null`
// run as root replaced the system's /dev/null.
func writeFileAtomic(path string, write func(io.Writer) error) (err error) {
	name := path
	if real, err := filepath.EvalSymlinks(path); err == nil {
		path = real
	}
	if fi, err := os.Stat(path); err == nil && !fi.Mode().IsRegular() {
		if fi.IsDir() {
			return badInput("out", "%s is a folder; name a file", name)
		}
		return writeInto(path, write)
	}
	if err := inFolder("out", path); err != nil {
		return err
	}
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*")
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			// The temporary name is no name the user gave.
			return badInput("out", "cannot make a file in %s: %v", filepath.Dir(name), pe.Err)
		}
		return err
	}
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(f.Name())
			// The temporary file is no name the user gave: a full disk
			// said "write …/.rec.json.1950597273: no space left on
			// device".
			var pe *fs.PathError
			var le *os.LinkError
			switch {
			case errors.As(err, &pe) && pe.Path == f.Name():
				err = fmt.Errorf("writing %s: %w; nothing was written there", name, pe.Err)
			case errors.As(err, &le) && le.Old == f.Name():
				err = fmt.Errorf("writing %s: %w; nothing was written there", name, le.Err)
			}
		}
	}()
	if err = writeBuffered(f, write); err != nil {
		return err
	}
	if err = f.Chmod(0o644); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	return os.Rename(f.Name(), path)
}

// writeInto streams write's output into the device or pipe at path.
func writeInto(path string, write func(io.Writer) error) error {
	f, err := os.OpenFile(path, os.O_WRONLY, 0)
	if err != nil {
		return err
	}
	if err := writeBuffered(f, write); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// overDatabase reports whether writing a file at out (followed through
// its links, as writeFileAtomic follows them) would replace the database
// at db or a file kept beside it: its -wal, -shm or -journal, named after
// the database as given or as its links resolve, or the server's lock
// file. It returns what out is, in words.
func overDatabase(db, out string) (string, bool) {
	// The same file under another name: a link, a second hard link, or
	// another spelling on a filesystem that ignores letter case
	// (Parley.db and parley.db on a Mac).
	if fo, err := os.Stat(out); err == nil {
		if fd, err := os.Stat(db); err == nil && os.SameFile(fo, fd) {
			return "the database (--db) itself", true
		}
	}
	// Files beside the database, by name, where they are not there yet.
	target := entry(out)
	if real, err := filepath.EvalSymlinks(out); err == nil {
		target = entry(real)
	}
	if target == "" {
		return "", false
	}
	names := []string{entry(db)}
	if real, err := filepath.EvalSymlinks(db); err == nil {
		names = append(names, entry(real))
	}
	for _, name := range names {
		if name == "" {
			continue
		}
		switch target {
		case name:
			return "the database (--db) itself", true
		case name + "-wal", name + "-shm", name + "-journal":
			return "a file SQLite keeps beside the database (--db)", true
		case name + ".lock":
			return "the lock file of the database's server", true
		}
	}
	return "", false
}

// entry is the absolute name of path with the links of its folder
// resolved and its own last name kept; "" when the folder cannot be
// resolved.
func entry(path string) string {
	abs, err := filepath.Abs(path)
	if err != nil {
		return ""
	}
	dir, err := filepath.EvalSymlinks(filepath.Dir(abs))
	if err != nil {
		return ""
	}
	return filepath.Join(dir, filepath.Base(abs))
}
