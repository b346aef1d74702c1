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
	clients map[string]*rate.Limiter // by client address
	overall *rate.Limiter
	// comparing admits one bcrypt comparison at a time; the limits keep
	// the queue for it at most SignInBurst long.
	comparing chan struct{}
	compared  atomic.Int64 // comparisons made, for tests
}

// maxThrottledClients bounds the limiters kept; beyond it, those of
// addresses back at their full allowance are dropped (they lose nothing).
const maxThrottledClients = 4096

func newSignInThrottle() *signInThrottle {
	return &signInThrottle{
		clients:   map[string]*rate.Limiter{},
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
	cl, ok := t.clients[client]
	if !ok {
		if len(t.clients) >= maxThrottledClients {
			t.prune(now)
		}
		cl = rate.NewLimiter(rate.Every(signInClientEvery), SignInBurst)
		t.clients[client] = cl
	}
	rc, ro := cl.ReserveN(now, 1), t.overall.ReserveN(now, 1)
	wait := max(rc.DelayFrom(now), ro.DelayFrom(now))
	if wait > 0 {
		rc.CancelAt(now)
		ro.CancelAt(now)
	}
	return wait
}

// prune drops the limiters of clients back at their full allowance, and
// all of them if that is not enough (the overall limit still holds).
func (t *signInThrottle) prune(now time.Time) {
	for k, l := range t.clients {
		if l.TokensAt(now) >= SignInBurst {
			delete(t.clients, k)
		}
	}
	if len(t.clients) >= maxThrottledClients {
		clear(t.clients)
	}
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
