package web

import (
	"context"
	"net/url"
	"regexp"
	"strings"
	"testing"
)

// A question one expert answered (the demo's question 3, revealed after
// round 1) is shown in the room with that expert's curve on top of the
// equal-weight pool, which is the same curve: drawn after it, the pool's
// thick black line hid the expert's, and the legend's "Expert A" had no
// line to be found on the projector.
func TestRoomDrawsALoneExpertAboveThePool(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	if r, _ := h.post(workshopPath(ws.ID)+"/round", url.Values{"action": {"close"}}); r.StatusCode != 303 {
		t.Fatalf("close: %d", r.StatusCode)
	}
	if err := h.db.SetTrueValue(context.Background(), qs[2].ID, *qs[2].TrueValue, true, "Revealed after round 1 (invented)."); err != nil {
		t.Fatal(err)
	}
	_, body := h.get(roomPath(ws.ID, qs[2].ID))
	curves := regexp.MustCompile(`class="curve curve-density curve-(\w+)"`).FindAllStringSubmatch(wideOnly(body), -1)
	var order []string
	for _, c := range curves {
		order = append(order, c[1])
	}
	if strings.Join(order, ",") != "pool,expert" {
		t.Errorf("the room draws one expert's panel in the order %v, want the pool first and the expert above it", order)
	}
	// A panel of several keeps the pool on top.
	_, body = h.get(roomPath(ws.ID, qs[0].ID))
	curves = regexp.MustCompile(`class="curve curve-density curve-(\w+)"`).FindAllStringSubmatch(wideOnly(body), -1)
	if n := len(curves); n < 3 || curves[n-1][1] != "pool" {
		t.Errorf("question 1's room draws %v, want the pool last", curves)
	}
}
