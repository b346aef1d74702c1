// Package store keeps Parley's workshops in one SQLite file: the elicit
// domain's types, persisted with their full history. SQL lives only here
// and in package migrations.
package store

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"log/slog"
	"net/url"
	"path/filepath"
	"sync"
	"sync/atomic"
	"time"

	_ "github.com/mattn/go-sqlite3" // registers the "sqlite3" driver
	"github.com/parley-elicit/parley/elicit/workshop"
)

// DB is a Parley database. Writes go through one connection, each in an
// IMMEDIATE transaction, so concurrent saves queue in Go instead of failing
// with SQLITE_BUSY; reads use a small pool of their own, which WAL lets
// run alongside the writer. A DB is safe for concurrent use.
type DB struct {
	path string
	w    *sql.DB // the single writer
	r    *sql.DB // readers
	rows *rows   // rows every expert request reads (cache.go)
	log  atomic.Pointer[slog.Logger]
	// ahead holds the workshops whose stamps run ahead of the clock and
	// have been warned of (stamp): one warning each while it lasts.
	ahead sync.Map
	// clockKept is set once the schema is known to have fact_clock
	// (keepsClock).
	clockKept atomic.Bool
}

// SetLogger sets where the store's warnings go (slog.Default until set).
func (db *DB) SetLogger(l *slog.Logger) { db.log.Store(l) }

// logger is the store's logger.
func (db *DB) logger() *slog.Logger {
	if l := db.log.Load(); l != nil {
		return l
	}
	return slog.Default()
}

// dsn builds the connection string. synchronous=FULL makes SQLite sync the
// WAL at every commit, so a save that was acknowledged survives a process
// kill and a power cut; NORMAL would survive only the first. A workshop
// saves a few revisions a second, so the extra fsync costs nothing that
// matters.
func dsn(path string, readOnly bool) string {
	v := url.Values{}
	v.Set("_journal_mode", "WAL")
	v.Set("_foreign_keys", "on")
	v.Set("_busy_timeout", "5000")
	v.Set("_synchronous", "FULL")
	if readOnly {
		v.Set("mode", "ro")
	} else {
		v.Set("_txlock", "immediate")
	}
	return "file:" + url.PathEscape(path) + "?" + v.Encode()
}

// Open opens (creating if needed) the database at path and migrates it to
// the latest schema version.
func Open(path string) (*DB, error) {
	db, err := open(path)
	if err != nil {
		return nil, err
	}
	if err := db.Migrate(context.Background()); err != nil {
		db.Close()
		return nil, err
	}
	return db, nil
}

// open opens the database without migrating it.
func open(path string) (*DB, error) {
	if path == "" {
		return nil, errors.New("store: empty database path")
	}
	if err := oneName(path); err != nil {
		return nil, err
	}
	w, err := sql.Open("sqlite3", dsn(path, false))
	if err != nil {
		return nil, fmt.Errorf("store: open %s: %w", path, err)
	}
	w.SetMaxOpenConns(1)
	w.SetConnMaxIdleTime(0)
	// Ping creates the file and switches it to WAL before any reader opens
	// it read-only.
	if err := w.Ping(); err != nil {
		w.Close()
		return nil, fmt.Errorf("store: open %s: %w", path, err)
	}
	r, err := sql.Open("sqlite3", dsn(path, true))
	if err != nil {
		w.Close()
		return nil, fmt.Errorf("store: open %s: %w", path, err)
	}
	r.SetMaxOpenConns(4)
	return &DB{path: path, w: w, r: r, rows: newRows()}, nil
}

// Close closes both pools.
func (db *DB) Close() error {
	return errors.Join(db.r.Close(), db.w.Close())
}

// Path is the database file's path.
func (db *DB) Path() string { return db.path }

// querier is what reads need: the reader pool, or one transaction when
// several reads must see the same snapshot.
type querier interface {
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
	QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row
}

// write runs fn in one IMMEDIATE transaction on the writer, committing
// when fn returns nil and rolling back otherwise; then it moves the row
// cache's generation on (cache.go).
func (db *DB) write(ctx context.Context, fn func(tx *sql.Tx) error) error {
	defer db.rows.changed()
	return db.writeRevision(ctx, fn)
}

// writeRevision is write for a transaction that only adds revisions,
// which no cached row holds.
func (db *DB) writeRevision(ctx context.Context, fn func(tx *sql.Tx) error) error {
	tx, err := db.w.BeginTx(ctx, nil)
	if err != nil {
		return fmt.Errorf("store: begin: %w", err)
	}
	if err := fn(tx); err != nil {
		tx.Rollback()
		return err
	}
	if err := tx.Commit(); err != nil {
		return fmt.Errorf("store: commit: %w", err)
	}
	return nil
}

// IntegrityCheck runs PRAGMA integrity_check and returns its verdict,
// "ok" for a sound file.
func (db *DB) IntegrityCheck(ctx context.Context) (string, error) {
	rows, err := db.r.QueryContext(ctx, "PRAGMA integrity_check")
	if err != nil {
		return "", fmt.Errorf("store: integrity check: %w", err)
	}
	defer rows.Close()
	var out string
	for rows.Next() {
		var line string
		if err := rows.Scan(&line); err != nil {
			return "", fmt.Errorf("store: integrity check: %w", err)
		}
		if out != "" {
			out += "\n"
		}
		out += line
	}
	return out, rows.Err()
}

// Backup writes a consistent copy of the database to dest with VACUUM
// INTO, which reads one snapshot and so may run while the server writes.
// dest must not exist. dest is a file's name: SQLite reads a name that
// starts with "file:" as a URI ("file:copy.db?mode=memory"), so the name
// is made absolute first, which no URI is.
func (db *DB) Backup(ctx context.Context, dest string) error {
	if dest == "" {
		return errors.New("store: backup: empty destination path")
	}
	abs, err := filepath.Abs(dest)
	if err != nil {
		return fmt.Errorf("store: backup to %s: %w", dest, err)
	}
	if _, err := db.r.ExecContext(ctx, "VACUUM INTO ?", abs); err != nil {
		return fmt.Errorf("store: backup to %s: %w", dest, err)
	}
	return nil
}

// Times are stored as UTC RFC 3339 text with nanoseconds.
func formatTime(t time.Time) string { return t.UTC().Format(time.RFC3339Nano) }

func parseTime(s string) (time.Time, error) {
	t, err := time.Parse(time.RFC3339Nano, s)
	if err != nil {
		return time.Time{}, fmt.Errorf("store: bad stored time %q: %w", s, err)
	}
	return t.UTC(), nil
}

func boolInt(b bool) int {
	if b {
		return 1
	}
	return 0
}

// notFound wraps workshop.ErrNotFound with what was looked for.
func notFound(what string, id int64) error {
	return fmt.Errorf("store: %s %d: %w", what, id, workshop.ErrNotFound)
}

// FoldJournal copies the commits waiting in the write-ahead log
// (PATH-wal) into the database file itself (PRAGMA wal_checkpoint,
// PASSIVE: it waits for no reader and no writer waits long for it).
// SQLite does so by itself only once the log reaches 1,000 pages, some
// 4 MB, which a whole workshop may never write: until then a copy of the
// file alone (cp while the server runs) held none of it. `parley serve`
// calls it every few seconds.
func (db *DB) FoldJournal(ctx context.Context) error {
	if _, err := db.w.ExecContext(ctx, "PRAGMA wal_checkpoint(PASSIVE)"); err != nil {
		return fmt.Errorf("store: fold the journal into %s: %w", db.path, err)
	}
	return nil
}
