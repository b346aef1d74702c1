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

	"github.com/mattn/go-sqlite3"

	"github.com/parley-elicit/parley/store"
)

func init() {
	command("backup", "copy the database consistently, even while the server runs (--db, --out)", runBackup)
}

func runBackup(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("backup", stderr)
	dbPath := fs.String("db", "", "database `file` to copy")
	out := fs.String("out", "", "new `file` for the copy; must not exist")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	if *out == "" {
		return fail(stderr, "backup", badInput("out", "a file for the copy is required"))
	}
	// A name SQLite keeps beside the database would be removed with the
	// database's journal when this command closes it, copy and all.
	if beside, ok := overDatabase(*dbPath, *out); ok && *dbPath != "" {
		return fail(stderr, "backup", badInput("out", "%s is %s; write the copy to a file of its own", *out, beside))
	}
	if _, err := os.Lstat(*out); err == nil {
		return fail(stderr, "backup", badInput("out", "%s already exists; backup never overwrites", *out))
	}
	if err := creatable("out", *out); err != nil {
		return fail(stderr, "backup", err)
	}
	log := commandLog(stderr)
	db, err := openForReading(*dbPath, log)
	if err != nil {
		return fail(stderr, "backup", err)
	}
	defer db.Close()
	ctx := context.Background()
	if err := db.Backup(ctx, *out); err != nil {
		// A copy cut short (a full disk, a size limit) would stay behind
		// as an empty or partial file under the name asked for, and the
		// next attempt would be refused as "already exists". --out did
		// not exist before (checked above), so what is there is ours.
		if rmErr := os.Remove(*out); rmErr == nil || errors.Is(rmErr, os.ErrNotExist) {
			err = fmt.Errorf("%w (nothing was kept at %s)", err, *out)
		}
		return fail(stderr, "backup", err)
	}
	verdict, err := checkCopy(ctx, *out, log)
	if err != nil {
		return fail(stderr, "backup", err)
	}
	if verdict != "ok" {
		return fail(stderr, "backup", fmt.Errorf("the copy %s fails its integrity check: %s", *out, verdict))
	}
	fmt.Fprintf(stdout, "backup written to %s (integrity check ok)\n", *out)
	return exitOK
}

func checkCopy(ctx context.Context, path string, log *slog.Logger) (string, error) {
	cp, err := openStore(path, log)
	if err != nil {
		return "", err
	}
	defer cp.Close()
	return cp.IntegrityCheck(ctx)
}

// openExisting opens a database that must already exist, with the
// command's log (openStore); store.Open would otherwise create an empty
// one at a mistyped path.
func openExisting(path string, log *slog.Logger) (*store.DB, error) {
	if path == "" {
		return nil, badInput("db", "a database file is required")
	}
	if err := existingDatabase(path); err != nil {
		return nil, err
	}
	if err := parleyDatabase(path); err != nil {
		return nil, err
	}
	db, err := openStore(path, log)
	if err != nil {
		return nil, notADatabase(path, fmt.Errorf("open %s: %w", path, err))
	}
	return db, nil
}

// notADatabase turns SQLite's refusal of a file that is no database (a
// record or a sheet given as --db by mistake) into bad input naming
// --db, and its refusal of a damaged one into a message saying so and
// what to do; other errors pass unchanged.
func notADatabase(path string, err error) error {
	var se sqlite3.Error
	if errors.As(err, &se) && se.Code == sqlite3.ErrNotADB {
		return badInput("db", "%s is not a Parley database (SQLite reads no database in it); give the file the server uses", path)
	}
	if errors.As(err, &se) && se.Code == sqlite3.ErrCorrupt {
		// A file cut short or overwritten in part (a copy taken as the
		// server wrote, a failing disk): nothing here can mend it.
		return fmt.Errorf("%s is damaged (SQLite: %v): restore it from a backup made with parley backup, "+
			"or from its last exported record with parley import; nothing was changed", path, se)
	}
	return err
}

// openForReading is openExisting for the commands that only read
// (export, backup): a database whose file or folder cannot be written (a
// read-only disk, another user's file) is opened read-only instead,
// as it stands, so that it can still be exported or copied to a writable
// disk; openExisting, which opens the writer and upgrades, refused it
// with "attempt to write a readonly database".
func openForReading(path string, log *slog.Logger) (*store.DB, error) {
	if path == "" {
		return nil, badInput("db", "a database file is required")
	}
	if err := existingDatabase(path); err != nil {
		return nil, err
	}
	var nw *store.NotWritableError
	if err := store.CheckWritable(path); !errors.As(err, &nw) {
		return openExisting(path, log)
	}
	db, err := store.OpenReadOnly(path)
	var np *store.NotParleyError
	if errors.As(err, &np) {
		return nil, badInput("db", "%v", err)
	}
	if err != nil {
		return nil, notADatabase(path, fmt.Errorf("open %s (read-only): %w", path, err))
	}
	return db, nil
}

// parleyDatabase refuses, as bad input naming --db, an existing file
// that holds no Parley database (store.CheckParley): opening it would
// write Parley's empty tables into another program's database, or into a
// copy taken while the server ran without its journal, and the command
// would then say only that the workshop is not there.
func parleyDatabase(path string) error {
	var np *store.NotParleyError
	if err := store.CheckParley(path); errors.As(err, &np) {
		return badInput("db", "%v", err)
	}
	return nil
}

// notAnothersDatabase is parleyDatabase for the commands that may make a
// database in a file that holds none (serve, import): an empty file is
// theirs to fill, while another program's database or a copy taken
// without its journal is refused as parleyDatabase refuses it.
func notAnothersDatabase(path string) error {
	var np *store.NotParleyError
	if err := store.CheckParley(path); errors.As(err, &np) && (np.Tables > 0 || np.WALCopy) {
		return badInput("db", "%v", err)
	}
	return nil
}

// existingDatabase checks that --db names a file that exists: not a
// folder, whose many names (a folder's "." and "..") read as hard links
// the store refuses, nor a mistyped name.
func existingDatabase(path string) error {
	fi, err := os.Stat(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return badInput("db", "no database file %s (give the file the server uses, parley.db unless its --db said otherwise)", path)
	case err != nil:
		return badInput("db", "%v", err)
	case fi.IsDir():
		return badInput("db", "%s is a folder; name the database file in it", path)
	}
	return nil
}

// inFolder checks that the file a flag names can be made where it is
// named: its folder exists and is a folder. Left to the write, a missing
// folder was reported by the name of a temporary file nobody typed, with
// exit status 1.
func inFolder(flag, path string) error {
	dir := filepath.Dir(path)
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return badInput(flag, "the folder %s does not exist; create it, or name a file in an existing folder", dir)
	case err != nil:
		return badInput(flag, "%v", err)
	case !fi.IsDir():
		return badInput(flag, "%s is not a folder", dir)
	}
	return nil
}

// creatable checks, by making and removing a hidden file beside it, that
// a new file can be made where a flag names one; a folder that cannot be
// written to is bad input naming the flag, not an error about a
// temporary name or "unable to open database" after the work is done.
func creatable(flag, path string) error {
	if err := inFolder(flag, path); err != nil {
		return err
	}
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".check-*")
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return badInput(flag, "cannot make a file in %s: %v", filepath.Dir(path), err)
	}
	f.Close()
	return os.Remove(f.Name())
}
