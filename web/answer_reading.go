package web

import (
	"errors"
	"fmt"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// Reading an expert's answer from the form, in the expert's own terms:
// a proportion question takes 0.05 or 5% (and, with the form's
// percentage choice, a plain 5 as 5%); the four-value confidence is a
// percentage, 80 or 80%; an empty chips bin holds none. The number rules
// are workshop's (ParseAnswerNumber, ParseConfidence), which the answer
// sheet reads by too. Every field's problem is found at once (elicit's
// Question.Problems) and said in words written for the expert, with the
// value as they typed it.

// Form values of the proportion question's unit choice.
const (
	unitProportion = "proportion"
	unitPercent    = "percent"
)

// readAnswer parses the posted form into the question's format, then
// lets elicit judge it: every field's problem at once (Problems), then
// the fit's own rules (Fit). Messages land beside their fields, written
// for the expert; sp names whose values they are where the facilitator
// types them ("Priya Raman's 5% value", not "your 5% value").
func readAnswer(q workshop.Question, f *Form, sp speaker) (workshop.Answer, elicit.Fit, bool) {
	// Errors of other fields (a reason, a channel) do not stop the
	// answer's own rules from being checked: every error shows at once.
	before := len(f.Errors)
	var a workshop.Answer
	asPercent := q.IsProportion() && f.Value("unit") == unitPercent
	if u := f.Value("unit"); u != "" && u != unitProportion && u != unitPercent {
		// Only a form not of this page sends another: it was read as
		// proportions without a word. (A page without the choice, on a
		// question that is no proportion, sends none.)
		f.set("", "Choose how you type your values, as proportions or as percentages, and send the answer again.")
	}
	typed, count := 0, 0
	value := func(name string) float64 {
		typedText, ambiguous := decimalComma(f.Value(name), possibleReading(q, name, asPercent))
		if ambiguous != "" {
			f.set(name, ambiguous)
			count++
			return 0
		}
		v, pct, err := workshop.ParseAnswerNumber(name, typedText, q, asPercent)
		if err != nil {
			f.set(name, expertWords(q, f, err, sp))
		}
		count++
		if pct {
			typed++
		}
		return v
	}
	switch q.Format {
	case workshop.FormatInterval:
		a.Lowest = value("lowest")
		a.Highest = value("highest")
		a.Best = value("best")
		typedText, ambiguous := decimalComma(f.Value("confidence"), possibleReading(q, "confidence", false))
		c, err := workshop.ParseConfidence(typedText)
		switch {
		case ambiguous != "":
			f.set("confidence", ambiguous)
		case err != nil:
			f.set("confidence", expertWords(q, f, err, sp))
		}
		a.Confidence = c
	case workshop.FormatChips:
		a.Counts = make([]int, max(0, len(q.BinEdges)-1))
		for i := range a.Counts {
			name := fmt.Sprintf("counts[%d]", i)
			if strings.TrimSpace(f.Value(name)) == "" {
				continue // an empty bin holds no chips
			}
			n, err := input.Whole(name, f.Value(name), 0, workshop.MaxChips)
			if err != nil {
				f.set(name, expertWords(q, f, err, sp))
			}
			a.Counts[i] = n
		}
	default:
		a.Values = make([]float64, len(q.Probs))
		for i := range a.Values {
			a.Values[i] = value(fmt.Sprintf("values[%d]", i))
		}
	}
	a.Percent = workshop.KeptInPercent(q, typed, count)
	unread := len(f.Errors) > before
	if ps := q.Problems(a); len(ps) > 0 {
		// Beside the fields that could be read, every problem at once; a
		// field that could not be read is not compared with its neighbour.
		// A value's own rule (within the bounds) stands whatever its
		// neighbour holds: "2" under an unreadable "0,1" was passed over,
		// and refused only once the typing slip was put right.
		for _, p := range ps {
			field := answerField(q, p.Field)
			if unread && (f.Error(field) != "" || field == "" || p.Rule == elicit.RuleValueIncreasing && f.Error(comparedWith(p.Field)) != "") {
				continue
			}
			f.set(field, expertWords(q, f, p, sp))
		}
		return a, elicit.Fit{}, false
	}
	if unread {
		return a, elicit.Fit{}, false
	}
	fit, err := q.Fit(a)
	if err != nil {
		var ie *elicit.InputError
		field := ""
		if errors.As(err, &ie) {
			field = answerField(q, ie.Field)
		}
		switch {
		case errors.Is(err, elicit.ErrFitFailed):
			// Never the fitter's own words on an expert's screen.
			f.set("", "No curve could be drawn through these answers. Please check them: each value above the one before, none at a bound, and not all crowded together.")
		case ie != nil && ie.Rule == elicit.RuleFitRange && q.Format == workshop.FormatChips:
			f.set("", "No curve Parley can draw matches where your chips are. Please spread them over more bins.")
		case ie != nil && ie.Rule == elicit.RuleFitRange:
			// The rule's own words speak of alpha and beta; an expert
			// reads what to change.
			f.set("", "These values lie too close together, or too close to a bound, for any curve Parley can draw to match them. Please spread them out or move them away from the bounds.")
		default:
			f.set(field, expertWords(q, f, err, sp))
		}
		return a, fit, false
	}
	return a, fit, true
}

// commaDecimal is a number written with one comma between its whole part
// and its decimals, and perhaps a % sign.
var commaDecimal = regexp.MustCompile(`^\s*([+-]?)([0-9]*),([0-9]+)\s*(%?)\s*$`)

// decimalComma reads a decimal comma as a point on the expert's form: a
// phone's number keyboard set to a language that writes 0,05 shows a
// comma and no point (the iPhone's decimal pad shows only the language's
// separator), so an expert there could type no decimal at all, and each
// "0,05" was refused as "not a number". One comma between digits, no
// point: "0,05" is 0.05 and "12,5%" is 12.5%, as the read-backs then show.
// Three digits after a whole part of one to three digits other than 0
// ("1,500") is also how a thousands separator writes 1500: that is not
// guessed, and ambiguous says so, naming both readings, unless the
// field could not hold the thousands (possible(x, pct) false for it,
// with pct a % sign typed): on a proportion "1,500" cannot be 1500, and
// "1,250" typed as a percentage cannot be 1250%, so each is read with
// its decimal comma; refused as ambiguous, the expert was told to type
// "1250 without the comma", which the bounds then refused. A nil
// possible takes every reading as possible. Anything else is returned as
// typed, for the number rules to judge.
func decimalComma(typed string, possible func(x float64, pct bool) bool) (text, ambiguous string) {
	m := commaDecimal.FindStringSubmatch(typed)
	if m == nil {
		return typed, ""
	}
	sign, whole, frac, pct := m[1], m[2], m[3], m[4]
	thousands := func() bool {
		if possible == nil {
			return true
		}
		x, err := strconv.ParseFloat(sign+whole+frac, 64)
		return err == nil && possible(x, pct != "")
	}
	if len(frac) == 3 && whole != "" && len(whole) <= 3 && strings.Trim(whole, "0") != "" && thousands() {
		point, thousands := sign+whole+"."+frac+pct, sign+whole+frac+pct
		return typed, "“" + strings.TrimSpace(typed) + "” could be " + point + " or " + thousands + ": please type " + point + " with a point, or " + thousands + " without the comma."
	}
	return sign + whole + "." + frac + pct, ""
}

// possibleReading is decimalComma's possible for the field name of q:
// whether x (pct: typed with a % sign) could be the field's value, so
// that a thousands reading it cannot hold is not offered. The confidence
// is a percentage from 0 to 100; a value lies within q's bounds, read as
// a percentage on a proportion where it has its sign or the expert chose
// percentages (asPercent). Every reading of a typed value (the answer,
// the words of its refusal, the box it is shown back in) takes the same
// one, so that all read "1,250" alike.
func possibleReading(q workshop.Question, name string, asPercent bool) func(x float64, pct bool) bool {
	if name == "confidence" {
		return func(x float64, _ bool) bool { return x >= 0 && x <= 100 }
	}
	return func(x float64, pct bool) bool {
		if q.IsProportion() && (pct || asPercent) {
			x /= 100
		}
		return x >= q.Lower && x <= q.Upper
	}
}

// comparedWith is the field a value must exceed ("" for none).
func comparedWith(field string) string {
	switch field {
	case "best":
		return "lowest"
	case "highest":
		return "best"
	}
	var i int
	if _, err := fmt.Sscanf(field, "values[%d]", &i); err == nil && i > 0 {
		return fmt.Sprintf("values[%d]", i-1)
	}
	return ""
}

// answerField is the form field of an elicit field for q's form, or ""
// (the form as a whole) for a field the form does not show: a rule about
// all the chips together, or any field of another format, so that no
// message lands where the expert cannot see it.
func answerField(q workshop.Question, field string) string {
	shown := false
	switch q.Format {
	case workshop.FormatInterval:
		shown = field == "lowest" || field == "best" || field == "highest" || field == "confidence"
	case workshop.FormatChips:
		i, ok := workshop.FieldIndex(field)
		shown = ok && strings.HasPrefix(field, "counts[") && i < len(q.BinEdges)-1
	default:
		i, ok := workshop.FieldIndex(field)
		shown = ok && strings.HasPrefix(field, "values[") && i < len(q.Probs)
	}
	if !shown {
		return ""
	}
	return field
}

// expertWords says what is wrong with a field in words for the expert,
// quoting what they typed; no rule names, interval notation or
// exponents.
func expertWords(q workshop.Question, f *Form, err error, sp speaker) string {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return "Parley could not read this. Please check it."
	}
	typed := strings.TrimSpace(f.Value(ie.Field))
	lo, hi := chart.FormatValue(q.Lower), chart.FormatValue(q.Upper)
	between := "between " + lo + " and " + hi
	if q.IsProportion() {
		between = "between 0 and 1 (0% and 100%)"
		if f.Value("unit") == unitPercent {
			// The expert chose percentages: "between 0 and 1" asked them
			// for a proportion the form would read as 1% at most.
			between = "between 0% and 100%"
		}
	}
	switch ie.Rule {
	case elicit.RuleRequired:
		return "Please fill this in."
	case input.RuleNumberSyntax, elicit.RuleFinite:
		if q.IsProportion() {
			return "“" + input.Clip(typed, 24) + "” is not a number Parley can read. Type a decimal such as 0.05, or a percentage such as 5%."
		}
		return "“" + input.Clip(typed, 24) + "” is not a number Parley can read. Type digits with a decimal point, such as 12.5."
	case input.RuleUnderflow:
		return "“" + input.Clip(typed, 24) + "” is too close to 0 for Parley to hold: it would be read as 0. Please check it."
	case workshop.RulePercentHere:
		return "This question's values run " + between + ", not as percentages: please type the value without %."
	case workshop.RuleConfidencePercent:
		if ie.Detail == "" {
			return "Type the confidence as a percentage, such as 80 for 80%; you typed " + typed + "."
		}
		return "Type the confidence as a percentage: did you mean " + ie.Detail + "%?"
	case elicit.RuleValueInBounds:
		if atBound(q, f, ie.Field) {
			// "Must be between 0 and 30; you typed 0" contradicted itself
			// to anyone who reads "between" as taking in its ends.
			return "Must be " + strictlyBetween(q, f) + ", not at either end; you typed " + typed + "."
		}
		msg := "Must be " + between + "; you typed " + typed + "."
		// Read as the value was ("5,5" is 5.5, decimalComma).
		asRead, _ := decimalComma(typed, possibleReading(q, ie.Field, q.IsProportion() && f.Value("unit") == unitPercent))
		if v, err := strconv.ParseFloat(strings.TrimSuffix(asRead, "%"), 64); err == nil && q.IsProportion() && v > 1 && v < 100 && !strings.HasSuffix(typed, "%") {
			msg += " Did you mean " + typed + "%? Type " + typed + "% or choose percentages above."
		}
		return msg
	case elicit.RuleValueIncreasing:
		return "Must be larger than " + previousLabel(q, ie.Field, sp) + "."
	case elicit.RuleProbOpen:
		if ie.Field == "confidence" {
			return "Must be more than 0% and less than 100%; you typed " + typed + "."
		}
	case elicit.RuleCentralTails:
		return "Must be at most " + workshop.ConfidenceMaxPercent + "%, which leaves a sliver of chance outside your range; you typed " + typed + "."
	case elicit.RuleCentralNarrow:
		return "Must be at least " + workshop.ConfidenceMinPercent + "%, or your range would hold no chance at all; you typed " + typed + "."
	case elicit.RuleInteger, elicit.RuleCountRange, elicit.RuleNonNegative:
		return "Type a whole number of chips, such as 3, or leave it empty for none."
	case workshop.RuleChipsExceeded:
		total := 0
		for i := 0; i+1 < len(q.BinEdges); i++ {
			// A bin refused for its own sake (-2, 3.5) holds no chips:
			// "-2" beside "30" made the count 28, "take 4 away", short of
			// what brings the board to its number.
			if n, err := strconv.Atoi(strings.TrimSpace(f.Value(fmt.Sprintf("counts[%d]", i)))); err == nil && n > 0 {
				total += n
			}
		}
		return fmt.Sprintf("You have placed %d chips, and this question has %d. Take %d away.", total, q.Chips, total-q.Chips)
	case elicit.RuleCountsNotAllZero:
		return fmt.Sprintf("Place your %d chips: none are placed yet.", q.Chips)
	case elicit.RuleChipsSpread:
		return "Put chips in at least three bins: a curve needs some spread to be fitted."
	case elicit.RuleValueNearBound:
		return "This lies too close to " + lo + " or " + hi + " for Parley to draw a curve through it; you typed " + typed + ". Please move it a little further from the end of the range."
	case elicit.RuleValuesTooClose:
		return "This is so close to " + previousLabel(q, ie.Field, sp) + " that the two cannot be told apart; you typed " + typed + ". Please spread them out."
	}
	// The fit's own rules (values too close together, or too close to a
	// bound, for a curve to mean anything).
	return "Parley cannot fit a curve to these values as they are: " + strings.TrimSuffix(string(ie.Rule), ".") + ". Please check them."
}

