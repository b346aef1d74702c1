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
// first (their keys lose nothing); if every one is spent in part, the one
// with the most left is dropped, so its key loses the least. (Clearing
// them all, as before, gave back the whole allowance to a client with
// enough addresses to fill the map.)
func (l *limiters[K]) get(key K, now time.Time) *rate.Limiter {
	if lim, ok := l.m[key]; ok {
		return lim
	}
	if len(l.m) >= maxLimiters {
		var (
			most    K
			mostTok = -1.0
		)
		for k, lim := range l.m {
			tok := lim.TokensAt(now)
			if tok >= float64(l.burst) {
				delete(l.m, k)
			} else if tok > mostTok {
				most, mostTok = k, tok
			}
		}
		if len(l.m) >= maxLimiters {
			delete(l.m, most)
		}
	}
	lim := rate.NewLimiter(rate.Every(l.every), l.burst)
	l.m[key] = lim
	return lim
}
