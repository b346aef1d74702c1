package store

import (
	"context"
	"database/sql"
	"fmt"
	"io/fs"
	"sort"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/migrations"
)

// migration is one numbered schema step.
type migration struct {
	version int
	name    string
	sql     string
}

// loadMigrations reads migrations.FS, ordered by version. File names are
// NNNN_name.sql with versions 1, 2, 3, ... and no gaps.
func loadMigrations() ([]migration, error) {
	names, err := fs.Glob(migrations.FS, "*.sql")
	if err != nil {
		return nil, fmt.Errorf("store: migrations: %w", err)
	}
	var ms []migration
	for _, n := range names {
		num, _, ok := strings.Cut(n, "_")
		v, err := strconv.Atoi(num)
		if !ok || err != nil || v < 1 {
			return nil, fmt.Errorf("store: migration %s: name must be NNNN_name.sql", n)
		}
		b, err := fs.ReadFile(migrations.FS, n)
		if err != nil {
			return nil, fmt.Errorf("store: migration %s: %w", n, err)
		}
		ms = append(ms, migration{version: v, name: n, sql: string(b)})
	}
	sort.Slice(ms, func(i, j int) bool { return ms[i].version < ms[j].version })
	for i, m := range ms {
		if m.version != i+1 {
			return nil, fmt.Errorf("store: migration %s: expected version %d", m.name, i+1)
		}
	}
	return ms, nil
}

// LatestVersion is the schema version the embedded migrations reach.
func LatestVersion() int {
	ms, err := loadMigrations()
	if err != nil {
		return 0
	}
	return len(ms)
}

// Migrate applies every migration not yet applied.
func (db *DB) Migrate(ctx context.Context) error {
	return db.MigrateTo(ctx, LatestVersion())
}

// MigrateTo applies the migrations after the current version up to and
// including version, each in its own transaction together with its row in
// schema_migrations. It never goes down: a database already past version
// is left alone.
func (db *DB) MigrateTo(ctx context.Context, version int) error {
	ms, err := loadMigrations()
	if err != nil {
		return err
	}
	if version < 0 || version > len(ms) {
		return fmt.Errorf("store: migrate: version %d: must be 0 to %d", version, len(ms))
	}
	if _, err := db.w.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_migrations (
		version INTEGER PRIMARY KEY,
		name    TEXT NOT NULL,
		applied TEXT NOT NULL
	)`); err != nil {
		return fmt.Errorf("store: migrate: %w", err)
	}
	current, err := db.SchemaVersion(ctx)
	if err != nil {
		return err
	}
	if current > len(ms) {
		return &NewerSchemaError{Database: db.path, Version: current, Latest: len(ms)}
	}
	if current >= version {
		return nil
	}
	// A new database (version 0) has no server of another version; an
	// older one served by another process is not upgraded under it.
	if current > 0 {
		if pid, held, err := servedElsewhere(db.path); err != nil {
			return err
		} else if held {
			return &ServedUpgradeError{Database: db.path, From: current, To: version, PID: pid}
		}
	}
	for _, m := range ms[current:version] {
		err := db.write(ctx, func(tx *sql.Tx) error {
			// Another process may have applied it since we looked.
			var done int
			if err := tx.QueryRowContext(ctx,
				`SELECT COUNT(*) FROM schema_migrations WHERE version = ?`, m.version).Scan(&done); err != nil {
				return err
			}
			if done > 0 {
				return nil
			}
			if _, err := tx.ExecContext(ctx, m.sql); err != nil {
				return err
			}
			_, err := tx.ExecContext(ctx,
				`INSERT INTO schema_migrations (version, name, applied) VALUES (?, ?, ?)`,
				m.version, m.name, formatTime(now()))
			return err
		})
		if err != nil {
			return &MigrationError{Database: db.path, Name: m.name, Version: m.version - 1, Err: err}
		}
	}
	return nil
}

// MigrationError says a migration step failed: its transaction was rolled
// back, so the database is at the version before it, as it was. A step
// whose tables or columns are already there (a half-applied step, by
// hand or another program, without its row in schema_migrations) fails
// this way, as does one on a full disk.
type MigrationError struct {
	Database string
	Name     string // the step's file
	Version  int    // the database's version, unchanged
	Err      error
}

func (e *MigrationError) Error() string {
	return fmt.Sprintf("store: migration %s: %v; the upgrade of %s stopped there and was undone, so the database "+
		"is at schema version %d as it was (where the error names a table or column that already exists, part of "+
		"the step was made by hand or by another program: restore the database from a backup)", e.Name, e.Err, e.Database, e.Version)
}

func (e *MigrationError) Unwrap() error { return e.Err }

// NewerSchemaError says the database was last migrated by a newer Parley:
// its schema has steps this binary does not know, so it could misread or
// damage what they hold. Nothing is changed.
type NewerSchemaError struct {
	Database string
	Version  int // the database's schema version
	Latest   int // the latest this binary knows
}

func (e *NewerSchemaError) Error() string {
	return fmt.Sprintf("%s has schema version %d, and this Parley knows versions up to %d: "+
		"a newer Parley has upgraded it; run that newer Parley on it (this one changed nothing)",
		e.Database, e.Version, e.Latest)
}

// SchemaVersion is the highest migration applied, 0 for a new file.
func (db *DB) SchemaVersion(ctx context.Context) (int, error) {
	var v sql.NullInt64
	err := db.w.QueryRowContext(ctx, `SELECT MAX(version) FROM schema_migrations`).Scan(&v)
	if err != nil {
		return 0, fmt.Errorf("store: schema version: %w", err)
	}
	return int(v.Int64), nil
}
