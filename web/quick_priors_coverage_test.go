package web

import (
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// "90% sure" is how a room says a coverage: the field takes 90% as 0.9,
// as the four-value answer takes its confidence with a % sign. It was
// refused as "must be a plain decimal number". A plain 90 is still
// refused (it could be a slip for 0.90 or for 90%), and so is 150%.
func TestQuickPriorsCoverageTakesAPercentSign(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	base := url.Values{"question": {strconv.FormatInt(qs[0].ID, 10)}, "construction": {"interval"}, "c_low": {"0.03"}, "c_high": {"0.12"}}
	get := func(coverage string) (*http.Response, string) {
		v := url.Values{}
		for k, x := range base {
			v[k] = x
		}
		v.Set("c_coverage", coverage)
		return h.get(quickPriorsPath(ws.ID) + "?" + v.Encode())
	}
	_, want := get("0.9")
	c, err := elicit.Construct(elicit.ConstructionInput{Method: elicit.MethodIntervalQuantiles, Low: 0.03, High: 0.12, Coverage: 0.9, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	for _, typed := range []string{"90%", " 90 % ", "90.0%"} {
		res, body := get(typed)
		if res.StatusCode != http.StatusOK || hasFieldError(body, "c_coverage") {
			t.Fatalf("coverage %q: %d, refused beside the field %v", typed, res.StatusCode, hasFieldError(body, "c_coverage"))
		}
		if !strings.Contains(body, priorLabel(c.Dist)) || !strings.Contains(want, priorLabel(c.Dist)) {
			t.Errorf("coverage %q: the page lacks %s, the Beta of 0.9", typed, priorLabel(c.Dist))
		}
	}
	for _, typed := range []string{"90", "150%", "100%", "0%", "abc%"} {
		if res, body := get(typed); res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "c_coverage") {
			t.Errorf("coverage %q: %d, refused beside the field %v", typed, res.StatusCode, hasFieldError(body, "c_coverage"))
		}
	}
}

// The interval's ends and the mean and sd of a proportion take a % sign
// too, as the coverage beside them does and as the experts' answers and
// the true value do: "3%" was refused as not a plain decimal number
// beside a coverage of "90%" taken.
func TestQuickPriorsValuesOfAProportionTakeAPercentSign(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	if !qs[0].IsProportion() {
		t.Fatalf("question %+v is no proportion", qs[0])
	}
	get := func(v url.Values) (*http.Response, string) {
		v.Set("question", strconv.FormatInt(qs[0].ID, 10))
		return h.get(quickPriorsPath(ws.ID) + "?" + v.Encode())
	}
	for _, c := range []struct {
		form url.Values
		in   elicit.ConstructionInput
	}{
		{url.Values{"construction": {"interval"}, "c_low": {"3%"}, "c_high": {"12%"}, "c_coverage": {"90%"}},
			elicit.ConstructionInput{Method: elicit.MethodIntervalQuantiles, Low: 0.03, High: 0.12, Coverage: 0.9, Upper: 1}},
		{url.Values{"construction": {"mean_sd"}, "c_mean": {"6%"}, "c_sd": {"2%"}},
			elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 0.06, SD: 0.02, Upper: 1}},
	} {
		want, err := elicit.Construct(c.in)
		if err != nil {
			t.Fatal(err)
		}
		res, body := get(c.form)
		if res.StatusCode != http.StatusOK {
			t.Errorf("%v: %d", c.form, res.StatusCode)
			continue
		}
		if !strings.Contains(body, priorLabel(want.Dist)) {
			t.Errorf("%v: the page lacks %s", c.form, priorLabel(want.Dist))
		}
	}
}

// The hints of the fields that take a % sign on a proportion say so, as
// the coverage's does: without it a facilitator who thinks in
// percentages types 3 for 3%, which is refused (or, for an SD, read as
// 3), and learns the % sign only from the message.
func TestQuickPriorsHintsSayAPercentSignIsTaken(t *testing.T) {
	h, ws, _, _, _ := seeded(t)
	_, body := h.get(quickPriorsPath(ws.ID))
	for _, name := range []string{"c_mean", "c_sd", "c_low", "c_high", "c_coverage"} {
		at := strings.Index(body, `id="`+inputID(name)+`"`)
		if at < 0 {
			t.Fatalf("no field %s", name)
		}
		field := body[at:]
		field = field[:strings.Index(field, "</div>")]
		_, hint, ok := strings.Cut(field, `<span class="hint">`)
		if hint, _, _ = strings.Cut(hint, "</span>"); !ok || !strings.Contains(hint, "%") {
			t.Errorf("%s: its hint does not say a %% sign is taken: %q", name, field)
		}
	}
}

// A coverage too small to leave the interval's ends apart from its
// middle is refused beside the coverage, by its rule. The moment match
// had shown "sd +Inf: got +Inf" beside the interval's high end.
func TestQuickPriorsRefuseACoverageOfNoChance(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	for _, typed := range []string{"1e-300", "4.9e-324", "1e-13", "1e-11%"} {
		v := url.Values{"question": {strconv.FormatInt(qs[0].ID, 10)}, "construction": {"interval"},
			"c_low": {"0.03"}, "c_high": {"0.12"}, "c_coverage": {typed}}
		res, body := h.get(quickPriorsPath(ws.ID) + "?" + v.Encode())
		if res.StatusCode != http.StatusUnprocessableEntity || !hasFieldError(body, "c_coverage") || strings.Contains(body, `id="err-c_high"`) {
			t.Errorf("coverage %q: %d, beside the coverage %v, beside the high end %v", typed, res.StatusCode, hasFieldError(body, "c_coverage"), strings.Contains(body, `id="err-c_high"`))
		}
		if !strings.Contains(body, string(elicit.RuleCentralNarrow)) || strings.Contains(body, "Inf") {
			t.Errorf("coverage %q: the page does not give the rule, or shows an infinity", typed)
		}
	}
}
