package web

import (
	"strconv"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
)

// warningGroup is one kind of fit warning on a question of the report:
// what it means and what to do, written once, then only what is
// particular to each expert. In a large panel the fits' messages repeat
// one sentence a hundred times; the project lead reading the record
// should see the pattern, and the report stays small.
type warningGroup struct {
	Code  string
	Title string // the kind of warning, and how many experts have it
	Lead  string // what it means and what to do
	Tails []tailRow
	Items []warningItem
}

// tailRow is one expert's tail miss (elicit.TailMiss) as the report's
// table writes it.
type tailRow struct {
	Expert, Outer, Stated, Fitted, Ratio string
}

// warningItem is one expert's particulars of a warning other than a tail
// miss, or the whole message where the particulars are not known.
type warningItem struct {
	Expert, Detail string
}

// warningOrder is the order the report gives the kinds of warning: the
// fit itself first, then its shape, then its weight.
var warningOrder = []elicit.WarningCode{elicit.WarnPoorFit, elicit.WarnTailMisfit, elicit.WarnUShaped, elicit.WarnJShaped, elicit.WarnNearCertainty, elicit.WarnBeyondDouble}

// fitWarningGroups groups the warnings of q's current fits by kind, in
// warningOrder; a kind this version does not know (from an older record)
// comes last, each expert with the whole message.
func (v reportView) fitWarningGroups(q record.Question) []warningGroup {
	byCode := map[string]*warningGroup{}
	var unknown []string
	for _, cf := range q.CurrentFits {
		if cf.Fit == nil {
			continue
		}
		outer := func(x float64) string { return typedBack(q.Question, x, v.Percent[cf.RevisionID]) }
		for _, w := range cf.Fit.Warnings {
			g, ok := byCode[w.Code]
			if !ok {
				g = &warningGroup{Code: w.Code}
				byCode[w.Code] = g
				if !knownWarning(w.Code) {
					unknown = append(unknown, w.Code)
				}
			}
			g.add(v.name(cf.ExpertID), cf.Fit, w, outer)
		}
	}
	var out []warningGroup
	codes := make([]string, 0, len(warningOrder)+len(unknown))
	for _, c := range warningOrder {
		codes = append(codes, string(c))
	}
	for _, c := range append(codes, unknown...) {
		if g, ok := byCode[c]; ok {
			g.Title, g.Lead = warningWords(elicit.WarningCode(c), len(g.Tails)+len(g.Items), len(q.CurrentFits), q.IsProportion())
			out = append(out, *g)
		}
	}
	return out
}

func knownWarning(code string) bool {
	for _, c := range warningOrder {
		if string(c) == code {
			return true
		}
	}
	return false
}

// add lists one expert's warning w on fit f by its particulars: the
// tail miss elicit worked out, its outer value written by outer as the
// expert typed it, or the fit's own numbers that the rule read. A tail
// miss whose particulars a record read back does not carry is listed
// with its message.
func (g *warningGroup) add(expert string, f *record.Fit, w record.Warning, outer func(float64) string) {
	a, b := f.Dist.Alpha, f.Dist.Beta.Beta
	detail := w.Message
	switch elicit.WarningCode(w.Code) {
	case elicit.WarnTailMisfit:
		if m := w.Tail; m != nil {
			fitted, stated := m.Chances()
			g.Tails = append(g.Tails, tailRow{Expert: expert, Outer: m.Side() + " " + outer(m.Value),
				Stated: stated, Fitted: fitted, Ratio: m.RatioText()})
			return
		}
	case elicit.WarnPoorFit:
		detail = "misses by " + gapText(f.MaxProbError)
	case elicit.WarnUShaped:
		detail = "α\u00a0=\u00a0" + elicit.ShapeText(a) + ", β\u00a0=\u00a0" + elicit.ShapeText(b)
	case elicit.WarnJShaped:
		// The rule flags the parameter below 1, the smaller of the two.
		detail = "at the lower bound, α\u00a0=\u00a0" + elicit.ShapeText(a)
		if b < a {
			detail = "at the upper bound, β\u00a0=\u00a0" + elicit.ShapeText(b)
		}
	case elicit.WarnNearCertainty:
		detail = "α\u00a0+\u00a0β\u00a0=\u00a0" + elicit.ESSText(a+b)
	}
	g.Items = append(g.Items, warningItem{Expert: expert, Detail: detail})
}

