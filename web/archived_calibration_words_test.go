package web

import (
	"context"
	"html"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// An archived workshop's calibration cards say what happened: "Not yet:
// Priya Raman" and "no true value yet" waited for what no one will give
// once the workshop is archived.
func TestArchivedCalibrationCardsSayWhatHappened(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	ctx := context.Background()
	q := workshop.Question{WorkshopID: ws.ID, Wording: "(Invented.) What share of last year's relays stuck?", Quantity: "stuck relay share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault, Calibration: true}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	_, page := h.get(calibrationPath(ws.ID))
	if page = html.UnescapeString(page); !strings.Contains(page, "Answered by Ines Varga and Ole Brandt. Not yet: Tomas Lindqvist and Priya Raman.") {
		t.Fatal("the calibration page of a workshop in progress does not say who has not answered yet")
	}
	if err := h.db.SetArchived(ctx, ws.ID, true, "Finished (invented)."); err != nil {
		t.Fatal(err)
	}
	_, page = h.get(calibrationPath(ws.ID))
	page = html.UnescapeString(page)
	for _, want := range []string{
		"Answered by Ines Varga and Ole Brandt. Tomas Lindqvist and Priya Raman did not answer.",
		"Answered by Tomas Lindqvist. Ines Varga, Priya Raman and Ole Brandt did not answer.",
		"Nobody answered it.", "no true value was given",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("the archived calibration page does not say %q", want)
		}
	}
	for _, stale := range []string{"Not yet:", "Nobody has answered yet", "no true value yet"} {
		if strings.Contains(page, stale) {
			t.Errorf("the archived calibration page says %q", stale)
		}
	}
}
