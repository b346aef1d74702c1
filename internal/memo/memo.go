// Package memo is a bounded, concurrency-safe table of computed values,
// for results that depend only on their key and so can never be stale.
package memo

import "sync"

// Memo is a bounded, concurrency-safe table of computed values. It keeps
// two generations of at most half entries each: a hit in the older one
// moves the entry to the newer, and when the newer fills it becomes the
// older and the oldest is dropped.
type Memo[K comparable, V any] struct {
	mu       sync.Mutex
	half     int
	cur, old map[K]V
}

// New returns an empty memo holding at most size values.
func New[K comparable, V any](size int) *Memo[K, V] {
	half := max(1, size/2)
	return &Memo[K, V]{half: half, cur: make(map[K]V, half), old: map[K]V{}}
}

// Get returns the value for k, computing it outside the lock when absent.
func (m *Memo[K, V]) Get(k K, compute func() V) V {
	v, _ := m.GetErr(k, func() (V, error) { return compute(), nil })
	return v
}

// GetErr is Get for a computation that can fail: an error is returned
// and nothing is remembered, so the next call computes again.
func (m *Memo[K, V]) GetErr(k K, compute func() (V, error)) (V, error) {
	m.mu.Lock()
	if v, ok := m.cur[k]; ok {
		m.mu.Unlock()
		return v, nil
	}
	v, ok := m.old[k]
	if !ok {
		m.mu.Unlock()
		var err error
		if v, err = compute(); err != nil {
			return v, err
		}
		m.mu.Lock()
	}
	if len(m.cur) >= m.half {
		m.old, m.cur = m.cur, make(map[K]V, m.half)
	}
	m.cur[k] = v
	m.mu.Unlock()
	return v, nil
}

// Reset forgets every value.
func (m *Memo[K, V]) Reset() {
	m.mu.Lock()
	m.cur, m.old = make(map[K]V, m.half), map[K]V{}
	m.mu.Unlock()
}

// Len is the number of values held.
func (m *Memo[K, V]) Len() int {
	m.mu.Lock()
	defer m.mu.Unlock()
	return len(m.cur) + len(m.old)
}
