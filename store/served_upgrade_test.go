package store

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// TestNoUpgradeUnderAnotherServer: a command of a newer Parley (export,
// backup, import-answers…) that opens a database another process is
// serving at an older schema refuses to upgrade it, naming the server's
// process and both versions, and leaves the file as it was: the old
// server would go on writing its own schema's rows into the upgraded
// file. At the same schema it opens the file as before (an export while
// the workshop runs); a server's own claim upgrades its file; and once
// the other server stops, the upgrade goes ahead. The other process is
// played by a second open file description holding the lock file's
// flock, which the kernel treats exactly as another process's (flock(2)
// locks belong to open file descriptions).
func TestNoUpgradeUnderAnotherServer(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "parley.db")
	older := LatestVersion() - 1
	old, err := open(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := old.MigrateTo(ctx, older); err != nil {
		t.Fatal(err)
	}
	old.Close()

	// Another process serves it: an exclusive flock with its id written.
	server, err := os.OpenFile(LockFile(path), os.O_RDWR|os.O_CREATE, 0o644)
	if err != nil {
		t.Fatal(err)
	}
	if err := syscall.Flock(int(server.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		t.Fatal(err)
	}
	if _, err := server.WriteString("4242\n"); err != nil {
		t.Fatal(err)
	}
	_, err = Open(path)
	var su *ServedUpgradeError
	if !errors.As(err, &su) || su.From != older || su.To != LatestVersion() || su.PID != 4242 {
		t.Fatalf("open under another server: %v, want a ServedUpgradeError from %d to %d naming process 4242", err, older, LatestVersion())
	}
	if msg := err.Error(); !strings.Contains(msg, "is being served by process 4242 at schema version") || !strings.Contains(msg, "nothing was changed") {
		t.Errorf("the refusal reads %q", msg)
	}
	db, err := open(path)
	if err != nil {
		t.Fatal(err)
	}
	if v, err := db.SchemaVersion(ctx); err != nil || v != older {
		t.Errorf("schema version %d (%v) after the refusal, want %d unchanged", v, err, older)
	}
	// At the server's own version the file opens as before.
	if err := db.MigrateTo(ctx, older); err != nil {
		t.Errorf("at the same version: %v", err)
	}
	db.Close()

	// The server stops; the upgrade goes ahead.
	server.Close()
	db, err = Open(path)
	if err != nil {
		t.Fatalf("after the server stopped: %v", err)
	}
	if v, _ := db.SchemaVersion(ctx); v != LatestVersion() {
		t.Errorf("schema version %d, want %d", v, LatestVersion())
	}
	db.Close()
}

// TestServerUpgradesItsOwnFile: `parley serve` claims the file, then
// opens it; its own claim is no other server's, so an older file is
// upgraded as it starts.
func TestServerUpgradesItsOwnFile(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "parley.db")
	old, err := open(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := old.MigrateTo(ctx, LatestVersion()-1); err != nil {
		t.Fatal(err)
	}
	old.Close()
	claim, err := ClaimServing(path)
	if err != nil {
		t.Fatal(err)
	}
	defer claim.Release()
	db, err := Open(path)
	if err != nil {
		t.Fatalf("the server's own open: %v", err)
	}
	defer db.Close()
	if v, _ := db.SchemaVersion(ctx); v != LatestVersion() {
		t.Errorf("schema version %d, want %d", v, LatestVersion())
	}
}
