package web

import (
	"context"
	"crypto/hmac"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"net/http"
	"sort"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/a-h/templ"
	"github.com/go-chi/chi/v5"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/internal/turns"
	"github.com/parley-elicit/parley/web/chart"
)

// An expert's pages: their home (the workshop and their questions) and one
// page per question, where they enter a judgement in the question's
// format, preview the fitted Beta, save revisions and, from round 2, see
// the other experts' curves without names.

// expertHomeView is what an expert's home page shows.
type expertHomeView struct {
	Base      string // "/e/{token}"
	Expert    string // the expert's own display name
	Title     string
	Purpose   string
	Decision  string
	Round     int
	Open      bool
	Finished  bool // the workshop is archived: no next round
	Questions []expertQuestionItem
	// Held counts the questions whose other experts' answers are held
	// back from round 2 until their true value is shown
	// (workshop.Question.PanelHeld); which ones is not said here.
	Held int
	// Few counts the questions, not held, whose pages hold back the one
	// other expert's answer given (othersShown); which ones is not said
	// here either.
	Few int
}

// roundNext says what a later round asks of an expert: the demo's round-2
// home said only that the round was open, beside grey tags reading
// "answered in an earlier round", and left them to wonder whether every
// answer had to be given again. It promises the other experts' answers
// only where the question pages show them: "on each question's page you
// can now read what the other experts said" was untrue of a question
// whose panel is held back until its true value is shown.
func (v expertHomeView) roundNext() string {
	said := "what the other experts said in round " + strconv.Itoa(v.Round-1) + ", without their names"
	if v.Few > 0 {
		// Some pages show no other answer because too few others gave
		// one: the promise leaves them out, and their pages say why.
		if v.Held+v.Few < len(v.Questions) {
			return "On each question's page you can now read " + said + ", except where the page says why their answers are not shown. " +
				"Revise your answer if it changes your mind; an answer you leave as it is stays your judgement."
		}
		return "The other experts' answers are not shown on " + plural(len(v.Questions), "this question's page; the page says why. ", "these questions' pages; each page says why. ") +
			"You can revise your answers while the round is open; an answer you leave as it is stays your judgement."
	}
	switch {
	case v.Held == 0:
		return "On each question's page you can now read " + said + ". " +
			"Revise your answer if it changes your mind; an answer you leave as it is stays your judgement."
	case v.Held < len(v.Questions):
		return "On each question's page you can now read " + said + ", except where the page says their answers stay hidden until the question's true value is shown. " +
			"Revise your answer if it changes your mind; an answer you leave as it is stays your judgement."
	}
	return "The other experts' answers to these questions stay hidden until the facilitator shows their true values, so that every answer is each expert's own judgement. " +
		"You can revise your answers while the round is open; an answer you leave as it is stays your judgement."
}

// progress says, on a long list, where the expert stands: how many of the
// questions have their answer, and which is the first still waiting for
// one. A workshop of 25 questions put the first unanswered one some
// 3,000 px down a phone's list, found only by reading every tag.
func (v expertHomeView) progress() string {
	answered, now := 0, 0
	for _, q := range v.Questions {
		if q.Answered || q.Earlier {
			answered++
		}
		if q.Answered {
			now++
		}
	}
	total := len(v.Questions)
	switch {
	case answered < total:
		return "You have answered " + strconv.Itoa(answered) + " of the " + strconv.Itoa(total) + " questions."
	case v.Round > 1:
		some := strconv.Itoa(now) + " of them"
		if now == 0 {
			some = "none of them"
		}
		return "You have answered all " + strconv.Itoa(total) + " questions, " + some + " in round " + strconv.Itoa(v.Round) + "."
	}
	return "You have answered all " + strconv.Itoa(total) + " questions. You can revise any of them while the round is open."
}

// firstUnanswered is the first question in the list that has no answer
// from the expert and can still take one.
func (v expertHomeView) firstUnanswered() (expertQuestionItem, bool) {
	for _, q := range v.Questions {
		if !q.Answered && !q.Earlier && !q.Revealed {
			return q, true
		}
	}
	return expertQuestionItem{}, false
}

type expertQuestionItem struct {
	Href     string
	Position int
	Wording  string
	Quantity string
	Units    string
	// Revealed is set for a calibration question once its true value has
	// been shown: its answers are then final.
	Revealed   bool
	Answered   bool   // has a revision in the current round
	AnsweredAt string // time of that revision
	Earlier    bool   // answered only in an earlier round
	// EarlierRound is the round of the latest such answer, the one that
	// stands.
	EarlierRound int
}

// expertQuestionView is one question's page.
type expertQuestionView struct {
	Base     string
	Action   string // the question's URL
	Title    string
	Round    int
	Open     bool
	Finished bool // the workshop is archived: no next round
	Question expertQuestionInfo
	Form     answerForm
	Preview  *previewView
	Saved    bool
	Closed   string // a message when a save was refused because the round is closed
	History  []historyRow
	Panel    *chart.PanelView
	Spread   *chart.SpreadView // instead of Panel when the panel is large
	// FeedbackRound is the round whose close the panel shows.
	FeedbackRound int
	// PanelMissing is set when the panel could not be read.
	PanelMissing bool
	// PanelHeld is set from round 2 on a calibration question whose true
	// value is not yet revealed: the other experts' answers are held back
	// (workshop.Question.PanelHeld) and the page says why.
	PanelHeld bool
	// OwnCurve says the panel includes the expert's own current curve;
	// without it the feedback's words do not promise one.
	OwnCurve bool
	// FewOthers says, in the panel's place, that too few other experts
	// had answered for their answers to be shown (othersShown).
	FewOthers string
	// OwnLabel is the expert's label in the panel fed back ("Expert C"),
	// "" when they are not in it: the label is left out of their own
	// page, where their curve is "You", and the words above it name it.
	OwnLabel string
	// Reasons are the other experts' reasons from the feedback round,
	// under the same labels as their curves; withheld ones are left out.
	Reasons []feedbackReason
	// NextHref and NextLabel lead, after a save, to the next question the
	// expert has not answered in this round; AllAnswered says there is none.
	NextHref, NextLabel string
	AllAnswered         bool
	// EnteredNote says, when the expert's current answer was entered by
	// the facilitator, when and from what ("was entered by the facilitator
	// on … from your paper form").
	EnteredNote string
	// OnBehalf is set on the facilitator's page for entering this
	// question's judgement for an expert.
	OnBehalf *onBehalf
	// Frozen is set once a calibration question's true value has been
	// revealed: the expert's last answer is shown and cannot change.
	Frozen bool
	// Unanswered says the expert has saved no answer to the question
	// (nor has the facilitator for them).
	Unanswered bool
	// Tried says the form holds values sent to Show the fit without the
	// script, not the expert's saved answer.
	Tried bool
	// Live is set on the expert's own page, which follows the workshop
	// (live_expert.go); Drawn is the state its form was drawn in, when the
	// live script fetches the page again.
	Live  bool
	Drawn *drawnForm
}

// finalWithoutAnswer says the question's answers are final and the expert
// gave none: the form shows a sentence, not empty inputs locked.
func (v expertQuestionView) finalWithoutAnswer() bool { return v.Frozen && v.Unanswered }

// noHistory is what an empty history says: "yet" only where an answer
// may still come, not on a question whose answers are final or in an
// archived workshop.
func (v expertQuestionView) noHistory() string {
	if v.Frozen || v.Finished {
		return "No answer was saved."
	}
	return "No saved answers yet."
}

// noAnswerSentence says, in the answer form's place, that no answer was given.
func (v expertQuestionView) noAnswerSentence() string {
	if v.OnBehalf != nil {
		return v.OnBehalf.Expert + " gave no answer to this question."
	}
	return "You gave no answer to this question."
}

type expertQuestionInfo struct {
	ID       int64
	Position int
	Wording  string
	Quantity string
	Units    string
	Lower    string
	Upper    string
	Format   workshop.AnswerFormat
	// InPercent follows the bounds of a question whose values may be
	// typed as percentages, " (0% and 100%)": an expert who chose
	// percentages read "between 0 and 1" above boxes that took 5 for 5%.
	InPercent string
	// Revealed is the true value of a calibration question, set only once
	// the facilitator has revealed it. Until then nothing on an expert's
	// page says which questions are calibration questions.
	Revealed string
}

// refusedSummary heads the refused form: the marked fields to correct,
// or, where no field is marked (chips refused as a whole), the message
// above it.
func (af answerForm) refusedSummary() string {
	if af.ReasonError != "" {
		return nothingSavedSummary
	}
	for _, f := range af.Fields {
		if f.Error != "" {
			return nothingSavedSummary
		}
	}
	return nothingSavedAsSaid
}

