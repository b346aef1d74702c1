package elicit

import (
	"math"
	"sort"
	"strconv"
)

// Left-out kinds of a LeaveOneOutCase.
const (
	LeaveOutQuestion = "question"
	LeaveOutExpert   = "expert"
)

// robustnessProbs are the percentiles whose shifts LeaveOneOut reports.
var robustnessProbs = []float64{0.05, 0.5, 0.95}

// RobustnessTarget is a question on which LeaveOneOut watches the pooled
// distribution: the experts' fitted distributions (e.g. from FitQuantiles),
// all on the same bounds, pooled by LinearPool with the classical model's
// weights.
type RobustnessTarget struct {
	Question string                `json:"question"`
	Fits     map[string]ScaledBeta `json:"fits"` // by expert name
}

// LeaveOneOutCase is the classical model rerun without one calibration
// question or one expert. Percentiles[t] are this case's pooled 5th, 50th
// and 95th percentiles on target t (nil when it has no pool there).
// Shifts[t] is the largest of |Δq₀.₀₅|, |Δq₀.₅|, |Δq₀.₉₅| on target t
// between this case's pool and the full panel's, in units of the
// target's width (Upper − Lower of the fits; for a calibration question,
// its bounds' width when it has bounds, else U* − L*; for one on the log
// scale, the shift of ln x against U* − L* on ln x), so for a
// proportion on [0, 1] it is the absolute shift.
// Shift is the largest over targets. Unpooled names the targets on which
// no expert with weight remains. Error, when set, says why the rerun
// failed; the shifts are then empty.
type LeaveOneOutCase struct {
	LeftOut string  `json:"left_out"` // LeaveOutQuestion or LeaveOutExpert
	Name    string  `json:"name"`
	Alpha   float64 `json:"alpha"`
	// LogAlpha is ln α where α is a score below the smallest double
	// (Scores.LogAlpha); nil otherwise.
	LogAlpha    *float64           `json:"log_alpha,omitempty"`
	Weights     map[string]float64 `json:"weights"`
	Percentiles [][]float64        `json:"percentiles,omitempty"`
	Shifts      []float64          `json:"shifts"`
	Shift       float64            `json:"shift"`
	Unpooled    []string           `json:"unpooled,omitempty"`
	Error       string             `json:"error,omitempty"`
}

// LeaveOneOutReport is the outcome of LeaveOneOut. Full[t] are the full
// panel's pooled 5th, 50th and 95th percentiles on Targets[t].
type LeaveOneOutReport struct {
	Targets  []string          `json:"targets"`
	Full     [][]float64       `json:"full"`
	Cases    []LeaveOneOutCase `json:"cases"`
	MaxShift float64           `json:"max_shift"`
}

// LeaveOneOut is the robustness analysis of the classical model (Cooke
// 1991, "Experts in Uncertainty", §12.6; Cooke & Goossens 2008, Reliab.
// Eng. Syst. Saf. 93: 657–674): ClassicalModel is rerun on the input less
// each calibration question in turn, then less each expert in turn, with
// the same options (a nil opt.Alpha is optimised again on each rerun), and
// the pooled 5th, 50th and 95th percentiles on each target are compared
// with the full panel's.
//
// With targets, each is pooled by LinearPool of its fits with the weights
// of the experts who have a fit (experts without a score have weight 0).
// Without targets the calibration questions themselves are the targets:
// the experts' minimal-information distributions are pooled on the full
// panel's intrinsic ranges, so that only the weights change between cases.
func LeaveOneOut(assessments []SeedAssessment, realisations map[string]float64, bounds map[string][2]float64, opt ModelOptions, targets []RobustnessTarget) (LeaveOneOutReport, error) {
	full, err := ClassicalModel(assessments, realisations, bounds, opt)
	if err != nil {
		return LeaveOneOutReport{}, err
	}
	set, _ := newSeedSet(assessments, realisations, bounds, opt.Overshoot, opt.LogScale) // valid: ClassicalModel accepted it
	watch, err := newWatchers(set, bounds, targets)
	if err != nil {
		return LeaveOneOutReport{}, err
	}
	rep := LeaveOneOutReport{}
	fullW := full.Weights()
	fullRaw := make([][]float64, len(watch))
	for t, w := range watch {
		rep.Targets = append(rep.Targets, w.name)
		qs, _ := w.percentiles(fullW)
		fullRaw[t] = qs
		rep.Full = append(rep.Full, w.shownAll(qs))
	}
	run := func(c LeaveOneOutCase, keep func(SeedAssessment) bool) {
		var sub []SeedAssessment
		for _, a := range assessments {
			if keep(a) {
				sub = append(sub, a)
			}
		}
		s, err := ClassicalModel(sub, realisations, bounds, opt)
		if err != nil {
			c.Error = err.Error()
			rep.Cases = append(rep.Cases, c)
			return
		}
		c.Alpha, c.LogAlpha, c.Weights = s.Alpha, s.LogAlpha, s.Weights()
		c.Shifts = make([]float64, len(watch))
		c.Percentiles = make([][]float64, len(watch))
		for t, w := range watch {
			qs, ok := w.percentiles(c.Weights)
			if !ok || fullRaw[t] == nil {
				c.Unpooled = append(c.Unpooled, w.name)
				continue
			}
			c.Percentiles[t] = w.shownAll(qs)
			for i := range qs {
				c.Shifts[t] = math.Max(c.Shifts[t], math.Abs(qs[i]-fullRaw[t][i])/w.width)
			}
			c.Shift = math.Max(c.Shift, c.Shifts[t])
		}
		rep.MaxShift = math.Max(rep.MaxShift, c.Shift)
		rep.Cases = append(rep.Cases, c)
	}
	for _, q := range set.questions {
		run(LeaveOneOutCase{LeftOut: LeaveOutQuestion, Name: q.name}, func(a SeedAssessment) bool { return a.Question != q.name })
	}
	for _, e := range set.experts {
		run(LeaveOneOutCase{LeftOut: LeaveOutExpert, Name: e}, func(a SeedAssessment) bool { return a.Expert != e })
	}
	return rep, nil
}

