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
const (
	SignInBurst        = 5
	signInClientEvery  = 5 * time.Second
	SignInOverallEvery = time.Second
)

// signInThrottle holds the limits of sign-in attempts.
type signInThrottle struct {
	mu      sync.Mutex
	clients limiters[string] // by client address
	overall *rate.Limiter
	// comparing admits one bcrypt comparison at a time; the limits keep
	// the queue for it at most SignInBurst long.
	comparing chan struct{}
	compared  atomic.Int64 // comparisons made, for tests
}

func newSignInThrottle() *signInThrottle {
	return &signInThrottle{
		clients:   newLimiters[string](signInClientEvery, SignInBurst),
		overall:   rate.NewLimiter(rate.Every(SignInOverallEvery), SignInBurst),
		comparing: make(chan struct{}, 1),
	}
}

// admit takes one attempt from the client's allowance and the overall
// one, at now. When either is spent it takes nothing and returns how
// long to wait.
func (t *signInThrottle) admit(client string, now time.Time) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	cl := t.clients.get(client, now)
	rc, ro := cl.ReserveN(now, 1), t.overall.ReserveN(now, 1)
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

// tooManySignIns answers an attempt over the limits: 429, Retry-After in
// whole seconds, and the sign-in page saying when to try again.
func (s *Server) tooManySignIns(w http.ResponseWriter, r *http.Request, wait time.Duration) {
	secs := int(math.Ceil(wait.Seconds()))
	w.Header().Set("Retry-After", strconv.Itoa(secs))
	s.renderPage(w, r, http.StatusTooManyRequests, signInMeta, signInPage(signInView{RetryAfter: secs}))
}
