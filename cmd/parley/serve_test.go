package main

import (
	"bufio"
	"bytes"
	"context"
	"database/sql"
	"fmt"
	"io"
	"net"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/parley-elicit/parley/store"
)

// syncBuffer is a bytes.Buffer safe to read while serve writes to it.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

var servingAt = regexp.MustCompile(`serving at (https?://[^ ]+)/\n`)

// startServe runs serve on a free loopback port until the test ends and
// returns its base URL and output.
func startServe(t *testing.T, c serveConfig) (base string, stdout, stderr *syncBuffer, stop func() error) {
	t.Helper()
	stdout, stderr = &syncBuffer{}, &syncBuffer{}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- serve(ctx, c, stdout, stderr) }()
	deadline := time.Now().Add(20 * time.Second)
	for time.Now().Before(deadline) {
		// The sign-in line follows "serving at" in a second write: wait
		// for it too, or a test reading it may find it not yet printed
		// (TestServeTLS failed so once in CI).
		if out := stdout.String(); signInPrinted.MatchString(out) {
			if m := servingAt.FindStringSubmatch(out); m != nil {
				base = m[1]
				break
			}
		}
		select {
		case err := <-done:
			cancel()
			t.Fatalf("serve ended early: %v\n%s%s", err, stdout, stderr)
		case <-time.After(20 * time.Millisecond):
		}
	}
	if base == "" {
		cancel()
		t.Fatalf("serve did not start:\n%s%s", stdout, stderr)
	}
	var once sync.Once
	var result error
	stop = func() error {
		once.Do(func() { cancel(); result = <-done })
		return result
	}
	t.Cleanup(func() { _ = stop() })
	return base, stdout, stderr, stop
}

// signInPrinted is either sign-in line serve prints after "serving at".
var signInPrinted = regexp.MustCompile(`(?m)^parley: facilitator sign-in .*\n`)

var signInLine = regexp.MustCompile(`facilitator sign-in address \(works once; keep it private\): (http://[^ ]+)/signin#([A-Za-z0-9_-]{43})\n`)

func TestServeFirstStartSignInDemoAndShutdown(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	base, out, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath})
	text := out.String()
	if !strings.Contains(text, "database "+dbPath) {
		t.Errorf("the database path is not printed:\n%s", text)
	}
	m := signInLine.FindStringSubmatch(text)
	if m == nil || m[1] != base {
		t.Fatalf("no one-time sign-in address:\n%s", text)
	}
	if !strings.Contains(text, "invented demo workshop") || strings.Count(text, "/e/") != 4 {
		t.Errorf("demo links not printed:\n%s", text)
	}

	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar}
	req, _ := http.NewRequest(http.MethodPost, base+"/signin", strings.NewReader(url.Values{"secret": {m[2]}}.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", base)
	res, err := c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	body, _ := io.ReadAll(res.Body)
	res.Body.Close()
	if res.StatusCode != http.StatusOK || !strings.Contains(string(body), "HX-40") {
		t.Fatalf("after sign-in: %d, demo workshop listed: %v", res.StatusCode, strings.Contains(string(body), "HX-40"))
	}

	if err := stop(); err != nil {
		t.Fatalf("graceful shutdown: %v", err)
	}
	if !strings.Contains(out.String(), "shutting down") {
		t.Error("shutdown not reported")
	}
	if _, err := http.Get(base + "/signin"); err == nil {
		t.Error("server still answers after shutdown")
	}

	// Second start: the address was used, so a new one is printed, and
	// the browser signed in before stays signed in; no second demo.
	base2, out2, _, stop2 := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath})
	m2 := signInLine.FindStringSubmatch(out2.String())
	if m2 == nil || m2[2] == m[2] || strings.Contains(out2.String(), "/e/") {
		t.Errorf("second start after the address was used: want a new address and no demo links:\n%s", out2)
	}
	// The session cookie was set for 127.0.0.1; the new server has
	// another port, and cookies do not depend on the port.
	if res, err := c.Get(base2 + "/"); err != nil || res.StatusCode != http.StatusOK || res.Request.URL.Path != "/" {
		t.Errorf("the session of the first start does not carry over: %v %v", res, err)
	} else {
		res.Body.Close()
	}
	if err := stop2(); err != nil {
		t.Fatal(err)
	}
	// Third start: the second address is unused, so none is printed; the
	// line says the earlier one still works.
	base3, out3, _, stop3 := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath})
	if signInLine.MatchString(out3.String()) || !strings.Contains(out3.String(), "printed earlier is still unused and works once") {
		t.Errorf("third start with an unused address:\n%s", out3)
	}
	// The command it suggests for a lost address prints this server's
	// address, not the default http://127.0.0.1:8080 (another port, or
	// https under --tls-cert, which the sign-in address would not open).
	if !strings.Contains(out3.String(), "parley facilitator-reset --db "+dbPath+" --keep-signed-in --base-url "+base3+")") {
		t.Errorf("third start: the suggested facilitator-reset does not give this server's --base-url %s:\n%s", base3, out3)
	}
	if err := stop3(); err != nil {
		t.Fatal(err)
	}
	db, err := store.Open(dbPath)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	ws, _ := db.Workshops(context.Background())
	if len(ws) != 1 {
		t.Fatalf("%d workshops after two starts, want 1", len(ws))
	}
}

