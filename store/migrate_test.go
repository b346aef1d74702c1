package store

import (
	"bytes"
	"context"
	"errors"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestMigrateFromEveryVersion brings a database at each earlier schema
// version, holding data written at that version, up to the latest, and
// checks the data survives and each migration is recorded once.
func TestMigrateFromEveryVersion(t *testing.T) {
	ctx := context.Background()
	latest := LatestVersion()
	if latest < 1 {
		t.Fatal("no migrations embedded")
	}
	for k := 0; k <= latest; k++ {
		path := filepath.Join(t.TempDir(), "old.db")
		old, err := open(path)
		if err != nil {
			t.Fatal(err)
		}
		if err := old.MigrateTo(ctx, k); err != nil {
			t.Fatalf("migrate to %d: %v", k, err)
		}
		if v, _ := old.SchemaVersion(ctx); v != k {
			t.Fatalf("at version %d, SchemaVersion = %d", k, v)
		}
		var w workshop.Workshop
		if k >= 1 { // version 1: workshops and the panel's record
			w = workshop.Workshop{Title: "Written at an old version (invented)"}
			if k < 5 {
				// Before 0005 there is no workshop_deletions table, which
				// today's CreateWorkshop reads for the next id: the row is
				// written as that version's own columns allow.
				res, err := old.w.ExecContext(ctx, `INSERT INTO workshops (title, created) VALUES (?, ?)`, w.Title, formatTime(now()))
				if err != nil {
					t.Fatalf("version %d: %v", k, err)
				}
				if w.ID, err = res.LastInsertId(); err != nil {
					t.Fatal(err)
				}
			} else if err := old.CreateWorkshop(ctx, &w); err != nil {
				t.Fatalf("version %d: %v", k, err)
			}
		}
		if k >= 2 { // version 2: weights and agreed priors
			if err := old.SetWeights(ctx, &workshop.Weights{WorkshopID: w.ID, Scheme: workshop.WeightsEqual, Reason: "v2"}); err != nil {
				t.Fatalf("version %d: %v", k, err)
			}
		}
		if k >= 3 { // version 3: facilitator sign-in
			if err := old.SetFacilitatorHash(ctx, []byte("v3")); err != nil {
				t.Fatalf("version %d: %v", k, err)
			}
		}
		old.Close()

		db, err := Open(path)
		if err != nil {
			t.Fatalf("open at version %d: %v", k, err)
		}
		if v, _ := db.SchemaVersion(ctx); v != latest {
			t.Fatalf("from version %d: SchemaVersion = %d, want %d", k, v, latest)
		}
		var n, distinct int
		if err := db.r.QueryRowContext(ctx,
			`SELECT COUNT(*), COUNT(DISTINCT version) FROM schema_migrations WHERE applied <> ''`).Scan(&n, &distinct); err != nil {
			t.Fatal(err)
		}
		if n != latest || distinct != latest {
			t.Fatalf("from version %d: %d migration rows (%d distinct), want %d", k, n, distinct, latest)
		}
		if k >= 1 {
			got, err := db.Workshop(ctx, w.ID)
			if err != nil || got.Title != w.Title {
				t.Fatalf("from version %d: workshop %+v, %v", k, got, err)
			}
		}
		if k >= 2 {
			if got, err := db.Weights(ctx, w.ID); err != nil || got.Reason != "v2" {
				t.Fatalf("from version %d: weights %+v, %v", k, got, err)
			}
		}
		if k >= 3 {
			if h, err := db.FacilitatorHash(ctx); err != nil || string(h) != "v3" {
				t.Fatalf("from version %d: facilitator hash %q, %v", k, h, err)
			}
		}
		if k >= 1 { // version 4: every workshop has its panel salt
			old, err := db.PanelSalt(ctx, w.ID)
			if err != nil || len(old) != 32 {
				t.Fatalf("from version %d: panel salt %x, %v", k, old, err)
			}
			nw := workshop.Workshop{Title: "Made after the upgrade (invented)"}
			if err := db.CreateWorkshop(ctx, &nw); err != nil {
				t.Fatal(err)
			}
			if salt, err := db.PanelSalt(ctx, nw.ID); err != nil || len(salt) != 32 || bytes.Equal(salt, old) {
				t.Fatalf("from version %d: new workshop's panel salt %x (old %x), %v", k, salt, old, err)
			}
			if _, err := db.w.ExecContext(ctx, `UPDATE panel_salts SET salt = randomblob(32)`); err == nil {
				t.Fatalf("from version %d: a panel salt was changed", k)
			}
		}
		// A second Migrate is a no-op.
		if err := db.Migrate(ctx); err != nil {
			t.Fatal(err)
		}
		db.Close()
	}
}

func TestMigrateToRejectsUnknownVersion(t *testing.T) {
	db := newDB(t)
	if err := db.MigrateTo(context.Background(), LatestVersion()+1); err == nil {
		t.Fatal("migrating past the latest version succeeded")
	}
}

// TestNewerSchemaIsRefused: a file a newer Parley has migrated (a version
// past the embedded ones) is refused by Open with a *NewerSchemaError
// naming both versions, and is left as it was; the slice of migrations to
// apply ran from the file's version to the latest, backwards, and panicked.
func TestNewerSchemaIsRefused(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "newer.db")
	db, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	latest := LatestVersion()
	if _, err := db.w.ExecContext(ctx, `INSERT INTO schema_migrations (version, name, applied) VALUES (?, 'from_a_newer_parley.sql', '2030-01-01T00:00:00Z')`, latest+1); err != nil {
		t.Fatal(err)
	}
	db.Close()

	_, err = Open(path)
	var ne *NewerSchemaError
	if !errors.As(err, &ne) || ne.Version != latest+1 || ne.Latest != latest {
		t.Fatalf("Open of a newer database: %v, want a *NewerSchemaError %d > %d", err, latest+1, latest)
	}
	for _, want := range []string{path, "schema version " + strconv.Itoa(latest+1), "newer Parley"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message %q does not say %q", err, want)
		}
	}
	old, err := open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer old.Close()
	if v, err := old.SchemaVersion(ctx); err != nil || v != latest+1 {
		t.Fatalf("after the refusal, schema version %d, %v", v, err)
	}
}

