package web

import (
	"context"
	"io"
	"net"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/parley-elicit/parley/store"
)

// inFlight is the store counting how many secret comparisons run at once
// (each starts by reading the stored hash) and slowing each a little, so
// that overlapping ones would be seen.
type inFlight struct {
	*store.DB
	now, most atomic.Int64
}

func (s *inFlight) FacilitatorHash(ctx context.Context) ([]byte, error) {
	n := s.now.Add(1)
	defer s.now.Add(-1)
	for {
		m := s.most.Load()
		if n <= m || s.most.CompareAndSwap(m, n) {
			break
		}
	}
	time.Sleep(20 * time.Millisecond)
	return s.DB.FacilitatorHash(ctx)
}

// clientFrom is an HTTP client whose connections come from the loopback
// address ip (127.0.0.0/8 is all this machine's), so the server sees
// different client addresses without any traffic leaving the machine.
func clientFrom(ip string) *http.Client {
	d := &net.Dialer{LocalAddr: &net.TCPAddr{IP: net.ParseIP(ip)}, Timeout: 5 * time.Second}
	return &http.Client{
		Transport:     &http.Transport{DialContext: d.DialContext},
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse },
	}
}

// signInServer serves a new database on loopback with the server's clock
// now, and issues a facilitator secret. With st, the server reads the
// database through it (st.DB is set to the database).
func signInServer(t *testing.T, st *inFlight, now func() time.Time) (*Server, *httptest.Server, string) {
	t.Helper()
	db, err := store.Open(t.TempDir() + "/parley.db")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	var through Store = db
	if st != nil {
		st.DB = db
		through = st
	}
	s, err := New(through, Options{Now: now})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	secret, err := IssueFacilitatorSecret(context.Background(), db)
	if err != nil {
		t.Fatal(err)
	}
	return s, ts, secret
}

func postSignIn(t *testing.T, c *http.Client, base, secret string) (*http.Response, string) {
	t.Helper()
	req, err := http.NewRequest(http.MethodPost, base+"/signin", strings.NewReader(url.Values{"secret": {secret}}.Encode()))
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", base)
	res, err := c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	b, _ := io.ReadAll(res.Body)
	return res, string(b)
}

// TestSignInThrottled: a burst of sign-ins from one address gets 429 with
// Retry-After once its allowance is spent, even with the right secret,
// and nothing is compared meanwhile; many addresses together are held to
// the overall allowance; and comparisons never overlap (issue 13, item
// 2). The clock is the server's own, moved by the test.
func TestSignInThrottled(t *testing.T) {
	st := &inFlight{}
	clock := time.Date(2026, 5, 4, 9, 0, 0, 0, time.UTC)
	var clockMu sync.Mutex
	now := func() time.Time { clockMu.Lock(); defer clockMu.Unlock(); return clock }
	advance := func(d time.Duration) { clockMu.Lock(); clock = clock.Add(d); clockMu.Unlock() }
	s, ts, secret := signInServer(t, st, now)
	db := st.DB
	wrong := strings.Repeat("A", 43)

	one := clientFrom("127.0.0.1")
	for i := 0; i < SignInBurst; i++ {
		if res, _ := postSignIn(t, one, ts.URL, wrong); res.StatusCode != http.StatusUnauthorized {
			t.Fatalf("attempt %d within the allowance: %d, want 401", i+1, res.StatusCode)
		}
	}
	before := s.signIns.compared.Load()
	res, body := postSignIn(t, one, ts.URL, secret)
	if res.StatusCode != http.StatusTooManyRequests {
		t.Fatalf("attempt past the allowance: %d, want 429", res.StatusCode)
	}
	if ra, err := strconv.Atoi(res.Header.Get("Retry-After")); err != nil || ra < 1 || ra > int(signInClientEvery/time.Second) {
		t.Errorf("Retry-After %q, want 1 to %d seconds", res.Header.Get("Retry-After"), int(signInClientEvery/time.Second))
	}
	if !strings.Contains(body, "too many sign-in attempts just now; nothing was checked. Try again in 5 seconds.") {
		t.Error("the 429 page does not say when to try again")
	}
	if s.signIns.compared.Load() != before {
		t.Error("a throttled attempt was compared")
	}
	// Once the address's allowance has come back, the right secret works.
	advance(signInClientEvery)
	if res, _ := postSignIn(t, one, ts.URL, secret); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("after waiting: %d, want 303", res.StatusCode)
	}

	// A flood from 20 addresses at once: the overall allowance (spent
	// down to its refill by the attempts above) admits at most
	// SignInBurst, the rest are 429, and comparisons run one at a time.
	advance(SignInBurst * SignInOverallEvery) // the overall allowance is full again
	if _, err := IssueFacilitatorSecret(context.Background(), db); err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	var admitted, refused atomic.Int64
	compared0 := s.signIns.compared.Load()
	for i := 2; i < 22; i++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			res, _ := postSignIn(t, clientFrom("127.0.0."+strconv.Itoa(i)), ts.URL, wrong)
			switch res.StatusCode {
			case http.StatusUnauthorized:
				admitted.Add(1)
			case http.StatusTooManyRequests:
				refused.Add(1)
			default:
				t.Errorf("flood: status %d", res.StatusCode)
			}
		}()
	}
	wg.Wait()
	if admitted.Load() != SignInBurst || refused.Load() != 20-SignInBurst {
		t.Errorf("flood from 20 addresses: %d compared, %d refused; want %d and %d", admitted.Load(), refused.Load(), SignInBurst, 20-SignInBurst)
	}
	if n := s.signIns.compared.Load() - compared0; n != SignInBurst {
		t.Errorf("%d comparisons for the flood, want %d", n, SignInBurst)
	}
	if m := st.most.Load(); m != 1 {
		t.Errorf("%d comparisons ran at once, want 1", m)
	}
}

