package web

import (
	"strconv"
	"testing"
	"time"
)

// limiters keeps at most maxLimiters: a new key first drops the keys
// back at their full allowance, then all of them if every one is spent.
func TestLimitersStayBounded(t *testing.T) {
	now := time.Date(2026, 3, 3, 10, 0, 0, 0, time.UTC)
	l := newLimiters[string](time.Second, 2)
	for i := range maxLimiters {
		lim := l.get(strconv.Itoa(i), now)
		if i%2 == 0 {
			lim.AllowN(now, 1) // half of them spent in part
		}
	}
	if got := l.get("0", now).TokensAt(now); got != 1 {
		t.Fatalf("a key's limiter is not kept: %v tokens", got)
	}
	l.get("new", now)
	if len(l.m) != maxLimiters/2+1 {
		t.Fatalf("%d limiters after a new key, want the %d spent ones and the new one", len(l.m), maxLimiters/2)
	}
	for i := range maxLimiters {
		l.get("spent"+strconv.Itoa(i), now).AllowN(now, 1)
	}
	if len(l.m) > maxLimiters {
		t.Fatalf("%d limiters, more than %d", len(l.m), maxLimiters)
	}
}
