package elicit

import (
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// tailWords reads the numbers out of a WarnTailMisfit message: the
// fitted chance, the side, the outer value, the stated chance and the
// ratio with its direction.
var tailWords = regexp.MustCompile(`^The fitted Beta puts ([0-9.e+-]+)% of the chance (above|below) ([0-9.e+-]+), where the expert put ([0-9.e+-]+)%: (?:about|over) ([0-9.]+) times (less|more)\.`)

// TestTailMissIsTheMessagesNumbers: a fit's structured tail miss holds
// the very numbers its tail_misfit message states, and they are the
// fitted Beta's own tail chance beyond the stated outer value (gonum's
// distuv.Beta CDF as the reference), on either side. The judgements are
// invented.
func TestTailMissIsTheMessagesNumbers(t *testing.T) {
	cases := []struct {
		name  string
		j     Judgement
		value float64
		above bool
		more  bool
	}{
		// The 95% value four times the median: the fit leaves far less
		// than 5% above it.
		// A right-skewed judgement whose 95% value the fit falls short of,
		// a little and by more.
		{"upper tail 5 times short", Judgement{[]float64{0.05, 0.5, 0.95}, []float64{0.06, 0.15, 0.38}, 0, 1}, 0.38, true, false},
		{"upper tail 24 times short", Judgement{[]float64{0.05, 0.5, 0.95}, []float64{0.06, 0.15, 0.42}, 0, 1}, 0.42, true, false},
		{"upper tail short", Judgement{[]float64{0.05, 0.5, 0.95}, []float64{0.02, 0.05, 0.2}, 0, 1}, 0.2, true, false},
		// The mirror image: the 5% value far below the median.
		{"lower tail short", Judgement{[]float64{0.05, 0.5, 0.95}, []float64{0.8, 0.95, 0.98}, 0, 1}, 0.8, false, false},
		// On a scale of days, the same judgement as the first.
		{"days", Judgement{[]float64{0.05, 0.5, 0.95}, []float64{0.6, 1.5, 6}, 0, 30}, 6, true, false},
	}
	for _, c := range cases {
		f, err := FitQuantiles(c.j)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		m, ok := f.TailMiss()
		if !ok {
			t.Fatalf("%s: no tail miss; warnings %+v", c.name, f.Warnings)
		}
		var msg string
		for _, w := range f.Warnings {
			if w.Code == WarnTailMisfit {
				msg = w.Message
			}
		}
		g := tailWords.FindStringSubmatch(msg)
		if g == nil {
			t.Fatalf("%s: message %q does not read as a tail miss", c.name, msg)
		}
		num := func(s string) float64 {
			x, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatalf("%s: %q in %q: %v", c.name, s, msg, err)
			}
			return x
		}
		// The message rounds to three or four significant figures.
		near := func(what string, got, said, rel float64) {
			if math.Abs(got-said) > rel*math.Abs(said) {
				t.Errorf("%s: %s is %g, the message says %g", c.name, what, got, said)
			}
		}
		near("fitted chance", 100*m.Fitted, num(g[1]), 5e-3)
		near("outer value", m.Value, num(g[3]), 5e-4)
		near("stated chance", 100*m.Stated, num(g[4]), 5e-3)
		// The ratio to one decimal below 10, else whole.
		if said := num(g[5]); m.Ratio < 1000 && math.Abs(m.Ratio-said) > 0.5 {
			t.Errorf("%s: ratio %g, the message says %g", c.name, m.Ratio, said)
		}
		if m.Side() != g[2] || m.Above != c.above || m.Value != c.value || (g[6] == "more") != c.more {
			t.Errorf("%s: side %q above %v value %g, message %q", c.name, m.Side(), m.Above, m.Value, msg)
		}
		// The fitted chance is the Beta's own tail beyond the outer value
		// (reference: gonum distuv.Beta.CDF), and the stated one 5%.
		b := distuv.Beta{Alpha: f.Dist.Alpha, Beta: f.Dist.Beta.Beta}
		u := (m.Value - c.j.Lower) / (c.j.Upper - c.j.Lower)
		want := b.CDF(u)
		if m.Above {
			want = 1 - want
		}
		if math.Abs(m.Fitted-want) > 1e-9 || math.Abs(m.Stated-0.05) > 1e-12 {
			t.Errorf("%s: fitted %g stated %g, Beta's tail %g", c.name, m.Fitted, m.Stated, want)
		}
		if r := math.Max(m.Fitted/m.Stated, m.Stated/m.Fitted); math.Abs(m.Ratio-r) > 1e-9*r {
			t.Errorf("%s: ratio %g, want %g", c.name, m.Ratio, r)
		}
	}
	// A fit without the warning has no tail miss: an ordinary judgement,
	// and chips, whose fit carries no tail rule.
	if f, err := FitQuantiles(Judgement{[]float64{0.05, 0.5, 0.95}, []float64{0.06, 0.15, 0.35}, 0, 1}); err != nil {
		t.Fatal(err)
	} else if m, ok := f.TailMiss(); ok {
		t.Errorf("an ordinary judgement has tail miss %+v", m)
	}
	chips, err := FitChips([]float64{0, 0.1, 0.2, 0.3, 0.5, 1}, []int{1, 0, 0, 18, 1})
	if err != nil {
		t.Fatal(err)
	}
	if m, ok := chips.TailMiss(); ok {
		t.Errorf("a chips fit has tail miss %+v", m)
	}
}

