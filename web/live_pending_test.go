package web

import "testing"

// A stream has room for one pending change. A change published while one
// was pending was skipped, and the stream then told the pending one's
// count, older than the workshop's: the shared worker (live-worker.js)
// kept that count and gave it to a tab joining afterwards, and a tab
// whose page was read at that older count took itself as current and
// missed the skipped change (an answer) until some later one. The event
// that reaches the stream carries the workshop's latest count.
func TestPendingChangeCarriesTheLatestCount(t *testing.T) {
	hub := newLiveHub()
	ch, _, cancel, err := hub.subscribe(7)
	if err != nil {
		t.Fatal(err)
	}
	defer cancel()
	hub.publish(7, "save") // pending: nobody reads the stream yet
	hub.publish(7, "save") // skipped
	ev := <-ch
	if want := hub.version(7); ev.Version != want {
		t.Errorf("the pending change carries count %q; the workshop is at %q", ev.Version, want)
	}
	select {
	case ev := <-ch:
		t.Errorf("a second change pending: %+v", ev)
	default:
	}
}
