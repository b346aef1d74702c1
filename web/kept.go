package web

import (
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
	items map[string]keptItem[T]
}

type keptItem[T any] struct {
	v       T
	expires time.Time
}

func newKept[T any](life time.Duration) *kept[T] {
	return &kept[T]{life: life, items: map[string]keptItem[T]{}}
}

// keep remembers v until now+life and returns its key.
func (k *kept[T]) keep(v T, now time.Time) (string, error) {
	b := make([]byte, 16)
	if _, err := rand.Read(b); err != nil {
		return "", err
	}
	key := hex.EncodeToString(b)
	k.mu.Lock()
	defer k.mu.Unlock()
	for old, it := range k.items {
		if now.After(it.expires) {
			delete(k.items, old)
		}
	}
	k.items[key] = keptItem[T]{v, now.Add(k.life)}
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

// drop forgets key.
func (k *kept[T]) drop(key string) {
	k.mu.Lock()
	defer k.mu.Unlock()
	delete(k.items, key)
}