// TestHalfAppliedMigrationIsUndone: a database holding part of a step
// without its row in schema_migrations (a column added by hand) fails
// that step with a *MigrationError naming the step and the version the
// database stays at; the step is undone, the file is at its old
// version with its data, and opens again once the part is gone.
func TestHalfAppliedMigrationIsUndone(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "half.db")
	old, err := open(path)
	if err != nil {
		t.Fatal(err)
	}
	const before = 12 // the step after it, 0013, adds questions.log_uniform_background
	if err := old.MigrateTo(ctx, before); err != nil {
		t.Fatal(err)
	}
	w := workshop.Workshop{Title: "Half applied (invented)"}
	if err := old.CreateWorkshop(ctx, &w); err != nil {
		t.Fatal(err)
	}
	// Step 0013's column, made by hand: the step fails as it adds it.
	if _, err := old.w.ExecContext(ctx, `ALTER TABLE questions ADD COLUMN log_uniform_background INTEGER NOT NULL DEFAULT 0`); err != nil {
		t.Fatal(err)
	}
	old.Close()

	_, err = Open(path)
	var me *MigrationError
	if !errors.As(err, &me) || me.Version != before || me.Name != "0013_log_uniform_background.sql" ||
		!strings.Contains(err.Error(), "was undone") || !strings.Contains(err.Error(), "schema version "+strconv.Itoa(before)) {
		t.Fatalf("Open of a half-applied database: %v; want a *MigrationError at version %d", err, before)
	}
	db, err := open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if v, err := db.SchemaVersion(ctx); err != nil || v != before {
		t.Fatalf("after the failed step: version %d, %v", v, err)
	}
	if got, err := db.Workshop(ctx, w.ID); err != nil || got.Title != w.Title {
		t.Fatalf("after the failed step: workshop %+v, %v", got, err)
	}
}
