package input_test

import (
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// number reads "4,000" or "1,048,576" as written in the docs.
func number(t *testing.T, s string) int {
	t.Helper()
	n, err := strconv.Atoi(strings.ReplaceAll(s, ",", ""))
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// The limits README.md and DEVELOPERS.md state are the code's.
func TestDocumentedLimitsAreTheCodes(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Join(strings.Fields(string(readme)), " ")
	for _, c := range []struct {
		re   string
		want int
	}{
		{`and affiliation take up to ([\d,]+) characters`, input.MaxShortText},
		{`every reason and rationale take up to ([\d,]+) characters`, input.MaxLongText},
		{`A workshop runs up to ([\d,]+) Delphi rounds`, workshop.MaxRounds},
		{`arrays and objects nested more than ([\d,]+) deep`, input.MaxJSONDepth},
		{`with more than ([\d,]+) values`, input.MaxJSONValues},
		{`take more than ([\d,]+) MiB of memory once read`, input.MaxJSONDecoded >> 20},
	} {
		m := regexp.MustCompile(c.re).FindStringSubmatch(text)
		if m == nil {
			t.Errorf("README.md no longer says %q", c.re)
			continue
		}
		if got := number(t, m[1]); got != c.want {
			t.Errorf("README.md says %d where the code has %d (%s)", got, c.want, c.re)
		}
	}

	dev, err := os.ReadFile("../../DEVELOPERS.md")
	if err != nil {
		t.Fatal(err)
	}
	consts := map[string]int{
		"input.MaxShortText": input.MaxShortText, "input.MaxLongText": input.MaxLongText,
		"input.MaxDetail": input.MaxDetail, "workshop.MaxRounds": workshop.MaxRounds,
		"workshop.MaxChips": workshop.MaxChips, "input.MaxListItems": input.MaxListItems,
		"input.MaxJSONDepth": input.MaxJSONDepth, "input.MaxJSONValues": input.MaxJSONValues,
		"input.MaxJSONDecoded": input.MaxJSONDecoded >> 20, "input.MaxNumberLen": input.MaxNumberLen,
	}
	seen := map[string]bool{}
	for _, m := range regexp.MustCompile("([\\d,]+)(?: \\w+)? \\(`((?:input|workshop)\\.Max\\w+)`").FindAllStringSubmatch(string(dev), -1) {
		if m[2] == "input.MaxID" { // "2⁵³ − 1 (`input.MaxID`", checked below
			continue
		}
		want, ok := consts[m[2]]
		if !ok {
			t.Errorf("DEVELOPERS.md names %s, which this test does not know", m[2])
			continue
		}
		seen[m[2]] = true
		if got := number(t, m[1]); got != want {
			t.Errorf("DEVELOPERS.md says %d for %s; the code has %d", got, m[2], want)
		}
	}
	for _, name := range []string{"input.MaxShortText", "input.MaxLongText", "input.MaxDetail", "workshop.MaxRounds", "workshop.MaxChips"} {
		if !seen[name] {
			t.Errorf("DEVELOPERS.md's input-rule table does not state %s with its value", name)
		}
	}
	if input.MaxID != 1<<53-1 || !strings.Contains(string(dev), "2⁵³ − 1 (`input.MaxID`") {
		t.Errorf("DEVELOPERS.md does not say ids run to 2⁵³ − 1 (input.MaxID = %d)", int64(input.MaxID))
	}
	if !strings.Contains(string(dev), "≤ "+strconv.Itoa(input.MaxListItems)+" items") {
		t.Errorf("DEVELOPERS.md does not say lists hold at most %d items", input.MaxListItems)
	}
	if !strings.Contains(string(dev), "≤ "+strconv.Itoa(input.MaxNumberLen)+" characters") {
		t.Errorf("DEVELOPERS.md does not say a number is at most %d characters", input.MaxNumberLen)
	}
}
