package web

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// TestValueAtABoundIsToldItsEnds: a value typed exactly at a bound is
// refused, since the rule is strictly between; its message said "Must be
// between 0 and 30; you typed 0", which an expert reads as a
// contradiction. It now says the ends are left out, in the terms typed.
func TestValueAtABoundIsToldItsEnds(t *testing.T) {
	g := newExpertRig(t)
	cases := []struct {
		name string
		path string
		form url.Values
		id   string
		want string
	}{
		{"lower bound of days", g.qpath(0, g.qs), quantiles("10", "20", "30"), "f-values-0", "Must be above 10 and below 50, not at either end; you typed 10."},
		{"upper bound of days", g.qpath(0, g.qs), quantiles("20", "30", "50"), "f-values-2", "Must be above 10 and below 50, not at either end; you typed 50."},
		{"a proportion at 0", g.qpath(0, g.q), quantiles("0", "0.2", "0.4"), "f-values-0", "Must be above 0 and below 1 (above 0% and below 100%), not at either end; you typed 0."},
		{"a proportion at 100%", g.qpath(0, g.q), quantiles("0.05", "0.2", "100%"), "f-values-2", "Must be above 0 and below 1 (above 0% and below 100%), not at either end; you typed 100%."},
		{"percentages at 0", g.qpath(0, g.q), url.Values{"unit": {"percent"}, "values[0]": {"0"}, "values[1]": {"20"}, "values[2]": {"40"}}, "f-values-0", "Must be above 0% and below 100%, not at either end; you typed 0."},
		{"the interval's lowest at 0", g.qpath(0, g.qi), url.Values{"lowest": {"0"}, "highest": {"0.5"}, "best": {"0.2"}, "confidence": {"80"}}, "f-lowest", "not at either end; you typed 0."},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			resp, body := g.post(c.path+"/save", c.form)
			if resp.StatusCode != http.StatusUnprocessableEntity {
				t.Fatalf("status %d, want 422", resp.StatusCode)
			}
			msg := shownError(body, c.id)
			if !strings.Contains(msg, c.want) {
				t.Errorf("beside %s: %q, want %q", c.id, msg, c.want)
			}
			if strings.Contains(msg, "between") {
				t.Errorf("beside %s: %q still says between", c.id, msg)
			}
		})
	}
	if n := len(g.revisions()); n != 0 {
		t.Errorf("%d revisions saved from values at a bound", n)
	}
}

// TestOutOfRangeBesideAnUnreadableValue: every field's own problem shows
// at once. A value beyond the bounds under a value that could not be read
// ("0..1") was passed over, because its neighbour could not be compared
// with it, and refused only on the next save.
func TestOutOfRangeBesideAnUnreadableValue(t *testing.T) {
	g := newExpertRig(t)
	for _, c := range []struct {
		name string
		path string
		form url.Values
		id   string
		want string
	}{
		{"quantiles", g.qpath(0, g.q), quantiles("5%", "0..1", "2"), "f-values-2", "Must be between 0 and 1 (0% and 100%); you typed 2."},
		{"interval", g.qpath(0, g.qi), url.Values{"lowest": {"abc"}, "best": {"1.5"}, "highest": {"0.6"}, "confidence": {"80"}}, "f-best", "Must be between 0 and 1 (0% and 100%); you typed 1.5."},
	} {
		t.Run(c.name, func(t *testing.T) {
			resp, body := g.post(c.path+"/save", c.form)
			if resp.StatusCode != http.StatusUnprocessableEntity {
				t.Fatalf("status %d, want 422", resp.StatusCode)
			}
			if msg := shownError(body, c.id); !strings.Contains(msg, c.want) {
				t.Errorf("beside %s: %q, want %q", c.id, msg, c.want)
			}
		})
	}
	// The unreadable value is not also said to be smaller than the one
	// above it.
	_, body := g.post(g.qpath(0, g.q)+"/save", quantiles("0.05", "0..1", "0.5"))
	if msg := shownError(body, "f-values-1"); !strings.Contains(msg, "is not a number Parley can read") {
		t.Errorf("beside the unreadable value: %q", msg)
	}
	if msg := shownError(body, "f-values-2"); msg != "" {
		t.Errorf("beside the value under the unreadable one: %q, want nothing", msg)
	}
}

// TestChipsOverCountLeavesOutRefusedBins: chips past the question's
// number are counted over the bins that hold some. A bin typed as "-2",
// refused for its own sake, was counted too: beside "30" on a board of
// 20 chips the message said 28 were placed, "Take 8 away", which left
// the board still over.
func TestChipsOverCountLeavesOutRefusedBins(t *testing.T) {
	g := newExpertRig(t)
	resp, body := g.post(g.qpath(0, g.qc)+"/save", url.Values{"counts[0]": {"-2"}, "counts[1]": {"30"}, "counts[2]": {"3.5"}})
	if resp.StatusCode != http.StatusUnprocessableEntity {
		t.Fatalf("status %d, want 422", resp.StatusCode)
	}
	if msg := shownError(body, "f-counts-1"); msg != "You have placed 30 chips, and this question has 20. Take 10 away." {
		t.Errorf("beside the bin of 30: %q", msg)
	}
	for _, id := range []string{"f-counts-0", "f-counts-2"} {
		if msg := shownError(body, id); !strings.Contains(msg, "Type a whole number of chips") {
			t.Errorf("beside %s: %q", id, msg)
		}
	}
}

// TestFitRefusalSpeaksOfACurve: values no curve can match were refused as
// lying too close "for any distribution Parley can draw to match them",
// a statistician's word where every other line of the expert's page
// speaks of the curve.
func TestFitRefusalSpeaksOfACurve(t *testing.T) {
	g := newExpertRig(t)
	for _, action := range []string{"/preview", "/preview?fragment=1", "/save"} {
		resp, body := g.post(g.qpath(0, g.q)+action, quantiles("1e-9", "1.02e-9", "1.04e-9"))
		if resp.StatusCode != http.StatusUnprocessableEntity {
			t.Fatalf("%s: status %d, want 422", action, resp.StatusCode)
		}
		if !strings.Contains(body, "for any curve Parley can draw to match them") || strings.Contains(body, "distribution") {
			t.Errorf("%s: the refusal does not speak of a curve alone", action)
		}
	}
}