// watcher computes one target's pooled percentiles for given weights,
// on the scale its shifts are measured on (ln x for a calibration
// question on the log scale), of which width is the range; shown takes
// them back to the question's own scale (nil: they are on it).
type watcher struct {
	name        string
	width       float64
	percentiles func(w map[string]float64) ([]float64, bool)
	shown       func(float64) float64
}

// shownAll is qs on the target's own scale; nil stays nil.
func (w watcher) shownAll(qs []float64) []float64 {
	if w.shown == nil || qs == nil {
		return qs
	}
	out := make([]float64, len(qs))
	for i, v := range qs {
		out[i] = w.shown(v)
	}
	return out
}

func newWatchers(set *seedSet, bounds map[string][2]float64, targets []RobustnessTarget) ([]watcher, error) {
	var out []watcher
	if len(targets) == 0 {
		for _, q := range set.questions {
			// On the log scale a shift is measured in ln x, against the
			// intrinsic range on ln x (a lower bound of 0 has no
			// logarithm to measure from).
			width := q.hi - q.lo
			if b, ok := bounds[q.name]; ok && !q.log {
				width = b[1] - b[0]
			}
			out = append(out, watcher{name: q.name, width: width, shown: q.shown, percentiles: func(w map[string]float64) ([]float64, bool) {
				ws := make([]float64, len(set.experts))
				for i, e := range set.experts {
					ws[i] = w[e]
				}
				d, ok := set.poolQuestion(q, ws)
				if !ok {
					return nil, false
				}
				qs := make([]float64, len(robustnessProbs))
				for i, p := range robustnessProbs {
					qs[i] = d.Quantile(p)
				}
				return qs, true
			}})
		}
		return out, nil
	}
	for ti, t := range targets {
		names := make([]string, 0, len(t.Fits))
		for e := range t.Fits {
			names = append(names, e)
		}
		sort.Strings(names)
		dists := make([]ScaledBeta, len(names))
		for i, e := range names {
			dists[i] = t.Fits[e]
		}
		// Validate fits and shared bounds once, with equal weights.
		if _, err := LinearPool(dists, nil); err != nil {
			return nil, prefixField(targetField(ti), err)
		}
		out = append(out, watcher{name: t.Question, width: dists[0].Upper - dists[0].Lower, percentiles: func(w map[string]float64) ([]float64, bool) {
			ws := make([]float64, len(names))
			any := false
			for i, e := range names {
				ws[i] = w[e]
				any = any || ws[i] > 0
			}
			if !any {
				return nil, false
			}
			pool, err := LinearPool(dists, ws)
			if err != nil {
				return nil, false
			}
			qs, err := pool.Quantiles(robustnessProbs)
			return qs, err == nil
		}})
	}
	return out, nil
}

func targetField(i int) string { return "targets[" + strconv.Itoa(i) + "]" }
