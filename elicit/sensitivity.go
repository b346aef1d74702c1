package elicit

import (
	"errors"
	"fmt"
)

// NamedPrior is one prior in a sensitivity comparison: an expert's own
// fit, a pool, the agreed prior, or any other, under a name for people.
// Key is the caller's own name for it, one that stays the same when
// other priors join or leave the comparison (a form's choice of prior);
// Sensitivity does not read it.
type NamedPrior struct {
	Name  string `json:"name"`
	Prior Beta   `json:"prior"`
	Key   string `json:"key,omitempty"`
}

// SensitivityRow is the posterior under one prior for the same data.
type SensitivityRow struct {
	Name      string     `json:"name"`
	Prior     Beta       `json:"prior"`
	Posterior Beta       `json:"posterior"`
	Mean      float64    `json:"mean"`
	SD        float64    `json:"sd"`
	Interval  [2]float64 `json:"interval"` // equal-tailed at the level
	HDI       [2]float64 `json:"hdi"`      // highest-density at the level
	// DataShare is the weight the data get in the posterior mean
	// (PriorWorth.DataShare): how far this prior lets the data move it.
	DataShare float64 `json:"data_share"`
}

// Sensitivity updates each prior with the same data, successes in trials,
// and reports each posterior's mean, standard deviation and credible
// intervals at level side by side (Posterior, EqualTailed, HDI), so that
// a reader sees how much the conclusion depends on whose judgement is
// used: the prior's influence is the spread of these rows, and it shrinks
// as the data's share grows (the "community of priors" of Spiegelhalter,
// Freedman & Parmar 1994, "Bayesian approaches to randomized trials",
// J. R. Statist. Soc. A 157(3)). The data may be observed, or
// hypothetical for a planned study: for instance the outcomes at the
// agreed prior's predictive 5%, 50% and 95% points (PlannedOutcomes).
//
// Rules: at least one prior, each valid (its field is "priors[i].alpha"
// or "priors[i].beta"); the data as Posterior; level as EqualTailed.
func Sensitivity(priors []NamedPrior, successes, trials int, level float64) ([]SensitivityRow, error) {
	if len(priors) == 0 {
		return nil, inputErr("priors", RuleCount, "no priors to compare")
	}
	if err := checkLevel(level); err != nil {
		return nil, err
	}
	rows := make([]SensitivityRow, len(priors))
	for i, np := range priors {
		if err := np.Prior.Validate(); err != nil {
			var ie *InputError
			if errors.As(err, &ie) {
				return nil, inputErr(fmt.Sprintf("priors[%d].%s", i, ie.Field), ie.Rule, "%s", ie.Detail)
			}
			return nil, err
		}
		post, err := Posterior(np.Prior, successes, trials)
		if err != nil {
			return nil, err
		}
		lo, hi, err := EqualTailed(post, level)
		if err != nil {
			return nil, err
		}
		hlo, hhi, err := HDI(post, level)
		if err != nil {
			return nil, err
		}
		rows[i] = SensitivityRow{
			Name: np.Name, Prior: np.Prior, Posterior: post,
			Mean: post.Mean(), SD: post.SD(),
			Interval: [2]float64{lo, hi}, HDI: [2]float64{hlo, hhi},
			DataShare: Worth(np.Prior).DataShare(trials),
		}
	}
	return rows, nil
}

// PlannedOutcomes returns the numbers of successes at the 5%, 50% and 95%
// points of the prior predictive distribution of a study of n trials
// (PredictiveQuantile of PriorPredictive): a low, a typical and a high
// outcome under that prior, for a sensitivity comparison before the data
// exist. It needs 0 ≤ n ≤ MaxPredictiveTrials.
func PlannedOutcomes(prior Beta, n int) ([3]int, error) {
	pmf, err := PriorPredictive(prior, n)
	if err != nil {
		return [3]int{}, err
	}
	return [3]int{PredictiveQuantile(pmf, 0.05), PredictiveQuantile(pmf, 0.5), PredictiveQuantile(pmf, 0.95)}, nil
}