// readReason reads the expert's reason, saying what is wrong with it in
// words for the expert: f.Text's rule words ("must be plain text (no
// control characters) (character U+0007)") are the facilitator's.
func readReason(f *Form) string {
	reason, err := input.Text("reason", f.Value("reason"), input.MaxLongText, false)
	var ie *elicit.InputError
	switch {
	case err == nil:
		return reason
	case errors.As(err, &ie) && ie.Rule == input.RuleTooLong:
		f.set("reason", fmt.Sprintf("This is %d characters long; the most is %d. Please shorten it.", utf8.RuneCountInString(input.Lines(f.Value("reason"))), input.MaxLongText))
	case errors.As(err, &ie) && ie.Rule == input.RuleTextValid:
		f.set("reason", "This holds an invisible character that cannot be kept, often brought along when text is pasted from another program. Please retype the part you pasted.")
	default:
		f.set("reason", "Parley could not keep this text. Please check it.")
	}
	return ""
}

// previousLabel names the value a field must exceed, as the form labels it.
func previousLabel(q workshop.Question, field string, sp speaker) string {
	whose := sp.pick("your", "%s's")
	switch field {
	case "best":
		return whose + " lowest plausible value"
	case "highest":
		return whose + " best estimate"
	}
	var i int
	if _, err := fmt.Sscanf(field, "values[%d]", &i); err == nil && i > 0 && i <= len(q.Probs) {
		// Its name, not "the value above it": above on the form is below
		// in size, and "larger than the value above it" reads as a riddle.
		return whose + " " + chart.FormatPercent(q.Probs[i-1]) + " value"
	}
	return "the value before it"
}

