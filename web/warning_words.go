package web

import (
	"regexp"
	"strings"

	"github.com/parley-elicit/parley/elicit"
)

// Fit and construction warnings are elicit's, written for the command line
// in plain ASCII ("alpha+beta"). The facilitator's pages write the shapes
// as α and β, as everywhere else on them, and on a question that is not a
// proportion on [0, 1] they give α + β as it is, not as observed trials,
// which describe a proportion only.
var (
	alphaValue   = regexp.MustCompile(`\balpha ([0-9])`)
	betaValue    = regexp.MustCompile(`\bbeta ([0-9])`)
	trialsWorth  = regexp.MustCompile(`is worth about (\S+) observed trials \(alpha\+beta above (\S+)\)`)
	greekShapes  = strings.NewReplacer("alpha+beta", "α + β", "alpha + beta", "α + β")
	shapeWarning = map[string]bool{string(elicit.WarnUShaped): true, string(elicit.WarnJShaped): true}
)

// warningWords is warning message msg, of code, as a facilitator's page
// shows it; proportion says the question's bounds are [0, 1].
func warningWords(code, msg string, proportion bool) string {
	if shapeWarning[code] {
		msg = alphaValue.ReplaceAllString(msg, "α = $1")
		msg = betaValue.ReplaceAllString(msg, "β = $1")
	}
	if code == string(elicit.WarnNearCertainty) && !proportion {
		msg = trialsWorth.ReplaceAllString(msg, "has α + β of about $1 (above $2)")
	}
	return greekShapes.Replace(msg)
}

// fitWarningWords is warningWords for one of elicit's warnings.
func fitWarningWords(w elicit.Warning, proportion bool) string {
	return warningWords(string(w.Code), w.Message, proportion)
}
