package memo

import (
	"errors"
	"runtime"
	"sync"
	"sync/atomic"
	"testing"
)

func TestMemoBoundedAndConcurrent(t *testing.T) {
	m := New[int, int](8)
	calls := 0
	var mu sync.Mutex
	sq := func(k int) func() int {
		return func() int { mu.Lock(); calls++; mu.Unlock(); return k * k }
	}
	for k := range 50 {
		if got := m.Get(k, sq(k)); got != k*k {
			t.Fatalf("Get(%d) = %d", k, got)
		}
		if m.Len() > 8 {
			t.Fatalf("memo of size 8 holds %d", m.Len())
		}
	}
	if m.Get(49, sq(49)) != 49*49 || calls != 50 {
		t.Errorf("%d computations for 50 keys and one repeat, want 50", calls)
	}
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range 200 {
				k := (i + g) % 13
				if got := m.Get(k, sq(k)); got != k*k {
					t.Errorf("Get(%d) = %d", k, got)
					return
				}
			}
		}()
	}
	wg.Wait()
}

// A failed computation is not remembered: the next call computes again.
func TestGetErrForgetsFailures(t *testing.T) {
	m := New[string, int](4)
	calls := 0
	failing := func() (int, error) { calls++; return 0, errors.New("disk gone") }
	if _, err := m.GetErr("k", failing); err == nil {
		t.Fatal("GetErr hid the error")
	}
	v, err := m.GetErr("k", func() (int, error) { calls++; return 7, nil })
	if err != nil || v != 7 || calls != 2 {
		t.Errorf("after a failure GetErr = %d, %v with %d computations; want 7, nil, 2", v, err, calls)
	}
	if v, _ := m.GetErr("k", failing); v != 7 || calls != 2 {
		t.Errorf("a remembered value was computed again (%d computations)", calls)
	}
	if m.Len() != 1 {
		t.Errorf("memo holds %d values, want 1", m.Len())
	}
}

// waiting is the number of callers waiting on k's computation in flight.
func (m *Memo[K, V]) waiting(k K) int {
	m.mu.Lock()
	defer m.mu.Unlock()
	if c, ok := m.inflight[k]; ok {
		return c.waiters
	}
	return 0
}

// concurrentMisses has n callers miss key "k" at once. Each computation
// holds until every other caller is either waiting on it or computing
// too, so the callers overlap whatever the scheduler does; it returns
// how many computations ran and what each caller got.
func concurrentMisses(t *testing.T, n int, result func(int32) (int, error)) (int32, []int, []error) {
	t.Helper()
	m := New[string, int](8)
	var calls atomic.Int32
	var wg sync.WaitGroup
	got, errs := make([]int, n), make([]error, n)
	for i := range n {
		wg.Add(1)
		go func() {
			defer wg.Done()
			got[i], errs[i] = m.GetErr("k", func() (int, error) {
				c := calls.Add(1)
				for m.waiting("k")+int(calls.Load()) < n {
					runtime.Gosched()
				}
				return result(c)
			})
		}()
	}
	wg.Wait()
	return calls.Load(), got, errs
}

// Many callers missing one key at once (every expert opening round 2
// together) compute it once and all get its value.
func TestConcurrentMissesComputeOnce(t *testing.T) {
	calls, got, _ := concurrentMisses(t, 16, func(c int32) (int, error) { return 100 + int(c), nil })
	if calls != 1 {
		t.Errorf("16 concurrent misses computed %d times, want once", calls)
	}
	for i, v := range got {
		if v != 101 {
			t.Errorf("caller %d got %d, want the one computation's 101", i, v)
		}
	}
}

// A failure is handed to the callers that waited on it and not
// remembered.
func TestConcurrentMissesShareAFailure(t *testing.T) {
	gone := errors.New("disk gone")
	calls, _, errs := concurrentMisses(t, 8, func(int32) (int, error) { return 0, gone })
	if calls != 1 {
		t.Errorf("8 concurrent misses computed %d times, want once", calls)
	}
	for i, err := range errs {
		if !errors.Is(err, gone) {
			t.Errorf("caller %d got %v, want the computation's error", i, err)
		}
	}
}

// A computation that panics panics in its own caller; a caller waiting on
// it computes for itself instead of hanging.
func TestPanicReleasesWaiters(t *testing.T) {
	m := New[string, int](4)
	started, release := make(chan struct{}), make(chan struct{})
	panicked := make(chan any, 1)
	go func() {
		defer func() { panicked <- recover() }()
		m.Get("k", func() int { close(started); <-release; panic("broken computation") })
	}()
	<-started
	done := make(chan int)
	go func() { done <- m.Get("k", func() int { return 5 }) }()
	for m.waiting("k") == 0 {
		select {
		case v := <-done:
			t.Fatalf("the second caller did not wait for the computation in flight (got %d)", v)
		default:
			runtime.Gosched()
		}
	}
	close(release)
	if p := <-panicked; p == nil {
		t.Error("the panic did not reach its own caller")
	}
	if v := <-done; v != 5 {
		t.Errorf("the waiting caller got %d, want its own 5", v)
	}
}