// formNumber writes a stored value back into the form as the expert
// typed it: as a percentage when they typed percentages, never with an
// exponent.
func formNumber(v float64, percent bool) string { return input.Typed(v, percent) }

// typedBack writes a stored value of q for the expert, as they typed it:
// as a percentage when they typed percentages, with the same figures
// either way and never rounded onto a bound (chart.FormatWithin).
func typedBack(q workshop.Question, v float64, percent bool) string {
	return chart.FormatWithin(v, q.Lower, q.Upper, percent)
}

// fittedRangeAsTyped writes a fit's 5%, 50% and 95% points beside the
// answer they were fitted to, in that answer's terms: as percentages for
// an answer typed in percentages, as the expert's own history writes
// them, so that "95%: 9%" does not stand beside a fitted 0.07222; and as
// one range, each as far as it takes to read apart from the others
// (chart.FormatRangeWithin).
func fittedRangeAsTyped(q workshop.Question, percent bool, xs ...float64) []string {
	return typedRange(q, percent && q.ValuesInPercent(), xs...)
}

// typedRange writes values of one range of q (a judgement's values, a
// fit's points) as typedBack does, each as far as it takes to read apart
// from the others (chart.FormatRangeWithin).
func typedRange(q workshop.Question, percent bool, xs ...float64) []string {
	return chart.FormatRangeWithin(xs, q.Lower, q.Upper, percent)
}