func TestServeNoDemo(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	_, out, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath, noDemo: true})
	if strings.Contains(out.String(), "demo") {
		t.Errorf("--no-demo printed demo links:\n%s", out)
	}
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	db, err := store.Open(dbPath)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if ws, _ := db.Workshops(context.Background()); len(ws) != 0 {
		t.Fatalf("--no-demo created %d workshops", len(ws))
	}
}

// TestServeWarnsOffLoopback: --addr 0.0.0.0 listens on IPv4 only, and
// the warning names the address really listened on (issue 13, item 9).
func TestServeWarnsOffLoopback(t *testing.T) {
	base, _, errOut, stop := startServe(t, serveConfig{addr: "0.0.0.0:0", db: filepath.Join(t.TempDir(), "p.db"), noDemo: true})
	warning := errOut.String()
	_, port, _ := net.SplitHostPort(strings.TrimPrefix(base, "http://"))
	if !strings.Contains(warning, "WARNING: listening on 0.0.0.0:"+port+" (every IPv4 address of this machine)") || strings.Contains(warning, "[::]") {
		t.Errorf("the warning does not name 0.0.0.0:%s: %q", port, warning)
	}
	if c, err := net.DialTimeout("tcp4", "127.0.0.1:"+port, 5*time.Second); err != nil {
		t.Errorf("IPv4 loopback: %v", err)
	} else {
		c.Close()
	}
	// [::1] is on this machine (the test's only traffic stays on it).
	if c, err := net.DialTimeout("tcp6", "[::1]:"+port, 5*time.Second); err == nil {
		c.Close()
		t.Errorf("--addr 0.0.0.0 also answers on IPv6 [::1]:%s", port)
	}
	if err := stop(); err != nil {
		t.Fatal(err)
	}
}

