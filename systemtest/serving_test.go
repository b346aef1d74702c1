package systemtest

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	mrand "math/rand/v2"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/parley-elicit/parley/store"
)

// runParley runs the built binary with args (as user uid when uid >= 0)
// and returns its exit status, stdout and stderr. It is killed if it
// has not ended within limit.
func runParley(t *testing.T, uid int, limit time.Duration, args ...string) (int, string, string) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), limit)
	defer cancel()
	cmd := exec.CommandContext(ctx, parleyBinary(t), args...)
	var out, errOut bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errOut
	if uid >= 0 {
		cmd.SysProcAttr = &syscall.SysProcAttr{Credential: &syscall.Credential{Uid: uint32(uid), Gid: uint32(uid)}}
	}
	err := cmd.Run()
	if ctx.Err() != nil {
		t.Fatalf("parley %v did not end within %v\nstdout:\n%s\nstderr:\n%s", args, limit, out.String(), errOut.String())
	}
	var ee *exec.ExitError
	switch {
	case err == nil:
		return 0, out.String(), errOut.String()
	case errors.As(err, &ee):
		return ee.ExitCode(), out.String(), errOut.String()
	}
	t.Fatalf("parley %v: %v", args, err)
	return 0, "", ""
}

// TestOneServerPerDatabase: while one server runs on a database file, a
// second `parley serve` on the same file exits at once, status 1, naming
// the file and the process serving it; `export` and `backup` still work
// beside the running server; and a server killed with SIGKILL leaves no
// stale claim (issue 13, item 3).
func TestOneServerPerDatabase(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	ws := seedWorkshop(t, dbPath, 2, 1)
	first := startServer(t, parleyBinary(t), dbPath, freeAddr(t))
	defer first.kill()

	start := time.Now()
	code, _, stderr := runParley(t, -1, 20*time.Second, "serve", "--addr", freeAddr(t), "--db", dbPath, "--no-demo")
	took := time.Since(start)
	pid := strconv.Itoa(first.cmd.Process.Pid)
	if code != 1 || !strings.Contains(stderr, dbPath+" is already being served by another Parley server (process "+pid+" holds "+dbPath+".lock)") {
		t.Errorf("second serve: exit %d after %v, stderr:\n%s", code, took, stderr)
	}
	t.Logf("the second server refused in %v: %s", took.Round(time.Millisecond), strings.TrimSpace(stderr))

	code, stdout, stderr := runParley(t, -1, 60*time.Second, "export", "--db", dbPath, "--workshop", strconv.FormatInt(ws.workshopID, 10), "--format", "json")
	var rec struct {
		Format int `json:"parley_record"`
	}
	if code != 0 || json.Unmarshal([]byte(stdout), &rec) != nil || rec.Format != 1 {
		t.Errorf("export while the server runs: exit %d, stderr %s", code, stderr)
	}
	copyPath := filepath.Join(t.TempDir(), "copy.db")
	if code, _, stderr := runParley(t, -1, 60*time.Second, "backup", "--db", dbPath, "--out", copyPath); code != 0 {
		t.Errorf("backup while the server runs: exit %d, stderr %s", code, stderr)
	}
	if err := first.waitReady(5 * time.Second); err != nil {
		t.Errorf("the first server stopped answering: %v", err)
	}

	// The same file by another name: a symbolic link meets the first
	// server's claim; a second hard link is refused, since SQLite keeps a
	// journal per name (a server through one used to start and not see
	// the first's commits).
	link := filepath.Join(t.TempDir(), "link.db")
	if err := os.Symlink(dbPath, link); err != nil {
		t.Fatal(err)
	}
	code, _, stderr = runParley(t, -1, 20*time.Second, "serve", "--addr", freeAddr(t), "--db", link, "--no-demo")
	if code != 1 || !strings.Contains(stderr, link+" is already being served by another Parley server (process "+pid+" holds "+dbPath+".lock)") {
		t.Errorf("serve through a symbolic link: exit %d, stderr:\n%s", code, stderr)
	}
	hard := filepath.Join(filepath.Dir(dbPath), "hard.db")
	if err := os.Link(dbPath, hard); err != nil {
		t.Fatal(err)
	}
	code, _, stderr = runParley(t, -1, 20*time.Second, "serve", "--addr", freeAddr(t), "--db", hard, "--no-demo")
	if code != 1 || !strings.Contains(stderr, hard+" is one file with 2 names (hard links)") {
		t.Errorf("serve through a hard link: exit %d, stderr:\n%s", code, stderr)
	}
	if err := os.Remove(hard); err != nil {
		t.Fatal(err)
	}

	first.kill()
	second := startServer(t, parleyBinary(t), dbPath, freeAddr(t))
	second.kill()
}

