package web

import (
	"time"

	"golang.org/x/time/rate"
)

// limiters holds a rate.Limiter per key (a client's address for sign-in,
// an expert for previews), each allowing burst at once and then one every
// every. It is not safe for concurrent use: its owner locks around it.
type limiters[K comparable] struct {
	every time.Duration
	burst int
	m     map[K]*rate.Limiter
}

// maxLimiters bounds the limiters one limiters holds.
const maxLimiters = 4096

func newLimiters[K comparable](every time.Duration, burst int) limiters[K] {
	return limiters[K]{every: every, burst: burst, m: map[K]*rate.Limiter{}}
}

// get returns key's limiter, new at its full allowance when key has none.
// At maxLimiters, the limiters back at their full allowance are dropped
// first (their keys lose nothing), and all of them if that is not enough.
func (l *limiters[K]) get(key K, now time.Time) *rate.Limiter {
	if lim, ok := l.m[key]; ok {
		return lim
	}
	if len(l.m) >= maxLimiters {
		for k, lim := range l.m {
			if lim.TokensAt(now) >= float64(l.burst) {
				delete(l.m, k)
			}
		}
		if len(l.m) >= maxLimiters {
			clear(l.m)
		}
	}
	lim := rate.NewLimiter(rate.Every(l.every), l.burst)
	l.m[key] = lim
	return lim
}
