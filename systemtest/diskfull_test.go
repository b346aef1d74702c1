package systemtest

import (
	"context"
	"encoding/json"
	"errors"
	"html"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

// TestSaveOnAFullDisk serves a database on a small tmpfs from the real
// binary, fills the filesystem, and saves: the expert's save and the
// facilitator's form answer 503 with the typed values kept and a
// sentence saying nothing was saved and what to do; nothing is stored;
// once space is freed the same save goes through, and the file is sound
// (issue 13, item 5). Where mounting is not allowed it is skipped, with a
// loud message.
func TestSaveOnAFullDisk(t *testing.T) {
	mnt := mountTmpfs(t, "4m")
	if mnt == "" {
		t.Skip("SKIPPED: mounting a small tmpfs is not allowed here (see the message above)")
	}
	ctx := context.Background()
	dbPath := filepath.Join(mnt, "parley.db")
	ws := seedWorkshop(t, dbPath, 2, 1)
	db, err := store.Open(dbPath)
	if err != nil {
		t.Fatal(err)
	}
	secret, err := web.ResetFacilitatorSecret(ctx, db)
	db.Close()
	if err != nil {
		t.Fatal(err)
	}
	// Its expert saves without pause until the disk is full, far beyond a
	// link's allowance of saves, so serve's --expert-save-burst raises it.
	server := startServer(t, parleyBinary(t), dbPath, freeAddr(t), "--expert-save-burst", "1000000000")
	defer server.kill()
	cl := newClient(2)
	status, cookies, err := postRaw(ctx, cl, server.base, "/signin", url.Values{"secret": {secret}})
	if err != nil || status != http.StatusSeeOther {
		t.Fatalf("sign in: %d, %v", status, err)
	}

	// Fill the filesystem to the last block.
	filler, err := os.Create(filepath.Join(mnt, "filler"))
	if err != nil {
		t.Fatal(err)
	}
	chunk := make([]byte, 64<<10)
	for {
		if _, err := filler.Write(chunk); err != nil {
			if !errors.Is(err, syscall.ENOSPC) {
				t.Fatalf("fill the disk: %v", err)
			}
			break
		}
	}
	for n := len(chunk) / 2; n > 0; n /= 2 { // the last part-chunk
		_, _ = filler.Write(chunk[:n])
	}
	filler.Close()

	e, q := ws.experts[0], ws.questions[0]
	typed := url.Values{"values[0]": {"0.0123"}, "values[1]": {"0.0456"}, "values[2]": {"0.0789"}, "reason": {"Typed on a full disk (invented)"}}
	full, err := getFull(ctx, cl, server.base, savePath(e.token, q.ID), typed, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(full, "status 503\n") {
		t.Fatalf("expert save on a full disk:\n%.300s\nserver:\n%s", full, server.out.tail(2000))
	}
	if !server.out.waitFor("database or disk is full", 10*time.Second) || strings.Contains(server.out.tail(4000), e.token) {
		t.Errorf("the server log should name the full disk and not the token:\n%s", server.out.tail(4000))
	}
	for _, want := range []string{"Nothing was saved: the server could not write your answer down just now.", "Try Save again in a minute",
		`value="0.0123"`, `value="0.0456"`, `value="0.0789"`, "Typed on a full disk (invented)"} {
		if !strings.Contains(full, want) {
			t.Errorf("the expert's page on a full disk lacks %q", want)
		}
	}
	header := http.Header{}
	for _, c := range cookies {
		header.Add("Cookie", c.Name+"="+c.Value)
	}
	page, err := getFull(ctx, cl, server.base, "/workshops", url.Values{"title": {"Typed title on a full disk (invented)"}}, header)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(page, "status 503") || !strings.Contains(page, "Nothing was saved: the database could not be written") ||
		!strings.Contains(page, `value="Typed title on a full disk (invented)"`) {
		t.Errorf("the facilitator's new-workshop form on a full disk:\n%.600s", page)
	}

	// Space again: the same save goes through.
	if err := os.Remove(filepath.Join(mnt, "filler")); err != nil {
		t.Fatal(err)
	}
	if status, body, err := postForm(ctx, cl, server.base, savePath(e.token, q.ID), typed); err != nil || status != http.StatusSeeOther {
		t.Fatalf("the same save with space again: %d, %v, %.300s", status, err, body)
	}
	server.kill()
	revs := checkStored(t, dbPath, ws.workshopID)
	if len(revs) != 1 || !sameValues(revs[0].Answer.Values, []float64{0.0123, 0.0456, 0.0789}) {
		t.Errorf("stored revisions %+v, want the one save made with space", revs)
	}
	if ws2 := countWorkshops(t, dbPath); ws2 != 1 {
		t.Errorf("%d workshops stored, want 1 (the refused one not saved)", ws2)
	}
}

// getFull posts form (or gets, when form is nil) and returns "status N"
// and the whole body, unescaped, for reading what the page says.
func getFull(ctx context.Context, cl *http.Client, base, path string, form url.Values, header http.Header) (string, error) {
	method, body := http.MethodGet, ""
	if form != nil {
		method, body = http.MethodPost, form.Encode()
	}
	req, err := http.NewRequestWithContext(ctx, method, base+path, strings.NewReader(body))
	if err != nil {
		return "", err
	}
	if form != nil {
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", base)
	}
	for k, v := range header {
		req.Header[k] = v
	}
	res, err := cl.Do(req)
	if err != nil {
		return "", err
	}
	defer res.Body.Close()
	var b strings.Builder
	buf := make([]byte, 32<<10)
	for {
		n, err := res.Body.Read(buf)
		b.Write(buf[:n])
		if err != nil {
			break
		}
	}
	return "status " + strconv.Itoa(res.StatusCode) + "\n" + html.UnescapeString(b.String()), nil
}

func countWorkshops(t *testing.T, dbPath string) int {
	t.Helper()
	db, err := store.Open(dbPath)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	ws, err := db.Workshops(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return len(ws)
}

// TestFailedImportLeavesNoFiles imports a record too large for a small
// tmpfs with the real binary: into a new file, the import fails and
// leaves the folder as it was (no database, no journal, no temporary
// file); into an existing database, it fails and leaves that database as
// it was, and nothing beside it (issue 13, item 9).
func TestFailedImportLeavesNoFiles(t *testing.T) {
	// A record of some 700 kB: 24 experts, 6 questions, long reasons; the
	// tmpfs holds an empty database (about 100 kB, with its write-ahead
	// log while it is made) but not the record.
	ctx := context.Background()
	srcPath := filepath.Join(t.TempDir(), "source.db")
	ws := seedWorkshop(t, srcPath, 24, 6)
	src, err := store.Open(srcPath)
	if err != nil {
		t.Fatal(err)
	}
	reason := strings.Repeat("Invented reasoning about the batch. ", 110) // under the 4000-character limit
	for _, e := range ws.experts {
		for _, q := range ws.questions {
			if err := src.SaveRevision(ctx, &workshop.Revision{QuestionID: q.ID, ExpertID: e.id, Reason: reason,
				Answer: workshop.Answer{Values: []float64{0.02, 0.05, 0.11}}}); err != nil {
				t.Fatal(err)
			}
		}
	}
	rec, err := src.Record(ctx, ws.workshopID, time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC))
	src.Close()
	if err != nil {
		t.Fatal(err)
	}
	recPath := filepath.Join(t.TempDir(), "record.json")
	b, err := json.Marshal(rec)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(recPath, b, 0o644); err != nil {
		t.Fatal(err)
	}

	mnt := mountTmpfs(t, "512k")
	if mnt == "" {
		t.Skip("SKIPPED: mounting a small tmpfs is not allowed here (see the message above)")
	}
	listing := func() []string {
		entries, err := os.ReadDir(mnt)
		if err != nil {
			t.Fatal(err)
		}
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		return names
	}

	newDB := filepath.Join(mnt, "imported.db")
	code, _, stderr := runParley(t, -1, 60*time.Second, "import", "--db", newDB, "--in", recPath)
	if code != 1 || !strings.Contains(stderr, "full") {
		t.Fatalf("import of %d kB into a 512 kB filesystem: exit %d, %s", len(b)>>10, code, stderr)
	}
	if left := listing(); len(left) != 0 {
		t.Errorf("a failed import into a new file left %v", left)
	}

	existing := filepath.Join(mnt, "existing.db")
	small := seedWorkshop(t, existing, 1, 1)
	before := listing()
	code, _, stderr = runParley(t, -1, 60*time.Second, "import", "--db", existing, "--in", recPath)
	if code != 1 {
		t.Fatalf("import into an existing database on a full disk: exit %d, %s", code, stderr)
	}
	if after := listing(); strings.Join(after, " ") != strings.Join(before, " ") {
		t.Errorf("a failed import into an existing database: files %v before, %v after", before, after)
	}
	if revs := checkStored(t, existing, small.workshopID); len(revs) != 0 || countWorkshops(t, existing) != 1 {
		t.Errorf("the existing database changed: %d revisions, %d workshops", len(revs), countWorkshops(t, existing))
	}
}
