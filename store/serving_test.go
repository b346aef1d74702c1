package store

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestClaimServing: a database is claimed by one server at a time; the
// refusal names the holder; a released claim can be taken again.
func TestClaimServing(t *testing.T) {
	path := filepath.Join(t.TempDir(), "parley.db")
	first, err := ClaimServing(path)
	if err != nil {
		t.Fatal(err)
	}
	// flock belongs to the open file, so a second claim from this very
	// process is refused like one from another process.
	_, err = ClaimServing(path)
	var held *HeldError
	if !errors.As(err, &held) || held.PID != os.Getpid() || held.Database != path || held.LockFile != path+".lock" {
		t.Fatalf("second claim: %v (%+v)", err, held)
	}
	if err := first.Release(); err != nil {
		t.Fatal(err)
	}
	again, err := ClaimServing(path)
	if err != nil {
		t.Fatalf("claim after release: %v", err)
	}
	again.Release()
}

func TestCheckWritable(t *testing.T) {
	dir := t.TempDir()
	if err := CheckWritable(filepath.Join(dir, "new.db")); err != nil {
		t.Errorf("a new file in a writable folder: %v", err)
	}
	var nw *NotWritableError
	missing := filepath.Join(dir, "gone", "p.db")
	if err := CheckWritable(missing); !errors.As(err, &nw) || !errors.Is(err, os.ErrNotExist) || !strings.Contains(err.Error(), "does not exist") {
		t.Errorf("missing folder: %v", err)
	}
	file := filepath.Join(dir, "f")
	if err := os.WriteFile(file, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := CheckWritable(filepath.Join(file, "p.db")); !errors.As(err, &nw) || !strings.Contains(err.Error(), "is not a folder") {
		t.Errorf("a file as the folder: %v", err)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("the check left files behind: %v", entries)
	}
}
