package web

import (
	"testing"
	"time"
)

// kept holds at most keptSheets values: checking a 1 MiB answer sheet again
// and again kept every copy for its half hour. The value that would
// expire first goes; the newest are still there.
func TestKeptStaysBounded(t *testing.T) {
	now := time.Date(2026, 12, 3, 5, 0, 0, 0, time.UTC)
	k := newKept[int](sheetFor, keptSheets)
	var keys []string
	for i := range keptSheets + 10 {
		key, err := k.keep(i, now.Add(time.Duration(i)*time.Second))
		if err != nil {
			t.Fatal(err)
		}
		keys = append(keys, key)
	}
	if n := len(k.items); n != keptSheets {
		t.Fatalf("%d values kept, want at most %d", n, keptSheets)
	}
	at := now.Add(time.Minute)
	if _, ok := k.get(keys[0], at); ok {
		t.Error("the oldest value is still kept")
	}
	for i := len(keys) - keptSheets; i < len(keys); i++ {
		if v, ok := k.get(keys[i], at); !ok || v != i {
			t.Errorf("value %d: %v %v", i, v, ok)
		}
	}
}
