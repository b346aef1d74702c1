package input

import (
	"errors"
	"math/big"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// TestPercentIsTheTypedDecimalOver100: a percentage is divided by 100 as
// the decimal typed, not as its float64. The oracle is math/big's exact
// rational arithmetic (big.Rat.SetString, then Float64, the nearest
// float64), outside this package's code.
func TestPercentIsTheTypedDecimalOver100(t *testing.T) {
	cases := []string{"28.81", "5", "0.5", "99.99", "1e-3", "2.881E1", " 12.5 ", "-3.7", "0", "7.", ".07", "1e-320", "33.333333333333333333"}
	rng := rand.New(rand.NewPCG(11, 12))
	for range 2000 {
		// Up to four decimals, as experts type them.
		cases = append(cases, strconv.FormatFloat(float64(rng.IntN(1_000_000))/10_000, 'f', -1, 64))
	}
	for _, raw := range cases {
		got, err := Percent("values[0]", raw)
		if err != nil {
			t.Fatalf("%q: %v", raw, err)
		}
		r, ok := new(big.Rat).SetString(strings.TrimSpace(raw))
		if !ok {
			t.Fatalf("%q: big.Rat cannot read it", raw)
		}
		want, _ := r.Quo(r, big.NewRat(100, 1)).Float64()
		if got != want {
			t.Errorf("%q%%: %v, want %v", raw, got, want)
		}
	}
	if got, _ := Percent("x", "28.81"); got != 0.2881 {
		t.Errorf("28.81%% is %v, want 0.2881 as typed", got)
	}
	for _, raw := range []string{"1e-322", "4.9e-324", "1e-400"} {
		// 1e-322% is a proportion below the smallest float64: read as 0.
		var ie *elicit.InputError
		if v, err := Percent("values[0]", raw); !errors.As(err, &ie) || ie.Rule != RuleUnderflow || ie.Field != "values[0]" {
			t.Errorf("%q%%: %v, %v; want values[0] refused by RuleUnderflow", raw, v, err)
		}
	}
	for _, raw := range []string{"", "abc", "5%", "1e400", "NaN"} {
		if _, err := Percent("values[0]", raw); err == nil {
			t.Errorf("%q accepted", raw)
		} else if ie := (*elicit.InputError)(nil); !errors.As(err, &ie) || ie.Field != "values[0]" {
			t.Errorf("%q: %v does not name the field", raw, err)
		}
	}
}
