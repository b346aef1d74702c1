package systemtest

import (
	"bytes"
	"context"
	"crypto/rand"
	"crypto/sha256"
	"encoding/base64"
	"fmt"
	mrand "math/rand/v2"
	"net"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/internal/testbin"
	"github.com/parley-elicit/parley/store"
)

// The harness: build the real binary once, seed a database through the
// store, start `parley serve` as a child process, wait until it answers,
// kill or stop it, and talk to it the way a browser form does.

func TestMain(m *testing.M) { testbin.Main(m) }

// parleyBinary builds cmd/parley once per test run (internal/testbin).
// PARLEY_SYSTEMTEST_SRC builds it from another copy of the module, for
// checking that these tests fail on a broken server.
func parleyBinary(t testing.TB) string {
	t.Helper()
	src := os.Getenv("PARLEY_SYSTEMTEST_SRC")
	if src == "" {
		src = ".."
	}
	return testbin.Parley(t, src)
}

// freeAddr returns a loopback address with a port that was free a moment
// ago.
func freeAddr(t testing.TB) string {
	t.Helper()
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	addr := ln.Addr().String()
	ln.Close()
	return addr
}

// lockedBuffer collects a child's output; the tail is shown on failure.
type lockedBuffer struct {
	mu  sync.Mutex
	buf bytes.Buffer
}

func (b *lockedBuffer) Write(p []byte) (int, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.buf.Len() > 1<<20 { // keep memory bounded; the tail is what matters
		b.buf.Reset()
	}
	return b.buf.Write(p)
}

func (b *lockedBuffer) tail(n int) string {
	b.mu.Lock()
	defer b.mu.Unlock()
	s := b.buf.String()
	if len(s) > n {
		s = "..." + s[len(s)-n:]
	}
	return s
}

// waitFor waits up to limit for the output to hold text, and reports
// whether it does. The child's output reaches the buffer through a pipe
// and a copying goroutine, and a line logged as a request fails can
// arrive after its response: read at once, it was missing now and then.
func (b *lockedBuffer) waitFor(text string, limit time.Duration) bool {
	for deadline := time.Now().Add(limit); ; time.Sleep(20 * time.Millisecond) {
		b.mu.Lock()
		ok := strings.Contains(b.buf.String(), text)
		b.mu.Unlock()
		if ok || time.Now().After(deadline) {
			return ok
		}
	}
}

// child is one running `parley serve`.
type child struct {
	cmd     *exec.Cmd
	addr    string
	base    string // http://addr
	out     *lockedBuffer
	done    chan struct{} // closed when the process has exited
	waitErr error         // valid after done
}

// startServer starts `parley serve --no-demo` on addr over dbPath, with
// any further flags, and waits until it answers GET /signin.
func startServer(t testing.TB, bin, dbPath, addr string, flags ...string) *child {
	t.Helper()
	c := &child{
		cmd:  exec.Command(bin, append([]string{"serve", "--addr", addr, "--db", dbPath, "--no-demo"}, flags...)...),
		addr: addr, base: "http://" + addr,
		out: &lockedBuffer{}, done: make(chan struct{}),
	}
	c.cmd.Stdout, c.cmd.Stderr = c.out, c.out
	if err := c.cmd.Start(); err != nil {
		t.Fatalf("start parley serve: %v", err)
	}
	go func() {
		c.waitErr = c.cmd.Wait()
		close(c.done)
	}()
	if err := c.waitReady(20 * time.Second); err != nil {
		c.kill()
		t.Fatalf("parley serve on %s: %v\noutput:\n%s", addr, err, c.out.tail(4000))
	}
	return c
}