func TestServeFlags(t *testing.T) {
	dir := t.TempDir()
	dbPath := filepath.Join(dir, "parley.db")
	for _, args := range [][]string{
		{"--tls-cert", "c.pem"},
		{"--addr", "no-port"},
		// A port that is no port is bad input, refused before the
		// database is opened; it exited 1 from the listen and left a new
		// database behind.
		{"--addr", "127.0.0.1:99999"},
		{"--addr", "127.0.0.1:-1"},
		{"--addr", ":abc"},
		{"--addr", "[::1]:65536"},
		// Digits only: net.Listen would take a service's name, a sign or
		// no port at all (any free port), and the message says a number.
		{"--addr", "127.0.0.1:http"},
		{"--addr", "127.0.0.1:+80"},
		{"--addr", "127.0.0.1:"},
		{"--bogus"},
		{"extra"},
		{"--expert-save-burst", "0"},
		{"--expert-save-burst", "-5"},
		{"--expert-save-burst", "many"},
		{"--expert-page-burst", "0"},
		{"--expert-page-burst", "-1"},
		{"--expert-page-burst", "lots"},
	} {
		var out, errOut bytes.Buffer
		if code := runServe(append([]string{"--db", dbPath, "--no-demo"}, args...), nil, &out, &errOut); code != exitBadInput {
			t.Errorf("serve %v: exit %d, want %d (%s)", args, code, exitBadInput, errOut.String())
		}
		if args[0] == "--addr" && !strings.Contains(errOut.String(), "--addr") {
			t.Errorf("serve %v: the refusal names no --addr: %s", args, errOut.String())
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("refused starts left %v behind", entries)
	}
}

func TestFacilitatorReset(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	db, err := store.Open(dbPath)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	check(t, db.SetFacilitatorHash(ctx, []byte("old hash")))
	db.Close()
	var out, errOut bytes.Buffer
	if code := runFacilitatorReset([]string{"--db", dbPath, "--addr", "192.0.2.1:9000"}, nil, &out, &errOut); code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut.String())
	}
	if !regexp.MustCompile(`http://192\.0\.2\.1:9000/signin#[A-Za-z0-9_-]{43}\n`).MatchString(out.String()) {
		t.Fatalf("no sign-in address: %q", out.String())
	}
	db, err = store.Open(dbPath)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if h, _ := db.FacilitatorHash(ctx); string(h) == "old hash" || len(h) == 0 {
		t.Fatalf("hash not replaced: %q", h)
	}
	// Under TLS the address is the one browsers reach: --base-url.
	out.Reset()
	if code := runFacilitatorReset([]string{"--db", dbPath, "--base-url", "https://192.0.2.1:8443/"}, nil, &out, &errOut); code != exitOK ||
		!regexp.MustCompile(`https://192\.0\.2\.1:8443/signin#[A-Za-z0-9_-]{43}\n`).MatchString(out.String()) {
		t.Fatalf("--base-url https: exit %d: %q", code, out.String())
	}
	for _, bad := range []string{"ftp://host:1", "192.0.2.1:8443", "https://", "https://host:1/path"} {
		errOut.Reset()
		before, _ := db.FacilitatorHash(ctx)
		if code := runFacilitatorReset([]string{"--db", dbPath, "--base-url", bad}, nil, &out, &errOut); code != exitBadInput || !strings.Contains(errOut.String(), "base-url") {
			t.Errorf("--base-url %q: exit %d, %q; want 2 naming the flag", bad, code, errOut.String())
		}
		if after, _ := db.FacilitatorHash(ctx); string(after) != string(before) {
			t.Errorf("--base-url %q: the secret changed though the input was refused", bad)
		}
	}
	// --keep-signed-in leaves a signed-in browser signed in; without it
	// every session ends.
	check(t, db.CreateSession(ctx, []byte("open session"), time.Now().Add(time.Hour)))
	for _, c := range []struct {
		args []string
		kept bool
		says string
	}{
		{[]string{"--db", dbPath, "--keep-signed-in"}, true, "browsers already signed in stay signed in"},
		{[]string{"--db", dbPath}, false, "browsers signed in before are signed out"},
	} {
		out.Reset()
		if code := runFacilitatorReset(c.args, nil, &out, &errOut); code != exitOK || !strings.Contains(out.String(), c.says) {
			t.Fatalf("reset %v: exit %d: %s", c.args, code, out.String())
		}
		if ok, _ := db.SessionValid(ctx, []byte("open session"), time.Now()); ok != c.kept {
			t.Errorf("reset %v: session still valid = %v, want %v", c.args, ok, c.kept)
		}
	}
	if code := runFacilitatorReset([]string{"--db", filepath.Join(t.TempDir(), "missing.db")}, nil, &out, &errOut); code != exitBadInput {
		t.Fatalf("missing database: exit %d", code)
	}
}