// answerForm is the judgement form in the question's format, with the
// values as typed and any message beside its field.
type answerForm struct {
	Format      workshop.AnswerFormat
	Fields      []formField
	Reason      string
	ReasonError string
	Error       string // a message not tied to one field
	Invalid     bool   // some field has a message
	Chips       int    // chips to place, FormatChips
	// Proportion is set for a proportion question (bounds 0 and 1),
	// whose values may be typed as percentages; Unit is the form's choice,
	// unitProportion or unitPercent.
	Proportion bool
	Unit       string
	// Bins are the chips' bins, for the picture the chips script draws.
	Bins []chipBin
}

// chipBin is one bin of a chips question.
type chipBin struct {
	From, To string
}

type formField struct {
	Name   string // the form key, also the elicit field name: "values[1]", "lowest"
	ID     string
	Label  string
	Hint   string
	Value  string
	Error  string
	Suffix string // "%" for confidence
	// Keyboard is the box's inputmode, the keyboard a phone shows.
	Keyboard string
	// FollowsUnit marks a value box whose "%" follows the unit choice
	// ("As percentages" shows it): the page's script shows or hides the
	// sign when the choice changes, before the form is sent.
	FollowsUnit bool
}

// previewView is the fitted picture with its read-backs.
type previewView struct {
	// Heading names whose numbers the read-backs describe: "What your
	// numbers imply", or the expert's name on the facilitator's page.
	Heading   string
	Fit       chart.FitView
	Params    string
	ReadBacks []string
	Warnings  []string
	Problem   string // why no fit could be drawn
}

type historyRow struct {
	Round  int
	At     string
	Reason string
	// Fitted says what the fit of the saved values implies, in the
	// expert's terms (median and 90% range, as the values were typed);
	// Params names the Beta, for the expert who reads one.
	Fitted string
	Params string
	Values string
	// EnteredNote is set for a revision the facilitator entered.
	EnteredNote string
}

// chance says a probability the way people say odds: "1 in 20" when
// p is within 0.2% of 1/N for a whole N of at least 3, "about 1 in 39" for
// other probabilities below 0.2, otherwise a percentage ("a 47.5%
// chance"), which reads better than "1 in 2" for a value near a half.
// Every phrase but "no chance" and "certainty" ends in "chance", so it
// fits "there is … the value is below" and "the best-matching curve gives …
// below it" alike.
func chance(p float64) string {
	switch {
	case math.IsNaN(p) || math.IsInf(p, 0) || p < 0 || p > 1:
		return "an unknown chance"
	case p == 0:
		return "no chance"
	case p == 1:
		return "certainty"
	case p < 0.001:
		return "less than a 1 in 1000 chance"
	}
	n := 1 / p
	r := math.Round(n)
	switch {
	case r >= 3 && math.Abs(p*r-1) <= 0.002:
		return fmt.Sprintf("a 1 in %d chance", int(r))
	case p < 0.2:
		return fmt.Sprintf("about a 1 in %d chance", int(r))
	}
	return "a " + chart.FormatPercent(p) + " chance"
}

// speaker is whose judgement a preview reads back: the expert on their
// own page ("you"), or, on the facilitator's page for entering an expert's
// judgement on their behalf, that expert by name, since the facilitator
// reads the sentences back to them.
type speaker struct {
	Name string // "" on the expert's own page
}

// pick returns you on the expert's own page, named on the facilitator's,
// with every "%s" in named replaced by the expert's name.
func (sp speaker) pick(you, named string) string {
	if sp.Name == "" {
		return you
	}
	return strings.ReplaceAll(named, "%s", sp.Name)
}

// numbersOf names the answer an expert gave to q, as the sentences about
// it speak of it: "your numbers", or a chips board's "your chips", which
// were placed, not typed ("What your numbers imply" stood over a board of
// chips).
func (sp speaker) numbersOf(q workshop.Question) string {
	if q.Format == workshop.FormatChips {
		return sp.pick("your chips", "%s's chips")
	}
	return sp.pick("your numbers", "%s's numbers")
}

// upperFirst starts s with a capital, for a sentence that begins with a
// name such as "the panel".
func upperFirst(s string) string {
	r, n := utf8.DecodeRuneInString(s)
	return string(unicode.ToUpper(r)) + s[n:]
}

// readBack turns one stated pair P(X ≤ x) = p into a sentence, speaking of
// the smaller tail so that 95% reads "1 in 20 ... above".
func readBack(p, x float64, q workshop.Question, percent bool, sp speaker) string {
	return readBackWritten(p, typedBack(q, x, false), typedBack(q, x, true), q, percent, sp)
}

// readBackWritten is readBack with the value already written, plainly and
// as a percentage: a judgement's values are one range (typedRange).
func readBackWritten(p float64, plain, asPercent string, q workshop.Question, percent bool, sp speaker) string {
	v := plain
	if u := strings.TrimSpace(q.Units); u != "" {
		// In brackets, as the form's labels and the picture's axis write
		// them: units that name the quantity ("proportion of mains") do
		// not read as a number's suffix.
		v += " (" + u + ")"
	}
	if percent {
		// The expert typed percentages: speak in them.
		v = asPercent
	}
	who, gives, even := sp.pick("You are saying", "%s is saying"), " there is ", " the value is as likely to be below "
	if q.Format == workshop.FormatChips {
		// Chips are placed, not typed: the share of them below an edge is
		// the chance they give, as the picture says "your chips put".
		who, gives, even = sp.pick("Your chips", "%s's chips"), " give ", " make the value as likely to be below "
	}
	switch {
	case p == 0.5:
		return who + even + v + " as above it."
	case p < 0.5:
		return who + gives + chance(p) + " the value is below " + v + "."
	}
	return who + gives + chance(1-p) + " the value is above " + v + "."
}

// fittedBack says what the fitted Beta gives for the same statement, in
// the words of the picture under it: "the best-matching curve", as its
// key names it, not the statistician's "fitted curve".
func fittedBack(p, fittedP float64) string {
	side, c := "below", fittedP
	if p > 0.5 {
		side, c = "above", 1-fittedP
	}
	if c == 1 {
		// All of it, to double precision: "gives certainty below it"
		// read badly.
		return "The best-matching curve puts all but a vanishing part of the chance " + side + " it."
	}
	if c < 1e-6 || c > 1-1e-6 {
		// A far tail: a true bound, not "no chance" or fourteen figures
		// short of certainty.
		return "The best-matching curve gives a chance of " + chart.FormatChance(c) + " " + side + " it."
	}
	return "The best-matching curve gives " + chance(c) + " " + side + " it."
}

// newAnswerForm lays out the question's form with the typed values; its
// labels speak of the judgement's owner by sp ("you" on the expert's own
// page, the expert's name where the facilitator enters it).
func newAnswerForm(q workshop.Question, typed map[string]string, sp speaker) answerForm {
	f := answerForm{Format: q.Format, Chips: q.Chips, Proportion: q.ValuesInPercent(), Unit: unitProportion}
	if typed["unit"] == unitPercent {
		f.Unit = unitPercent
	}
	for i := 0; i+1 < len(q.BinEdges) && q.Format == workshop.FormatChips; i++ {
		f.Bins = append(f.Bins, chipBin{From: chart.FormatValue(q.BinEdges[i]), To: chart.FormatValue(q.BinEdges[i+1])})
	}
	add := func(name, label, hint, suffix string) {
		value := typed[name]
		if suffix == "%" {
			value, suffix = besidePercentSign(q, name, value)
		}
		f.Fields = append(f.Fields, formField{
			Name: name, ID: "f-" + strings.NewReplacer("[", "-", "]", "").Replace(name),
			Label: label, Hint: hint, Value: value, Suffix: suffix, Keyboard: inputMode(q, name),
			FollowsUnit: f.Proportion && name != "confidence" && q.Format != workshop.FormatChips,
		})
	}
	units := ""
	if u := strings.TrimSpace(q.Units); u != "" {
		units = " (" + u + ")"
	}
	valueSuffix := ""
	if f.Proportion && f.Unit == unitPercent {
		valueSuffix = "%" // typed as percentages
	}
	switch q.Format {
	case workshop.FormatInterval:
		add("lowest", "Lowest plausible value"+units, "", valueSuffix)
		add("highest", "Highest plausible value"+units, "", valueSuffix)
		add("best", "Best estimate"+units, "", valueSuffix)
		add("confidence", sp.pick("How sure are you that the true value lies between your lowest and highest?",
			"How sure is %s that the true value lies between their lowest and highest?"), "A percentage, for example 80 for 80% sure.", "%")
	case workshop.FormatChips:
		for i := 0; i+1 < len(q.BinEdges); i++ {
			add(fmt.Sprintf("counts[%d]", i),
				fmt.Sprintf("Chips from %s to %s", chart.FormatValue(q.BinEdges[i]), chart.FormatValue(q.BinEdges[i+1])), "", "")
		}
	default:
		for i, p := range q.Probs {
			hint := ""
			if p == 0.5 {
				hint = upperFirst(sp.pick("Your median: as likely below as above.", "%s's median: as likely below as above."))
			}
			add(fmt.Sprintf("values[%d]", i),
				fmt.Sprintf("The value with a %s chance of being lower%s", chart.FormatPercent(p), units), hint, valueSuffix)
		}
	}
	return f
}

