package store

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// SaveImportedRevisions saves an answer sheet's rows for the workshop it
// names, and stamped them by the first revision's workshop without
// checking the others: a revision on another workshop's question was
// saved there, at a time taken from the first one's clock, and named by
// the sheet's log entry of a workshop it is not in; with the first
// revision of another workshop, the log entry went to the workshop named
// and the stamp came from the other. Every revision must now be on a
// question of the workshop named (of the first one's, for SaveRevisions):
// the refusal names the revision and both workshops, and nothing is
// saved.
func TestSavedRevisionsMustAllBeOfTheWorkshopNamed(t *testing.T) {
	ctx := context.Background()
	db, err := Open(filepath.Join(t.TempDir(), "parley.db"))
	must(t, err)
	defer db.Close()
	a, b := seed(t, db), seed(t, db)
	typed := func(p panel, expert int) workshop.Revision {
		return workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[expert].ID, Answer: quantileAnswer(0.3),
			EnteredBy: workshop.ByFacilitator, Channel: workshop.ChannelFile}
	}
	sheet := func(n int) workshop.SheetImport {
		imp := workshop.SheetImport{SHA256: strings.Repeat("ab", 32), Name: "answers.csv", Channel: workshop.ChannelFile}
		for i := range n {
			imp.Rows = append(imp.Rows, i+2)
		}
		return imp
	}
	for _, c := range []struct {
		name  string
		save  func() error
		index int
		of    *panel // the workshop of the refused revision
		to    *panel // the workshop saved to
	}{
		{"a sheet of A with a row of B", func() error {
			return db.SaveImportedRevisions(ctx, a.w.ID, []workshop.Revision{typed(a, 0), typed(b, 1)}, sheet(2))
		}, 1, &b, &a},
		{"a sheet of A whose rows are all of B", func() error {
			return db.SaveImportedRevisions(ctx, a.w.ID, []workshop.Revision{typed(b, 0), typed(b, 1)}, sheet(2))
		}, 0, &b, &a},
		{"revisions of B then A", func() error {
			return db.SaveRevisions(ctx, []workshop.Revision{typed(b, 0), typed(a, 1)})
		}, 1, &a, &b},
	} {
		err := c.save()
		var rr *workshop.RevisionRefused
		if !errors.As(err, &rr) || rr.Index != c.index {
			t.Fatalf("%s: %v; want revisions[%d] refused", c.name, err, c.index)
		}
		for _, want := range []string{fmt.Sprintf("revisions[%d]: ", c.index),
			fmt.Sprintf("is of workshop %d, not of workshop %d", c.of.w.ID, c.to.w.ID)} {
			if !strings.Contains(err.Error(), want) {
				t.Errorf("%s: the refusal %q does not say %q", c.name, err, want)
			}
		}
		for _, p := range []panel{a, b} {
			rs, err := db.Revisions(ctx, p.w.ID)
			must(t, err)
			es, err := db.Events(ctx, p.w.ID)
			must(t, err)
			for _, e := range es {
				if e.Kind == workshop.EventAnswersImported {
					t.Errorf("%s: workshop %d logs a sheet's import", c.name, p.w.ID)
				}
			}
			if len(rs) != 0 {
				t.Errorf("%s: workshop %d has %d revisions after a refused save", c.name, p.w.ID, len(rs))
			}
		}
	}

	// A sheet whose rows are all of the workshop named saves.
	must(t, db.SaveImportedRevisions(ctx, a.w.ID, []workshop.Revision{typed(a, 0), typed(a, 1)}, sheet(2)))
	if rs, err := db.Revisions(ctx, a.w.ID); err != nil || len(rs) != 2 {
		t.Fatalf("a sheet of A's own rows: %d revisions (%v)", len(rs), err)
	}
}