// A client that stops sending in the middle of a request (a phone that
// left the Wi-Fi mid-save) does not make the stop fail: after the grace
// period its connection is closed and serve returns cleanly. It used to
// return "context deadline exceeded", so `parley serve` exited 1.
func TestServeStopsWithAStalledClient(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	base, out, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath, grace: 500 * time.Millisecond})
	link := regexp.MustCompile(`/e/[A-Za-z0-9_-]{43}/`).FindString(out.String())
	if link == "" {
		t.Fatalf("no demo link printed:\n%s", out)
	}
	host := strings.TrimPrefix(base, "http://")
	conn, err := net.DialTimeout("tcp", host, 5*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	// The head, asking to be told when the body is wanted: the server
	// sends "100 Continue" when the handler first reads the body, so the
	// request is then surely in the handler; then 7 of the 100 bytes the
	// body promises.
	fmt.Fprintf(conn, "POST %sq/1/save HTTP/1.1\r\nHost: %s\r\nOrigin: %s\r\nExpect: 100-continue\r\n"+
		"Content-Type: application/x-www-form-urlencoded\r\nContent-Length: 100\r\n\r\n", link, host, base)
	_ = conn.SetReadDeadline(time.Now().Add(10 * time.Second))
	line, err := bufio.NewReader(conn).ReadString('\n')
	if err != nil || !strings.HasPrefix(line, "HTTP/1.1 100") {
		t.Fatalf("waiting for the handler to read the body: %q, %v", line, err)
	}
	if _, err := io.WriteString(conn, "q05=0.1"); err != nil {
		t.Fatal(err)
	}
	if err := stop(); err != nil {
		t.Fatalf("stop with a stalled client: %v\n%s", err, out)
	}
	if !strings.Contains(out.String(), "closed the connections still open after 500ms") {
		t.Errorf("the cut-off is not reported:\n%s", out)
	}
	_ = conn.SetReadDeadline(time.Now().Add(5 * time.Second))
	if _, err := conn.Read(make([]byte, 1)); err == nil {
		t.Error("the stalled client's connection is still open after the stop")
	}
}

// TestServeBaseURLWithClosingSlash: --base-url typed with its closing
// slash, as a browser's address bar shows it, gives links with one slash
// after the host. It printed http://HOST:8080//signin#… and every demo
// expert's link with "//e/", which the server does not route.
func TestServeBaseURLWithClosingSlash(t *testing.T) {
	_, out, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: filepath.Join(t.TempDir(), "p.db"), baseURL: "http://192.0.2.1:8080/"})
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	text := out.String()
	if strings.Contains(text, "8080//") || !strings.Contains(text, "http://192.0.2.1:8080/signin#") || !strings.Contains(text, "http://192.0.2.1:8080/e/") {
		t.Errorf("links with a doubled slash, or none:\n%s", text)
	}
}

// TestServeRefusesABadBaseURL: --base-url is checked as
// facilitator-reset checks it, before anything is opened; "nonsense"
// printed the sign-in address as nonsense/signin#….
func TestServeRefusesABadBaseURL(t *testing.T) {
	for _, bad := range []string{"nonsense", "192.0.2.1:8080", "ftp://192.0.2.1:21", "http://192.0.2.1:8080/parley", "http://192.0.2.1:8080/?x=1",
		"http://192.0.2.1:99999", "http://192.0.2.1:0"} {
		dbPath := filepath.Join(t.TempDir(), "p.db")
		ctx, cancel := context.WithCancel(context.Background())
		cancel() // a server that starts anyway stops at once
		var out, errOut syncBuffer
		err := serve(ctx, serveConfig{addr: "127.0.0.1:0", db: dbPath, baseURL: bad, noDemo: true}, &out, &errOut)
		if err == nil || fail(io.Discard, "serve", err) != exitBadInput || !strings.Contains(err.Error(), "--base-url") {
			t.Errorf("--base-url %q: %v; want bad input naming --base-url\n%s", bad, err, out.String())
		}
		if _, serr := os.Stat(dbPath); serr == nil {
			t.Errorf("--base-url %q: the database was created though the flag was refused", bad)
		}
	}
}

