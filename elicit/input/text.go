package input

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/parley-elicit/parley/elicit"
)

// Rules of text.
const (
	RuleTextValid elicit.Rule = "must be plain text (no control characters or text-direction overrides)"
	RuleTooLong   elicit.Rule = "is too long"
)

// Length limits of text, in characters (Unicode code points), whichever
// way the text arrives: a form, the command line or an imported record.
// DEVELOPERS.md's input-rule table and the README state them.
const (
	// MaxShortText bounds one line of text: a workshop's title, a
	// question's quantity and units, an expert's name and affiliation.
	MaxShortText = 200
	// MaxLongText bounds text that may run to paragraphs: a workshop's
	// purpose, decision and notes, a question's wording, an expert's
	// expertise, and every reason and rationale.
	MaxLongText = 4000
	// MaxDetail bounds an event's detail, which Parley writes itself as
	// JSON (a correction keeps the fields before and after, each escaped).
	MaxDetail = 1 << 20
)

// Text trims the spaces around raw, writes its line breaks as one
// newline each (Lines) and checks the rest by CheckText: the rule of
// every text field of a form.
func Text(field, raw string, max int, required bool) (string, error) {
	s := Lines(raw)
	return s, CheckText(field, s, max, required)
}

// Lines is raw as the person typed it: without the spaces around it, and
// with each line break one newline. A browser sends a text area's line
// breaks as CR LF (HTML's form encoding) while it shows and counts each
// as one character, so without this a reason of 3,990 characters and 20
// lines, inside the limit on the page, came to the server as 4,010.
func Lines(raw string) string {
	return strings.ReplaceAll(strings.TrimSpace(raw), "\r\n", "\n")
}

// CheckText checks text as it is stored: valid UTF-8 with no control
// characters but newline, carriage return and tab (CheckChars); not
// blank when required (elicit.RuleRequired); at most max characters
// (RuleTooLong). Errors are *elicit.InputError naming field.
func CheckText(field, s string, max int, required bool) error {
	if err := CheckChars(field, s); err != nil {
		return err
	}
	if required && strings.TrimSpace(s) == "" {
		return &elicit.InputError{Field: field, Rule: elicit.RuleRequired}
	}
	if n := utf8.RuneCountInString(s); n > max {
		return &elicit.InputError{Field: field, Rule: RuleTooLong, Detail: fmt.Sprintf("at most %d characters, got %d", max, n)}
	}
	return nil
}

// CheckChars checks that s is valid UTF-8 without control characters
// (Unicode category Cc: NUL, BEL, ESC, DEL, the C1 set, ...) other than
// newline, carriage return and tab, and without the explicit
// text-direction embeddings, overrides and isolates (U+202A–U+202E,
// U+2066–U+2069; see directionOverride).
func CheckChars(field, s string) error {
	if !utf8.ValidString(s) {
		return &elicit.InputError{Field: field, Rule: RuleTextValid, Detail: "not UTF-8"}
	}
	for _, r := range s {
		if unicode.IsControl(r) && r != '\n' && r != '\r' && r != '\t' {
			return &elicit.InputError{Field: field, Rule: RuleTextValid, Detail: fmt.Sprintf("character %U", r)}
		}
		if directionOverride(r) {
			return &elicit.InputError{Field: field, Rule: RuleTextValid, Detail: fmt.Sprintf("character %U, an invisible text-direction override", r)}
		}
	}
	return nil
}

// directionOverride reports the invisible characters that reorder the
// text after them on screen (Unicode's explicit bidirectional formatting
// characters: LRE, RLE, PDF, LRO, RLO, LRI, RLI, FSI, PDI). With them a
// name, a reason or a rationale in the record can be shown in another
// order than it was written, so the decision log would not read as what
// was typed ("Trojan Source", Boucher & Anderson 2021, CVE-2021-42574).
// Right-to-left names need none of them: the browser orders Arabic and
// Hebrew letters itself, and the left-to-right and right-to-left marks
// (U+200E, U+200F), each an invisible letter of one direction that
// reverses no text, are kept.
func directionOverride(r rune) bool {
	return (r >= 0x202A && r <= 0x202E) || (r >= 0x2066 && r <= 0x2069)
}

// Clip shortens s to n characters, with an ellipsis when it cut, for
// quoting typed text in a message.
func Clip(s string, n int) string {
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	return string([]rune(s)[:n]) + "…"
}
