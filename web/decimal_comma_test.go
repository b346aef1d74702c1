package web

import (
	"context"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// An expert whose phone's number keyboard writes a decimal comma (an
// iPhone's decimal pad in a language that writes 0,05 has no point) types
// "0,02", "0,05", "0,12": each was refused as "not a number Parley can
// read", and she could type no decimal at all. One comma between digits
// is read as the decimal point, the read-backs show what was read, and
// the save keeps 0.02, 0.05 and 0.12. "1,500", which is also one thousand
// five hundred, is refused naming both readings; nothing is saved.
func TestDecimalCommaFromAPhoneKeyboard(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	priya := links[2]
	qp := priya.Path + "q/" + strconv.FormatInt(qs[0].ID, 10)
	form := url.Values{"unit": {"proportion"}, "values[0]": {"0,02"}, "values[1]": {" 0,05 "}, "values[2]": {"0,12"}}
	if r, body := h.post(qp+"/preview?fragment=1", form); r.StatusCode != http.StatusOK || !strings.Contains(body, "0.02") || !strings.Contains(body, "0.12") {
		t.Errorf("the fit of 0,02, 0,05 and 0,12: %d %.600s", r.StatusCode, body)
	}
	pct := url.Values{"unit": {"percent"}, "values[0]": {"2"}, "values[1]": {"5,5"}, "values[2]": {"12,5%"}}
	if r, body := h.post(qp+"/preview?fragment=1", pct); r.StatusCode != http.StatusOK || !strings.Contains(body, "12.5%") {
		t.Errorf("the fit of 2, 5,5 and 12,5%% in percent: %d %.600s", r.StatusCode, body)
	}
	// On a proportion the thousands reading cannot be meant: "1,250"
	// typed as a percentage is 1.25%, not 1250%, and "1,500" typed as a
	// proportion is 1.5, refused by the bounds, not as ambiguous with an
	// advice to type 1500.
	rare := url.Values{"unit": {"percent"}, "values[0]": {"0,5"}, "values[1]": {"1,250"}, "values[2]": {"4"}}
	if r, body := h.post(qp+"/preview?fragment=1", rare); r.StatusCode != http.StatusOK || !strings.Contains(body, "1.25%") || strings.Contains(body, "could be") {
		t.Errorf("1,250 typed as a percentage: %d %.600s", r.StatusCode, body)
	}
	amb := url.Values{"unit": {"proportion"}, "values[0]": {"0,02"}, "values[1]": {"0,05"}, "values[2]": {"1,500"}}
	r, body := h.post(qp+"/save", amb)
	if r.StatusCode != http.StatusUnprocessableEntity || strings.Contains(body, "could be 1.500 or 1500") || !strings.Contains(body, "Must be between 0 and 1 (0% and 100%); you typed 1,500.") {
		t.Errorf("1,500 on a proportion: %d; want it read as 1.5 and refused by the bounds; %.3000s", r.StatusCode, body)
	}
	if r, body := h.post(qp+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save 0,02, 0,05 and 0,12: %d %.600s", r.StatusCode, body)
	}
	revs, err := h.db.Revisions(context.Background(), ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	var got [][]float64
	for _, rv := range revs {
		if rv.ExpertID == es[2].ID && rv.QuestionID == qs[0].ID {
			got = append(got, rv.Answer.Values)
		}
	}
	if len(got) != 1 || len(got[0]) != 3 || got[0][0] != 0.02 || got[0][1] != 0.05 || got[0][2] != 0.12 {
		t.Errorf("saved %v; want one revision of [0.02 0.05 0.12]", got)
	}
}

func TestDecimalComma(t *testing.T) {
	for _, c := range []struct{ typed, text, ambiguous string }{
		{"0,05", "0.05", ""},
		{" 12,5% ", "12.5%", ""},
		{"-0,5", "-0.5", ""},
		{",5", ".5", ""},
		{"0,125", "0.125", ""},
		{"1,25", "1.25", ""},
		{"1,500", "1,500", "“1,500” could be 1.500 or 1500: please type 1.500 with a point, or 1500 without the comma."},
		{"12,500%", "12,500%", "“12,500%” could be 12.500% or 12500%: please type 12.500% with a point, or 12500% without the comma."},
		{"1234,500", "1234.500", ""},
		{"0.05", "0.05", ""},
		{"1,2,3", "1,2,3", ""},
		{"1.000,5", "1.000,5", ""},
		{"", "", ""},
	} {
		text, amb := decimalComma(c.typed, nil)
		if text != c.text || amb != c.ambiguous {
			t.Errorf("decimalComma(%q) = %q, %q; want %q, %q", c.typed, text, amb, c.text, c.ambiguous)
		}
	}
	// Where the field cannot hold the thousands, the comma is the decimal.
	upTo := func(upper float64) func(float64, bool) bool {
		return func(x float64, pct bool) bool {
			if pct {
				x /= 100
			}
			return x >= 0 && x <= upper
		}
	}
	for _, c := range []struct {
		typed           string
		upper           float64
		text, ambiguous string
	}{
		{"1,500", 1, "1.500", ""},
		{"12,500%", 1, "12.500%", ""},
		{"1,500", 10000, "1,500", "“1,500” could be 1.500 or 1500: please type 1.500 with a point, or 1500 without the comma."},
		{"1,500", 1500, "1,500", "“1,500” could be 1.500 or 1500: please type 1.500 with a point, or 1500 without the comma."},
		{"1,500", 1499, "1.500", ""},
	} {
		text, amb := decimalComma(c.typed, upTo(c.upper))
		if text != c.text || amb != c.ambiguous {
			t.Errorf("decimalComma(%q) = %q, %q; want %q, %q", c.typed, text, amb, c.text, c.ambiguous)
		}
	}
}

// A value typed with a decimal comma is refused in the words the same
// value with a point gets: "1,0" on a proportion is at its upper end, not
// "between 0 and 1; you typed 1,0", which contradicts itself to anyone
// who reads "between" as taking in its ends; and "5,5", likely a
// percentage, is asked about as "5.5" is ("Did you mean 5,5%?").
func TestDecimalCommaRefusedInTheWordsOfThePoint(t *testing.T) {
	h, _, qs, _, links := seeded(t)
	qp := links[2].Path + "q/" + strconv.FormatInt(qs[0].ID, 10)
	for _, c := range []struct{ last, want string }{
		{"1,0", "not at either end; you typed 1,0."},
		// Three decimals: on a proportion no thousands reading, so the
		// answer reads 1.000, and so do its words.
		{"1,000", "not at either end; you typed 1,000."},
		{"5,5", "Did you mean 5,5%? Type 5,5% or choose percentages above."},
	} {
		form := url.Values{"unit": {"proportion"}, "values[0]": {"0,02"}, "values[1]": {"0,05"}, "values[2]": {c.last}}
		r, body := h.post(qp+"/save", form)
		if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, c.want) {
			t.Errorf("%s: %d; want %q in %.3000s", c.last, r.StatusCode, c.want, body)
		}
	}
}
