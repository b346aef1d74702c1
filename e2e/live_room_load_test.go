package e2e

import (
	"context"
	"crypto/rand"
	"crypto/sha256"
	"encoding/base64"
	"fmt"
	mrand "math/rand/v2"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// roomLoadExperts is the room of TestLiveRoomInOneBrowserUnderLoad.
const roomLoadExperts = 30

// TestLiveRoomInOneBrowserUnderLoad: the facilitator's browser with the
// overview, a question's panel and its room view open (one shared
// stream, live-worker.js) while 30 more experts each answer that question
// and revise it within some 6 s. Every tab comes to the workshop's last
// count and shows every expert; none fetched itself more than once a
// change, and none goes on fetching itself once caught up. The server's
// side of the same room, with Go clients, is systemtest's
// TestLiveRoomUnderLoad.
func TestLiveRoomInOneBrowserUnderLoad(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	q := d.qs[0]
	var tokens []string
	var names []string
	for i := 0; i < roomLoadExperts; i++ {
		raw := make([]byte, 32)
		if _, err := rand.Read(raw); err != nil {
			t.Fatal(err)
		}
		sum := sha256.Sum256(raw)
		e := workshop.Expert{WorkshopID: d.w.ID, Name: fmt.Sprintf("Invented room member %02d", i+1)}
		if err := site.DB.AddExpert(ctx, &e, sum[:]); err != nil {
			t.Fatal(err)
		}
		tokens = append(tokens, base64.RawURLEncoding.EncodeToString(raw))
		names = append(names, e.Name)
	}

	fac := signedInFacilitator(t, site)
	qPath := "/w/" + strconv.FormatInt(d.w.ID, 10) + "/q/" + strconv.FormatInt(q.ID, 10)
	pages := []string{"/w/" + strconv.FormatInt(d.w.ID, 10) + "/", qPath, qPath + "/room"}
	tabs := []*person{fac, fac.tab("facilitator's panel"), fac.tab("projector's room view")}
	for i, tab := range tabs {
		if st := tab.open(site.URL + pages[i]); st != http.StatusOK {
			t.Fatalf("%s: status %d", pages[i], st)
		}
		tab.liveConnected("the live stream to connect")
		eval[bool](tab, "room for the fetches' timings", `performance.setResourceTimingBufferSize(2000), true`)
	}
	// fetches are a tab's fetches of its own page (live.js fetches
	// data-live-page where the page names one).
	const fetches = `performance.getEntriesByType("resource").filter(e => e.initiatorType === "fetch" &&
		new URL(e.name).pathname === (document.querySelector("[data-live-src]").getAttribute("data-live-page") || location.pathname))`
	fetched := func(i int) int {
		return eval[int](tabs[i], "count the page's fetches", fetches+`.length`)
	}

	save := func(i, pass int, rng *mrand.Rand) error {
		m := 0.03 + 0.1*rng.Float64()
		form := url.Values{
			"values[0]": {strconv.FormatFloat(m/2, 'f', 3, 64)},
			"values[1]": {strconv.FormatFloat(m, 'f', 3, 64)},
			"values[2]": {strconv.FormatFloat(2*m, 'f', 3, 64)},
			"reason":    {fmt.Sprintf("Invented: thoughts, pass %d.", pass)},
		}
		req, _ := http.NewRequest(http.MethodPost, site.URL+"/e/"+tokens[i]+"/q/"+strconv.FormatInt(q.ID, 10)+"/save", strings.NewReader(form.Encode()))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", site.URL)
		cl := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
		res, err := cl.Do(req)
		if err != nil {
			return err
		}
		res.Body.Close()
		if res.StatusCode != http.StatusSeeOther {
			return fmt.Errorf("expert %d's save: status %d", i+1, res.StatusCode)
		}
		return nil
	}
	var wg sync.WaitGroup
	errs := make(chan error, 2*roomLoadExperts)
	for i := range tokens {
		wg.Add(1)
		go func() {
			defer wg.Done()
			rng := mrand.New(mrand.NewPCG(uint64(i), 2026))
			for pass := 1; pass <= 2; pass++ {
				time.Sleep(time.Duration(rng.Int64N(int64(3 * time.Second))))
				if err := save(i, pass, rng); err != nil {
					errs <- err
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	// Every answer is in now: a fetch started from here shows them all.
	// One more save makes sure each tab has a change to fetch itself for.
	last := time.Now().UnixMilli()
	if err := save(0, 3, mrand.New(mrand.NewPCG(99, 2026))); err != nil {
		t.Fatal(err)
	}
	saves := 2*roomLoadExperts + 1

	caught := fmt.Sprintf(`%s.some(e => performance.timeOrigin + e.startTime > %d && e.responseEnd > 0) &&
		Number(document.documentElement.getAttribute("data-live-updated")) > %d`, fetches, last, last)
	for i, tab := range tabs {
		if err := tab.poll(10*time.Second, caught); err != nil {
			t.Errorf("%s did not fetch itself after the last answers came: %v", pages[i], err)
		}
	}
	before := make([]int, len(tabs))
	for i := range tabs {
		before[i] = fetched(i)
	}
	// A tab may yet fetch itself once for the last save, then no more.
	time.Sleep(2 * time.Second)
	for i, tab := range tabs {
		n := fetched(i)
		t.Logf("%s fetched itself %d times for %d saves", pages[i], n, saves)
		if n > saves+1 {
			t.Errorf("%s fetched itself %d times for %d saves", pages[i], n, saves)
		}
		if n > before[i]+1 {
			t.Errorf("%s fetched itself %d more times after it had caught up, with one change since", pages[i], n-before[i])
		}
		tab.noScriptErrors("the room")
	}
	panel := tabs[1].text()
	for _, name := range names {
		if !strings.Contains(panel, name) {
			t.Errorf("the panel does not show %s", name)
		}
	}
}
