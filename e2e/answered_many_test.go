package e2e

import (
	"context"
	"fmt"
	"net/http"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestAnsweredTableOfManyQuestions: with eleven questions and four
// experts the overview's who-answered-what table set a column per
// question, and at 1366 px "carried from round 1" broke over three or
// four lines in columns a word wide. With more questions than fit side by
// side (and more questions than experts) each question is a row and each
// expert a column, and every cell reads on one line.
func TestAnsweredTableOfManyQuestions(t *testing.T) {
	s, d := startDemo(t)
	ctx := context.Background()
	for i := len(d.qs); i < 11; i++ {
		q := workshop.Question{WorkshopID: d.w.ID, Wording: fmt.Sprintf("What share of inverters show fault code F%d in year one (invented)?", i),
			Quantity: fmt.Sprintf("share with fault code F%d", i), Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
		if err := s.DB.AddQuestion(ctx, &q); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.DB.SetRound(ctx, d.w.ID, 1, false, "Round 1 discussed (invented)."); err != nil {
		t.Fatal(err)
	}
	if err := s.DB.SetRound(ctx, d.w.ID, 2, true, "A second round (invented)."); err != nil {
		t.Fatal(err)
	}
	shots := newScreenshots(t)
	fac := signedInFacilitator(t, s)
	fac.viewport(1366, 900, false)
	if st := fac.open(d.url); st != http.StatusOK {
		t.Fatalf("overview: %d", st)
	}
	rows := eval[[]string](fac, "the table's row headings", `[...document.querySelectorAll("#answered tbody th[scope=row]")].map(th => th.innerText.trim())`)
	if len(rows) != 11 || !strings.HasPrefix(rows[0], "Q1 ") || !strings.HasPrefix(rows[10], "Q11 ") {
		t.Errorf("rows %q, want a row per question, Q1 to Q11", rows)
	}
	cols := eval[[]string](fac, "the table's column headings", `[...document.querySelectorAll("#answered thead th")].map(th => th.innerText.trim())`)
	if len(cols) != 1+len(d.experts) {
		t.Errorf("columns %q, want the question and one per expert", cols)
	}
	broken := eval[[]string](fac, "cells over more than one line", `[...document.querySelectorAll("#answered tbody td")].filter(td => {
		const r = document.createRange();
		r.selectNodeContents(td);
		return new Set([...r.getClientRects()].filter(b => b.width > 0).map(b => Math.round(b.top))).size > 1;
	}).map(td => td.innerText.trim()).slice(0, 5)`)
	if len(broken) > 0 {
		t.Errorf("at 1366 px cells break over lines: %q", broken)
	}
	fits(t, fac, "the overview with eleven questions at 1366 px", 1366)
	shots.part(fac, "#answered", "answered-eleven-questions-1366")
}
