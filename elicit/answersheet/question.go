package answersheet

import (
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The question cell names a question by its id, id:N, or by its number
// as Parley's pages write it: 3 on the overview's grid, Q3 on the
// facilitator's pages, Question 3 on the expert's, and 3.0 as a
// spreadsheet writes a number cell formatted with decimals. The number
// may be followed by the question's name in any form Parley writes it
// beside a number: its quantity (Q3 wall loss share on the overview,
// Question 3, wall loss share on the expert's page, Q3: wall loss share
// in the report), the quantity with its units (Q3: wall loss share
// (share of tanks) in the report's agreed priors, wall loss share share
// of tanks on the overview's grid), the quantity in brackets (Q3 (wall
// loss share), the report's retired questions) or its wording (Q3: Share
// of tanks with wall loss?, the room's title). That name must then be
// the question's, so that a list copied with one line out of step is
// refused rather than read by its numbers. Anything else (3.5, +3, #3,
// Q3b, "three") is refused naming the rule: a cell only a guess could
// read.

// Rules of the question cell.
const (
	RuleQuestionForm elicit.Rule = "must name the question by its number, 3, Q3 or Question 3 (3.0 as a spreadsheet writes it), which its name may follow as Parley writes it, or by id:N"
	RuleQuantity     elicit.Rule = "names a quantity, units or wording other than the question's of that number"
)

// questionCell is a question cell read: by id (id > 0) or by number,
// with the text after the number ("" for none).
type questionCell struct {
	id       int64
	number   int
	quantity string
}

// readQuestionCell reads a question cell by the rule above; false when
// it has none of its forms.
func readQuestionCell(s string) (questionCell, bool) {
	s = strings.TrimSpace(s)
	if id, ok := sheetID(s); ok {
		return questionCell{id: id}, true
	}
	// "question" and "q" are ASCII, so a prefix of that many bytes
	// compared without regard to case is the word whatever follows.
	for _, word := range []string{"question", "q"} {
		if len(s) > len(word) && strings.EqualFold(s[:len(word)], word) {
			s = strings.TrimLeft(s[len(word):], " ")
			break
		}
	}
	digits := len(s) - len(strings.TrimLeft(s, "0123456789"))
	if digits == 0 {
		return questionCell{}, false
	}
	n, err := input.Whole("question", s[:digits], 0, input.MaxID)
	if err != nil {
		return questionCell{}, false
	}
	rest := s[digits:]
	// A point and zeros only: 3.0, 3.00.
	if after, ok := strings.CutPrefix(rest, "."); ok {
		zeros := len(after) - len(strings.TrimLeft(after, "0"))
		if zeros == 0 {
			return questionCell{}, false
		}
		rest = after[zeros:]
	}
	if rest == "" {
		return questionCell{number: n}, true
	}
	// The quantity after a space, a comma, a colon or a dash.
	quantity := strings.TrimLeft(rest, " ,:-–—")
	// Digits alone after it are a number's (1,0 with a decimal comma),
	// no quantity.
	if len(quantity) == len(rest) || strings.Trim(quantity, " 0123456789") == "" {
		return questionCell{}, false
	}
	return questionCell{number: n, quantity: strings.TrimSpace(quantity)}, true
}

// names reports whether the cell names q, by its id or its number.
func (c questionCell) names(q workshop.Question) bool {
	if c.id > 0 {
		return q.ID == c.id
	}
	return q.Position == c.number
}

// findQuestion finds the question that takes answers a row's question
// cell names, or refuses the cell naming its rule: its form, a number no
// such question has (a retired one said as such), or a quantity that is
// not its question's.
func findQuestion(line int, s string, questions []workshop.Question) (workshop.Question, error) {
	c, ok := readQuestionCell(s)
	if !ok {
		return workshop.Question{}, rowErr(line, "question", RuleQuestionForm, "%s%s", shownCell(s), withoutNumber(s, questions))
	}
	var found, retired *workshop.Question
	for i, q := range questions {
		switch {
		case !c.names(q):
		case q.Retired:
			retired = &questions[i]
		default:
			found = &questions[i]
		}
	}
	if found == nil {
		if retired != nil {
			return workshop.Question{}, rowErr(line, "question", RuleQuestion, "Q%d is retired", retired.Position)
		}
		return workshop.Question{}, rowErr(line, "question", RuleQuestion, "%s", shownCell(s))
	}
	if c.quantity != "" && !namesQuestion(c.quantity, *found) {
		asks := shownCell(found.Quantity)
		if found.Units != "" {
			asks += " (" + input.Clip(found.Units, 40) + ")"
		}
		return workshop.Question{}, rowErr(line, "question", RuleQuantity, "%s, but Q%d asks for %s",
			shownCell(s), found.Position, asks)
	}
	return *found, nil
}

// withoutNumber says which questions a cell names without a number, as
// the record's CSV writes a question in its column "question" (the
// quantity alone), so that the refusal says what to write instead; ""
// when it names none.
func withoutNumber(s string, questions []workshop.Question) string {
	var named []string
	for _, q := range questions {
		if namesQuestion(strings.TrimSpace(s), q) {
			named = append(named, "Q"+strconv.Itoa(q.Position))
		}
	}
	switch len(named) {
	case 0:
		return ""
	case 1:
		return ": " + named[0] + "'s name without its number; write " + named[0] + " before it"
	}
	last := len(named) - 1
	return ": the name of " + strings.Join(named[:last], ", ") + " and " + named[last] + " without a number; write the number of the one it answers before it"
}

// namesQuestion reports whether the text after a question cell's number
// names q as Parley writes it beside its number: the quantity alone, in
// brackets (the report's retired questions), with its units in brackets
// (the report's agreed priors, the panel's and the entry page's line
// under the title) or after a space (the overview's grid), or the
// question's wording (the room's title).
func namesQuestion(s string, q workshop.Question) bool {
	names := []string{q.Quantity, "(" + q.Quantity + ")", q.Wording}
	if q.Units != "" {
		names = append(names, q.Quantity+" ("+q.Units+")", q.Quantity+" "+q.Units)
	}
	for _, n := range names {
		if n != "" && sameName(s, n) {
			return true
		}
	}
	return false
}
