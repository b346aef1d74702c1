package web

import (
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestWeightsInForceEndsOnce: the report's line on the weights in force
// quotes the facilitator's reason and ends with one full stop, whether
// or not the reason ends its own sentence (it printed “Equal but
// explicit (invented).”. before).
func TestWeightsInForceEndsOnce(t *testing.T) {
	for _, c := range []struct{ reason, end string }{
		{"Equal but explicit (invented).", "“Equal but explicit (invented).”"},
		{"Is Ole overconfident?", "“Is Ole overconfident?”"},
		{"Ole is overconfident (invented)", "“Ole is overconfident (invented)”."},
	} {
		got := weightsInForce(workshop.Weights{Scheme: workshop.WeightsCustom, Reason: c.reason})
		if !strings.HasSuffix(got, c.end) {
			t.Errorf("reason %q: the report writes %q, want it to end %q", c.reason, got, c.end)
		}
	}
}