// gapText writes a poor fit's largest probability gap to three decimals,
// or as many more as it takes to read above the rule's limit: a gap of
// 0.05004 is "0.05004", not "0.050" under a lead that says the gap is
// more than 0.05.
func gapText(gap float64) string {
	for d := 3; d < 17; d++ {
		s := strconv.FormatFloat(gap, 'f', d, 64)
		if v, err := strconv.ParseFloat(s, 64); err == nil && elicit.PoorFit(v) {
			return s
		}
	}
	return strconv.FormatFloat(gap, 'g', -1, 64)
}

// warningWords are a kind of warning's title, saying that n of the of
// experts who answered the question have it, and its meaning and what to
// do, written once for the project lead and the facilitator; proportion
// says the question is on [0, 1], where α + β reads as observed trials.
func warningWords(code elicit.WarningCode, n, of int, proportion bool) (title, lead string) {
	count := ": " + strconv.Itoa(n) + " of " + strconv.Itoa(of) + " experts"
	each, fit, theFit, fits, experts := "each expert", "Each of these fits", "each fit", "these fits", "the experts"
	if n == 1 {
		each, fit, theFit, fits, experts = "the expert", "The fit", "the fit", "this fit", "the expert"
	}
	if of == 1 {
		count = ""
	}
	limit := strconv.Itoa(elicit.NearCertaintyESS)
	switch code {
	case elicit.WarnPoorFit:
		return "Poor fit" + count, "No single Beta matches the answers well: " + theFit + " misses one of the stated probabilities by more than " +
			strconv.FormatFloat(elicit.PoorFitThreshold, 'f', 2, 64) + " (the largest gap is listed). Show " + each + " the fit and ask whether they want to revise."
	case elicit.WarnTailMisfit:
		return "Outer value missed" + count, fit + " keeps close to the expert's stated probabilities, but not to one outer value (a 5% or 95% value, say): beyond it, the fit puts more than " +
			strconv.Itoa(elicit.TailRatioLimit) + " times the chance the expert put there, or less than a third of it. A prior made from " + fits +
			" says something else about rare values than " + experts + " did. Show " + each + " the fit and ask whether it says what they meant."
	case elicit.WarnUShaped:
		return "U-shaped fit" + count, "α and β are both below 1: " + theFit + " says the value is most likely close to one bound or the other, and least likely in the middle. Check with " +
			each + " that this is what they meant."
	case elicit.WarnJShaped:
		return "J-shaped fit" + count, "α or β is below 1: " + theFit + " rises without limit towards that bound (α the lower, β the upper), so values right at the bound are the most likely. Check with " +
			each + " that this is what they meant."
	case elicit.WarnNearCertainty:
		// "α + β" kept on one line, as the lines under it keep theirs.
		weight := "α\u00a0+\u00a0β is above " + limit
		if proportion {
			weight = "it is worth more than " + limit + " observed trials (α\u00a0+\u00a0β above " + limit + ")"
		}
		return "Near-certainty" + count, fit + " implies near-certainty about the value: " + weight + ". Check that " + each + " really is this sure."
	case elicit.WarnBeyondDouble:
		return "Point written as a bound" + count, "A percentile or fitted value of " + theFit + " lies nearer a bound than the computer's numbers (double precision) can hold beside it, so the report writes it as the bound itself; each line gives how far from the bound it really lies. Such a fit is pressed against the edge: check it with " + each + "."
	}
	return "Other warnings (" + string(code) + ")" + count, ""
}
