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

// TestClaimServingIsOnTheFile: the claim is on the database file, not on
// the name it is given. A symbolic link to a served file (or to its
// folder) meets the claim; a file with a second hard link is refused,
// since SQLite would keep a journal per name. Before, a server started on
// a link beside a running one, and through a hard link did not even see
// the first's commits.
func TestClaimServingIsOnTheFile(t *testing.T) {
	dir, other := t.TempDir(), t.TempDir()
	path := filepath.Join(dir, "parley.db")
	if err := os.WriteFile(path, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	first, err := ClaimServing(path)
	if err != nil {
		t.Fatal(err)
	}
	defer first.Release()

	fileLink := filepath.Join(other, "link.db")
	dirLink := filepath.Join(other, "folder")
	for _, l := range [][2]string{{path, fileLink}, {dir, dirLink}} {
		if err := os.Symlink(l[0], l[1]); err != nil {
			t.Fatal(err)
		}
	}
	for _, name := range []string{fileLink, filepath.Join(dirLink, "parley.db")} {
		c, err := ClaimServing(name)
		var held *HeldError
		if !errors.As(err, &held) || held.PID != os.Getpid() || held.Database != name || held.LockFile != path+".lock" {
			c.Release()
			t.Errorf("a claim through %s: %v", name, err)
		}
	}

	first.Release()
	hard := filepath.Join(other, "hard.db")
	if err := os.Link(path, hard); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{path, hard} {
		c, err := ClaimServing(name)
		var many *ManyNamesError
		if !errors.As(err, &many) || many.Links != 2 || many.Database != name ||
			!strings.Contains(err.Error(), name+" is one file with 2 names (hard links)") {
			c.Release()
			t.Errorf("a claim of %s, a file with two names: %v", name, err)
		}
	}
}

// TestOpenRefusesAFileWithTwoNames: every command opens its database with
// Open, and a database with a second name (hard link) is refused by each
// name, as serve refuses it: SQLite keeps a journal per name, so a command
// through the other name would miss a server's commits or corrupt the
// file. A symbolic link names the same file and one journal, and opens.
func TestOpenRefusesAFileWithTwoNames(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "parley.db")
	db, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	db.Close()
	sym := filepath.Join(dir, "sym.db")
	if err := os.Symlink(path, sym); err != nil {
		t.Fatal(err)
	}
	if db, err := Open(sym); err != nil {
		t.Fatalf("open through a symbolic link: %v", err)
	} else {
		db.Close()
	}
	hard := filepath.Join(t.TempDir(), "hard.db")
	if err := os.Link(path, hard); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{path, hard, sym} {
		db, err := Open(name)
		var many *ManyNamesError
		if !errors.As(err, &many) || many.Links != 2 || many.Database != name {
			if err == nil {
				db.Close()
			}
			t.Errorf("open %s, a file with two names: %v", name, err)
		}
	}
	if _, err := os.Stat(hard + "-wal"); !os.IsNotExist(err) {
		t.Errorf("a refused open left a journal beside the second name: %v", err)
	}
}