// TestFacilitatorResetChecksAddr: --addr makes the printed address, so a
// value that makes none is refused before the secret changes; it printed
// "http:///signin#…" for --addr "" with every browser signed out. The
// wildcard address is printed as serve prints it, 127.0.0.1.
func TestFacilitatorResetChecksAddr(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	db, err := store.Open(dbPath)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	ctx := context.Background()
	check(t, db.SetFacilitatorHash(ctx, []byte("old hash")))
	for _, bad := range []string{"", "8080", "foo bar:8080", "host:port", "127.0.0.1:", "127.0.0.1:99999", "127.0.0.1:0"} {
		var out, errOut bytes.Buffer
		if code := runFacilitatorReset([]string{"--db", dbPath, "--addr", bad}, nil, &out, &errOut); code != exitBadInput || !strings.Contains(errOut.String(), "--addr") || out.Len() != 0 {
			t.Errorf("--addr %q: exit %d, %q %q; want 2 naming --addr and nothing printed", bad, code, errOut.String(), out.String())
		}
		if h, _ := db.FacilitatorHash(ctx); string(h) != "old hash" {
			t.Fatalf("--addr %q: the secret changed though the flag was refused", bad)
		}
	}
	var out, errOut bytes.Buffer
	if code := runFacilitatorReset([]string{"--db", dbPath, "--addr", "0.0.0.0:8080"}, nil, &out, &errOut); code != exitOK ||
		!regexp.MustCompile(`http://127\.0\.0\.1:8080/signin#[A-Za-z0-9_-]{43}\n`).MatchString(out.String()) {
		t.Errorf("--addr 0.0.0.0:8080: exit %d: %q", code, out.String())
	}
}

// TestServeOnAPortInUseIssuesNoSecret: a start that cannot bind its
// address issues no sign-in secret, so the next start prints one. It
// issued one and stopped without printing it; the next start said "the
// sign-in address printed earlier is still unused" of an address nobody
// saw.
func TestServeOnAPortInUseIssuesNoSecret(t *testing.T) {
	taken, err := net.Listen("tcp4", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer taken.Close()
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	var out, errOut syncBuffer
	err = serve(context.Background(), serveConfig{addr: taken.Addr().String(), db: dbPath, noDemo: true}, &out, &errOut)
	if err == nil {
		t.Fatal("serve on a port in use: no error")
	}
	if !strings.Contains(err.Error(), "--addr "+taken.Addr().String()) {
		t.Errorf("serve on a port in use: %v; want an error naming --addr", err)
	}
	if strings.Contains(out.String(), "sign-in") {
		t.Errorf("a start that did not bind spoke of a sign-in address:\n%s", out.String())
	}
	// Nor does it leave a new database behind: the address is bound
	// before the database is opened.
	if _, err := os.Stat(dbPath); !os.IsNotExist(err) {
		t.Errorf("a start that did not bind left %s behind (%v)", dbPath, err)
	}
	_, out2, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath, noDemo: true})
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	if !signInLine.MatchString(out2.String()) {
		t.Errorf("the next start printed no sign-in address:\n%s", out2.String())
	}
}