// confidenceBack writes a four-value confidence as typed, a percentage
// short of 100% however close to it.
func confidenceBack(c float64) string { return chart.FormatWithin(c, 0, 1, true) }

// readAsLine says how a proportion question's values were read: "Read as
// 0.02 (2%), 0.05 (5%) and 0.12 (12%)."
func readAsLine(q workshop.Question, values []float64) string {
	if !q.IsProportion() || len(values) == 0 {
		return ""
	}
	parts := make([]string, len(values))
	plain, pct := typedRange(q, false, values...), typedRange(q, true, values...)
	for i := range values {
		parts[i] = plain[i] + " (" + pct[i] + ")"
	}
	last := len(parts) - 1
	if last == 0 {
		return "Read as " + parts[0] + "."
	}
	return "Read as " + strings.Join(parts[:last], ", ") + " and " + parts[last] + "."
}

// boundsShownWords tell the expert that a number above, written as a
// bound (0, 100%, the question's own limits), is really a hair inside it
// (elicit.WarnBeyondDouble), without the double's arithmetic that the
// facilitator's message gives.
func boundsShownWords(q workshop.Question, fit elicit.Fit, percent bool, sp speaker) string {
	lo, hi := elicit.BoundsShown(fit.Dist, fit.Shown())
	numbers := sp.numbersOf(q)
	var s string
	switch {
	case lo && hi:
		l, u := typedBack(q, q.Lower, percent), typedBack(q, q.Upper, percent)
		s = "Parts of the curve that fits " + numbers + " lie so close to " + l + " and to " + u + " that they are written as " + l + " and " + u + " here, though they lie a hair inside."
	case hi:
		u := typedBack(q, q.Upper, percent)
		s = "Part of the curve that fits " + numbers + " lies so close to " + u + " that it is written as " + u + " here, though it lies a hair below."
	default:
		l := typedBack(q, q.Lower, percent)
		s = "Part of the curve that fits " + numbers + " lies so close to " + l + " that it is written as " + l + " here, though it lies a hair above."
	}
	values := sp.pick("your values need", "the values need")
	if q.Format == workshop.FormatChips {
		values = sp.pick("your chips need", "the chips need")
	}
	return s + " A curve pressed this hard against the edge usually means " + values + " another look."
}

