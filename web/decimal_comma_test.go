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
	amb := url.Values{"unit": {"proportion"}, "values[0]": {"0,02"}, "values[1]": {"0,05"}, "values[2]": {"1,500"}}
	r, body := h.post(qp+"/save", amb)
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "“1,500” could be 1.500 or 1500: please type 1.500 with a point, or 1500 without the comma.") {
		t.Errorf("1,500: %d; want it refused naming both readings; %.3000s", r.StatusCode, body)
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
		text, amb := decimalComma(c.typed)
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
		{"5,5", "Did you mean 5,5%? Type 5,5% or choose percentages above."},
	} {
		form := url.Values{"unit": {"proportion"}, "values[0]": {"0,02"}, "values[1]": {"0,05"}, "values[2]": {c.last}}
		r, body := h.post(qp+"/save", form)
		if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, c.want) {
			t.Errorf("%s: %d; want %q in %.3000s", c.last, r.StatusCode, c.want, body)
		}
	}
}