// unprivileged is the user the read-only checks run as when the tests
// run as root, for whom no file is read-only: "nobody".
const unprivileged = 65534

// TestStartupSaysWhyTheDatabaseCannotBeWritten: `parley serve` checks at
// start that it can write the database and its folder, and says exactly
// what is wrong, with exit status 1: a missing folder, a read-only file,
// a read-only folder, a read-only filesystem (issue 13, item 4).
func TestStartupSaysWhyTheDatabaseCannotBeWritten(t *testing.T) {
	uid := -1
	if os.Geteuid() == 0 {
		uid = unprivileged
	}
	// A folder the unprivileged user can reach, with the binary in one too.
	if uid >= 0 {
		if err := os.Chmod(filepath.Dir(parleyBinary(t)), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	base, err := os.MkdirTemp("", "parley-readonly-")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(base) })
	if err := os.Chmod(base, 0o755); err != nil {
		t.Fatal(err)
	}
	// newDB makes a folder with a database in it, both belonging to the
	// user the check runs as.
	newDB := func(name string) (dir, db string) {
		dir = filepath.Join(base, name)
		if err := os.Mkdir(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		db = filepath.Join(dir, "parley.db")
		seedWorkshop(t, db, 1, 1)
		if uid >= 0 {
			for _, p := range []string{dir, db} {
				if err := os.Chown(p, uid, uid); err != nil {
					t.Fatal(err)
				}
			}
		}
		return dir, db
	}
	serve := func(db string) (int, string) {
		code, _, stderr := runParley(t, uid, 20*time.Second, "serve", "--addr", freeAddr(t), "--db", db, "--no-demo")
		t.Logf("serve --db %s: exit %d: %s", db, code, strings.TrimSpace(stderr))
		return code, strings.TrimSpace(stderr)
	}

	missing := filepath.Join(base, "no-such-folder", "parley.db")
	if code, msg := serve(missing); code != 1 || msg != "parley serve: cannot write "+missing+": the folder "+filepath.Dir(missing)+
		" does not exist; create it, or give --db a file in an existing folder" {
		t.Errorf("missing folder: exit %d, %q", code, msg)
	}

	_, roFile := newDB("read-only-file")
	if err := os.Chmod(roFile, 0o444); err != nil {
		t.Fatal(err)
	}
	if code, msg := serve(roFile); code != 1 || !strings.Contains(msg, "cannot write "+roFile+": the file is read-only for this user (-r--r--r--") {
		t.Errorf("read-only file: exit %d, %q", code, msg)
	}

	roDir, roDirDB := newDB("read-only-folder")
	if err := os.Chmod(roDir, 0o555); err != nil {
		t.Fatal(err)
	}
	if code, msg := serve(roDirDB); code != 1 || !strings.Contains(msg, "cannot write "+roDirDB+": the folder "+roDir+
		" (where SQLite keeps the database's journal, parley.db-wal and -shm) is read-only for this user (dr-xr-xr-x") {
		t.Errorf("read-only folder: exit %d, %q", code, msg)
	}

	// A link to a database in a read-only folder, from a writable one:
	// SQLite keeps the journal beside the file the link names, so that
	// folder is the one that counts (it passed the check, and the start
	// failed with SQLite's "attempt to write a readonly database").
	linkDir, _ := newDB("link-to-read-only-folder")
	link := filepath.Join(linkDir, "link.db")
	if err := os.Symlink(roDirDB, link); err != nil {
		t.Fatal(err)
	}
	if code, msg := serve(link); code != 1 || !strings.Contains(msg, "cannot write "+link+": the folder "+roDir+
		" (where SQLite keeps the database's journal, parley.db-wal and -shm) is read-only for this user (dr-xr-xr-x") {
		t.Errorf("a link to a database in a read-only folder: exit %d, %q", code, msg)
	}

	// A full disk: a small tmpfs holding the database, filled to the
	// last block. A file can still be made there (an empty file takes no
	// room), and the start failed at the lock file with "no space left
	// on device", not naming the disk as full.
	// Room enough for the seeded database and the journal its migrations
	// write before it is checkpointed at close (512 KiB was too little
	// once the 14th migration came), before the filler takes the rest.
	if full := mountTmpfs(t, "2m"); full != "" {
		db := filepath.Join(full, "parley.db")
		seedWorkshop(t, db, 1, 1)
		if uid >= 0 {
			for _, p := range []string{full, db} {
				if err := os.Chown(p, uid, uid); err != nil {
					t.Fatal(err)
				}
			}
		}
		filler, err := os.Create(filepath.Join(full, "filler"))
		if err != nil {
			t.Fatal(err)
		}
		for err == nil {
			_, err = filler.Write(make([]byte, 4096))
		}
		filler.Close()
		if code, msg := serve(db); code != 1 || !strings.Contains(msg, "cannot write "+db+": the folder "+full+" (where SQLite keeps the database's journal, parley.db-wal and -shm) is on a full disk; free some space") {
			t.Errorf("full disk: exit %d, %q", code, msg)
		}
		// The work can still be taken off the full disk: export and backup
		// read it as it stands, and make no file beside it; both failed with
		// "no space left on device", leaving journal files behind.
		if code, stdout, stderr := runParley(t, uid, 20*time.Second, "export", "--db", db, "--workshop", "1"); code != 0 || !strings.Contains(stdout, `"parley_record"`) {
			t.Errorf("export from a full disk: exit %d, %s", code, stderr)
		}
		elsewhere := filepath.Join(base, "off-the-full-disk")
		if err := os.Mkdir(elsewhere, 0o777); err != nil {
			t.Fatal(err)
		}
		if err := os.Chmod(elsewhere, 0o777); err != nil {
			t.Fatal(err)
		}
		copyPath := filepath.Join(elsewhere, "copy.db")
		if code, stdout, stderr := runParley(t, uid, 20*time.Second, "backup", "--db", db, "--out", copyPath); code != 0 || !strings.Contains(stdout, "integrity check ok") {
			t.Errorf("backup from a full disk: exit %d, %s", code, stderr)
		}
		entries, err := os.ReadDir(full)
		if err != nil {
			t.Fatal(err)
		}
		if len(entries) != 2 {
			var names []string
			for _, e := range entries {
				names = append(names, e.Name())
			}
			t.Errorf("the full disk holds %v; want the database and the filler", names)
		}
	}

	// A read-only filesystem: a small tmpfs, written, then remounted
	// read-only. Root may write any file, but not on a read-only mount.
	mnt := mountTmpfs(t, "1m")
	if mnt == "" {
		return
	}
	roFS := filepath.Join(mnt, "parley.db")
	seedWorkshop(t, roFS, 1, 1)
	if out, err := exec.Command("mount", "-o", "remount,ro", mnt).CombinedOutput(); err != nil {
		t.Fatalf("remount %s read-only: %v %s", mnt, err, out)
	}
	if code, msg := serve(roFS); code != 1 || !strings.Contains(msg, "cannot write "+roFS+": the folder "+mnt+" (where SQLite keeps the database's journal, parley.db-wal and -shm) is on a read-only filesystem") {
		t.Errorf("read-only filesystem: exit %d, %q", code, msg)
	}
	if _, err := os.Stat(roFS); err != nil {
		t.Fatalf("the database on the read-only filesystem: %v", err)
	}
	if _, err := os.Stat(store.LockFile(roFile)); err == nil {
		t.Error("a refused start left a lock file")
	}
}

// mountTmpfs mounts a tmpfs of the given size (as mount's size= option)
// on a new temporary folder, unmounted when the test ends, and returns
// the folder. Where mounting is not allowed (not root, or a sandbox
// without CAP_SYS_ADMIN) it says so loudly in the test log and returns
// "": the rest of that test is skipped.
func mountTmpfs(t *testing.T, size string) string {
	t.Helper()
	dir, err := os.MkdirTemp("", "parley-tmpfs-")
	if err != nil {
		t.Fatal(err)
	}
	if out, err := exec.Command("mount", "-t", "tmpfs", "-o", "size="+size+",mode=0755", "tmpfs", dir).CombinedOutput(); err != nil {
		os.Remove(dir)
		t.Logf("SKIPPING THE PART OF %s THAT NEEDS A SMALL FILESYSTEM: `mount -t tmpfs` is not allowed here (%v: %s). "+
			"Run the tests as root on a machine that allows mounting (CI does) to check it.", t.Name(), err, strings.TrimSpace(string(out)))
		return ""
	}
	t.Cleanup(func() {
		if out, err := exec.Command("umount", dir).CombinedOutput(); err != nil {
			t.Errorf("umount %s: %v %s", dir, err, out)
			return
		}
		os.Remove(dir)
	})
	return dir
}

// `parley serve --expert-save-burst N` gives each expert link N saves at
// once, then paces them at one a second: the real binary takes the
// flag's allowance from one link and answers the next save 429 with
// Retry-After, while another link still saves.
func TestServeExpertSaveBurst(t *testing.T) {
	const burst = 3
	dbPath := filepath.Join(t.TempDir(), "burst.db")
	ws := seedWorkshop(t, dbPath, 2, 1)
	c := startServer(t, parleyBinary(t), dbPath, freeAddr(t), "--expert-save-burst", strconv.Itoa(burst))
	defer c.kill()
	ctx := t.Context()
	cl := newClient(2)
	rng := mrand.New(mrand.NewPCG(3, 12))
	q := ws.questions[0]
	for i := range burst {
		status, body, err := postForm(ctx, cl, c.base, savePath(ws.experts[0].token, q.ID), quantileAnswer(rng, fmt.Sprintf("save %d", i+1)).form)
		if err != nil || status != http.StatusSeeOther {
			t.Fatalf("save %d of %d: %d %v %.300s", i+1, burst, status, err, body)
		}
	}
	status, body, err := postForm(ctx, cl, c.base, savePath(ws.experts[0].token, q.ID), quantileAnswer(rng, "one too many").form)
	if err != nil || status != http.StatusTooManyRequests || !strings.Contains(body, "Nothing was saved") {
		t.Fatalf("save %d with --expert-save-burst %d: %d %v %.300s", burst+1, burst, status, err, body)
	}
	status, body, err = postForm(ctx, cl, c.base, savePath(ws.experts[1].token, q.ID), quantileAnswer(rng, "another link").form)
	if err != nil || status != http.StatusSeeOther {
		t.Fatalf("another link's save: %d %v %.300s", status, err, body)
	}
}

// `parley serve --expert-page-burst N` gives each expert link N pages at
// once, then paces them: the real binary answers the next page of that
// link 429 with Retry-After, while another link's page is still shown.
func TestServeExpertPageBurst(t *testing.T) {
	const burst = 3
	dbPath := filepath.Join(t.TempDir(), "pages.db")
	ws := seedWorkshop(t, dbPath, 2, 1)
	c := startServer(t, parleyBinary(t), dbPath, freeAddr(t), "--expert-page-burst", strconv.Itoa(burst))
	defer c.kill()
	ctx := t.Context()
	cl := newClient(2)
	get := func(path string) (int, string, error) {
		req, err := http.NewRequestWithContext(ctx, http.MethodGet, c.base+path, nil)
		if err != nil {
			return 0, "", err
		}
		return do(cl, req)
	}
	home := "/e/" + ws.experts[0].token + "/"
	for i := range burst {
		if status, body, err := get(home); err != nil || status != http.StatusOK {
			t.Fatalf("page %d of %d: %d %v %.300s", i+1, burst, status, err, body)
		}
	}
	// The allowance comes back at four pages a second, far slower than
	// pages go out on loopback: within a few more, one is refused.
	refused := false
	for i := 0; i < 20 && !refused; i++ {
		status, body, err := get(questionPagePath(ws.experts[0].token, ws.questions[0].ID))
		switch {
		case err != nil:
			t.Fatal(err)
		case status == http.StatusTooManyRequests:
			if !strings.Contains(body, "reload the page") {
				t.Fatalf("the refused page says: %.300s", body)
			}
			refused = true
		case status != http.StatusOK:
			t.Fatalf("page %d: %d %.300s", burst+i+1, status, body)
		}
	}
	if !refused {
		t.Fatalf("20 pages past --expert-page-burst %d were all shown", burst)
	}
	if status, body, err := get("/e/" + ws.experts[1].token + "/"); err != nil || status != http.StatusOK {
		t.Fatalf("another link's page: %d %v %.300s", status, err, body)
	}
}
