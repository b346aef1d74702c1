package answersheet

import (
	"errors"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The question cell as a practitioner's sheet carries it: the number as
// a spreadsheet writes a number cell (1.0), as the expert's page writes
// it (Question 2, wall loss share) and as the overview lists it (Q2
// coating share); each form read to its question. What only a guess could
// read is refused naming the cell and the rule (common practice, no
// source: the forms are Parley's own pages' and the spreadsheets' we
// tried).
func TestQuestionCell(t *testing.T) {
	qs := []workshop.Question{
		{ID: 41, Position: 1, Quantity: "wall loss share", Units: "share of tanks", Wording: "Share of tanks with wall loss?"},
		{ID: 42, Position: 2, Quantity: "coating share"},
		{ID: 43, Position: 3, Quantity: "valve share", Retired: true},
		{ID: 44, Position: 12, Quantity: "O’Neil share"},
	}
	for _, c := range []struct {
		cell string
		want int64 // the question's id; 0 when refused
		rule elicit.Rule
	}{
		{"1", 41, ""},
		{"Q1", 41, ""},
		{"q2", 42, ""},
		{" Q 2 ", 42, ""},
		{"1.0", 41, ""},
		{"2.00", 42, ""},
		{"Q12.0", 44, ""},
		{"Question 1", 41, ""},
		{"QUESTION 2", 42, ""},
		{"question12", 44, ""},
		{"id:42", 42, ""},
		{"ID:41", 41, ""},
		{"Q1 wall loss share", 41, ""},
		{"Question 2, coating share", 42, ""},
		{"Q2: Coating  Share", 42, ""},
		{"2 – coating share", 42, ""},
		{"Q12 O'Neil share", 44, ""},
		{"012", 44, ""},
		// The quantity with its units, in brackets and as the wording, as
		// the report, the overview's grid and the room write them.
		{"Q1: wall loss share (share of tanks)", 41, ""},
		{"1 wall loss share share of tanks", 41, ""},
		{"Q1 (wall loss share)", 41, ""},
		{"Q2 (coating share)", 42, ""},
		{"Q1: Share of tanks with wall loss?", 41, ""},
		// Refused by their form.
		{"1.5", 0, RuleQuestionForm},
		{"1.", 0, RuleQuestionForm},
		{"1,0", 0, RuleQuestionForm},
		{"1e0", 0, RuleQuestionForm},
		{"+1", 0, RuleQuestionForm},
		{"Q+1", 0, RuleQuestionForm},
		{"id:+1", 0, RuleQuestionForm},
		{"#1", 0, RuleQuestionForm},
		{"Q1b", 0, RuleQuestionForm},
		{"Questions 1", 0, RuleQuestionForm},
		{"Q", 0, RuleQuestionForm},
		{"one", 0, RuleQuestionForm},
		{"wall loss share", 0, RuleQuestionForm},
		{"Q1,", 0, RuleQuestionForm},
		// Of the right form, naming no question that takes answers.
		{"Q9", 0, RuleQuestion},
		{"0", 0, RuleQuestion},
		{"Question 3", 0, RuleQuestion},
		{"id:43", 0, RuleQuestion},
		// A quantity that is not its number's: a list copied one line
		// out of step.
		{"Q1 coating share", 0, RuleQuantity},
		{"Question 2, wall loss share", 0, RuleQuantity},
		// Units that are not the question's, units on a question without
		// any, and a quantity in brackets out of step.
		{"Q1: wall loss share (share of wells)", 0, RuleQuantity},
		{"Q1 wall loss share (proportion)", 0, RuleQuantity},
		{"Q2 coating share (share of tanks)", 0, RuleQuantity},
		{"Q1 (coating share)", 0, RuleQuantity},
		{"Q1 (wall loss share", 0, RuleQuantity},
		{"Q1 share of tanks", 0, RuleQuantity},
	} {
		q, err := findQuestion(7, c.cell, qs)
		if c.want != 0 {
			if err != nil || q.ID != c.want {
				t.Errorf("%q: question %d, %v; want %d", c.cell, q.ID, err, c.want)
			}
			continue
		}
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != "row 7, column question" || ie.Rule != c.rule {
			t.Errorf("%q: %v; want row 7, column question: %s", c.cell, err, c.rule)
			continue
		}
		if c.rule != RuleQuestion && !strings.Contains(ie.Detail, `"`+strings.TrimSpace(c.cell)) {
			t.Errorf("%q: the message does not quote the cell: %v", c.cell, err)
		}
	}
	if _, err := findQuestion(7, "Question 3", qs); err == nil || !strings.Contains(err.Error(), "Q3 is retired") {
		t.Errorf("a retired question by Question 3: %v", err)
	}
	// A quantity alone, as the record's CSV writes a question in its
	// column "question": refused, saying whose it is.
	if _, err := findQuestion(7, "Wall loss share", qs); err == nil || !strings.Contains(err.Error(), `("Wall loss share": Q1's name without its number; write Q1 before it)`) {
		t.Errorf("a quantity alone does not say whose it is: %v", err)
	}
	twice := append(qs, workshop.Question{ID: 45, Position: 13, Quantity: "wall loss share"})
	if _, err := findQuestion(7, "wall loss share", twice); err == nil || !strings.Contains(err.Error(), "the name of Q1 and Q13 without a number") {
		t.Errorf("a quantity two questions share does not name both: %v", err)
	}
	if _, err := findQuestion(7, "one", qs); err == nil || strings.Contains(err.Error(), "without") {
		t.Errorf("a cell naming no question says it does: %v", err)
	}
	if _, err := findQuestion(7, "Q1 coating share", qs); err == nil || !strings.Contains(err.Error(), `Q1 asks for "wall loss share" (share of tanks)`) {
		t.Errorf("a quantity out of step does not name the question's: %v", err)
	}
}
