package e2e

import (
	"fmt"
	"net/http"
	"strconv"
	"testing"
)

// liveTabs is more live pages than a browser keeps connections to one
// server over plain HTTP (six).
const liveTabs = 8

// TestManyLiveTabsInOneBrowser: a facilitator with eight live pages open
// in one browser (the overview, the projector's room view, panels) can
// still open pages, and every one of them follows a save. Each page held
// its own event stream, so with six open the seventh never loaded.
func TestManyLiveTabsInOneBrowser(t *testing.T) {
	site, d := startDemo(t)
	qs, wsURL := d.qs, d.url+"/"
	fac := signedInFacilitator(t, site)
	pages := []string{wsURL, wsURL + "q/" + strconv.FormatInt(qs[0].ID, 10), wsURL + "q/" + strconv.FormatInt(qs[0].ID, 10) + "/room"}
	var tabs []*person
	for i := 0; i < liveTabs; i++ {
		tab := fac
		if i > 0 {
			tab = fac.tab(fmt.Sprintf("facilitator's tab %d", i+1))
		}
		if st := tab.open(pages[i%len(pages)]); st != http.StatusOK { // a tab that never loads fails the step's timeout
			t.Fatalf("tab %d: status %d", i+1, st)
		}
		tab.liveConnected("the live stream to connect")
		tabs = append(tabs, tab)
	}
	before := make([]string, len(tabs))
	for i, tab := range tabs {
		before[i] = eval[string](tab, "last update", `String(document.documentElement.getAttribute("data-live-updated"))`)
	}

	// Priya saves her answer to question 1: every tab follows.
	priyaSaves(t, site, d, "0.02", "0.05", "0.12")
	for i, tab := range tabs {
		expr := fmt.Sprintf(`String(document.documentElement.getAttribute("data-live-updated")) !== %q`, before[i])
		if err := tab.poll(liveWithin, expr); err != nil {
			t.Errorf("tab %d (%s) did not follow the save within %v: %v", i+1, pages[i%len(pages)], liveWithin, err)
		}
	}
}
