package elicit

import (
	"fmt"
	"math"
	"strconv"
)

// TailMiss is the particulars of a WarnTailMisfit warning: the stated
// outer point whose fitted tail chance is furthest, as a ratio, from the
// stated one, with both chances. The warning's message says the same in
// a sentence; a page that lists many fits' tail misses can show these
// instead and word the rule once.
type TailMiss struct {
	Value  float64 // the stated outer value
	Above  bool    // the tail above Value (its stated probability is over ½); else the tail below
	Stated float64 // the expert's chance beyond Value: p below it, or 1 − p above it
	Fitted float64 // the fitted Beta's chance beyond Value (0 when it puts none there)
	Ratio  float64 // max(Fitted/Stated, Stated/Fitted); +Inf when Fitted is 0
}

// TailMiss is the particulars of f's WarnTailMisfit warning, worked out
// from its stated points and probability errors by the rule that raised
// it; ok is false when f carries no such warning (a chips fit, a poor
// fit, or a fit whose tails are within TailRatioLimit).
func (f Fit) TailMiss() (m TailMiss, ok bool) {
	for _, w := range f.Warnings {
		if w.Code == WarnTailMisfit {
			return tailMiss(f.Probs, f.Stated, f.ProbErrors)
		}
	}
	return TailMiss{}, false
}

// tailMiss is the stated outer point whose fitted tail chance is
// furthest, as a ratio, from the stated one, if that ratio exceeds
// TailRatioLimit. resid[i] is F(values[i]) − probs[i].
func tailMiss(probs, values, resid []float64) (TailMiss, bool) {
	if len(values) != len(probs) || len(resid) != len(probs) {
		return TailMiss{}, false
	}
	m, at := TailMiss{}, -1
	for i, p := range probs {
		ts, tf := p, p+resid[i] // the lower tail below values[i]
		if p > 0.5 {
			ts, tf = 1-p, (1-p)-resid[i] // the upper tail above it
		}
		if !(ts > 0 && ts <= TailPointMax) || p == 0.5 {
			continue
		}
		r := math.Inf(1)
		if tf > 0 {
			r = math.Max(tf/ts, ts/tf)
		}
		if r > m.Ratio {
			m, at = TailMiss{Value: values[i], Above: p > 0.5, Stated: ts, Fitted: math.Max(tf, 0), Ratio: r}, i
		}
	}
	if at < 0 || !(m.Ratio > TailRatioLimit) {
		return TailMiss{}, false
	}
	return m, true
}

// tailWarning is WarnTailMisfit for the tail miss of a fit whose stated
// points, probabilities and residuals are given, if it has one.
func tailWarning(probs, values, resid []float64) (Warning, bool) {
	m, ok := tailMiss(probs, values, resid)
	if !ok {
		return Warning{}, false
	}
	return Warning{WarnTailMisfit, m.Message(fmt.Sprintf("%.4g", m.Value))}, true
}

// Message is the WarnTailMisfit warning's sentence with the outer value
// written as value: a page writes it as the expert typed it (9% where
// they typed 9%), where the warning itself, which knows no typing,
// writes %.4g (0.09).
func (m TailMiss) Message(value string) string {
	ratio := m.RatioText()
	if m.Ratio < 1000 {
		ratio = "about " + ratio
	}
	fitted, stated := m.Chances()
	return "The fitted Beta puts " + fitted + " of the chance " + m.Side() + " " + value + ", where the expert put " + stated + ": " + ratio +
		". Its probability gaps are small, but it does not match the expert's outer value; show the expert the fit."
}

// Chances writes the fitted and the stated tail chance (ChanceText); when
// both are under one in a million, as figures ("1.0e-7"): "almost none"
// beside "almost none" hid the two numbers the warning is about (found in
// review, for a stated 1e-9).
func (m TailMiss) Chances() (fitted, stated string) {
	if m.Fitted < 1e-6 && m.Stated < 1e-6 {
		return tinyChance(m.Fitted), tinyChance(m.Stated)
	}
	return ChanceText(m.Fitted), ChanceText(m.Stated)
}

// tinyChance writes a chance under one in a million in scientific
// notation to two figures, "1.0e-7", and 0 as "0".
func tinyChance(p float64) string {
	if p <= 0 {
		return "0"
	}
	return FormatExp(math.Log(p), 2)
}

// Side is "above" for the tail above the outer value and "below" for
// the tail below it.
func (m TailMiss) Side() string {
	if m.Above {
		return "above"
	}
	return "below"
}

// RatioText says how far the fitted tail chance is from the stated one:
// "22 times less", "4.2 times more" (one decimal below 10), "over 1000
// times less".
func (m TailMiss) RatioText() string {
	how := "less"
	if m.Fitted > m.Stated {
		how = "more"
	}
	switch {
	case m.Ratio >= 1000:
		return "over 1000 times " + how
	case m.Ratio < 10:
		return strconv.FormatFloat(m.Ratio, 'f', 1, 64) + " times " + how
	}
	return strconv.FormatFloat(m.Ratio, 'f', 0, 64) + " times " + how
}

// ChanceText writes a tail chance as a percentage to three significant
// figures, and a chance under one in a million as "almost none (under
// 0.0001%)", which no rounding of a tiny number would say as plainly.
func ChanceText(p float64) string {
	if p < 1e-6 {
		return "almost none (under 0.0001%)"
	}
	return strconv.FormatFloat(100*p, 'g', 3, 64) + "%"
}