// waitReady polls GET /signin until it answers 200, the process exits or
// the limit passes.
func (c *child) waitReady(limit time.Duration) error {
	cl := &http.Client{Timeout: time.Second}
	deadline := time.Now().Add(limit)
	for time.Now().Before(deadline) {
		select {
		case <-c.done:
			return fmt.Errorf("exited before answering: %v", c.waitErr)
		default:
		}
		res, err := cl.Get(c.base + "/signin")
		if err == nil {
			res.Body.Close()
			if res.StatusCode == http.StatusOK {
				return nil
			}
		}
		time.Sleep(10 * time.Millisecond)
	}
	return fmt.Errorf("no answer within %v", limit)
}

// kill sends SIGKILL to this child (by its own pid) and waits for it.
func (c *child) kill() {
	_ = c.cmd.Process.Signal(syscall.SIGKILL)
	<-c.done
}

// exitCode is the child's exit status once done; -1 when killed by a
// signal.
func (c *child) exitCode() int {
	if c.cmd.ProcessState == nil {
		return -1
	}
	return c.cmd.ProcessState.ExitCode()
}

// seeded is a workshop prepared directly through the store.
type seeded struct {
	workshopID int64
	questions  []workshop.Question
	experts    []seededExpert
}

type seededExpert struct {
	id    int64
	token string
}

// newToken makes an expert token in web's documented format: 32 random
// bytes as unpadded base64url; the store keeps SHA-256 of the raw bytes.
func newToken(t testing.TB) (token string, hash []byte) {
	t.Helper()
	b := make([]byte, 32)
	if _, err := rand.Read(b); err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256(b)
	return base64.RawURLEncoding.EncodeToString(b), sum[:]
}

// seedWorkshop creates dbPath with one open workshop (an invented
// scenario), nQuestions quantile questions on [0, 1] asking for the 5th,
// 50th and 95th percentiles, and nExperts experts with fresh tokens.
func seedWorkshop(t testing.TB, dbPath string, nExperts, nQuestions int) seeded {
	t.Helper()
	ctx := context.Background()
	db, err := store.Open(dbPath)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	w := workshop.Workshop{
		Title:    "Invented: valve seat failure proportion (system test)",
		Purpose:  "An invented scenario for Parley's system tests.",
		Decision: "None: invented data.",
		Invented: true,
	}
	if err := db.CreateWorkshop(ctx, &w); err != nil {
		t.Fatal(err)
	}
	s := seeded{workshopID: w.ID}
	for i := 0; i < nQuestions; i++ {
		q := workshop.Question{
			WorkshopID: w.ID,
			Wording:    fmt.Sprintf("Invented question %d: what proportion of seats in batch %d fail the leak test?", i+1, i+1),
			Quantity:   fmt.Sprintf("proportion failing, batch %d", i+1),
			Lower:      0, Upper: 1,
			Format: workshop.FormatQuantiles,
			Probs:  append([]float64(nil), workshop.ProbsDefault...),
		}
		if err := db.AddQuestion(ctx, &q); err != nil {
			t.Fatal(err)
		}
		s.questions = append(s.questions, q)
	}
	for i := 0; i < nExperts; i++ {
		token, hash := newToken(t)
		e := workshop.Expert{WorkshopID: w.ID, Name: fmt.Sprintf("Invented expert %03d", i+1)}
		if err := db.AddExpert(ctx, &e, hash); err != nil {
			t.Fatal(err)
		}
		s.experts = append(s.experts, seededExpert{id: e.ID, token: token})
	}
	return s
}

// answer is one judgement as typed in the form, and the numbers it means.
type answer struct {
	form   url.Values
	values []float64
}

// quantileAnswer makes a plausible 5/50/95 judgement on a proportion:
// median between 0.08 and 0.4, tails spread around it, three decimals as
// a person would type them. reason tags the save so it can be found again.
func quantileAnswer(rng *mrand.Rand, reason string) answer {
	m := 0.08 + 0.32*rng.Float64()
	lo := m * (0.35 + 0.3*rng.Float64())
	hi := m + (1-m)*(0.15+0.25*rng.Float64())
	raw := []float64{lo, m, hi}
	a := answer{form: url.Values{}}
	for i, v := range raw {
		s := strconv.FormatFloat(v, 'f', 3, 64)
		f, _ := strconv.ParseFloat(s, 64)
		a.values = append(a.values, f)
		a.form.Set(fmt.Sprintf("values[%d]", i), s)
	}
	if reason != "" {
		a.form.Set("reason", reason)
	}
	return a
}

