package workshop

import (
	"fmt"
	"math"
	"strconv"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// Rules of question definitions and answers.
const (
	RuleQuantileFormat elicit.Rule = "format does not give quantile judgements"
	RuleChipsExceeded  elicit.Rule = "more chips placed than the question allows"
	// RuleLogScaleCalibration and RuleLogScaleLower hold a question whose
	// information is scored on the log scale (Question.LogScale) to it.
	RuleLogScaleCalibration elicit.Rule = "must stay ticked while the question's information is scored on the log scale: set it back to the uniform scale on the calibration page first"
	RuleLogScaleLower       elicit.Rule = "must be at least 0 while the question's information is scored on the log scale (set on the calibration page)"
)

// Probability sets a facilitator can ask for in FormatQuantiles. They are
// shared values: copy before changing.
var (
	// ProbsDefault asks for the 5th, 50th and 95th percentiles.
	ProbsDefault = []float64{0.05, 0.5, 0.95}
	// ProbsQuartiles asks for the lower quartile, median and upper quartile.
	ProbsQuartiles = []float64{0.25, 0.5, 0.75}
	// ProbsTertiles asks for the tertiles, 1/3 and 2/3, with the median
	// between them, so that the expert states a central value as well as
	// three equally likely ranges.
	ProbsTertiles = []float64{1.0 / 3, 0.5, 2.0 / 3}
)

// MaxChips is the most chips a chips question may ask an expert to place.
const MaxChips = 1000

// Validate checks a question's definition and returns the first broken
// rule as an *elicit.InputError: the wording (at most input.MaxLongText
// characters), quantity and units (input.MaxShortText) by the text rule of
// input.CheckText, wording and quantity present; bounds finite and
// ordered; a known format; for FormatQuantiles, elicit.MinPairs to
// elicit.MaxPairs probabilities passing elicit.CheckProbs, at least
// MinProbGap apart; for
// FormatChips, elicit.MinBins to elicit.MaxBins bins whose edges strictly
// increase from Lower to Upper and between elicit.MinChipBins and MaxChips
// chips; a true value, if set, finite and within [Lower, Upper]; on the
// log scale, a calibration question with a lower bound of at least 0 and
// a true value above 0 (RuleLogScaleCalibration, RuleLogScaleLower,
// CheckTrueValue).
func (q Question) Validate() error { return q.validate(true) }

// ValidateKept checks a question already recorded, as an imported record
// holds it: Validate's rules but MinProbGap's. That rule guards typing,
// and a question made before it may ask for probabilities closer
// together (0.5 and 0.5000001); a question answered is never asked
// again, so the record brings it back as it was written rather than
// not at all.
func (q Question) ValidateKept() error { return q.validate(false) }

// validate is Validate, with MinProbGap's rule when gap is true.
func (q Question) validate(gap bool) error {
	if err := q.checkText(); err != nil {
		return err
	}
	if err := elicit.CheckBounds(q.Lower, q.Upper); err != nil {
		return err
	}
	switch q.Format {
	case FormatQuantiles:
		if n := len(q.Probs); n < elicit.MinPairs || n > elicit.MaxPairs {
			return inputErr("probs", elicit.RuleCount, "need %d to %d probabilities, got %d", elicit.MinPairs, elicit.MaxPairs, n)
		}
		if err := elicit.CheckProbs("probs", q.Probs); err != nil {
			return err
		}
		if err := checkProbGap(q.Probs); gap && err != nil {
			return err
		}
	case FormatInterval:
	case FormatChips:
		if err := elicit.CheckEdges("bin_edges", q.BinEdges); err != nil {
			return err
		}
		last := len(q.BinEdges) - 1
		if q.BinEdges[0] != q.Lower {
			return inputErr("bin_edges[0]", elicit.RuleEdgesSpanBounds, "first edge %v, lower %v", q.BinEdges[0], q.Lower)
		}
		if q.BinEdges[last] != q.Upper {
			return inputErr(fmt.Sprintf("bin_edges[%d]", last), elicit.RuleEdgesSpanBounds, "last edge %v, upper %v", q.BinEdges[last], q.Upper)
		}
		if q.Chips < elicit.MinChipBins || q.Chips > MaxChips {
			return inputErr("chips", elicit.RuleCountRange, "need %d to %d chips, got %d", elicit.MinChipBins, MaxChips, q.Chips)
		}
	default:
		return inputErr("format", elicit.RuleUnknown, "%q is not one of %q, %q, %q", q.Format, FormatQuantiles, FormatInterval, FormatChips)
	}
	if q.LogScale {
		// A question already on the log scale is held to it by the
		// field that would break it (a correction or an import names
		// that field, not the scale, which is set elsewhere); the true
		// value by CheckTrueValue.
		if !q.Calibration {
			return inputErr("calibration", RuleLogScaleCalibration, "")
		}
		if !(q.Lower >= 0) {
			return inputErr("lower", RuleLogScaleLower, "got %v", q.Lower)
		}
	}
	if t := q.TrueValue; t != nil {
		return q.CheckTrueValue(*t)
	}
	return nil
}

// MinProbGap is the least difference between two probabilities a
// question asks for: a tenth of a percentage point. Closer ones are one
// question asked twice (an expert cannot tell a 50% value from a 50.01%
// one), most often a slip of the keyboard; and at this gap every label
// (chart.FormatPercent's three figures) and every answer sheet's column
// tells them apart, where 0.5 and 0.5001 both read "50%" and both named
// the sheet's column q50. Common practice, no source.
const MinProbGap = 0.001

// RuleProbGap is MinProbGap's rule.
const RuleProbGap elicit.Rule = "must be at least 0.001 (a tenth of a percentage point) above the probability before it"

// checkProbGap checks that increasing probabilities are MinProbGap apart;
// a gap typed as exactly 0.001 (0.051 after 0.05, 0.000999… in binary) is
// taken.
func checkProbGap(ps []float64) error {
	for i := 1; i < len(ps); i++ {
		if ps[i]-ps[i-1] < MinProbGap*(1-1e-9) {
			return inputErr(fmt.Sprintf("probs[%d]", i), RuleProbGap, "%v after %v", ps[i], ps[i-1])
		}
	}
	return nil
}

// CheckTrueValue checks a calibration question's true value, the one
// rule for it whether it comes with the question, is set or revealed
// later, or is imported: finite and within [Lower, Upper], a bound
// included, as elicit.CalibrationInput takes a realisation. An observed
// share can be exactly 0 (no unit of a tested batch failed) or 1, while
// the experts' values stay strictly inside: the realisation then falls in
// the lowest or highest of each expert's bins, where Cooke's classical
// model counts it, and the background measure on [Lower, Upper] is
// unchanged. Errors name "true_value".
func (q Question) CheckTrueValue(t float64) error {
	if math.IsNaN(t) || math.IsInf(t, 0) {
		return inputErr("true_value", elicit.RuleFinite, "got %v", t)
	}
	if !(t >= q.Lower && t <= q.Upper) {
		return inputErr("true_value", elicit.RuleInRange, "%v outside [%v, %v]", t, q.Lower, q.Upper)
	}
	if q.LogScale && !(t > 0) {
		return inputErr("true_value", elicit.RuleLogScalePositive, "got %v", t)
	}
	return nil
}

// CheckLogScale checks that q may be scored on the log scale
// (LogScale): a calibration question whose lower bound is at least 0, so
// that every answer, strictly inside the bounds, is above 0, and whose
// true value, when entered, is above 0. Errors name "log_uniform_background".
func (q Question) CheckLogScale() error {
	if !q.Calibration {
		return inputErr("log_uniform_background", elicit.RuleUnknown, "question %d is not a calibration question", q.ID)
	}
	if !(q.Lower >= 0) {
		return inputErr("log_uniform_background", elicit.RuleLogScalePositive, "the lower bound is %v", q.Lower)
	}
	if q.TrueValue != nil && !(*q.TrueValue > 0) {
		return inputErr("log_uniform_background", elicit.RuleLogScalePositive, "the true value is %v", *q.TrueValue)
	}
	return nil
}

// checkText checks the question's text by the rules of its form.
func (q Question) checkText() error {
	return checkTexts([]textField{
		{"wording", q.Wording, input.MaxLongText, true},
		{"quantity", q.Quantity, input.MaxShortText, true},
		{"units", q.Units, input.MaxShortText, false},
	})
}

// Judgement turns an answer in a quantile format into the judgement it
// states: FormatQuantiles gives P(X ≤ Values[i]) = Probs[i]; FormatInterval
// goes through elicit.FourValue. FormatChips is not a quantile judgement and is
// refused with RuleQuantileFormat; use Fit.
func (q Question) Judgement(a Answer) (elicit.Judgement, error) {
	// A question made before MinProbGap is answered and fitted as it was
	// asked: the gap guards typing a question, not reading one.
	if err := q.ValidateKept(); err != nil {
		return elicit.Judgement{}, err
	}
	switch q.Format {
	case FormatQuantiles:
		if len(a.Values) != len(q.Probs) {
			return elicit.Judgement{}, inputErr("values", elicit.RuleLengthMatch, "%d %s, %d %s", len(q.Probs), plural(len(q.Probs), "probability", "probabilities"), len(a.Values), plural(len(a.Values), "value", "values"))
		}
		j := elicit.Judgement{
			Probs:  append([]float64(nil), q.Probs...),
			Values: append([]float64(nil), a.Values...),
			Lower:  q.Lower,
			Upper:  q.Upper,
		}
		return j, j.Validate()
	case FormatInterval:
		return elicit.FourValue(a.Lowest, a.Highest, a.Best, a.Confidence, q.Lower, q.Upper)
	}
	return elicit.Judgement{}, inputErr("format", RuleQuantileFormat, "%q", q.Format)
}

// Fit turns an expert's answer, in the question's format, into a fitted
// Beta on [Lower, Upper]: quantile and interval answers through Judgement
// and elicit.FitQuantiles, chips through elicit.FitChips (at most q.Chips chips may be
// placed). The first of q.Problems(a) is refused before anything else. Errors name the answer's field, e.g. "values[1]", "lowest",
// "confidence" or "counts[2]".
func (q Question) Fit(a Answer) (elicit.Fit, error) {
	if ps := q.Problems(a); len(ps) > 0 {
		return elicit.Fit{}, ps[0]
	}
	if q.Format == FormatChips {
		return elicit.FitChips(q.BinEdges, a.Counts)
	}
	j, err := q.Judgement(a)
	if err != nil {
		return elicit.Fit{}, err
	}
	return elicit.FitQuantiles(j)
}

// Parley's defaults for a chips question, when the facilitator gives no
// bins: DefaultBins equal bins across the bounds, and DefaultChips chips,
// about three a bin, enough to show a shape in steps of about 4% of the
// chance without asking for dozens of taps on a phone. Common practice
// for trial roulette uses a similar number of bins (Johnson et al. 2010);
// the numbers here are Parley's own choice, no source.
const (
	DefaultBins  = 8
	DefaultChips = 24
)

// DefaultBinEdges are DefaultBins equal bins from lower to upper, each
// inner edge rounded to four significant figures of the bins' width so
// the labels read cleanly (0.125, 12.5, 1000.125); lower and upper stay
// exact. Four significant figures of the edge itself put every inner
// edge of bounds 1000 and 1001 at 1000 or 1001 and of 123456 and 123457
// at 123500, beyond the upper bound, so the question's own default broke
// its rules for bins.
func DefaultBinEdges(lower, upper float64) []float64 {
	edges := make([]float64, DefaultBins+1)
	width := (upper - lower) / DefaultBins
	for i := range edges {
		x := lower + (upper-lower)*float64(i)/DefaultBins
		if i > 0 && i < DefaultBins && x != 0 {
			digits := 4 + int(math.Floor(math.Log10(math.Abs(x)))-math.Floor(math.Log10(width)))
			x, _ = strconv.ParseFloat(strconv.FormatFloat(x, 'g', min(max(digits, 4), 17), 64), 64)
		}
		edges[i] = x
	}
	edges[0], edges[DefaultBins] = lower, upper
	return edges
}

// FormatLabel says how q is asked, in the words of the facilitator's
// pages and of the answer sheet's messages: "quantiles at 5%, 50%, 95%",
// "four-value interval", "20 chips in 4 bins".
func FormatLabel(q Question) string {
	switch q.Format {
	case FormatQuantiles:
		return "quantiles at " + ProbsLabel(q.Probs)
	case FormatInterval:
		return "four-value interval"
	case FormatChips:
		return strconv.Itoa(q.Chips) + " chips in " + strconv.Itoa(max(len(q.BinEdges)-1, 0)) + " bins"
	}
	return string(q.Format)
}

// ProbsLabel writes probabilities as percentages to four figures:
// "5%, 50%, 95%".
func ProbsLabel(ps []float64) string {
	s := ""
	for i, p := range ps {
		if i > 0 {
			s += ", "
		}
		s += strconv.FormatFloat(100*p, 'g', 4, 64) + "%"
	}
	return s
}
