package store

import (
	"context"
	"fmt"
	"sync"
	"testing"
	"time"
)

// TestFacilitatorHashIsSpentOnce: the secret's hash signs in once; of
// many sign-ins racing with it exactly one gets a session, and expired
// sessions are deleted on the way.
func TestFacilitatorHashIsSpentOnce(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	t0 := time.Date(2026, 3, 1, 9, 0, 0, 0, time.UTC)
	if err := db.CreateSession(ctx, []byte("old"), t0.Add(-time.Minute)); err != nil {
		t.Fatal(err)
	}
	if err := db.CreateSession(ctx, []byte("current"), t0.Add(time.Hour)); err != nil {
		t.Fatal(err)
	}
	if err := db.IssueFacilitatorHash(ctx, []byte("h1")); err != nil {
		t.Fatal(err)
	}
	if ok, _ := db.SessionValid(ctx, []byte("current"), t0); !ok {
		t.Fatal("issuing a new secret ended an open session")
	}
	var wg sync.WaitGroup
	wins := make(chan string, 8)
	for i := 0; i < 8; i++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			s := fmt.Sprintf("s%d", i)
			ok, err := db.UseFacilitatorHash(ctx, []byte("h1"), []byte(s), t0.Add(time.Hour), t0)
			if err != nil {
				t.Error(err)
			}
			if ok {
				wins <- s
			}
		}()
	}
	wg.Wait()
	close(wins)
	var won []string
	for s := range wins {
		won = append(won, s)
	}
	if len(won) != 1 {
		t.Fatalf("%d sign-ins spent one secret: %v", len(won), won)
	}
	if h, _ := db.FacilitatorHash(ctx); h != nil {
		t.Errorf("the spent hash is still stored: %q", h)
	}
	if ok, _ := db.SessionValid(ctx, []byte(won[0]), t0); !ok {
		t.Error("the winning sign-in has no session")
	}
	if n, _ := db.Sessions(ctx); n != 2 {
		t.Errorf("%d sessions stored, want 2 (the expired one purged)", n)
	}
	if ok, err := db.UseFacilitatorHash(ctx, []byte("h1"), []byte("late"), t0.Add(time.Hour), t0); ok || err != nil {
		t.Errorf("a spent hash signed in again: %v, %v", ok, err)
	}
	if n, err := db.PurgeSessions(ctx, t0.Add(2*time.Hour)); n != 2 || err != nil {
		t.Errorf("PurgeSessions = %d, %v; want 2", n, err)
	}
}
