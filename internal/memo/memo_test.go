package memo

import (
	"errors"
	"sync"
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