// newClient is a browser-like client that does not follow redirects, so
// a save's 303 is seen as such.
func newClient(conns int) *http.Client {
	return &http.Client{
		Timeout: 20 * time.Second,
		Transport: &http.Transport{
			MaxIdleConns:        conns,
			MaxIdleConnsPerHost: conns,
			IdleConnTimeout:     30 * time.Second,
		},
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse },
	}
}

// postForm posts form to base+path as a Parley page would: urlencoded,
// with an Origin naming the server so cross-origin protection lets it
// through. It returns the status and the body (first 64 KiB).
func postForm(ctx context.Context, c *http.Client, base, path string, form url.Values) (int, string, error) {
	req, err := http.NewRequestWithContext(ctx, http.MethodPost, base+path, strings.NewReader(form.Encode()))
	if err != nil {
		return 0, "", err
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", base)
	return do(c, req)
}

func do(c *http.Client, req *http.Request) (int, string, error) {
	res, err := c.Do(req)
	if err != nil {
		return 0, "", err
	}
	defer res.Body.Close()
	// The simulated clients share the CPUs with the server: the body is
	// read into a reused buffer, and only its start is kept for messages.
	b := bodies.Get().(*bytes.Buffer)
	defer func() { b.Reset(); bodies.Put(b) }()
	_, err = b.ReadFrom(&limitedReader{r: res.Body, n: 64 << 10})
	return res.StatusCode, string(b.Bytes()[:min(b.Len(), 2000)]), err
}

var bodies = sync.Pool{New: func() any { return new(bytes.Buffer) }}

// limitedReader reads at most n bytes and then drains silently, so a
// connection can be reused.
type limitedReader struct {
	r interface{ Read([]byte) (int, error) }
	n int
}

func (l *limitedReader) Read(p []byte) (int, error) {
	n, err := l.r.Read(p)
	if l.n <= 0 {
		return 0, err
	}
	if n > l.n {
		n = l.n
	}
	l.n -= n
	return n, err
}

// savePath and previewPath are an expert's endpoints for one question.
func questionPagePath(token string, qid int64) string {
	return "/e/" + token + "/q/" + strconv.FormatInt(qid, 10)
}
func savePath(token string, qid int64) string    { return questionPagePath(token, qid) + "/save" }
func previewPath(token string, qid int64) string { return questionPagePath(token, qid) + "/preview" }

// saveAcknowledged says whether a save response is the success the
// expert sees: the redirect back to the question, or a 200 page.
func saveAcknowledged(status int) bool {
	return status == http.StatusSeeOther || status == http.StatusOK
}

// checkStored opens dbPath through the store, checks integrity and
// returns the workshop's revisions.
func checkStored(t testing.TB, dbPath string, workshopID int64) []workshop.Revision {
	t.Helper()
	ctx := context.Background()
	db, err := store.Open(dbPath)
	if err != nil {
		t.Fatalf("reopen %s: %v", dbPath, err)
	}
	defer db.Close()
	verdict, err := db.IntegrityCheck(ctx)
	if err != nil {
		t.Fatalf("integrity check: %v", err)
	}
	if verdict != "ok" {
		t.Errorf("PRAGMA integrity_check = %q, want ok", verdict)
	}
	revs, err := db.Revisions(ctx, workshopID)
	if err != nil {
		t.Fatalf("revisions: %v", err)
	}
	return revs
}

// sameValues compares two answers' quantile values exactly: they went
// through strconv both ways, which round-trips float64.
func sameValues(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
