package store

import (
	"bytes"
	"context"
	"errors"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A question changed through Parley (a correction, a background set, a
// true value revealed) reads back; one changed in the database without
// an event (its bounds, its background, its revealed true value) is
// refused by the record's reader, naming the field: the question's rows
// are not chained, its events are. So is an expert revoked or let back
// without an event (a revoked expert's answers leave the pool).
func TestQuestionChangedWithoutAnEventIsRefused(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	w := workshop.Workshop{Title: "Culvert blockage (invented)", Invented: true}
	must(t, db.CreateWorkshop(ctx, &w))
	target := workshop.Question{WorkshopID: w.ID, Wording: "Share of culverts blocked after a storm?", Quantity: "blocked share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	must(t, db.AddQuestion(ctx, &target))
	cal := workshop.Question{WorkshopID: w.ID, Wording: "Culverts inspected last year?", Quantity: "culverts",
		Lower: 1, Upper: 5000, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}, Calibration: true}
	must(t, db.AddQuestion(ctx, &cal))
	edited := target
	edited.Wording = "Share of culverts blocked after a heavy storm?"
	must(t, db.EditQuestion(ctx, edited, "clearer wording"))
	must(t, db.SetLogScale(ctx, cal.ID, true, "counts span three decades"))
	must(t, db.SetTrueValue(ctx, cal.ID, 420, true, "the inspection report"))
	var experts []workshop.Expert
	for _, name := range []string{"Odile (invented)", "Piet (invented)"} {
		e := workshop.Expert{WorkshopID: w.ID, Name: name}
		must(t, db.AddExpert(ctx, &e, []byte("token-"+name)))
		experts = append(experts, e)
	}
	must(t, db.RevokeExpert(ctx, experts[0].ID, "left the panel"))
	must(t, db.RevokeExpert(ctx, experts[1].ID, "lost their link"))
	must(t, db.ReissueToken(ctx, experts[1].ID, []byte("new token"), "lost their link"))
	parse := func() error {
		_, err := record.Parse(bytes.NewReader(exportJSON(t, db, w.ID)))
		return err
	}
	if err := parse(); err != nil {
		t.Fatalf("the record of questions changed through Parley: %v", err)
	}
	for _, c := range []struct{ update, field string }{
		{`UPDATE questions SET upper = 0.5 WHERE id = ?`, "questions[0].upper"},
		{`UPDATE questions SET log_uniform_background = 0 WHERE id = ?`, "questions[1].log_uniform_background"},
		{`UPDATE questions SET true_value = 400 WHERE id = ?`, "questions[1].true_value"},
		{`UPDATE questions SET probs = '[0.1,0.5,0.9]' WHERE id = ?`, "questions[0].probs"},
		{`UPDATE experts SET revoked = 0 WHERE id = ?`, "experts[0].revoked"},
		{`UPDATE experts SET revoked = 1 WHERE id = ?`, "experts[1].revoked"},
	} {
		row, col, _ := strings.Cut(c.field, ".")
		id := map[string]int64{"questions[0]": target.ID, "questions[1]": cal.ID, "experts[0]": experts[0].ID, "experts[1]": experts[1].ID}[row]
		table, _, _ := strings.Cut(row, "[")
		tx, err := db.w.BeginTx(ctx, nil)
		must(t, err)
		var was any
		must(t, tx.QueryRowContext(ctx, `SELECT `+col+` FROM `+table+` WHERE id = ?`, id).Scan(&was))
		_, err = tx.ExecContext(ctx, c.update, id)
		must(t, err)
		must(t, tx.Commit())
		var ie *elicit.InputError
		if err := parse(); !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != record.RuleDefinitionMismatch {
			t.Errorf("%s: the record reads with %v, want %s refused (%s)", c.update, err, c.field, record.RuleDefinitionMismatch)
		}
		_, err = db.w.ExecContext(ctx, `UPDATE `+table+` SET `+col+` = ? WHERE id = ?`, was, id)
		must(t, err)
		if err := parse(); err != nil {
			t.Fatalf("set back after %s: %v", c.update, err)
		}
	}
}
