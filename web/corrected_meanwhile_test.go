package web

import (
	"context"
	"errors"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"sync"
	"testing"

	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

// correctedMeanwhile is the store with one question corrected by the
// facilitator just before the next save reaches it: the save was checked
// against the question as it stood before.
type correctedMeanwhile struct {
	*store.DB
	mu   sync.Mutex
	edit *workshop.Question // the correction, made once, at the next save
}

func (c *correctedMeanwhile) correct() error {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.edit == nil {
		return nil
	}
	q := *c.edit
	c.edit = nil
	return c.DB.EditQuestion(context.Background(), q, "invented: the upper bound was a typo")
}

func (c *correctedMeanwhile) SaveRevision(ctx context.Context, r *workshop.Revision) error {
	if err := c.correct(); err != nil {
		return err
	}
	return c.DB.SaveRevision(ctx, r)
}

func (c *correctedMeanwhile) SaveRevisions(ctx context.Context, rs []workshop.Revision) error {
	if err := c.correct(); err != nil {
		return err
	}
	return c.DB.SaveRevisions(ctx, rs)
}

func (c *correctedMeanwhile) SaveImportedRevisions(ctx context.Context, workshopID int64, rs []workshop.Revision, imp workshop.SheetImport) error {
	if err := c.correct(); err != nil {
		return err
	}
	return c.DB.SaveImportedRevisions(ctx, workshopID, rs, imp)
}

// TestSaveMeetsACorrectedQuestion: a question may be corrected in every
// part until its first answer, so an expert's save, a facilitator's entry
// and an answer sheet can be checked against a question that is corrected
// before the save reaches the database. The store refuses the save
// (ErrQuestionChanged); the expert and the facilitator get their form
// again with 409, the values kept and checked against the corrected
// question, and a sentence saying why; the sheet names the row; nothing
// is saved.
func TestSaveMeetsACorrectedQuestion(t *testing.T) {
	h, ws, _, es, links := seeded(t)
	ctx := context.Background()
	q := workshop.Question{WorkshopID: ws.ID, Wording: "What share of the new batch fails in its first month? (invented)",
		Quantity: "first-month failure share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	if err := h.db.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	corrected := q
	corrected.Upper = 0.35 // the expert's 0.4 now lies outside
	st := &correctedMeanwhile{DB: h.db}
	post := serveOn(t, st)
	answered := func() int {
		rs, err := h.db.Revisions(ctx, ws.ID)
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		for _, r := range rs {
			if r.QuestionID == q.ID {
				n++
			}
		}
		return n
	}
	typed := url.Values{"values[0]": {"0.2"}, "values[1]": {"0.3"}, "values[2]": {"0.4"}, "reason": {"From the batch's burn-in log (invented)"}}

	// The expert.
	st.edit = &corrected
	code, page := post(links[0].Path+"q/"+strconv.FormatInt(q.ID, 10)+"/save", typed)
	if code != http.StatusConflict {
		t.Errorf("expert's save meeting a corrected question: %d, want 409", code)
	}
	for _, want := range []string{questionChangedForExpert, `value="0.2"`, `value="0.3"`, `value="0.4"`, "From the batch's burn-in log (invented)"} {
		if !strings.Contains(page, want) {
			t.Errorf("the expert's page lacks %q", want)
		}
	}
	// Checked against the corrected question: its highest value is marked.
	if !strings.Contains(page, "0.35") || !strings.Contains(page, `aria-invalid="true"`) {
		t.Error("the expert's values are not checked against the corrected question (upper bound 0.35)")
	}
	if strings.Contains(page, "Server error") {
		t.Error("the expert sees the generic error page")
	}

	// The facilitator, entering for another expert.
	secret, err := IssueFacilitatorSecret(ctx, h.db)
	if err != nil {
		t.Fatal(err)
	}
	if code, _ := post("/signin", url.Values{"secret": {secret}}); code != http.StatusSeeOther {
		t.Fatalf("sign in: %d", code)
	}
	back := corrected
	back.Upper = 1 // corrected back, meanwhile, before the facilitator's save
	st.edit = &back
	// Typed against the question as it now stands (upper bound 0.35).
	entry := url.Values{"channel": {"phone"}, "values[0]": {"0.2"}, "values[1]": {"0.3"}, "values[2]": {"0.34"}}
	code, page = post(entryPath(ws.ID, q.ID, es[1].ID)+"/save", entry)
	if code != http.StatusConflict {
		t.Errorf("facilitator's entry meeting a corrected question: %d, want 409", code)
	}
	for _, want := range []string{questionChangedForFacilitator, `value="0.34"`} {
		if !strings.Contains(page, want) {
			t.Errorf("the entry page lacks %q", want)
		}
	}

	// An answer sheet read before a correction.
	rows, err := answersheet.Read(strings.NewReader("expert,question,q05,q50,q95\n"+es[2].Name+","+strconv.Itoa(q.Position)+",0.2,0.3,0.4\n"),
		[]workshop.Question{back}, es)
	if err != nil {
		t.Fatal(err)
	}
	st.edit = &corrected
	err = SaveSheet(ctx, st, ws, rows, workshop.ChannelFile, answersheet.File{Text: "invented"})
	if !errors.Is(err, workshop.ErrQuestionChanged) && !strings.Contains(errString(err), string(answersheet.RuleChanged)) {
		t.Errorf("a sheet meeting a corrected question: %v, want the row refused by %q", err, answersheet.RuleChanged)
	}
	if n := answered(); n != 0 {
		t.Errorf("%d answers were saved to the corrected question, want none", n)
	}
}

func errString(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}