// besidePercentSign writes a typed value back into a box that a "%"
// stands beside (a value under the percentage choice, the confidence):
// "9%" as typed read "9% %" there. The value's own sign is left out when
// the box reads the rest the same, as it does any value of a percentage
// box but a confidence of 1% or less ("0.8%" is 0.8%, while "0.8" is
// refused as a likely 80%); otherwise the value keeps its sign and the
// box shows none beside it. It returns the value and the sign to show.
func besidePercentSign(q workshop.Question, name, typed string) (string, string) {
	s := strings.TrimSpace(typed)
	rest, signed := strings.CutSuffix(s, "%")
	if !signed {
		return typed, "%"
	}
	rest = strings.TrimSpace(rest)
	read := func(v string) (float64, error) {
		v, _ = decimalComma(v, possibleReading(q, name, true)) // as readAnswer reads it: "0,8%" is 0.8%
		if name == "confidence" {
			return workshop.ParseConfidence(v)
		}
		x, _, err := workshop.ParseAnswerNumber(name, v, q, true)
		return x, err
	}
	a, errA := read(s)
	b, errB := read(rest)
	same := (errA == nil && errB == nil && a == b) || (errA != nil && errB != nil)
	if rest == "" || strings.HasSuffix(rest, "%") || !same {
		return typed, ""
	}
	return rest, "%"
}

// previewInviteText begins previewInvite's sentence as HTML: "Place your
// chips", "Enter Priya Raman's values" (the name escaped).
func previewInviteText(format workshop.AnswerFormat, name string) string {
	whose := "your"
	if name != "" {
		whose = templ.EscapeString(name) + "'s"
	}
	if format == workshop.FormatChips {
		return "Place " + whose + " chips"
	}
	return "Enter " + whose + " values"
}

// saving says whether an answer form saves, and if not, why not.
type saving int

const (
	savingOpen     saving = iota
	savingClosed          // the round is closed; the facilitator may open the next
	savingFinished        // the workshop is archived: no round will open again
	savingRevoked         // the expert's access is revoked (the facilitator's entry page)
	savingFinal           // the question's true value has been shown: its answers are final
)

// saving is why the page's form saves or does not.
func (v expertQuestionView) saving() saving {
	switch {
	case v.Frozen:
		return savingFinal
	case v.Open:
		return savingOpen
	case v.OnBehalf != nil && v.OnBehalf.Revoked:
		return savingRevoked
	case v.Finished:
		return savingFinished
	}
	return savingClosed
}

// asksForSave says whether the form shows the parts only a save uses:
// the reasoning, and on the facilitator's entry page how the judgement
// reached them. For a revoked expert, in an archived workshop and in a
// closed round nothing can be entered, so the page asks for neither (the
// expert's own page asked an archived workshop's expert for reasoning
// that "later in the workshop the other experts may see"); the values and
// Show the fit stay, as the preview saves nothing. A closed round's box
// was said to keep its text for the next round, but nothing kept it: the
// preview does not read it, the save is refused, and the page opened
// again when the round opens starts empty. Only a save refused because
// the round closed keeps the box, holding the reasoning it sent, so that
// nothing typed vanishes from the page.
func (v expertQuestionView) asksForSave() bool {
	switch v.saving() {
	case savingRevoked, savingFinished:
		return false
	case savingClosed:
		return v.Form.Reason != ""
	}
	return true
}

// closedWithAnswer says the expert's own page shows, in a closed round,
// the answer they saved: not the values of a save just refused, nor
// those tried without the script, nor a form drawn while the round was
// open, which may hold a draft.
func (v expertQuestionView) closedWithAnswer() bool {
	return v.OnBehalf == nil && v.saving() == savingClosed && len(v.History) > 0 && v.Closed == "" && !v.Tried &&
		(v.Drawn == nil || v.Drawn.Saving == savingClosed)
}

// closedRoundStatus says, on the expert's page of a question they have
// answered, that the round is closed, what happens next and what the
// page below holds: their answer as saved, whose round it is from, and
// its curve. Changing the values only tries the fit.
func (v expertQuestionView) closedRoundStatus() string {
	// An answer the facilitator entered is said so in the note under
	// this line (enteredNoteSentence).
	return "Round " + strconv.Itoa(v.Round) + " is closed: nothing can be saved until the facilitator opens the next round, when you can revise your answer here. " +
		"Below are your answer from round " + strconv.Itoa(v.History[0].Round) + " and its best-matching curve; changing the values only tries the fit, and nothing tried here is kept."
}

// enteredNoteSentence says that the expert's current answer was entered
// by the facilitator, and whether and when they can revise it: "You can
// revise it here" stood above a closed round's disabled save and an
// archived workshop's.
func (v expertQuestionView) enteredNoteSentence() string {
	lead := "Your current answer " + v.EnteredNote + "."
	switch v.saving() {
	case savingOpen:
		return lead + " You can revise it here if it is not what you meant."
	case savingClosed:
		return lead + " If it is not what you meant, you can revise it here when the facilitator opens the next round."
	}
	return lead
}

// onBehalfOf is the expert's name on the facilitator's entry page, ""
// on the expert's own.
func (v expertQuestionView) onBehalfOf() string {
	if v.OnBehalf == nil {
		return ""
	}
	return v.OnBehalf.Expert
}

// previewInviteEnd ends previewInvite's sentence: while saving is closed
// the fit can still be tried, and the sentence says why nothing tried is
// kept in words true of the case. whose is "" on the expert's own page,
// else the expert's name on the facilitator's.
func previewInviteEnd(s saving, whose string) string {
	switch s {
	case savingOpen:
		return " before you save."
	case savingFinished:
		if whose != "" {
			return ". This workshop is archived, so nothing tried here is kept."
		}
		return ". The facilitator has closed this workshop, so nothing tried here is kept."
	case savingRevoked:
		return ". " + whose + "'s access is revoked, so nothing tried here is kept."
	case savingFinal:
		return ". Answers to this question are final, so nothing tried here is kept."
	}
	return ". Saving is closed for now: nothing tried here is kept."
}

// closedNotSaved answers a save in a closed round. What was sent stays on
// the page, where the fit can be tried, but nothing done there is kept:
// "Your values are kept below" stood above chips that could still be
// moved, and moving them kept nothing. Chips are placed on a board, not
// typed, and the sentence says so. sp is whose values they are: the
// expert's own, or, on the facilitator's entry page, the named expert's.
func closedNotSaved(round int, format workshop.AnswerFormat, sp speaker) string {
	lead := "Round " + strconv.Itoa(round) + " is closed, so "
	// The expert keeps their own note; the facilitator, who opens the
	// next round, keeps one of the expert's values.
	next := sp.pick("when the facilitator opens", "when you open")
	if format == workshop.FormatChips {
		return lead + sp.pick("your", "%s's") + " chips were not saved. They are still on the board below, where you can move them to try the fit, " +
			"but nothing here is kept: note where they are if you want them " + next + " the next round."
	}
	return lead + sp.pick("your answer was not saved. Your", "%s's answer was not saved. Their") + " values are still in the form below, where you can change them to try the fit, " +
		"but nothing here is kept: note them down if you want them " + next + " the next round."
}

// closedButton is the disabled save button's words when the form does
// not save; whose as for previewInviteEnd.
func closedButton(s saving, whose string) string {
	switch s {
	case savingFinished:
		if whose != "" {
			return "Saving is closed: the workshop is archived"
		}
		return "Saving is closed: the workshop is over"
	case savingRevoked:
		return "Saving is closed: access revoked"
	case savingFinal:
		return "Answers to this question are final"
	}
	return "Saving is closed for this round"
}

// answerValues writes a saved answer back as form values, for
// pre-filling, as the expert typed it.
func answerValues(q workshop.Question, a workshop.Answer) map[string]string {
	m := map[string]string{}
	switch q.Format {
	case workshop.FormatInterval:
		m["lowest"] = formNumber(a.Lowest, a.Percent)
		m["highest"] = formNumber(a.Highest, a.Percent)
		m["best"] = formNumber(a.Best, a.Percent)
		m["confidence"] = formNumber(a.Confidence, true)
	case workshop.FormatChips:
		for i, c := range a.Counts {
			if c > 0 {
				m[fmt.Sprintf("counts[%d]", i)] = strconv.Itoa(c)
			}
		}
	default:
		for i, v := range a.Values {
			m[fmt.Sprintf("values[%d]", i)] = formNumber(v, a.Percent)
		}
	}
	if a.Percent {
		m["unit"] = unitPercent
	}
	return m
}

