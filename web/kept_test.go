package web

import (
	"context"
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

// A caller awaiting a claimed value learns how its use ended: used
// (settle), given back (untake), or gone from the store (pushed out by
// newer values), and is never left waiting on a value no longer kept.
func TestKeptAwaitFollowsTheUse(t *testing.T) {
	now := time.Date(2026, 12, 3, 5, 0, 0, 0, time.UTC)
	for _, c := range []struct {
		name string
		end  func(k *kept[int], key string)
		used bool
	}{
		{"settled", func(k *kept[int], key string) { k.settle(key) }, true},
		{"given back", func(k *kept[int], key string) { k.untake(key) }, false},
		{"pushed out", func(k *kept[int], key string) {
			for i := range keptSheets {
				if _, err := k.keep(i, now.Add(time.Hour)); err != nil {
					t.Error(err)
				}
			}
		}, false},
	} {
		k := newKept[int](sheetFor, keptSheets)
		key, err := k.keep(7, now)
		if err != nil {
			t.Fatal(err)
		}
		if _, ok, _ := k.take(key, now); !ok {
			t.Fatalf("%s: not taken", c.name)
		}
		got := make(chan bool)
		go func() { got <- k.await(context.Background(), key) }()
		for k.awaiting(key) == 0 {
			time.Sleep(time.Millisecond)
		}
		c.end(k, key)
		if used := <-got; used != c.used {
			t.Errorf("%s: await says used %v, want %v", c.name, used, c.used)
		}
	}
}