// TestServeRefusesAFolderOrAnotherFileAsItsDatabase: --db naming a
// folder, or a file that is no database (the exported record, by a
// slip), is bad input naming --db, as the other commands say it; serve
// said "cannot write …: open …: is a directory" and "store: open …: file
// is not a database", exit 1.
func TestServeRefusesAFolderOrAnotherFileAsItsDatabase(t *testing.T) {
	dir := t.TempDir()
	record := filepath.Join(dir, "record.json")
	if err := os.WriteFile(record, []byte(`{"parley_record": 1}`), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ db, says string }{
		{dir, "--db: " + dir + " is a folder"},
		{record, "--db: " + record + " is not a Parley database"},
	} {
		ctx, cancel := context.WithCancel(context.Background())
		cancel()
		var out, errOut syncBuffer
		err := serve(ctx, serveConfig{addr: "127.0.0.1:0", db: c.db, noDemo: true}, &out, &errOut)
		if err == nil || fail(io.Discard, "serve", err) != exitBadInput || !strings.Contains(err.Error(), c.says) {
			t.Errorf("--db %s: %v; want bad input saying %q", c.db, err, c.says)
		}
	}
	if b, _ := os.ReadFile(record); string(b) != `{"parley_record": 1}` {
		t.Errorf("serve changed the file given as --db: %q", b)
	}
}

// The facilitator-reset that serve suggests for a lost sign-in address
// names a database whose path holds a space in quote marks, so that a
// copy and paste gives one word; it was unquoted and split at the space.
func TestServeSuggestsAResetAShellReads(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "Reliability team's workshops", "parley.db")
	if err := os.MkdirAll(filepath.Dir(dbPath), 0o755); err != nil {
		t.Fatal(err)
	}
	_, _, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath})
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	_, out, _, stop2 := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath})
	defer stop2()
	want := "parley facilitator-reset --db '" + strings.ReplaceAll(dbPath, "'", `'\''`) + "' --keep-signed-in"
	if !strings.Contains(out.String(), want) {
		t.Errorf("the suggested reset does not quote the database's path; want %q in:\n%s", want, out)
	}
	if got := shellWord("/srv/parley/parley.db"); got != "/srv/parley/parley.db" {
		t.Errorf("a plain path is written %q", got)
	}
}

// TestServeAndImportRefuseAnotherProgramsDatabase: serve and import, which
// make a database in a new or empty file, refuse as bad input naming --db
// an SQLite database of another program and a copy taken while a server
// ran without its journal, and leave them unchanged; they wrote Parley's
// tables (and serve its demo workshop) into them.
func TestServeAndImportRefuseAnotherProgramsDatabase(t *testing.T) {
	dir := t.TempDir()
	other := filepath.Join(dir, "notes.sqlite")
	raw, err := sql.Open("sqlite3", other)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := raw.Exec(`CREATE TABLE notes (body TEXT)`); err != nil {
		t.Fatal(err)
	}
	raw.Close()
	served := filepath.Join(dir, "parley.db")
	db, err := store.Open(served)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	copied := filepath.Join(dir, "copied.db")
	b, err := os.ReadFile(served)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(copied, b, 0o644); err != nil {
		t.Fatal(err)
	}
	src, wid, _ := cliWorkshop(t)
	record := filepath.Join(dir, "record.json")
	if code, _, errs := run("export", "--db", src, "--workshop", strconv.FormatInt(wid, 10), "--out", record); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	for _, c := range []struct{ db, says string }{
		{other, "--db: " + other + " is an SQLite database of another program"},
		{copied, "--db: " + copied + " holds no tables: it looks like a copy"},
	} {
		before, _ := os.ReadFile(c.db)
		ctx, cancel := context.WithCancel(context.Background())
		cancel()
		var out, errOut syncBuffer
		err := serve(ctx, serveConfig{addr: "127.0.0.1:0", db: c.db, noDemo: false}, &out, &errOut)
		if err == nil || fail(io.Discard, "serve", err) != exitBadInput || !strings.Contains(err.Error(), c.says) {
			t.Errorf("serve --db %s: %v; want bad input saying %q", c.db, err, c.says)
		}
		if code, _, errs := run("import", "--db", c.db, "--in", record); code != exitBadInput || !strings.Contains(errs, c.says) {
			t.Errorf("import --db %s: exit %d, %s; want 2 saying %q", c.db, code, errs, c.says)
		}
		if after, _ := os.ReadFile(c.db); !bytes.Equal(before, after) {
			t.Errorf("%s was changed", c.db)
		}
	}
}

