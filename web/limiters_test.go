package web

import (
	"strconv"
	"testing"
	"time"
)

// limiters keeps at most maxLimiters: a new key first drops the keys
// back at their full allowance, then, if every one is spent, the one with
// the most left; the others keep what they spent.
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
	// Every limiter is spent in part; one is spent to the last token. A
	// new key drops one limiter with a token left, and the spent one
	// keeps its count.
	var spent string
	for k := range l.m {
		spent = k
		break
	}
	l.m[spent].AllowN(now, int(l.m[spent].TokensAt(now)))
	l.get("one more", now)
	if len(l.m) != maxLimiters {
		t.Fatalf("%d limiters after a new key at full, want %d", len(l.m), maxLimiters)
	}
	if lim, ok := l.m[spent]; !ok || lim.TokensAt(now) != 0 {
		t.Fatalf("a spent key's limiter was dropped (%v) and would be given back its allowance", !ok)
	}
}
