package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"log/slog"
	"os"
	"path/filepath"

	"github.com/parley-elicit/parley/elicit/record"
)

func init() {
	command("import", "add a workshop from an exported JSON record (--db, --in); prints its ID (the record's own where the database has none of its ids)", runImport)
}

func runImport(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("import", stderr)
	dbPath := fs.String("db", "", "database `file` (created if missing)")
	in := fs.String("in", "", "JSON record `file`, or - for standard input")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	if *dbPath == "" {
		return fail(stderr, "import", badInput("db", "a database file is required"))
	}
	if fi, err := os.Stat(*dbPath); err == nil && fi.IsDir() {
		return fail(stderr, "import", badInput("db", "%s is a folder; name the database file in it (a new one is created)", *dbPath))
	} else if err != nil {
		if err := creatable("db", *dbPath); err != nil {
			return fail(stderr, "import", err)
		}
	}
	var r io.Reader = stdin
	switch *in {
	case "":
		return fail(stderr, "import", badInput("in", "a JSON record file is required"))
	case "-":
	default:
		f, err := os.Open(*in)
		if err != nil {
			return fail(stderr, "import", badInput("in", "%v", err))
		}
		defer f.Close()
		r = f
	}
	// The record is parsed and validated before the database is touched.
	rec, err := record.ParseChecked(r)
	if err != nil {
		return fail(stderr, "import", err)
	}
	// A weight set, an agreed prior or a batch of study data without its
	// entry in the decision log was added behind Parley's back (parley
	// fingerprint says so too); imported, it would stand as a decision
	// the log never mentions. record.Parse leaves this check to its
	// callers, for records written by hand in tests.
	if err := rec.Record.CheckLogged(); err != nil {
		return fail(stderr, "import", err)
	}
	id, err := importInto(*dbPath, rec, commandLog(stderr))
	if err != nil {
		return fail(stderr, "import", err)
	}
	fmt.Fprintln(stdout, id)
	return exitOK
}

// importInto adds rec to the database at path. An existing database is
// changed in one transaction, so a failed import leaves it as it was. A
// new one is built under a temporary name in the same folder and renamed
// into place only when whole and closed: a failed import (a full disk, an
// I/O error) removes it with its journal files and leaves nothing behind.
func importInto(path string, rec record.Checked, log *slog.Logger) (int64, error) {
	if _, err := os.Stat(path); err == nil {
		if err := notAnothersDatabase(path); err != nil {
			return 0, err
		}
		db, err := openStore(path, log)
		if err != nil {
			return 0, notADatabase(path, err)
		}
		id, err := db.ImportChecked(context.Background(), rec)
		return id, errors.Join(err, db.Close())
	} else if !errors.Is(err, fs.ErrNotExist) {
		return 0, err
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".importing-*")
	if err != nil {
		return 0, err
	}
	tmp.Close()
	remove := func() {
		for _, suffix := range []string{"", "-wal", "-shm", "-journal"} {
			os.Remove(tmp.Name() + suffix)
		}
	}
	db, err := openStore(tmp.Name(), log)
	if err != nil {
		remove()
		return 0, err
	}
	id, err := db.ImportChecked(context.Background(), rec)
	// Closing the only connection checkpoints the journal into the file
	// and deletes it, so the renamed file is the whole database.
	if err = errors.Join(err, db.Close()); err == nil {
		if _, serr := os.Stat(tmp.Name() + "-wal"); serr == nil {
			err = fmt.Errorf("import: the new database's journal %s-wal was not folded into it", tmp.Name())
		}
	}
	if err == nil {
		// A link, unlike a rename, never replaces a file that appeared
		// at path meanwhile.
		err = os.Link(tmp.Name(), path)
	}
	remove()
	if err != nil {
		return 0, err
	}
	return id, nil
}
