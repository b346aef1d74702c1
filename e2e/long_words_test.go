package e2e

import (
	"context"
	"fmt"
	"strconv"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web"
)

// TestLongWordsFitAnExpertsPhone: a workshop in German (invented), whose
// title and quantity are compounds of 36 and 38 letters. On a 360 px
// phone the expert's home page scrolled sideways to 629 px (the title)
// and a question's page to 494 px (the quantity beside its label); the
// words now break at the screen's edge.
func TestLongWordsFitAnExpertsPhone(t *testing.T) {
	s := startSite(t)
	ctx := context.Background()
	shots := newScreenshots(t)
	ws := workshop.Workshop{Title: "Wasserversorgungsunternehmensumfrage 2024 (erfunden)", Purpose: "Erfunden: eine A-priori-Verteilung für Rohrbrüche.", Invented: true}
	if err := s.DB.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	qs := []workshop.Question{
		{WorkshopID: ws.ID, Wording: "Welcher Anteil der Graugussleitungen bricht in den nächsten fünf Jahren mindestens einmal?", Quantity: "Hauptwasserleitungsrohrbruchhäufigkeit",
			Units: "Anteil der Leitungen", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault},
		{WorkshopID: ws.ID, Wording: "Welcher Anteil der Leitungen hat mehr als ein Viertel seiner Wand verloren?", Quantity: "Wanddickenverlustleitungsanteil",
			Units: "Anteil der Leitungen", Lower: 0, Upper: 1, Format: workshop.FormatInterval},
	}
	for i := range qs {
		if err := s.DB.AddQuestion(ctx, &qs[i]); err != nil {
			t.Fatal(err)
		}
	}
	tok, hash, err := web.NewExpertToken()
	if err != nil {
		t.Fatal(err)
	}
	e := workshop.Expert{WorkshopID: ws.ID, Name: "Annegret Vogt (erfunden)"}
	if err := s.DB.AddExpert(ctx, &e, hash); err != nil {
		t.Fatal(err)
	}
	link := s.URL + "/e/" + tok + "/"
	br := startBrowser(t)
	annegret := br.person("Annegret (on a phone)")
	for _, w := range []int64{360, 390, 1366} {
		annegret.viewport(w, 844, w < 600)
		annegret.open(link)
		fits(t, annegret, "the expert's home", w)
		shots.take(annegret, fmt.Sprintf("long-words-home-%d", w))
		for i, q := range qs {
			annegret.open(link + "q/" + strconv.FormatInt(q.ID, 10))
			fits(t, annegret, fmt.Sprintf("question %d", i+1), w)
			shots.take(annegret, fmt.Sprintf("long-words-Q%d-%d", i+1, w))
		}
	}
}
