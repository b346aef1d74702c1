package systemtest

import (
	"context"
	"fmt"
	mrand "math/rand/v2"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// ackedSave is a save the server answered with success: what was sent.
type ackedSave struct {
	expertID, questionID int64
	values               []float64
}

// TestCrashKeepsAcknowledgedSaves starts the real binary, has many
// goroutines save judgements through the expert save endpoint, kills the
// server with SIGKILL at random moments, restarts it on the same file,
// and finally checks that every save that was acknowledged is in the
// database with the values sent, and that PRAGMA integrity_check is ok.
func TestCrashKeepsAcknowledgedSaves(t *testing.T) {
	if testing.Short() {
		t.Skip("crash test starts and kills the server 24 times; skipped with -short")
	}
	const (
		kills      = 24
		workers    = 24
		nExperts   = 12
		nQuestions = 4
		loopLimit  = 45 * time.Second
	)
	bin := parleyBinary(t)
	dir := t.TempDir()
	dbPath := filepath.Join(dir, "crash.db")
	ws := seedWorkshop(t, dbPath, nExperts, nQuestions)
	addr := freeAddr(t)
	// The test's experts save without pause, far beyond an expert link's
	// allowance of saves (serve's --expert-save-burst), so it is raised.
	noPacing := []string{"--expert-save-burst", "1000000000"}
	c := startServer(t, bin, dbPath, addr, noPacing...)
	base := c.base

	var (
		mu       sync.Mutex
		acked    = map[string]ackedSave{} // by reason, unique per attempt
		statuses = map[int]int{}          // non-success statuses seen
		bodies   []string                 // a few bodies of those, for the failure message
		inflight atomic.Int64
		attempts atomic.Int64
		connErrs atomic.Int64
	)
	stop := make(chan struct{})
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			rng := mrand.New(mrand.NewPCG(uint64(w), 0xc0ffee))
			cl := newClient(2)
			for n := 0; ; n++ {
				select {
				case <-stop:
					return
				default:
				}
				e := ws.experts[(w+n)%nExperts]
				q := ws.questions[rng.IntN(nQuestions)]
				reason := fmt.Sprintf("crash-test w%02d n%05d", w, n)
				a := quantileAnswer(rng, reason)
				ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
				inflight.Add(1)
				attempts.Add(1)
				status, body, err := postForm(ctx, cl, base, savePath(e.token, q.ID), a.form)
				inflight.Add(-1)
				cancel()
				switch {
				case err != nil && status == 0:
					// The server was killed or is restarting: not acknowledged.
					connErrs.Add(1)
					time.Sleep(time.Duration(2+rng.IntN(8)) * time.Millisecond)
				case saveAcknowledged(status):
					// Even when a kill cut the body short, the status line
					// is the acknowledgement a browser would have acted on.
					mu.Lock()
					acked[reason] = ackedSave{expertID: e.id, questionID: q.ID, values: a.values}
					mu.Unlock()
				default:
					mu.Lock()
					statuses[status]++
					if len(bodies) < 3 {
						bodies = append(bodies, fmt.Sprintf("%d: %.300s", status, body))
					}
					mu.Unlock()
				}
			}
		}(w)
	}

	killer := mrand.New(mrand.NewPCG(42, 7))
	started := time.Now()
	var (
		done       int
		inflightAt []int64
		restarts   []time.Duration
	)
	for done < kills && time.Since(started) < loopLimit {
		time.Sleep(time.Duration(80+killer.IntN(420)) * time.Millisecond)
		inflightAt = append(inflightAt, inflight.Load())
		c.kill()
		done++
		t0 := time.Now()
		c = startServer(t, bin, dbPath, addr, noPacing...)
		restarts = append(restarts, time.Since(t0))
	}
	// Let the last life take some saves, then kill it too: the final
	// state on disk is one a crash left.
	time.Sleep(300 * time.Millisecond)
	inflightAt = append(inflightAt, inflight.Load())
	c.kill()
	done++
	close(stop)
	wg.Wait()
	elapsed := time.Since(started)

	if done < 20 {
		t.Fatalf("only %d kills within %v; the test needs at least 20", done, loopLimit)
	}
	mu.Lock()
	defer mu.Unlock()
	if len(statuses) > 0 {
		t.Errorf("valid saves got non-success statuses %v while the server was up, e.g.\n%s",
			statuses, strings.Join(bodies, "\n"))
	}
	if len(acked) == 0 {
		t.Fatal("no save was acknowledged; the test proves nothing")
	}

	revs := checkStored(t, dbPath, ws.workshopID)
	stored := map[string]int{}
	var unacked int
	for _, r := range revs {
		stored[r.Reason]++
		if _, ok := acked[r.Reason]; !ok {
			unacked++
		}
	}
	byReason := map[string]int{}
	for i, r := range revs {
		byReason[r.Reason] = i
	}
	var lost []string
	for reason, a := range acked {
		i, ok := byReason[reason]
		if !ok {
			lost = append(lost, reason)
			continue
		}
		r := revs[i]
		if r.ExpertID != a.expertID || r.QuestionID != a.questionID || !sameValues(r.Answer.Values, a.values) {
			t.Errorf("save %q stored as expert %d question %d values %v; sent expert %d question %d values %v",
				reason, r.ExpertID, r.QuestionID, r.Answer.Values, a.expertID, a.questionID, a.values)
		}
	}
	for reason, n := range stored {
		if n > 1 {
			t.Errorf("save %q stored %d times; each attempt was sent once", reason, n)
		}
	}
	if len(lost) > 0 {
		sort.Strings(lost)
		t.Errorf("%d acknowledged saves are missing after %d kills, e.g. %v\nlast server output:\n%s",
			len(lost), done, lost[:min(5, len(lost))], c.out.tail(1500))
	}

	var inflightKills int
	for _, n := range inflightAt {
		if n > 0 {
			inflightKills++
		}
	}
	sort.Slice(restarts, func(i, j int) bool { return restarts[i] < restarts[j] })
	t.Logf("crash test: %d SIGKILLs in %v; %d save attempts, %d acknowledged, %d failed with the connection, "+
		"%d committed but never acknowledged (allowed), %d lost (must be 0); kills with saves in flight: %d of %d; "+
		"restart-to-ready median %v, max %v",
		done, elapsed.Round(time.Millisecond), attempts.Load(), len(acked), connErrs.Load(),
		unacked, len(lost), inflightKills, len(inflightAt),
		restarts[len(restarts)/2].Round(time.Millisecond), restarts[len(restarts)-1].Round(time.Millisecond))
	if inflightKills == 0 {
		t.Error("no kill hit a save in flight; the test did not exercise a crash during a write")
	}
}
