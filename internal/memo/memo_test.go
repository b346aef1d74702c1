package memo

import (
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
