package answersheet

import (
	"math"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// quantileColumn is the sheet column of probability p: "q" and p's
// decimals, at least two (0.05 → q05, 0.5 → q50, 0.975 → q975). A
// probability without a short decimal form (1/3) takes the two-digit
// rounding (q33), the way people write it.
func quantileColumn(p float64) string {
	for d := 2; d <= 6; d++ {
		s := strconv.FormatFloat(p, 'f', d, 64)
		if v, _ := strconv.ParseFloat(s, 64); math.Abs(v-p) < 1e-12 {
			digits := strings.TrimPrefix(s, "0.")
			for len(digits) > 2 && strings.HasSuffix(digits, "0") {
				digits = digits[:len(digits)-1]
			}
			return "q" + digits
		}
	}
	return "q" + strings.TrimPrefix(strconv.FormatFloat(p, 'f', 2, 64), "0.")
}

// Columns are the answer columns of q's format, in order.
func Columns(q workshop.Question) []string {
	switch q.Format {
	case workshop.FormatInterval:
		return []string{"lowest", "highest", "best", "confidence"}
	case workshop.FormatChips:
		cols := make([]string, max(0, len(q.BinEdges)-1))
		for i := range cols {
			cols[i] = "bin" + strconv.Itoa(i+1)
		}
		return cols
	}
	cols := make([]string, len(q.Probs))
	for i, p := range q.Probs {
		cols[i] = quantileColumn(p)
	}
	// Two probabilities without a short decimal form can round to one
	// two-digit name (1/3 and 0.33434…, both q33); those take as many
	// decimals as tell them apart, so a sheet never names one column twice.
	for d := 3; d <= 17; d++ {
		seen := map[string]int{}
		for _, c := range cols {
			seen[c]++
		}
		if len(seen) == len(cols) {
			break
		}
		for i, p := range q.Probs {
			if seen[cols[i]] > 1 {
				digits := strings.TrimRight(strings.TrimPrefix(strconv.FormatFloat(p, 'f', d, 64), "0."), "0")
				cols[i] = "q" + digits
			}
		}
	}
	return cols
}