// warningsAsTyped are a fit's warnings as elicit words them for the
// facilitator, with the stated value a warning names written as the
// answer was typed (typedBack), as the row's stated values beside it
// are: a tail miss beyond a 95% value typed as 9% reads "above 9%", not
// elicit's "above 0.09".
func warningsAsTyped(q workshop.Question, fit elicit.Fit, percent bool) []string {
	out := make([]string, len(fit.Warnings))
	for i, w := range fit.Warnings {
		out[i] = w.Message
		if w.Code == elicit.WarnTailMisfit {
			if m, ok := fit.TailMiss(); ok {
				out[i] = m.Message(typedBack(q, m.Value, percent))
			}
		}
	}
	return out
}

// expertWarnings are a fit's warnings in words for the expert, or, on the
// facilitator's page for entering on an expert's behalf, about the expert
// by name (sp); the facilitator's panel keeps elicit's own, written for
// them.
func expertWarnings(q workshop.Question, fit elicit.Fit, percent bool, sp speaker) []string {
	var out []string
	numbers := sp.numbersOf(q)
	// adjust is the advice for typed values, or for a chips board, whose
	// chips are moved, not typed.
	adjust := func(values, chips string) string {
		if q.Format == workshop.FormatChips {
			return chips
		}
		return values
	}
	for _, w := range fit.Warnings {
		switch w.Code {
		case elicit.WarnUShaped:
			out = append(out, "The curve that fits "+numbers+" piles up at both ends: it says the value is most likely close to "+
				chart.FormatValue(q.Lower)+" or to "+chart.FormatValue(q.Upper)+", and least likely in between. "+
				adjust(sp.pick("If that is not what you mean, bring your outer values in towards your middle one.",
					"If that is not what %s means, bring the outer values in towards the middle one."),
					sp.pick("If that is not what you mean, move chips from the end bins towards the middle.",
						"If that is not what %s means, move chips from the end bins towards the middle.")))
		case elicit.WarnJShaped:
			end := chart.FormatValue(q.Lower)
			if fit.Dist.Alpha >= 1 {
				end = chart.FormatValue(q.Upper)
			}
			out = append(out, "The curve that fits "+numbers+" is highest right at "+end+": it says values at the very edge are the most likely. "+
				sp.pick("If you expect", "If %s expects")+" the value to sit a little away from "+end+", "+adjust("adjust "+sp.pick("your", "the")+" values.", "move a chip or two away from that end."))
		case elicit.WarnPoorFit:
			out = append(out, "No curve of this kind matches all "+numbers+" closely; the sentences above show how far it is from each. "+
				adjust(sp.pick("You may want to adjust one of them.", "%s may want to adjust one of them."),
					sp.pick("You may want to move a chip or two.", "%s may want to move a chip or two.")))
		case elicit.WarnTailMisfit:
			out = append(out, adjust("The curve does not match how far out one of "+sp.pick("your", "%s's")+" outer values lies: the sentences above show the chance it gives beyond each. "+
				sp.pick("You may want to adjust your values.", "%s may want to adjust the values."),
				"The curve does not match how far out "+sp.pick("your", "%s's")+" outermost chips lie: the sentences above show the chance it gives beyond each edge. "+
					sp.pick("You may want to move a chip or two.", "%s may want to move a chip or two.")))
		case elicit.WarnNearCertainty:
			out = append(out, adjust(sp.pick("Your values are very close together: you are saying you are nearly certain of the value. If you are less sure than that, widen them.",
				"%s's values are very close together: they say they are nearly certain of the value. If they are less sure than that, widen them."),
				sp.pick("Your chips sit in so narrow a range that they say you are nearly certain of the value. If you are less sure than that, spread them over more bins.",
					"%s's chips sit in so narrow a range that they say %s is nearly certain of the value. If they are less sure than that, spread them over more bins.")))
		case elicit.WarnBeyondDouble:
			out = append(out, boundsShownWords(q, fit, percent, sp))
		default:
			out = append(out, "Please check the curve against "+numbers+".")
		}
	}
	if q.Format == workshop.FormatInterval && len(fit.Probs) == 3 {
		if c := fit.Probs[2] - fit.Probs[0]; c < 0.5 {
			out = append(out, sp.pick("You are", "%s is")+" "+chart.FormatPercent(c)+" sure the value lies between "+
				sp.pick("your lowest and highest values, so you think it more likely lies outside them. If you meant that you are fairly sure it lies inside, raise the confidence.",
					"their lowest and highest values, so they think it more likely lies outside them. If they meant that they are fairly sure it lies inside, raise the confidence."))
		}
	}
	return out
}