// inputMode asks a phone for the keypad a field needs: whole numbers for
// chips, decimals otherwise. A phone's decimal keypad (the iPhone's) has
// no minus key, so a value of a question whose lower bound is below 0
// takes the full keyboard: with the keypad no negative value could be
// typed at all. The confidence is a percentage, never negative.
func inputMode(q workshop.Question, name string) string {
	switch {
	case q.Format == workshop.FormatChips:
		return "numeric"
	case name == "confidence":
		return "decimal"
	}
	return valueKeyboard(q.Lower)
}

func fieldClass(f formField) string {
	if f.Error != "" {
		return "field field-invalid"
	}
	return "field"
}

func ariaInvalid(f formField) string {
	if f.Error != "" {
		return "true"
	}
	return "false"
}

// describedBy links the input to its hint and message, when it has them.
func describedBy(f formField) templ.Attributes {
	var ids []string
	if f.Hint != "" {
		ids = append(ids, f.ID+"-hint")
	}
	if f.Error != "" {
		ids = append(ids, f.ID+"-error")
	}
	if len(ids) == 0 {
		return nil
	}
	return templ.Attributes{"aria-describedby": strings.Join(ids, " ")}
}

// reasonDescribedBy ties the reason's box to its hint and, when it has
// one, its message.
func reasonDescribedBy(msg string) string {
	if msg != "" {
		return "f-reason-hint f-reason-error"
	}
	return "f-reason-hint"
}

// expertRoutes are mounted under /e/{token} behind requireExpert, so
// every handler here acts for expertFrom(ctx) and no other. No expert or
// revision id ever appears in these URLs.
func (s *Server) expertRoutes(r chi.Router) {
	r.Use(s.noteExpertVersion)
	// The stream of the changes the expert's pages show (live_expert.go)
	// takes no turn: it holds its connection, not a CPU.
	r.Get("/events", s.expertEvents)
	// Previews and saves go before pages when the server is busy (turns.go).
	r.Get("/", s.throttlePages(s.inTurn(turns.Page, s.expertHomePage)))
	r.Get("/q/{qid}", s.throttlePages(s.inTurn(turns.Page, s.expertQuestionPage)))
	r.Post("/q/{qid}/preview", s.throttlePreviews(s.inTurn(turns.Interactive, s.expertPreviewPost)))
	r.Post("/q/{qid}/save", s.throttleSaves(s.inTurn(turns.Interactive, s.expertSavePost)))
}

func expertBase(r *http.Request) string { return "/e/" + chi.URLParam(r, "token") }

// expertQuestionPath is the expert's page of question q.
func expertQuestionPath(r *http.Request, q int64) string {
	return expertBase(r) + "/q/" + strconv.FormatInt(q, 10)
}

const timeLayout = "2006-01-02 15:04 UTC"

// frozenMessage answers a save to a calibration question whose true value
// has been revealed.
const frozenMessage = "The true value of this question has been shown, so answers to it can no longer change and nothing was saved. Your last saved answer stands as it was."

