// Package memo is a bounded, concurrency-safe table of computed values,
// for results that depend only on their key and so can never be stale.
package memo

import "sync"

// Memo is a bounded, concurrency-safe table of computed values. It keeps
// two generations of at most half entries each: a hit in the older one
// moves the entry to the newer, and when the newer fills it becomes the
// older and the oldest is dropped.
//
// A key missed by several callers at once is computed once: the first
// computes it and the others wait for its result, as
// golang.org/x/sync/singleflight does for string keys. The memo keeps its
// own table of computations in flight because its keys are any
// comparable values (structs of floats, say), which singleflight would
// need written out as strings on every miss, and an unambiguous string
// form of an arbitrary key is not to be had generically.
type Memo[K comparable, V any] struct {
	mu       sync.Mutex
	half     int
	cur, old map[K]V
	inflight map[K]*call[V]
}

// call is a computation in flight and, once done is closed, its result.
type call[V any] struct {
	done    chan struct{}
	v       V
	err     error
	ok      bool // the computation returned (it did not panic)
	waiters int  // callers waiting on it, for tests
}

// New returns an empty memo holding at most size values.
func New[K comparable, V any](size int) *Memo[K, V] {
	half := max(1, size/2)
	return &Memo[K, V]{half: half, cur: make(map[K]V, half), old: map[K]V{}, inflight: map[K]*call[V]{}}
}

// Get returns the value for k, computing it outside the lock when absent.
func (m *Memo[K, V]) Get(k K, compute func() V) V {
	v, _ := m.GetErr(k, func() (V, error) { return compute(), nil })
	return v
}

// GetErr is Get for a computation that can fail: an error is returned
// (to every caller that waited on the same computation) and nothing is
// remembered, so the next call computes again. A computation must not
// ask the memo for its own key: it would wait on itself.
func (m *Memo[K, V]) GetErr(k K, compute func() (V, error)) (V, error) {
	for {
		m.mu.Lock()
		if v, ok := m.cur[k]; ok {
			m.mu.Unlock()
			return v, nil
		}
		if v, ok := m.old[k]; ok {
			m.put(k, v)
			m.mu.Unlock()
			return v, nil
		}
		if c, ok := m.inflight[k]; ok {
			c.waiters++
			m.mu.Unlock()
			<-c.done
			if c.ok {
				return c.v, c.err
			}
			// The computation panicked in its own caller; try again here.
			continue
		}
		c := &call[V]{done: make(chan struct{})}
		m.inflight[k] = c
		m.mu.Unlock()
		return m.compute(k, c, compute)
	}
}

// compute runs the computation of call c for k and publishes its result.
func (m *Memo[K, V]) compute(k K, c *call[V], compute func() (V, error)) (V, error) {
	defer func() {
		m.mu.Lock()
		delete(m.inflight, k)
		if c.ok && c.err == nil {
			m.put(k, c.v)
		}
		m.mu.Unlock()
		close(c.done)
	}()
	c.v, c.err = compute()
	c.ok = true
	return c.v, c.err
}

// put stores v under k; m.mu is held.
func (m *Memo[K, V]) put(k K, v V) {
	if len(m.cur) >= m.half {
		m.old, m.cur = m.cur, make(map[K]V, m.half)
	}
	m.cur[k] = v
}

// Reset forgets every value. Computations in flight still hand their
// result to the callers waiting on them.
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
