package main

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// asAnotherUser runs the parley binary with args as a user who may read
// but not write dir: in-process when the tests do not run as root (dir is
// made read-only), else the real binary as uid 65534 through setpriv.
func asAnotherUser(t *testing.T, dir string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	if os.Geteuid() != 0 {
		check(t, os.Chmod(dir, 0o555))
		t.Cleanup(func() { os.Chmod(dir, 0o755) })
		return run(args...)
	}
	setpriv, err := exec.LookPath("setpriv")
	if err != nil {
		t.Skip("running as root without setpriv: no user to whom a folder is read-only")
	}
	bin := filepath.Join(filepath.Dir(dir), "parley")
	if _, err := os.Stat(bin); err != nil {
		b, err := os.ReadFile(parleyBinary(t))
		check(t, err)
		check(t, os.WriteFile(bin, b, 0o755))
	}
	// The test's own folders are opened to the other user; a folder
	// above them that is not is left alone, and the test skipped.
	own := filepath.Dir(filepath.Dir(dir)) // the testing package's folder for this test
	for d := dir; d != "/" && d != "."; d = filepath.Dir(d) {
		fi, err := os.Stat(d)
		check(t, err)
		if fi.Mode().Perm()&0o001 != 0 {
			continue
		}
		if !strings.HasPrefix(d, own) {
			t.Skipf("%s is closed to other users", d)
		}
		check(t, os.Chmod(d, fi.Mode().Perm()|0o005))
	}
	cmd := exec.Command(setpriv, append([]string{"--reuid=65534", "--regid=65534", "--clear-groups", bin}, args...)...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err = cmd.Run()
	var ee *exec.ExitError
	switch {
	case errors.As(err, &ee):
		code = ee.ExitCode()
	case err != nil:
		t.Fatal(err)
	}
	return code, out.String(), errb.String()
}

// TestAReadOnlyDatabaseIsExportedAndCopied: a database in a folder its
// user cannot write (a read-only disk, a colleague's folder) is exported
// and backed up as it stands, without a file made beside it; both said
// "attempt to write a readonly database", exit 1, though the error for a
// read-only disk tells the facilitator to copy the database with parley
// backup. Writing to it (facilitator-reset) names the folder and why.
// A database from an older Parley there, which must be upgraded to be
// read, is refused saying so.
func TestAReadOnlyDatabaseIsExportedAndCopied(t *testing.T) {
	src, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	want, errs := "", ""
	var code int
	if code, want, errs = run("export", "--db", src, "--workshop", ws, "--format", "csv"); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	top := t.TempDir()
	dir := filepath.Join(top, "archive")
	out := filepath.Join(top, "out")
	check(t, os.MkdirAll(dir, 0o755))
	check(t, os.MkdirAll(out, 0o777))
	check(t, os.Chmod(out, 0o777))
	path := filepath.Join(dir, "parley.db")
	b, err := os.ReadFile(src)
	check(t, err)
	check(t, os.WriteFile(path, b, 0o644))
	old := filepath.Join(dir, "old.db")
	check(t, os.WriteFile(old, mustRead(t, oldDatabase(t, 2)), 0o644))

	code, got, errs := asAnotherUser(t, dir, "export", "--db", path, "--workshop", ws, "--format", "csv")
	if code != exitOK || got != want {
		t.Errorf("export of a read-only database: exit %d, stderr %q; same CSV %v", code, errs, got == want)
	}
	copyPath := filepath.Join(out, "copy.db")
	if code, stdout, errs := asAnotherUser(t, dir, "backup", "--db", path, "--out", copyPath); code != exitOK || !strings.Contains(stdout, "integrity check ok") {
		t.Errorf("backup of a read-only database: exit %d, %q, %q", code, stdout, errs)
	}
	if code, _, errs := asAnotherUser(t, dir, "facilitator-reset", "--db", path); code != exitFailure || !strings.Contains(errs, "cannot write "+path+": the folder "+dir) {
		t.Errorf("facilitator-reset of a read-only database: exit %d, %q", code, errs)
	}
	if code, _, errs := asAnotherUser(t, dir, "export", "--db", old, "--workshop", "1"); code != exitFailure || !strings.Contains(errs, "schema version 2, from an older Parley") {
		t.Errorf("export of a read-only database from an older Parley: exit %d, %q", code, errs)
	}
	entries, err := os.ReadDir(dir)
	check(t, err)
	if len(entries) != 2 {
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		t.Errorf("the read-only folder holds %v; want only the two databases", names)
	}
	if got, _ := os.ReadFile(path); !bytes.Equal(got, b) {
		t.Error("the read-only database was changed")
	}
	if code, got, errs := run("export", "--db", copyPath, "--workshop", ws, "--format", "csv"); code != exitOK || got != want {
		t.Errorf("export of the copy: exit %d, %q; same CSV %v", code, errs, got == want)
	}
}

func mustRead(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	check(t, err)
	return b
}