func (s *Server) expertHomePage(w http.ResponseWriter, r *http.Request) {
	e := expertFrom(r.Context())
	ws, err := s.store.Workshop(r.Context(), e.WorkshopID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	qs, err := s.store.Questions(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	revs, err := s.store.ExpertRevisions(r.Context(), e.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	base := expertBase(r)
	v := expertHomeView{Base: base, Expert: e.Name, Title: ws.Title, Purpose: ws.Purpose, Decision: ws.Decision, Round: ws.Round, Open: ws.Open, Finished: ws.Archived}
	for _, q := range qs {
		if q.Retired {
			continue
		}
		it := expertQuestionItem{
			Href: base + "/q/" + strconv.FormatInt(q.ID, 10), Position: q.Position,
			Wording: q.Wording, Quantity: q.Quantity, Units: q.Units, Revealed: q.Frozen(),
		}
		if q.PanelHeld() {
			v.Held++
		} else if ws.Open && ws.Round > 1 {
			// roundNext promises the other experts' answers only where
			// the question's page shows them (othersShown).
			fb, err := s.panelThrough(r, ws, q, ws.FeedbackRound())
			if err != nil {
				// The question's page says its panel could not be read.
				s.logFailure(r, "round feedback", err, "question", q.ID)
			} else if others, ok := fb.othersShown(e.ID); !ok && len(others) > 0 {
				// One other's answer held back; a question nobody else
				// answered has nothing to promise.
				v.Few++
			}
		}
		for _, rv := range revs {
			if rv.ExpertID != e.ID || rv.QuestionID != q.ID {
				continue
			}
			if rv.Round == ws.Round {
				it.Answered, it.AnsweredAt = true, rv.At.UTC().Format(timeLayout)
			} else {
				it.Earlier = true
				it.EarlierRound = max(it.EarlierRound, rv.Round)
			}
		}
		v.Questions = append(v.Questions, it)
	}
	s.renderPage(w, r, http.StatusOK, pageMeta{Title: ws.Title, Invented: ws.Invented, Caution: true, Scripts: []string{"/static/live.js"}}, expertHome(v))
}

// expertScope is what a question's handlers work on: the expert, their
// workshop, the question, and the expert's own revisions of it.
type expertScope struct {
	expert   workshop.Expert
	workshop workshop.Workshop
	question workshop.Question
	own      []workshop.Revision // oldest first; read by readOwn
}

// loadExpertScope finds the question in the expert's own workshop. A
// question of another workshop is as absent as one that does not exist.
func (s *Server) loadExpertScope(r *http.Request) (expertScope, error) {
	ctx := r.Context()
	sc := expertScope{expert: expertFrom(ctx)}
	qid, err := strconv.ParseInt(chi.URLParam(r, "qid"), 10, 64)
	if err != nil || qid <= 0 {
		return sc, workshop.ErrNotFound
	}
	if sc.question, err = s.store.Question(ctx, qid); err != nil {
		return sc, err
	}
	if sc.question.WorkshopID != sc.expert.WorkshopID {
		return sc, workshop.ErrNotFound
	}
	if sc.question.Retired {
		return sc, workshop.ErrRetired
	}
	if sc.workshop, err = s.store.Workshop(ctx, sc.expert.WorkshopID); err != nil {
		return sc, err
	}
	return sc, nil
}

// readOwn reads the expert's own revisions of the question, for the
// pages that show them; the preview fragment does without.
func (s *Server) readOwn(r *http.Request, sc *expertScope) error {
	var err error
	sc.own, err = s.store.QuestionExpertRevisions(r.Context(), sc.question.ID, sc.expert.ID)
	return err
}

func (s *Server) expertQuestionPage(w http.ResponseWriter, r *http.Request) {
	sc, err := s.loadExpertScope(r)
	if err == nil {
		err = s.readOwn(r, &sc)
	}
	if err != nil {
		s.fail(w, r, err)
		return
	}
	var typed map[string]string
	var preview *previewView
	if n := len(sc.own); n > 0 {
		cur := sc.own[n-1]
		typed = answerValues(sc.question, cur.Answer)
		if fit, err := s.fits.fit(sc.question, cur); err == nil {
			preview = newPreview(sc.question, fit, cur.Answer.Percent, speaker{})
		}
	} else if sc.question.ValuesInPercent() {
		percent, err := s.typesPercentages(r, sc)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		if percent {
			typed = map[string]string{"unit": unitPercent}
		}
	}
	v := s.questionView(r, sc, typed, "")
	v.Preview = preview
	// The live script's fetch (?drawn=) takes no confirmation: "Saved."
	// is the page's that the save led to.
	if v.Drawn = parseDrawn(r.URL.Query().Get("drawn")); v.Drawn == nil {
		v.Saved = s.takeConfirmation(w, r, expertQuestionPath(r, sc.question.ID), doneSaved) == doneSaved
	}
	if v.Saved {
		if err := s.nextUnanswered(r, sc, &v); err != nil {
			s.fail(w, r, err)
			return
		}
	}
	s.renderQuestion(w, r, http.StatusOK, sc, v)
}

func (s *Server) expertPreviewPost(w http.ResponseWriter, r *http.Request) {
	sc, err := s.loadExpertScope(r)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	if !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	a, fit, ok := readAnswer(sc.question, f, speaker{})
	fragment := r.URL.Query().Get("fragment") == "1"
	status := http.StatusOK
	var p *previewView
	if ok {
		p = newPreview(sc.question, fit, a.Percent, speaker{})
		if w := unitSlip(sc.question, f, a, speaker{}); w != "" {
			p.Warnings = append([]string{w}, p.Warnings...)
		}
	} else {
		status = http.StatusUnprocessableEntity
		p = &previewView{Problem: problemSummary(newAnswerForm(sc.question, nil, speaker{}), f)}
	}
	if fragment {
		s.render(w, r, status, expertPreview(p))
		return
	}
	if err := s.readOwn(r, &sc); err != nil {
		s.fail(w, r, err)
		return
	}
	v := s.questionView(r, sc, formValues(f), f.Value("reason"))
	applyErrors(&v.Form, f)
	v.Preview = p
	v.Tried = true
	s.renderQuestion(w, r, status, sc, v)
}

func (s *Server) expertSavePost(w http.ResponseWriter, r *http.Request) {
	sc, err := s.loadExpertScope(r)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	if !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	reason := readReason(f)
	a, fit, ok := readAnswer(sc.question, f, speaker{})
	// The page is drawn again only when the save is refused; a saved
	// answer redirects to the question's page.
	again := func(status int, closed, unsaved string, fit *elicit.Fit) {
		if err := s.readOwn(r, &sc); err != nil {
			s.fail(w, r, err)
			return
		}
		v := s.questionView(r, sc, formValues(f), f.Value("reason"))
		switch {
		case v.Frozen:
			// The page shows the last saved answer, not what was sent.
		case fit == nil:
			applyErrors(&v.Form, f)
			v.Preview = &previewView{Problem: problemSummary(v.Form, f)}
		default:
			applyErrors(&v.Form, f)
			v.Preview = newPreview(sc.question, *fit, a.Percent, speaker{})
		}
		if closed != "" {
			v.Open, v.Closed = false, closed
		}
		if unsaved != "" {
			v.Form.Error = unsaved
		}
		s.renderQuestion(w, r, status, sc, v)
	}
	if sc.question.Frozen() {
		// Whatever was sent: the answers were final at the reveal.
		again(http.StatusConflict, frozenMessage, "", nil)
		return
	}
	if !ok {
		again(http.StatusUnprocessableEntity, "", "", nil)
		return
	}
	if !f.OK() {
		// Only the reason was refused: the values fit, and their picture
		// stays in view while the reason is put right.
		again(http.StatusUnprocessableEntity, "", "", &fit)
		return
	}
	closed := closedNotSaved(sc.workshop.Round, sc.question.Format, speaker{})
	if sc.workshop.Archived {
		closed = "The facilitator has closed this workshop, so your answer was not saved and nothing more can be."
	}
	if !sc.workshop.Open {
		again(http.StatusConflict, closed, "", &fit)
		return
	}
	rev := workshop.Revision{QuestionID: sc.question.ID, ExpertID: sc.expert.ID, Reason: reason, Answer: a, Kept: &fit}
	// The write waits on the disk, not on a CPU: previews go on meanwhile.
	turns.StepAway(r.Context())
	err = s.store.SaveRevision(r.Context(), &rev)
	if err != nil {
		if !turns.StepBack(r.Context()) {
			return
		}
		if errors.Is(err, workshop.ErrRoundClosed) {
			again(http.StatusConflict, closed, "", &fit)
			return
		}
		if serverFault(r, err) {
			// Disk full or failing: the expert keeps what they typed and
			// is told nothing was saved and what to do.
			s.logFailure(r, "save", err)
			again(http.StatusServiceUnavailable, "", notSavedForExpert, &fit)
			return
		}
		if errors.Is(err, workshop.ErrAnswersFrozen) {
			// The true value was revealed between the page and the save.
			sc.question.Revealed = true
			again(http.StatusConflict, frozenMessage, "", &fit)
			return
		}
		if errors.Is(err, workshop.ErrQuestionChanged) {
			// The facilitator corrected the question (before anyone had
			// answered it) while the page was open: the values are
			// checked, and fitted, afresh against the question as it
			// now stands and shown with it, nothing saved.
			q, qerr := s.store.Question(r.Context(), sc.question.ID)
			if qerr != nil {
				s.fail(w, r, qerr)
				return
			}
			sc.question = q
			f = newForm(r.PostForm)
			_, nf, nok := readAnswer(sc.question, f, speaker{})
			var fresh *elicit.Fit
			if nok {
				fresh = &nf
			}
			again(http.StatusConflict, "", questionChangedForExpert, fresh)
			return
		}
		s.fail(w, r, err)
		return
	}
	s.live.publishEvent(sc.workshop.ID, liveEvent{Kind: "save", Question: sc.question.ID, At: rev.At})
	s.live.publishOwn(sc.workshop.ID, sc.expert.ID)
	// "Saved." is said once, on the page the save leads to: a reload does
	// not say it again (confirm_once.go). The page opens at it (#saved):
	// opened at its top, a phone showed the question's wording, and
	// "Saved." with the way to the next question lay under the screen's
	// edge.
	page := expertQuestionPath(r, sc.question.ID)
	s.confirmOnce(w, r, page, doneSaved)
	http.Redirect(w, r, page+"#saved", http.StatusSeeOther)
}

func (s *Server) renderQuestion(w http.ResponseWriter, r *http.Request, status int, sc expertScope, v expertQuestionView) {
	m := pageMeta{
		Title:    "Question " + strconv.Itoa(sc.question.Position) + " · " + sc.workshop.Title,
		Invented: sc.workshop.Invented, Caution: true, CautionCompact: true,
		Scripts: []string{"/static/preview.js", "/static/chips.js", "/static/live.js"},
	}
	s.renderPage(w, r, status, m, expertQuestion(v))
}

// questionView builds the page around the form; the caller adds the
// preview, notices and errors.
func (s *Server) questionView(r *http.Request, sc expertScope, typed map[string]string, reason string) expertQuestionView {
	q := sc.question
	base := expertBase(r)
	lower, upper := fvBounds(q.Lower, q.Upper)
	v := expertQuestionView{
		Base: base, Action: base + "/q/" + strconv.FormatInt(q.ID, 10),
		Title: sc.workshop.Title, Round: sc.workshop.Round, Open: sc.workshop.Open, Finished: sc.workshop.Archived,
		Question: expertQuestionInfo{
			ID: q.ID, Position: q.Position, Wording: q.Wording, Quantity: q.Quantity, Units: q.Units,
			Lower: lower, Upper: upper,
			Format: q.Format,
		},
		Form: newAnswerForm(q, typed, speaker{}),
		Live: true,
	}
	v.Form.Reason = reason
	if q.ValuesInPercent() {
		v.Question.InPercent = " (0% and 100%)"
	}
	// A calibration question is marked, and its true value shown, only
	// once the facilitator has revealed it; from then on the expert's last
	// answer is final.
	if q.Frozen() && q.TrueValue != nil {
		v.Question.Revealed = chart.FormatValue(*q.TrueValue)
	}
	v.Unanswered = len(sc.own) == 0
	if q.Frozen() {
		v.Frozen = true
		if n := len(sc.own); n > 0 {
			v.Form = newAnswerForm(q, answerValues(q, sc.own[n-1].Answer), speaker{})
		}
	}
	for i := len(sc.own) - 1; i >= 0; i-- {
		v.History = append(v.History, s.newHistoryRow(q, sc.own[i]))
	}
	if n := len(sc.own); n > 0 && sc.own[n-1].EnteredBy == workshop.ByFacilitator {
		cur := sc.own[n-1]
		v.EnteredNote = "was entered by the facilitator on " + cur.At.UTC().Format(timeLayout) + " " + channelForExpert(cur.Channel)
	}
	if v.FeedbackRound = sc.workshop.FeedbackRound(); v.FeedbackRound > 0 {
		if q.PanelHeld() {
			v.PanelHeld = true
		} else {
			s.anonymousPanel(r, sc, &v)
		}
	}
	return v
}

func (s *Server) newHistoryRow(q workshop.Question, rv workshop.Revision) historyRow {
	h := historyRow{Round: rv.Round, At: rv.At.UTC().Format(timeLayout), Reason: rv.Reason,
		Values: answerInWords(q, rv.Answer), Fitted: "—"}
	if rv.EnteredBy == workshop.ByFacilitator {
		h.EnteredNote = "entered by the facilitator " + channelForExpert(rv.Channel)
	}
	if fit, err := s.fits.fit(q, rv); err == nil {
		pct := rv.Answer.Percent && q.Format != workshop.FormatChips
		ps := typedRange(q, pct, fit.Percentiles[:]...)
		h.Fitted = "median " + ps[1] + "; 90% between " + ps[0] + " and " + ps[2]
		h.Params = "Beta(" + chart.FormatShape(fit.Dist.Alpha) + ", " + chart.FormatShape(fit.Dist.Beta.Beta) + ")"
	}
	return h
}

// answerInWords writes a saved answer on one line for the expert's own
// history, in words: "5% chance below 3%; 50% below 7%; 95% below 16%"
// rather than answerSummary's "5%: 3%; …", which is ambiguous when the
// values are percentages too.
func answerInWords(q workshop.Question, a workshop.Answer) string {
	switch q.Format {
	case workshop.FormatInterval:
		v := typedRange(q, a.Percent, a.Lowest, a.Highest, a.Best)
		return "between " + v[0] + " and " + v[1] + ", " + confidenceBack(a.Confidence) + " sure; best estimate " + v[2]
	case workshop.FormatChips:
		var parts []string
		for _, c := range a.Counts {
			parts = append(parts, strconv.Itoa(c))
		}
		return "chips in each bin, lowest first: " + strings.Join(parts, ", ")
	}
	var parts []string
	values := typedRange(q, a.Percent, a.Values...)
	for i := range a.Values {
		p := "?"
		if i < len(q.Probs) {
			p = chart.FormatPercent(q.Probs[i])
		}
		if i == 0 {
			p += " chance"
		}
		parts = append(parts, p+" below "+values[i])
	}
	return strings.Join(parts, "; ")
}

// nbsp joins a value to its name in answerSummary: a cell may break
// between "5%: 0.02;" and "50%: 0.04;", never between "95%:" and its
// value (the large panel's tables broke "95%:" over "0.078").
const nbsp = "\u00a0"

// answerSummary writes a saved answer on one line.
func answerSummary(q workshop.Question, a workshop.Answer) string {
	var parts []string
	switch q.Format {
	case workshop.FormatInterval:
		v := typedRange(q, a.Percent, a.Lowest, a.Highest, a.Best)
		parts = append(parts, "lowest"+nbsp+v[0], "highest"+nbsp+v[1], "best"+nbsp+v[2], "sure"+nbsp+confidenceBack(a.Confidence))
	case workshop.FormatChips:
		for _, c := range a.Counts {
			parts = append(parts, strconv.Itoa(c))
		}
		return "chips " + strings.Join(parts, ", ")
	default:
		values := typedRange(q, a.Percent, a.Values...)
		for i := range a.Values {
			p := "?"
			if i < len(q.Probs) {
				p = chart.FormatPercent(q.Probs[i])
			}
			parts = append(parts, p+":"+nbsp+values[i])
		}
	}
	return strings.Join(parts, "; ")
}

// newPreview turns a fit into the picture and its read-backs; percent
// says the expert typed percentages, which the read-backs then use, and
// sp whose judgement it is.
func newPreview(q workshop.Question, fit elicit.Fit, percent bool, sp speaker) *previewView {
	p := &previewView{
		Heading: "What " + sp.numbersOf(q) + " imply",
		Params:  fmt.Sprintf("Beta(α = %s, β = %s)", chart.FormatShape(fit.Dist.Alpha), chart.FormatShape(fit.Dist.Beta.Beta)),
		Fit: chart.FitView{
			ID: "fit-q" + strconv.FormatInt(q.ID, 10), Quantity: q.Quantity, Units: q.Units,
			Lower: q.Lower, Upper: q.Upper, Dist: fit.Dist, Percentiles: fit.Percentiles,
			Percent: percent && q.Format != workshop.FormatChips, Whose: sp.Name,
			Chips: q.Format == workshop.FormatChips,
		},
	}
	if q.Format != workshop.FormatChips {
		if line := readAsLine(q, fit.Stated); line != "" {
			p.ReadBacks = append(p.ReadBacks, line)
		}
	}
	if line := intervalReading(q, fit, sp); line != "" {
		p.ReadBacks = append(p.ReadBacks, line)
	}
	// The stated values are one range, read back apart.
	plain, asPercent := typedRange(q, false, fit.Stated...), typedRange(q, true, fit.Stated...)
	for i := range fit.Probs {
		if i >= len(fit.Stated) {
			break
		}
		pr, x := fit.Probs[i], fit.Stated[i]
		p.Fit.Points = append(p.Fit.Points, chart.Point{X: x, P: pr})
		if i < len(fit.Fitted) && i < len(fit.ProbErrors) {
			p.Fit.Fitted = append(p.Fit.Fitted, fit.Fitted[i])
			p.Fit.FittedProbs = append(p.Fit.FittedProbs, pr+fit.ProbErrors[i])
		}
		line := readBackWritten(pr, plain[i], asPercent[i], q, percent && q.Format != workshop.FormatChips, sp)
		if i < len(fit.ProbErrors) {
			line += " " + fittedBack(pr, pr+fit.ProbErrors[i])
		}
		p.ReadBacks = append(p.ReadBacks, line)
	}
	// The curve's points in the words of the picture under it (its 5%
	// point, its middle, the median, and its 95% point); the Beta's
	// parameters come last, as in the picture's caption, for the
	// facilitator, and an expert who is not a statistician may pass them
	// by.
	ps := typedRange(q, percent, fit.Percentiles[:]...)
	answers := "answers"
	if q.Format == workshop.FormatChips {
		answers = "chips"
	}
	p.ReadBacks = append(p.ReadBacks, fmt.Sprintf("Taken together, the curve that best matches %s %s has its middle (the median) at %s, "+
		"and its 5%% and 95%% points at %s and %s: 90%% of the chance lies between them. In statistical terms the curve is %s.",
		sp.pick("your", "%s's"), answers, ps[1], ps[0], ps[2], p.Params))
	p.Warnings = expertWarnings(q, fit, percent, sp)
	return p
}

// intervalReading says how a four-value answer is read (elicit.FourValue):
// the best estimate as the median and the chance left outside the range
// split evenly between the two tails. The sentences below it say "you are
// saying" of those tails, which the expert did not type.
func intervalReading(q workshop.Question, fit elicit.Fit, sp speaker) string {
	if q.Format != workshop.FormatInterval || len(fit.Probs) != 3 {
		return ""
	}
	lo, hi := fit.Probs[0], fit.Probs[2]
	return sp.pick("Parley reads your four values this way: your best estimate as the middle value, as likely to be exceeded as not, and the ",
		"Parley reads %s's four values this way: the best estimate as the middle value, as likely to be exceeded as not, and the ") +
		chart.FormatPercent(lo+(1-hi)) + " chance left outside " + sp.pick("your", "their") + " range as split evenly: " +
		chart.FormatPercent(lo) + " below " + sp.pick("your", "their") + " lowest and " + chart.FormatPercent(1-hi) + " above " + sp.pick("your", "their") + " highest."
}

// formValues keeps the typed values for showing the form again.
func formValues(f *Form) map[string]string {
	m := map[string]string{}
	for k := range f.Values {
		m[k] = f.Values.Get(k)
	}
	return m
}

// applyErrors copies the parser's messages beside the fields.
func applyErrors(af *answerForm, f *Form) {
	for i := range af.Fields {
		af.Fields[i].Error = f.Error(af.Fields[i].Name)
	}
	af.ReasonError = f.Error("reason")
	af.Error = f.Error("")
	af.Invalid = !f.OK() && !f.unsaved // a server's failure is not the fields' fault
}

// problemSummary says, for the live preview, which field stops the fit.
// The messages end their own sentences; one full stop closes each.
func problemSummary(af answerForm, f *Form) string {
	for _, fl := range af.Fields {
		if msg := f.Error(fl.Name); msg != "" {
			label := fl.Label
			if strings.HasSuffix(label, "?") {
				// A label asked as a question is quoted: "…highest?: Type
				// the confidence…" read as broken punctuation.
				label = "“" + label + "”"
			}
			return "No fit yet. " + label + ": " + endSentence(msg)
		}
	}
	if msg := f.Error(""); msg != "" {
		return "No fit yet: " + endSentence(msg)
	}
	return "No fit yet: check the marked fields."
}

// endSentence closes a message with one full stop, or with the question
// mark it asks by ("did you mean 80%?", not "80%?.").
func endSentence(msg string) string {
	if strings.HasSuffix(msg, "?") {
		return msg
	}
	return strings.TrimSuffix(msg, ".") + "."
}

// anonymousPanel draws into v, from round 2, the panel as it stood when
// the previous round closed (elicit's FeedbackRound): the other experts'
// fitted curves without names, in the order of panelOrder (not by name,
// id or time of answer), beside
// the asking expert's own current curve and the equal-weight pool of the
// whole panel at that close. Beyond overlayLimit other experts it
// draws a spread instead: the own curve and the pool, with each other
// expert as one interval. The caller leaves out a question whose panel
// is held (workshop.Question.PanelHeld).
func (s *Server) anonymousPanel(r *http.Request, sc expertScope, v *expertQuestionView) {
	fb, err := s.feedbackFor(r, sc)
	if err != nil {
		// The page is still useful without the panel; it says so, and the
		// cause is logged.
		s.logFailure(r, "round feedback", err, "question", sc.question.ID)
		v.PanelMissing = true
		return
	}
	others, ok := fb.othersShown(sc.expert.ID)
	if !ok {
		v.FewOthers = fewOthersNote(len(others), v.FeedbackRound)
		if len(others) == 0 {
			// A question added after the round closed: nobody could have
			// answered it then, as the room view says.
			evs, err := s.store.Events(r.Context(), sc.workshop.ID)
			if err != nil {
				s.logFailure(r, "round feedback", err, "question", sc.question.ID)
			} else if addedAfterClose(evs, sc.question.ID, v.FeedbackRound) {
				v.FewOthers = addedAfterExpertNote(v.FeedbackRound, sc.workshop.Archived)
			}
		}
		return
	}
	q := sc.question
	var own *elicit.ScaledBeta
	// The panel writes values as the expert's own fit does: as
	// percentages when their last answer was typed in them.
	percent := false
	if n := len(sc.own); n > 0 {
		if fit, err := s.fits.fit(q, sc.own[n-1]); err == nil {
			d := fit.Dist
			own = &d
		}
		percent = sc.own[n-1].Answer.Percent && q.ValuesInPercent()
	}
	// The expert's own curve is drawn in their letter's style, as the
	// projector draws it; one not in the panel fed back takes the style
	// after every letter's.
	ownSlot := fb.lettered + 1
	for _, m := range fb.members {
		if m.expertID == sc.expert.ID {
			v.OwnLabel, ownSlot = m.label, m.slot
		}
	}
	var curves []chart.Curve
	if own != nil {
		curves = append(curves, chart.Curve{Label: "You", Prose: "your curve", Role: chart.RoleExpert, Dist: *own, Slot: ownSlot})
		v.OwnCurve = true
	}
	id := "panel-q" + strconv.FormatInt(q.ID, 10)
	v.Reasons = fb.reasons(sc.expert.ID)
	if len(others) > overlayLimit {
		if fb.poolErr == nil {
			curves = append(curves, poolCurve(fb.pool))
		}
		dists := make([]elicit.ScaledBeta, len(others))
		for i, m := range others {
			dists[i] = m.dist
		}
		v.Spread = &chart.SpreadView{ID: id, Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper, Curves: curves, Others: dists, Percent: percent, ForExpert: true}
		return
	}
	for _, m := range others {
		curves = append(curves, chart.Curve{Label: m.label, Role: chart.RoleExpert, Dist: m.dist, Slot: m.slot})
	}
	if fb.poolErr == nil {
		curves = append(curves, poolCurve(fb.pool))
	}
	v.Panel = &chart.PanelView{ID: id, Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper, Curves: curves, Percent: percent, ForExpert: true}
}

// panelIntro is the sentence above the overlaid panel. It speaks of the
// expert's own curve only when the panel draws one.
func (v expertQuestionView) panelIntro() string {
	with := " With them is the equal-weight pool of the whole panel at that close."
	if v.OwnCurve {
		with = " With them are your current curve and the equal-weight pool of the whole panel at that close."
	}
	return "The other experts' curves, each the one that best matches their answers, as they stood when round " + strconv.Itoa(v.FeedbackRound) +
		" closed, without names: the letters follow an order that says nothing about who they are." + v.lettering() + with +
		poolMeaning + " Everyone sees the same panel through this round." + v.feedbackUse()
}

// lettering says whose the letters are. They are the room view's, so
// that the room and the experts can speak of "Expert C" alike; an expert
// who saw "Expert B, Expert C" and no "Expert A" could not tell that the
// missing letter was their own, drawn as "You". It names their letter:
// a revoked expert's letter is missing too (newFeedback), so "the letter
// missing here" could be either.
func (v expertQuestionView) lettering() string {
	switch {
	case v.OwnCurve && v.OwnLabel != "":
		return " Your own curve is marked “You”; the letters are the other experts', as on the facilitator's screen in the room, where yours is " + v.OwnLabel + "."
	case v.OwnCurve:
		return " Your own curve is marked “You”; the letters are the other experts', as on the facilitator's screen in the room."
	case v.OwnLabel != "":
		return " The letters are the other experts', as on the facilitator's screen in the room, where yours is " + v.OwnLabel + "."
	}
	return ""
}

// poolMeaning says what the equal-weight pool is, in words for an expert
// who is not a statistician: the linear opinion pool with equal weights,
// whose density is the average of the experts' densities.
const poolMeaning = " The pool is every expert's curve averaged, each counting the same."

// spreadIntro is the sentence above the spread of a large panel.
func (v expertQuestionView) spreadIntro() string {
	lead := "The equal-weight pool of the whole panel"
	if v.OwnCurve {
		lead = "Your current curve with the equal-weight pool of the whole panel"
	}
	// The line's ends and dot in the words of the expert's own picture:
	// the curve's 5% and 95% points and its middle (the median).
	return lead + " as round " + strconv.Itoa(v.FeedbackRound) + " closed, and below it one line per other expert at that close, without names: " +
		"each runs from the 5% point to the 95% point of that expert's curve, with a dot at its middle (the median), the lowest middle at the top." + poolMeaning + " Everyone sees the same panel through this round." + v.feedbackUse()
}

// feedbackUse says what the feedback is for: to reconsider an answer the
// expert has given, or, before they have given one, to settle their own
// judgement first. Once the workshop is archived it is for neither:
// nothing more can be saved, and the page said "Once you save, your curve
// appears here beside them" under "nothing more can be saved".
func (v expertQuestionView) feedbackUse() string {
	switch {
	case v.Finished && !v.Frozen:
		return ""
	case v.OwnCurve:
		return " Use it to reconsider your own judgement; you need not agree."
	case len(v.History) > 0:
		// An answer that cannot be drawn: no promise of a curve.
		return " Use it to reconsider your own judgement; you need not agree."
	case v.Frozen:
		return " You gave no answer to this question before its true value was shown."
	}
	return " You have not saved an answer to this question yet: it is worth settling your own judgement before you read theirs. " +
		"Once you save, your curve appears here beside them; you need not agree with them."
}

// feedback is what every expert's page of a question shares through a
// round: the fits of the panel's active experts as the previous round
// closed, in the panel's order and under its labels, their reasons, and
// their equal-weight pool. The room view shows the same.
type feedback struct {
	members []feedbackMember
	// lettered counts the letters given, a revoked expert's included:
	// the slot after them is free for a curve of the page's own.
	lettered int
	pool     elicit.Pool
	poolErr  error
}

type feedbackMember struct {
	expertID int64
	dist     elicit.ScaledBeta
	label    string // "Expert A", ... in the panel's order
	slot     int    // the label's place in that order, from 1: its line style
	// reason is the reason saved with the judgement fed back, empty when
	// there is none or the facilitator withheld it; reasonRound is the
	// round it was given in.
	reason      string
	reasonRound int
}

// feedbackReason is one expert's reason as the feedback shows it.
type feedbackReason struct {
	Label  string
	Round  int
	Reason string
}

// reasons are the members' reasons, leaving out those of the expert
// except (0: nobody) and those with none.
func (fb *feedback) reasons(except int64) []feedbackReason {
	var out []feedbackReason
	for _, m := range fb.members {
		if m.expertID != except && m.reason != "" {
			out = append(out, feedbackReason{Label: m.label, Round: m.reasonRound, Reason: m.reason})
		}
	}
	return out
}

// othersShown is the rule every expert's round feedback follows, on the
// question's page, the page a no-script "Show the fit" returns and a
// refused save alike (anonymousPanel): the other experts' answers fed
// back, those of every member but the expert except, and whether they
// are shown at all. They are shown (curves, pool and reasons) only when
// at least roomLeastAnswers of them are there, the room view's rule
// counted from the reader's side: one other answer under its letter,
// or a pool of two beside the reader's own curve, is that colleague's
// answer, and an expert on a panel of two, or the second to answer a
// question, read it off. fb may be nil (nobody had answered).
func (fb *feedback) othersShown(except int64) ([]feedbackMember, bool) {
	if fb == nil {
		return nil, false
	}
	var others []feedbackMember
	for _, m := range fb.members {
		if m.expertID != except {
			others = append(others, m)
		}
	}
	return others, len(others) >= roomLeastAnswers
}

// fewOthersNote says, in the panel's place, why an expert's page shows
// no other answers (othersShown): how many others had answered when
// round `through` closed, and the rule.
func fewOthersNote(others, through int) string {
	had := "No other expert had"
	if others == 1 {
		had = "Only one other expert had"
	}
	return had + " answered this question when round " + strconv.Itoa(through) + " closed. " +
		"The other experts' answers are shown here only once at least " + numberWord(roomLeastAnswers) +
		" of them have answered by a round's close, so that no expert's answer is shown on its own."
}

// feedbackKey names one question's feedback in a round: the question in
// its workshop, the round fed back, the experts revoked when it was read,
// and the generations of the facilitator's reason decisions and round
// changes. The workshop is part of the key because a question's id can
// come back (a workshop deleted while it was the newest frees its
// questions' ids for the next one added or imported, perhaps by another
// process), while a workshop's never does (store's nextWorkshopID). The revisions of a
// closed round change only if it is reopened (saves go to the open round,
// and revisions are append-only), so the feedback is read and pooled once
// per key; a revocation, a reissued token lifting one, a reason withheld
// or shown again, a judgement withdrawn, or a round closed, opened or
// reopened gives a new key.
type feedbackKey struct {
	workshop  int64
	question  int64
	through   int
	revoked   string
	reasons   uint64
	rounds    uint64
	withdrawn uint64
}

// feedbackFor returns the panel fed back on sc's question in sc's round,
// or nil when there is none yet.
func (s *Server) feedbackFor(r *http.Request, sc expertScope) (*feedback, error) {
	return s.panelThrough(r, sc.workshop, sc.question, sc.workshop.FeedbackRound())
}

// panelThrough returns question q's anonymised panel as round `through`
// closed (nil when through is 0 or nobody answered by then), remembered
// per feedbackKey.
func (s *Server) panelThrough(r *http.Request, ws workshop.Workshop, q workshop.Question, through int) (*feedback, error) {
	if through == 0 {
		return nil, nil
	}
	revoked, err := s.store.RevokedExperts(r.Context(), ws.ID)
	if err != nil {
		return nil, err
	}
	key := feedbackKey{workshop: ws.ID, question: q.ID, through: through, revoked: fmt.Sprint(revoked), reasons: s.reasonGen.Load(), rounds: s.roundGen.Load(),
		withdrawn: s.withdrawnGen.Load()}
	fb, err := s.feedbacks.GetErr(key, func() (*feedback, error) {
		// Other requests may be waiting on this computation: an expert
		// closing their page must not fail the others' panels.
		ctx := context.WithoutCancel(r.Context())
		revs, err := s.store.LatestRevisions(ctx, q.ID, through)
		if err != nil {
			return nil, err
		}
		experts, err := s.store.Experts(ctx, ws.ID)
		if err != nil {
			return nil, err
		}
		salt, err := s.store.PanelSalt(ctx, ws.ID)
		if err != nil {
			return nil, err
		}
		// Revoked as the key says, so the feedback is the key's.
		gone := map[int64]bool{}
		for _, id := range revoked {
			gone[id] = true
		}
		for i := range experts {
			experts[i].Revoked = gone[experts[i].ID]
		}
		panel := workshop.PanelState(workshop.PanelInput{Question: q, Experts: experts, Revisions: revs,
			Weights: workshop.Weights{Scheme: workshop.WeightsEqual}, Through: through, Fit: s.fits.fit})
		return newFeedback(panel, salt), nil
	})
	if err != nil {
		return nil, err
	}
	if len(fb.members) == 0 {
		return nil, nil
	}
	return fb, nil
}

// newFeedback orders the panel's experts with a fit by panelOrder and
// labels them in that order, keeps the active ones with the reasons the
// facilitator has not withheld, and takes the panel's equal-weight pool.
// Revisions that cannot be fitted are left out. A revoked expert keeps
// their letter, unshown: lettering only the active ones moved every later
// letter when an expert was revoked mid-round, so the projector's
// "Expert D" became another expert's curve and reason while the room
// discussed it, and experts' pages changed under them alike.
func newFeedback(panel workshop.Panel, salt []byte) *feedback {
	type keyed struct {
		key     string
		m       feedbackMember
		revoked bool
	}
	q := panel.Question
	var ks []keyed
	for _, pm := range panel.Members {
		if pm.Fit == nil {
			continue
		}
		rv := pm.Revision
		m := feedbackMember{expertID: pm.Expert.ID, dist: pm.Fit.Dist}
		if !rv.ReasonWithheld {
			m.reason, m.reasonRound = strings.TrimSpace(rv.Reason), rv.Round
		}
		ks = append(ks, keyed{panelOrder(salt, q.ID, pm.Expert.ID), m, pm.Expert.Revoked})
	}
	sort.Slice(ks, func(i, j int) bool { return ks[i].key < ks[j].key })
	fb := &feedback{poolErr: panel.PoolErr, lettered: len(ks)}
	for i, k := range ks {
		if k.revoked {
			continue
		}
		k.m.label, k.m.slot = panelLabel(i), i+1
		fb.members = append(fb.members, k.m)
	}
	if panel.Pool != nil {
		fb.pool = *panel.Pool
	}
	return fb
}

// panelLabel is the anonymous label of the i-th expert (from 0) in a
// question's feedback order: "Expert A" to "Expert Z", then "Expert AA",
// "Expert AB", ... as spreadsheet columns are named. Letters are easy to
// say in the room and are not mistaken for question numbers.
func panelLabel(i int) string {
	s := ""
	for n := i + 1; n > 0; n = (n - 1) / 26 {
		s = string(rune('A'+(n-1)%26)) + s
	}
	return "Expert " + s
}

// panelOrder is an expert's sort key in a question's anonymised feedback:
// HMAC-SHA-256 under the workshop's secret panel salt of the question's
// and the expert's ids. The order says nothing about names, ids or times
// of answer, differs from question to question, and cannot be recomputed
// by anyone without the salt, which is never shown.
func panelOrder(salt []byte, questionID, expertID int64) string {
	m := hmac.New(sha256.New, salt)
	fmt.Fprintf(m, "parley panel order %d %d", questionID, expertID)
	return hex.EncodeToString(m.Sum(nil))
}

// overlayLimit is the most other experts whose curves are overlaid one by
// one. Beyond a dozen, overlaid curves cannot be told apart anyway (the
// line styles repeat and the lines merge into a band), and the page grows
// with every curve; a larger panel is drawn as a spread of intervals.
const overlayLimit = 12

// poolCurve is the equal-weight pool as a curve to draw.
func poolCurve(pool elicit.Pool) chart.Curve {
	return chart.Curve{Label: workshop.WeightsEqual.PoolName(), Role: chart.RolePool, Dist: chart.Pool{Pool: pool}}
}

// typesPercentages reports whether the expert, on their own link, last
// wrote a proportion as percentages: a question they have not answered
// yet then offers percentages first. An expert who chose "as
// percentages" on one question found the next back on proportions, and
// their 25 refused ("Did you mean 25%?"), question after question. An
// answer the facilitator entered for them is not their habit.
func (s *Server) typesPercentages(r *http.Request, sc expertScope) (bool, error) {
	if err := r.Context().Err(); err != nil {
		// The expert has gone: no more reads for a page nobody gets.
		return false, err
	}
	revs, err := s.store.ExpertRevisions(r.Context(), sc.expert.ID)
	if err != nil {
		return false, err
	}
	qs, err := s.store.Questions(r.Context(), sc.workshop.ID)
	if err != nil {
		return false, err
	}
	byID := make(map[int64]workshop.Question, len(qs))
	for _, q := range qs {
		byID[q.ID] = q
	}
	for i := len(revs) - 1; i >= 0; i-- {
		rv := revs[i]
		if q, ok := byID[rv.QuestionID]; ok && q.ValuesInPercent() && rv.EnteredBy != workshop.ByFacilitator {
			return rv.Answer.Percent, nil
		}
	}
	return false, nil
}

// nextUnanswered finds, after a save, the first question after this one
// (then from the start) that the expert has not answered in this round
// and can still answer.
func (s *Server) nextUnanswered(r *http.Request, sc expertScope, v *expertQuestionView) error {
	qs, err := s.store.Questions(r.Context(), sc.workshop.ID)
	if err != nil {
		return err
	}
	revs, err := s.store.ExpertRevisions(r.Context(), sc.expert.ID)
	if err != nil {
		return err
	}
	done := map[int64]bool{sc.question.ID: true}
	for _, rv := range revs {
		if rv.Round == sc.workshop.Round {
			done[rv.QuestionID] = true
		}
	}
	var after, before []workshop.Question
	for _, q := range qs {
		if q.Retired || q.Frozen() || done[q.ID] {
			continue
		}
		if q.Position > sc.question.Position {
			after = append(after, q)
		} else {
			before = append(before, q)
		}
	}
	if next := append(after, before...); len(next) > 0 {
		v.NextHref = v.Base + "/q/" + strconv.FormatInt(next[0].ID, 10)
		v.NextLabel = "Question " + strconv.Itoa(next[0].Position) + ": " + next[0].Quantity
		return nil
	}
	v.AllAnswered = true
	return nil
}
