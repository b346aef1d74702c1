package web

import (
	"context"
	"math"
	"net"
	"net/http"
	"strconv"
	"sync"
	"sync/atomic"
	"time"

	"golang.org/x/time/rate"
)

// Sign-in attempts are limited so that nobody on the network can tie up
// the CPUs with bcrypt comparisons (about 50 ms of CPU each at bcrypt's
// default cost): each client address may try SignInBurst times at once
// and then once every SignInClientEvery; all addresses together
// SignInBurst at once and then once every SignInOverallEvery; and only
// one comparison runs at a time. An attempt over a limit is answered 429
// with Retry-After and costs nothing. The facilitator opening their
// address makes one attempt.
//
// Attempts from the server's own machine (fromOwnMachine) draw on an
// overall allowance of their own, the same size: a flood from the
// room's network spends the network's and leaves the facilitator at the
// server's machine theirs, where it would otherwise hold even the right
// secret at 429 for as long as it lasted. A facilitator on another
// device shares the network's.
const (
	SignInBurst        = 5
	signInClientEvery  = 5 * time.Second
	SignInOverallEvery = time.Second
)

// signInThrottle holds the limits of sign-in attempts.
type signInThrottle struct {
	mu      sync.Mutex
	clients limiters[string] // by client address
	overall *rate.Limiter    // every address on the network together
	own     *rate.Limiter    // the server's own machine
	// comparing admits one bcrypt comparison at a time; the limits keep
	// the queue for it at most SignInBurst long.
	comparing chan struct{}
	compared  atomic.Int64 // comparisons made, for tests
}

func newSignInThrottle() *signInThrottle {
	return &signInThrottle{
		clients:   newLimiters[string](signInClientEvery, SignInBurst),
		overall:   rate.NewLimiter(rate.Every(SignInOverallEvery), SignInBurst),
		own:       rate.NewLimiter(rate.Every(SignInOverallEvery), SignInBurst),
		comparing: make(chan struct{}, 1),
	}
}

// admit takes one attempt from the client's allowance and the overall
// one (the own machine's when own), at now. When either is spent it
// takes nothing and returns how long to wait.
func (t *signInThrottle) admit(client string, own bool, now time.Time) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	cl := t.clients.get(client, now)
	overall := t.overall
	if own {
		overall = t.own
	}
	rc, ro := cl.ReserveN(now, 1), overall.ReserveN(now, 1)
	wait := max(rc.DelayFrom(now), ro.DelayFrom(now))
	if wait > 0 {
		rc.CancelAt(now)
		ro.CancelAt(now)
	}
	return wait
}

// compare runs f as the only comparison in progress, waiting for its
// turn unless ctx ends first.
func (t *signInThrottle) compare(ctx context.Context, f func() error) error {
	select {
	case t.comparing <- struct{}{}:
	case <-ctx.Done():
		return ctx.Err()
	}
	defer func() { <-t.comparing }()
	t.compared.Add(1)
	return f()
}

// clientAddress is the request's peer address without the port. Parley
// is reached directly on the room's network, so no forwarding header is
// trusted.
func clientAddress(r *http.Request) string {
	host, _, err := net.SplitHostPort(r.RemoteAddr)
	if err != nil {
		return r.RemoteAddr
	}
	return host
}

// fromOwnMachine reports whether the request came from the machine the
// server runs on: from a loopback address, or from the very address it
// reached the server on (a browser on the server's machine opening the
// room's address, 192.168.1.20, connects from 192.168.1.20). Neither can
// be claimed from another machine, since a TCP connection needs the
// server's answers to reach its source address.
func fromOwnMachine(r *http.Request) bool {
	peer := net.ParseIP(clientAddress(r))
	if peer == nil {
		return false
	}
	if peer.IsLoopback() {
		return true
	}
	local, ok := r.Context().Value(http.LocalAddrContextKey).(net.Addr)
	if !ok {
		return false
	}
	host, _, err := net.SplitHostPort(local.String())
	if err != nil {
		return false
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.Equal(peer)
}

// tooManySignIns answers an attempt over the limits: 429, Retry-After in
// whole seconds, and the sign-in page saying when to try again.
func (s *Server) tooManySignIns(w http.ResponseWriter, r *http.Request, wait time.Duration) {
	secs := int(math.Ceil(wait.Seconds()))
	w.Header().Set("Retry-After", strconv.Itoa(secs))
	s.renderPage(w, r, http.StatusTooManyRequests, signInMeta, signInPage(signInView{RetryAfter: secs}))
}