// TestTailMissWords: the ratio's words, one decimal below 10, whole
// numbers to 1000, and "over 1000" beyond; the direction is the fitted
// chance against the stated one. Chances under one in a million are
// "almost none".
func TestTailMissWords(t *testing.T) {
	cases := []struct {
		m    TailMiss
		want string
	}{
		{TailMiss{Stated: 0.05, Fitted: 0.05 / 4.24, Ratio: 4.24}, "4.2 times less"},
		{TailMiss{Stated: 0.05, Fitted: 0.05 * 22.4, Ratio: 22.4}, "22 times more"},
		{TailMiss{Stated: 0.05, Fitted: 0, Ratio: math.Inf(1)}, "over 1000 times less"},
	}
	for _, c := range cases {
		if got := c.m.RatioText(); got != c.want {
			t.Errorf("%+v: %q, want %q", c.m, got, c.want)
		}
	}
	if ChanceText(4e-7) != "almost none (under 0.0001%)" || ChanceText(0.00227) != "0.227%" || ChanceText(0.05) != "5%" {
		t.Errorf("chances: %q %q %q", ChanceText(4e-7), ChanceText(0.00227), ChanceText(0.05))
	}
}

// TestTailMissTinyChancesAreFigures: a stated probability may be as small
// as 1e-12, so both chances of a tail miss can be under one in a million;
// the warning then gives both as figures, where it read "puts almost none
// (under 0.0001%) … where the expert put almost none (under 0.0001%):
// about 100 times more" (found in review). One tiny chance beside a
// larger one keeps "almost none".
func TestTailMissTinyChancesAreFigures(t *testing.T) {
	m := TailMiss{Value: 2.182e-05, Stated: 1e-9, Fitted: 1.02e-7, Ratio: 102}
	if got := m.Message("2.182e-05"); !strings.Contains(got, "puts 1.0e-7 of the chance below 2.182e-05, where the expert put 1.0e-9: about 102 times more") {
		t.Errorf("both tiny: %q", got)
	}
	m = TailMiss{Value: 0.3, Above: true, Stated: 0.05, Fitted: 4e-7, Ratio: 125000}
	if got := m.Message("0.3"); !strings.Contains(got, "puts almost none (under 0.0001%) of the chance above 0.3, where the expert put 5%") {
		t.Errorf("one tiny: %q", got)
	}
}
