package elicit

import (
	"fmt"
	"math"
	"slices"
)

// MedianSpread summarises where a panel's medians lie: the lowest, the
// quartiles and the median of the medians, and the highest. Each value is
// one expert's own median.
type MedianSpread struct {
	Lowest, LowerQuartile, Median, UpperQuartile, Highest float64
}

// SpreadOfMedians summarises medians (in any order) with quartiles by the
// nearest-rank rule, the ⌈p·n⌉-th smallest (Hyndman and Fan 1996, "Sample
// quantiles in statistical packages", Amer. Statist. 50: 361–365,
// definition 1; R's quantile(type = 1)), so that every value reported is
// an actual expert's median and none is interpolated between two experts.
func SpreadOfMedians(medians []float64) (MedianSpread, error) {
	if len(medians) == 0 {
		return MedianSpread{}, inputErr("medians", RuleCount, "need at least 1 median, got 0")
	}
	for i, m := range medians {
		if math.IsNaN(m) || math.IsInf(m, 0) {
			return MedianSpread{}, inputErr(fmt.Sprintf("medians[%d]", i), RuleFinite, "%v", m)
		}
	}
	s := slices.Clone(medians)
	slices.Sort(s)
	return MedianSpread{
		Lowest:        s[0],
		LowerQuartile: nearestRank(s, 0.25),
		Median:        nearestRank(s, 0.5),
		UpperQuartile: nearestRank(s, 0.75),
		Highest:       s[len(s)-1],
	}, nil
}

// NearestRank is the p-quantile of sorted (ascending, not empty) by the
// nearest-rank rule: the ⌈p·n⌉-th smallest, the smallest for p ≤ 1/n.
func nearestRank(sorted []float64, p float64) float64 {
	k := int(math.Ceil(p*float64(len(sorted)))) - 1
	return sorted[max(0, min(len(sorted)-1, k))]
}
