package web

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"sync"
	"time"
)

// kept holds values for a short while under random keys that only the
// facilitator's next request carries: a private link just issued (shown
// again on reload, never stored), an answer sheet between its preview and
// its confirmation. Values are gone after their time or with the process.
type kept[T any] struct {
	mu    sync.Mutex
	life  time.Duration
	max   int // values kept at once (keptSheets, keptLinks)
	items map[string]keptItem[T]
}

// Bounds of the values kept at once. An answer sheet may be 1 MiB, and
// each check of one (a script, or a sheet checked again and again) was
// held for its half hour, without limit. Beyond the bound the value that
// would expire first goes: a sheet's confirmation then asks for the
// sheet again; a link just issued is not shown again (a panel of a few
// hundred experts added within issuedFor keeps every one).
const (
	keptSheets = 32
	keptLinks  = 4096
)

type keptItem[T any] struct {
	v       T
	expires time.Time
	taken   bool // claimed by take
	// inUse, while the claim's use runs (from take to settle or
	// untake), is closed when it ends, waking those who await it.
	inUse   chan struct{}
	waiters int // callers of await waiting on inUse
}

// end closes the item's inUse, if a use is running: it has ended.
func (it *keptItem[T]) end() {
	if it.inUse != nil {
		close(it.inUse)
		it.inUse = nil
	}
}

func newKept[T any](life time.Duration, max int) *kept[T] {
	return &kept[T]{life: life, max: max, items: map[string]keptItem[T]{}}
}

// keep remembers v until now+life and returns its key.
func (k *kept[T]) keep(v T, now time.Time) (string, error) {
	key, err := randomKey()
	if err != nil {
		return "", err
	}
	k.mu.Lock()
	defer k.mu.Unlock()
	for old, it := range k.items {
		if now.After(it.expires) {
			it.end()
			delete(k.items, old)
		}
	}
	for len(k.items) >= k.max {
		var first string
		for old, it := range k.items {
			if first == "" || it.expires.Before(k.items[first].expires) {
				first = old
			}
		}
		it := k.items[first]
		it.end()
		delete(k.items, first)
	}
	k.items[key] = keptItem[T]{v: v, expires: now.Add(k.life)}
	return key, nil
}

// get returns the value kept under key, if it has not expired.
func (k *kept[T]) get(key string, now time.Time) (T, bool) {
	k.mu.Lock()
	defer k.mu.Unlock()
	it, ok := k.items[key]
	if !ok || now.After(it.expires) {
		var zero T
		return zero, false
	}
	return it.v, true
}

// take claims the value kept under key for the one request that uses it
// up (an answer sheet's confirmation). The first caller gets it (ok) and
// ends its use with settle (used) or untake (failed, may be tried
// again); a caller while it is claimed, or after it was used, gets taken
// instead, with the value to read, so a confirmation sent twice (a double
// click, a replay) is used once. Such a caller awaits the use's end
// before it says what the use did: the second of two confirmations said
// "saved" while the first was still saving, and the first then failed.
// The value stays claimed until its time, or until untake.
func (k *kept[T]) take(key string, now time.Time) (v T, ok, taken bool) {
	k.mu.Lock()
	defer k.mu.Unlock()
	it, found := k.items[key]
	if !found || now.After(it.expires) {
		return v, false, false
	}
	if it.taken {
		return it.v, false, true
	}
	it.taken = true
	it.inUse = make(chan struct{})
	k.items[key] = it
	return it.v, true, false
}

// settle ends a use of the value claimed by take that used it: it stays
// claimed, and those awaiting it learn that it was used.
func (k *kept[T]) settle(key string) {
	k.mu.Lock()
	defer k.mu.Unlock()
	if it, ok := k.items[key]; ok {
		it.end()
		k.items[key] = it
	}
}

// untake gives back a value claimed by take, for a use that failed and
// may be tried again.
func (k *kept[T]) untake(key string) {
	k.mu.Lock()
	defer k.mu.Unlock()
	if it, ok := k.items[key]; ok {
		it.end()
		it.taken = false
		k.items[key] = it
	}
}

// await waits while the value under key is claimed by a use still
// running, and says whether it was used (settled, not given back nor
// gone); false, too, when ctx ends first.
func (k *kept[T]) await(ctx context.Context, key string) (used bool) {
	for {
		k.mu.Lock()
		it, found := k.items[key]
		if !found || !it.taken || it.inUse == nil {
			k.mu.Unlock()
			return found && it.taken
		}
		running := it.inUse
		it.waiters++
		k.items[key] = it
		k.mu.Unlock()
		select {
		case <-running:
		case <-ctx.Done():
		}
		k.mu.Lock()
		if it, ok := k.items[key]; ok {
			it.waiters--
			k.items[key] = it
		}
		k.mu.Unlock()
		if ctx.Err() != nil {
			return false
		}
	}
}

// awaiting counts the callers of await waiting on key's value: for tests
// that must know a second confirmation waits before the first ends.
func (k *kept[T]) awaiting(key string) int {
	k.mu.Lock()
	defer k.mu.Unlock()
	return k.items[key].waiters
}

// randomKey is 128 random bits in hex: a kept value's key, a form's key
// (once.go).
func randomKey() (string, error) {
	b := make([]byte, 16)
	if _, err := rand.Read(b); err != nil {
		return "", err
	}
	return hex.EncodeToString(b), nil
}
