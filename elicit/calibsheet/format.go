package calibsheet

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// A calibration sheet is a CSV (RFC 4180), one row per expert and
// calibration question. Its columns, in this order:
//
//	expert, question   names, by the short-text rule
//	realization        the question's true value ("realisation" is read too)
//	lower, upper       optional, both or neither: the question's bounds, to
//	                   which its intrinsic range is cut, as on the
//	                   calibration page (0 and 1 for a proportion)
//	background         optional, right before the quantile columns:
//	                   log-uniform scores the question's information against
//	                   the log-uniform background (elicit.ModelOptions.
//	                   LogScale); uniform or empty against the uniform
//	qNN ...            one column per probability 0.NN, increasing: usually
//	                   q05, q50, q95; q975 is 0.975
//
// Lines starting with # are comments.

// The columns of a calibration sheet, as Read reads them and
// record.WriteCalibrationCSV (the calibration page's download) writes
// them.
const (
	ColumnExpert      = "expert"
	ColumnQuestion    = "question"
	ColumnRealisation = "realization" // "realisation" is read too
	// ColumnLower and ColumnUpper may follow the leading columns, both
	// or neither: a question's lower and upper bound, as the workshop's
	// questions have (0 and 1 for a proportion). The intrinsic range is
	// cut to them, as on the calibration page, so the same answers score
	// the same here and there.
	ColumnLower = "lower"
	ColumnUpper = "upper"
	// ColumnBackground may stand right before the quantile columns:
	// BackgroundLogUniform scores a question's information against the
	// log-uniform background (elicit.ModelOptions.LogScale), for
	// quantities spread over orders of magnitude; BackgroundUniform or
	// empty against the uniform, as the page does by default. Named for
	// the classical model's background measure.
	ColumnBackground = "background"
)

// The words of the background column.
const (
	BackgroundUniform    = "uniform"
	BackgroundLogUniform = "log-uniform"
)

// leadingColumns are the columns every sheet starts with.
var leadingColumns = []string{ColumnExpert, ColumnQuestion, ColumnRealisation}

// quantileColumn is a qNN header: the probability 0.NN, e.g. q05 → 0.05,
// q975 → 0.975.
var quantileColumn = regexp.MustCompile(`^q([0-9]{2,})$`)

// QuantileColumn names probability p's column: q and p's decimals, at
// least two (q05 for 0.05, q50 for 0.5, q975 for 0.975), every decimal of
// the shortest decimal that reads back as p, so that Read reads the
// column as p itself (1/3 is q3333333333333333). p must lie strictly
// between 0 and 1.
func QuantileColumn(p float64) (string, error) {
	s := strconv.FormatFloat(p, 'f', -1, 64)
	digits, ok := strings.CutPrefix(s, "0.")
	if !ok || digits == "" {
		return "", fmt.Errorf("calibsheet: probability %v has no quantile column", p)
	}
	if len(digits) == 1 {
		digits += "0" // 0.5 is q50
	}
	return "q" + digits, nil
}

// Rules of calibration sheets.
const (
	// RuleHeader is the rule of the header row.
	RuleHeader elicit.Rule = "header must be expert,question,realization,q05,q50,q95 (lower,upper allowed after realization, then background; other qNN columns allowed, increasing)"
	// RuleCSV is CSV's own rule (RFC 4180), broken at a row.
	RuleCSV elicit.Rule = "must be well-formed CSV"
	// RuleUTF8 is the answer sheet's rule of its encoding, said of the file.
	RuleUTF8 elicit.Rule = "must be saved as UTF-8 (in a spreadsheet program: CSV UTF-8)"
	// RuleSameRealisation is broken when rows of one question give
	// different realisations.
	RuleSameRealisation elicit.Rule = "must be the same on every row of the question"
	// RuleSameBounds is broken when rows of one question give different
	// bounds.
	RuleSameBounds elicit.Rule = "must be the same on every row of the question (both empty for a question without bounds)"
	// RuleBoundsPair is broken when a row gives one bound and not the
	// other.
	RuleBoundsPair elicit.Rule = "must both be given, or both be empty for a question without bounds"
	// RuleSameBackground is broken when rows of one question give
	// different backgrounds.
	RuleSameBackground elicit.Rule = "must be the same on every row of the question (empty is uniform)"
	// RuleBackgroundWord is broken by a background cell other than
	// uniform, log-uniform or empty.
	RuleBackgroundWord elicit.Rule = "must be uniform or log-uniform (empty is uniform)"
)

// readHeader checks the header and returns the column names and the
// probabilities of the quantile columns.
func readHeader(header []string) ([]string, []float64, error) {
	cols := make([]string, len(header))
	for i, h := range header {
		cols[i] = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
	}
	for i, want := range leadingColumns {
		if i >= len(cols) || (cols[i] != want && !(want == ColumnRealisation && cols[i] == "realisation")) {
			return nil, nil, &elicit.InputError{Field: fmt.Sprintf("header column %d", i+1), Rule: RuleHeader,
				Detail: fmt.Sprintf("want %q", want)}
		}
	}
	rest := cols[len(leadingColumns):]
	switch {
	case len(rest) >= 2 && rest[0] == ColumnLower && rest[1] == ColumnUpper:
		rest = rest[2:]
	case len(rest) >= 1 && (rest[0] == ColumnLower || rest[0] == ColumnUpper):
		return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(rest[0]), Rule: RuleHeader,
			Detail: "the bound columns are lower,upper, both, in that order, right after realization"}
	}
	if len(rest) >= 1 && rest[0] == ColumnBackground {
		rest = rest[1:]
	}
	var probs []float64
	for _, c := range rest {
		m := quantileColumn.FindStringSubmatch(c)
		if m == nil {
			return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(input.Clip(c, 40)), Rule: RuleHeader,
				Detail: "quantile columns are named qNN, e.g. q05, q50, q95"}
		}
		if len(m[1]) > 2 && strings.HasSuffix(m[1], "0") {
			// q100 or q250 would read as 0.1 or 0.25: refuse the ambiguity.
			return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(input.Clip(c, 40)), Rule: RuleHeader,
				Detail: "the digits after q are the probability's decimals; drop the trailing 0"}
		}
		p, _ := strconv.ParseFloat("0."+m[1], 64)
		if len(probs) > 0 && !(p > probs[len(probs)-1]) {
			return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(input.Clip(c, 40)), Rule: elicit.RuleProbIncreasing,
				Detail: fmt.Sprintf("%v after %v", p, probs[len(probs)-1])}
		}
		if p == 0 {
			return nil, nil, &elicit.InputError{Field: "header column " + strconv.Quote(input.Clip(c, 40)), Rule: elicit.RuleProbOpen, Detail: "got 0"}
		}
		probs = append(probs, p)
	}
	// The classical model scores any increasing probabilities, as the
	// calibration page does for questions asked at 10/50/90; q05, q50 and
	// q95 are the usual ones, not a rule.
	if len(probs) == 0 {
		return nil, nil, &elicit.InputError{Field: "header", Rule: elicit.RuleRequired,
			Detail: "no quantile column; name them qNN, e.g. q05, q50, q95"}
	}
	return cols, probs, nil
}