// A sign-in flood from the room's network spends the network's overall
// allowance, and the facilitator at the server's own machine still gets
// in: the own machine's attempts draw on an allowance of their own. A
// facilitator on another device shares the network's and waits.
func TestSignInFloodLeavesTheOwnMachineItsAllowance(t *testing.T) {
	th := newSignInThrottle()
	now := time.Date(2026, 5, 4, 9, 0, 0, 0, time.UTC)
	for i := range 20 {
		th.admit("192.0.2."+strconv.Itoa(i+1), false, now)
	}
	if wait := th.admit("192.0.2.200", false, now); wait <= 0 {
		t.Fatal("the network's allowance is not spent by the flood")
	}
	if wait := th.admit("192.168.1.20", true, now); wait != 0 {
		t.Errorf("the own machine waits %v behind the network's flood", wait)
	}
	// The own machine is held to its own allowance in turn.
	for i := range SignInBurst {
		th.admit("127.0.0."+strconv.Itoa(10+i), true, now)
	}
	if wait := th.admit("127.0.0.99", true, now); wait <= 0 {
		t.Error("the own machine's attempts are not limited")
	}
}

// fromOwnMachine: a loopback peer, or a peer at the very address the
// connection reached the server on, is the server's own machine; any
// other peer is not, whatever it sends.
func TestFromOwnMachine(t *testing.T) {
	local := &net.TCPAddr{IP: net.ParseIP("192.168.1.20"), Port: 8080}
	for _, c := range []struct {
		remote string
		local  net.Addr
		want   bool
	}{
		{"127.0.0.1:50000", local, true},
		{"[::1]:50000", local, true},
		{"127.0.0.7:50000", nil, true},
		{"192.168.1.20:50000", local, true},
		{"192.168.1.21:50000", local, false},
		{"192.168.1.20:50000", nil, false},
		{"[2001:db8::5]:50000", &net.TCPAddr{IP: net.ParseIP("2001:db8::5"), Port: 8080}, true},
		{"[2001:db8::6]:50000", &net.TCPAddr{IP: net.ParseIP("2001:db8::5"), Port: 8080}, false},
		{"not an address", local, false},
	} {
		r := httptest.NewRequest(http.MethodPost, "/signin", nil)
		r.RemoteAddr = c.remote
		r.Header.Set("X-Forwarded-For", "127.0.0.1")
		if c.local != nil {
			r = r.WithContext(context.WithValue(r.Context(), http.LocalAddrContextKey, c.local))
		}
		if got := fromOwnMachine(r); got != c.want {
			t.Errorf("peer %s, reached at %v: own machine %v, want %v", c.remote, c.local, got, c.want)
		}
	}
}

// Through the sign-in page: with the network's allowance spent by a
// flood, the right secret posted from this machine (loopback) signs in.
func TestSignInFromTheOwnMachineDuringANetworkFlood(t *testing.T) {
	clock := time.Date(2026, 5, 4, 9, 0, 0, 0, time.UTC)
	s, ts, secret := signInServer(t, nil, func() time.Time { return clock })
	for i := range 50 {
		s.signIns.admit("198.51.100."+strconv.Itoa(i+1), false, clock)
	}
	if res, _ := postSignIn(t, clientFrom("127.0.0.1"), ts.URL, secret); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("the right secret from this machine during a network flood: %d, want 303", res.StatusCode)
	}
}
