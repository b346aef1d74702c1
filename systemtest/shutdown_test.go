package systemtest

import (
	"bufio"
	"fmt"
	mrand "math/rand/v2"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"
)

// slowSave is a save request written by hand on a raw connection so the
// test controls exactly when its body arrives: the head and half the body
// are sent before the signal, the rest after.
type slowSave struct {
	conn   net.Conn
	req    *http.Request
	rest   []byte
	reason string
	expert int64
	qid    int64
	values []float64
}

func startSlowSave(t *testing.T, c *child, e seededExpert, qid int64, a answer) *slowSave {
	t.Helper()
	body := []byte(a.form.Encode())
	path := savePath(e.token, qid)
	conn, err := net.DialTimeout("tcp", c.addr, 5*time.Second)
	if err != nil {
		t.Fatalf("dial %s: %v", c.addr, err)
	}
	head := fmt.Sprintf("POST %s HTTP/1.1\r\nHost: %s\r\nOrigin: %s\r\n"+
		"Content-Type: application/x-www-form-urlencoded\r\nContent-Length: %d\r\nConnection: close\r\n\r\n",
		path, c.addr, c.base, len(body))
	half := len(body) / 2
	if _, err := conn.Write(append([]byte(head), body[:half]...)); err != nil {
		t.Fatalf("write request head: %v", err)
	}
	req, _ := http.NewRequest(http.MethodPost, c.base+path, nil)
	return &slowSave{conn: conn, req: req, rest: body[half:], reason: a.form.Get("reason"),
		expert: e.id, qid: qid, values: a.values}
}

// finish sends the rest of the body and reads the response status.
func (s *slowSave) finish() (int, error) {
	defer s.conn.Close()
	_ = s.conn.SetDeadline(time.Now().Add(15 * time.Second))
	if _, err := s.conn.Write(s.rest); err != nil {
		return 0, err
	}
	res, err := http.ReadResponse(bufio.NewReader(s.conn), s.req)
	if err != nil {
		return 0, err
	}
	res.Body.Close()
	return res.StatusCode, nil
}

// TestGracefulShutdown sends SIGTERM (and, separately, SIGINT) to the
// real binary while saves are half-sent, and checks that the server stops
// accepting connections, still completes every in-flight save with
// success, exits 0, and leaves a database that reopens clean with those
// saves in it.
func TestGracefulShutdown(t *testing.T) {
	bin := parleyBinary(t)
	for _, tc := range []struct {
		name string
		sig  syscall.Signal
	}{{"SIGTERM", syscall.SIGTERM}, {"SIGINT", syscall.SIGINT}} {
		sig := tc.sig
		t.Run(tc.name, func(t *testing.T) {
			const inFlight = 16
			dbPath := filepath.Join(t.TempDir(), "shutdown.db")
			ws := seedWorkshop(t, dbPath, inFlight, 2)
			c := startServer(t, bin, dbPath, freeAddr(t))
			defer func() {
				select {
				case <-c.done:
				default:
					c.kill()
				}
			}()
			rng := mrand.New(mrand.NewPCG(3, uint64(sig)))
			var slow []*slowSave
			for i, e := range ws.experts {
				a := quantileAnswer(rng, fmt.Sprintf("shutdown %s %02d", tc.name, i))
				slow = append(slow, startSlowSave(t, c, e, ws.questions[i%2].ID, a))
			}
			// Give the server time to read every request head, so each
			// connection is active (not idle) when the signal arrives.
			time.Sleep(300 * time.Millisecond)
			if err := c.cmd.Process.Signal(sig); err != nil {
				t.Fatal(err)
			}
			time.Sleep(300 * time.Millisecond)
			select {
			case <-c.done:
				t.Fatalf("server exited with %d saves still in flight (status %d)\n%s",
					inFlight, c.exitCode(), c.out.tail(2000))
			default:
			}
			if conn, err := net.DialTimeout("tcp", c.addr, time.Second); err == nil {
				conn.Close()
				t.Errorf("after %s the server still accepts new connections", sig)
			}

			sent := time.Now()
			for _, s := range slow {
				status, err := s.finish()
				if err != nil || !saveAcknowledged(status) {
					t.Errorf("in-flight save %q after %s: status %d, error %v", s.reason, sig, status, err)
				}
			}
			select {
			case <-c.done:
			case <-time.After(20 * time.Second):
				t.Fatalf("server still running 20 s after its last request\n%s", c.out.tail(2000))
			}
			exitAfter := time.Since(sent)
			if code := c.exitCode(); code != 0 {
				t.Errorf("exit status after %s = %d, want 0\n%s", sig, code, c.out.tail(2000))
			}

			walSize := int64(-1)
			if fi, err := os.Stat(dbPath + "-wal"); err == nil {
				walSize = fi.Size()
			}
			revs := checkStored(t, dbPath, ws.workshopID)
			byReason := map[string]int{}
			for i, r := range revs {
				byReason[r.Reason] = i
			}
			for _, s := range slow {
				i, ok := byReason[s.reason]
				if !ok {
					t.Errorf("in-flight save %q acknowledged but not stored", s.reason)
					continue
				}
				if r := revs[i]; r.ExpertID != s.expert || r.QuestionID != s.qid || !sameValues(r.Answer.Values, s.values) {
					t.Errorf("save %q stored as %+v, sent expert %d question %d values %v", s.reason, r, s.expert, s.qid, s.values)
				}
			}
			t.Logf("%s: %d in-flight saves completed; exited %v after the last body arrived; WAL file after exit: %s",
				sig, len(slow), exitAfter.Round(time.Millisecond), walState(walSize))
		})
	}
}

func walState(size int64) string {
	switch {
	case size < 0:
		return "absent (checkpointed and removed at close)"
	case size == 0:
		return "empty"
	}
	return fmt.Sprintf("%d bytes left (not checkpointed)", size)
}