// TestServeFoldsItsJournalIntoTheFile: while serving, the commits in the
// journal (parley.db-wal) are folded into the database file every
// foldEvery, so that a copy of the file alone holds them. A whole
// workshop could stay in the journal (SQLite folds it by itself only at
// some 4 MB): a cp of parley.db after the demo was made held no
// workshop at all, however long the server had run.
func TestServeFoldsItsJournalIntoTheFile(t *testing.T) {
	was := foldEvery
	foldEvery = 20 * time.Millisecond
	t.Cleanup(func() { foldEvery = was })
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	_, _, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath})
	copied := filepath.Join(t.TempDir(), "copied.db")
	workshops := 0
	for deadline := time.Now().Add(5 * time.Second); time.Now().Before(deadline) && workshops == 0; time.Sleep(50 * time.Millisecond) {
		b, err := os.ReadFile(dbPath)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(copied, b, 0o644); err != nil {
			t.Fatal(err)
		}
		raw, err := sql.Open("sqlite3", "file:"+copied+"?immutable=1")
		if err != nil {
			t.Fatal(err)
		}
		// An error (no table yet) counts as none.
		_ = raw.QueryRow(`SELECT COUNT(*) FROM workshops`).Scan(&workshops)
		raw.Close()
	}
	if workshops != 1 {
		t.Errorf("a copy of the served file alone holds %d workshops, want the demo", workshops)
	}
	if err := stop(); err != nil {
		t.Fatal(err)
	}
}

// TestBaseURLMayLeaveOutItsPort: behind a proxy the server is reached at
// the scheme's own port, so --base-url may leave the port out (README);
// a port given must be one a browser can reach.
func TestBaseURLMayLeaveOutItsPort(t *testing.T) {
	for raw, want := range map[string]string{
		"https://parley.example.org":  "https://parley.example.org",
		"https://parley.example.org/": "https://parley.example.org",
		"http://192.0.2.1:65535":      "http://192.0.2.1:65535",
	} {
		got, err := checkBaseURL(raw)
		if err != nil || got != want {
			t.Errorf("checkBaseURL(%q) = %q, %v; want %q", raw, got, err, want)
		}
	}
	for _, bad := range []string{"http://192.0.2.1:65536", "http://192.0.2.1:0", "https://[::1]:99999"} {
		if _, err := checkBaseURL(bad); err == nil || !strings.Contains(err.Error(), "port must be a number from 1 to 65535") {
			t.Errorf("checkBaseURL(%q): %v; want the port's rule", bad, err)
		}
	}
}

// TestSecondServeOfOneDatabaseSaysItIsServed: the same command started
// twice (the same --db and --addr) is told the database is being served,
// not to change its port: the address was bound before the database was
// claimed, and the second start said "address already in use (give
// another host:port with --addr)".
func TestSecondServeOfOneDatabaseSaysItIsServed(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	base, _, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath, noDemo: true})
	defer stop()
	addr := strings.TrimPrefix(base, "http://")
	var out, errOut syncBuffer
	err := serve(context.Background(), serveConfig{addr: addr, db: dbPath, noDemo: true}, &out, &errOut)
	if err == nil || !strings.Contains(err.Error(), "is already being served by another Parley server") || strings.Contains(err.Error(), "--addr") {
		t.Errorf("a second start on %s and %s: %v; want the database said to be served", addr, dbPath, err)
	}
}