// atBound says the value typed in field reads as exactly one of q's
// bounds, which a value may not be: the rule is strictly between.
func atBound(q workshop.Question, f *Form, field string) bool {
	// Read as readAnswer read it: "1,0" is at the end as "1.0" is.
	typed, _ := decimalComma(f.Value(field), possibleReading(q, field, q.IsProportion() && f.Value("unit") == unitPercent))
	v, _, err := workshop.ParseAnswerNumber(field, typed, q, q.IsProportion() && f.Value("unit") == unitPercent)
	return err == nil && (v == q.Lower || v == q.Upper)
}

// strictlyBetween is q's range with its ends left out, in the terms the
// expert types in: "above 0 and below 30", or for a proportion "above 0
// and below 1 (above 0% and below 100%)", or "above 0% and below 100%"
// where they chose percentages.
func strictlyBetween(q workshop.Question, f *Form) string {
	if !q.IsProportion() {
		return "above " + chart.FormatValue(q.Lower) + " and below " + chart.FormatValue(q.Upper)
	}
	if f.Value("unit") == unitPercent {
		return "above 0% and below 100%"
	}
	return "above 0 and below 1 (above 0% and below 100%)"
}

// unitSlip is a warning for values typed as proportions on a form set to
// percentages: the choice of percentages carries from the expert's last
// answer to the next question, and an expert who typed 0.02, 0.04 and
// 0.08 there, meaning proportions, had them read as 0.02%, 0.04% and
// 0.08%, said only by the first read-back. Where every value was typed
// without a % sign and at most 1, the preview says how they are read and
// what the largest would be as a proportion; typed with a % sign, every
// value must have one (the warning said "or type 8%", and an expert who
// did so for the largest alone kept 0.02% and 0.04% beside it, with no
// warning left, since a value with its sign ends it). A rare event's
// percentages meet the warning too, which would be a false alarm that
// will not go: its last sentence tells an expert who does mean 0.08% how
// to say so, the % sign, which ends it. "" where it does not apply.
func unitSlip(q workshop.Question, f *Form, a workshop.Answer, sp speaker) string {
	if !q.ValuesInPercent() || f.Value("unit") != unitPercent {
		return ""
	}
	var names []string
	var values []float64
	switch q.Format {
	case workshop.FormatInterval:
		names, values = []string{"lowest", "best", "highest"}, []float64{a.Lowest, a.Best, a.Highest}
	default:
		for i, v := range a.Values {
			names, values = append(names, fmt.Sprintf("values[%d]", i)), append(values, v)
		}
	}
	largest := -1
	for i, name := range names {
		if strings.HasSuffix(strings.TrimSpace(f.Value(name)), "%") || values[i] > 0.01 {
			return ""
		}
		if largest < 0 || values[i] > values[largest] {
			largest = i
		}
	}
	if largest < 0 {
		return ""
	}
	typed := strings.TrimSpace(f.Value(names[largest]))
	return sp.pick("You chose percentages, so ", "The form is set to percentages, so ") + typed + " is read as " + typed + "%. " +
		sp.pick("If you meant", "If %s meant") + " proportions, " + typed + " is " + chart.FormatPercent(values[largest]*100) +
		": choose “As proportions” above, or type every value as a percentage with its % sign, such as " + chart.FormatPercent(values[largest]*100) + ". " +
		sp.pick("If you do mean ", "If %s does mean ") + typed + "%, add a % sign to each value (" + typed + "%) and this note goes away."
}
