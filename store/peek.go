package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io"
	"net/url"
	"os"
	"path/filepath"
	"strconv"
)

// NotParleyError says a file SQLite can read holds no Parley database: it
// has no schema_migrations table, so opening it with Open would write
// Parley's tables into it. WALCopy marks the likely cause when the file
// is a bare SQLite header in write-ahead-log mode with no journal beside
// it: a copy (cp) of a database taken while a server ran, whose contents
// were all still in the PATH-wal journal the copy left behind.
type NotParleyError struct {
	Database string
	Tables   int // tables it holds, none of them Parley's
	WALCopy  bool
}

func (e *NotParleyError) Error() string {
	switch {
	case e.WALCopy:
		return fmt.Sprintf("%s holds no tables: it looks like a copy of a Parley database taken while the server ran, "+
			"without its %s-wal journal, which held the contents; copy a database with parley backup "+
			"(or stop the server first), and give the file the server uses", e.Database, e.Database)
	case e.Tables > 0:
		tables := "1 table, not Parley's"
		if e.Tables > 1 {
			tables = strconv.Itoa(e.Tables) + " tables, none of them Parley's"
		}
		return fmt.Sprintf("%s is an SQLite database of another program (%s); give the file the server uses", e.Database, tables)
	}
	return fmt.Sprintf("%s holds no Parley database (it is empty); give the file the server uses", e.Database)
}

// CheckParley refuses, with a *NotParleyError and without changing it, an
// existing file that SQLite reads but that holds no Parley database. It
// reads the file through a read-only connection, which sees a running
// server's journal as SQLite does. An error reading it is returned as it
// is (Open then says what it finds).
func CheckParley(path string) error {
	// Looked at first: a read-only connection to a file in WAL mode makes
	// its journal files. A file in WAL mode without a journal beside it
	// has nothing outside it to read, so it is read as immutable, which
	// makes none.
	_, err := os.Lstat(path + "-wal")
	noJournal := errors.Is(err, os.ErrNotExist)
	wal := walHeader(path)
	mode := "mode=ro"
	if wal && noJournal {
		mode = "immutable=1"
	}
	r, err := sql.Open("sqlite3", "file:"+url.PathEscape(path)+"?"+mode+"&_busy_timeout=5000")
	if err != nil {
		return err
	}
	defer r.Close()
	var tables, parley int
	err = r.QueryRowContext(context.Background(),
		`SELECT COUNT(*), COUNT(*) FILTER (WHERE name = 'schema_migrations') FROM sqlite_schema WHERE type = 'table'`).Scan(&tables, &parley)
	if err != nil {
		return err
	}
	if parley > 0 {
		return nil
	}
	return &NotParleyError{Database: path, Tables: tables, WALCopy: tables == 0 && noJournal && wal}
}

// walHeader reports whether the SQLite file at path says it is in
// write-ahead-log mode (its header's read and write versions, bytes 18
// and 19, are 2).
func walHeader(path string) bool {
	f, err := os.Open(path)
	if err != nil {
		return false
	}
	defer f.Close()
	var h [20]byte
	if _, err := io.ReadFull(f, h[:]); err != nil {
		return false
	}
	return h[18] == 2 && h[19] == 2
}

// OldSchemaError says a database that must be read without writing (its
// file or folder is read-only) was written by an older Parley: it needs
// the upgrade Open would make, which cannot be written.
type OldSchemaError struct {
	Database string
	Version  int // the database's schema version
	Latest   int
}

func (e *OldSchemaError) Error() string {
	return fmt.Sprintf("%s has schema version %d, from an older Parley, and this one reads version %d: "+
		"it must be upgraded, which writes to it, and it cannot be written here; "+
		"copy it (cp, with any %s-wal beside it) to a writable folder and give the copy",
		e.Database, e.Version, e.Latest, e.Database)
}

// OpenReadOnly opens the database at path for reading only, for the
// commands that only read (export, backup) when the file or its folder
// cannot be written: Open's writer and its upgrade need both. It changes
// nothing and makes no files when the folder is read-only or its disk
// full and no journal is beside the file (nothing can then be writing it, so it is read as
// immutable). A database at another schema version than this Parley's is
// refused (*OldSchemaError, *NewerSchemaError), as is a file that holds
// no Parley database (*NotParleyError). Writes through it fail.
func OpenReadOnly(path string) (*DB, error) {
	if path == "" {
		return nil, errors.New("store: empty database path")
	}
	if err := oneName(path); err != nil {
		return nil, err
	}
	if err := CheckParley(path); err != nil {
		return nil, err
	}
	_, err := os.Lstat(path + "-wal")
	noJournal := errors.Is(err, os.ErrNotExist)
	v := url.Values{}
	v.Set("_busy_timeout", "5000")
	v.Set("_foreign_keys", "on")
	v.Set("mode", "ro")
	if noJournal && walHeader(path) && !dirWritable(filepath.Dir(path)) {
		v.Set("immutable", "1")
	}
	r, err := sql.Open("sqlite3", "file:"+url.PathEscape(path)+"?"+v.Encode())
	if err != nil {
		return nil, fmt.Errorf("store: open %s: %w", path, err)
	}
	r.SetMaxOpenConns(4)
	db := &DB{path: path, w: r, r: r, rows: newRows()}
	ctx := context.Background()
	version, err := db.SchemaVersion(ctx)
	if err != nil {
		r.Close()
		return nil, fmt.Errorf("store: open %s: %w", path, err)
	}
	switch latest := LatestVersion(); {
	case version > latest:
		r.Close()
		return nil, &NewerSchemaError{Database: path, Version: version, Latest: latest}
	case version < latest:
		r.Close()
		return nil, &OldSchemaError{Database: path, Version: version, Latest: latest}
	}
	return db, nil
}

// dirWritable reports whether a file can be made and written in dir (a
// full disk makes an empty file, but takes no byte).
func dirWritable(dir string) bool {
	f, err := os.CreateTemp(dir, ".parley-write-check-*")
	if err != nil {
		return false
	}
	_, err = f.Write([]byte{0})
	if err == nil {
		err = f.Sync()
	}
	f.Close()
	os.Remove(f.Name())
	return err == nil
}
