package web

import (
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web/chart"
)

// What the calibration page and the report's performance section show,
// prepared from elicit's results: the weight map and its table, the
// steadiness pictures and their table.

func seedPath(ws, q int64) string {
	return calibrationPath(ws) + "/q/" + strconv.FormatInt(q, 10)
}

func seedAnchor(q int64) string { return "seed-" + strconv.FormatInt(q, 10) }

func seedInputID(q int64, name string) string {
	return "f-q" + strconv.FormatInt(q, 10) + "-" + name
}

// answeredBy says who has answered a calibration question and who has
// not, in a sentence: "Not yet: nobody." read as a placeholder where
// everyone had answered. In an archived workshop, or on a question whose
// true value was revealed (finished), nobody will answer later, and the
// sentence says what happened.
func answeredBy(answered, not []string, finished bool) string {
	switch {
	case len(answered) == 0 && len(not) == 0 && finished:
		return "No active expert was on the panel."
	case len(answered) == 0 && len(not) == 0:
		return "No active expert on the panel yet."
	case len(answered) == 0 && finished:
		return "Nobody answered it."
	case len(answered) == 0:
		return "Nobody has answered yet."
	case len(not) == 0:
		return "Answered by everyone: " + wordList(answered) + "."
	case finished:
		return "Answered by " + wordList(answered) + ". " + wordList(not) + " did not answer."
	}
	return "Answered by " + wordList(answered) + ". Not yet: " + wordList(not) + "."
}

// wordList writes names as prose lists them: "A", "A and B", "A, B and C".
func wordList(names []string) string {
	if len(names) < 2 {
		return strings.Join(names, "")
	}
	return strings.Join(names[:len(names)-1], ", ") + " and " + names[len(names)-1]
}

// pooledOn says which questions the performance-weighted pool is scored
// on: the same as the experts', or, where a fixed cut-off leaves a
// question that only experts below it answered, fewer of them (the pool
// has no answer there, and its calibration score is weaker evidence).
func pooledOn(n, scored int) string {
	if n >= scored {
		return "on the same " + strconv.Itoa(n) + " " + plural(n, "question", "questions")
	}
	left := scored - n
	return "on only " + strconv.Itoa(n) + " of the " + strconv.Itoa(scored) + " questions (no expert at or above the cut-off answered the other " +
		plural(left, "one", strconv.Itoa(left)) + ", so the pool has no answer there)"
}

// alphaSentence says what the cut-off is and how it was chosen.
func alphaSentence(alpha float64, logAlpha *float64, rule string) string {
	if rule == workshop.AlphaFixed {
		// As typed: to four figures a cut-off could read as the score
		// it leaves out.
		return "Cut-off α = " + typedCutOff(alpha) + ", fixed by the facilitator: experts whose calibration score is below it get weight 0."
	}
	return "Cut-off α = " + alphaText(alpha, logAlpha) + ", optimised: of the cut-offs that change the weights, the one under which the performance-weighted pool, " +
		"scored as if it were an expert, does best on these questions. Experts whose calibration score is below it get weight 0."
}

// typedCutOff writes a fixed cut-off as typed (input.Typed): in plain
// decimals unless that takes more than a line's worth of figures (1e-320
// in plain decimals is 320 zeros, one unbroken line off the screen), and
// -0 as 0.
func typedCutOff(alpha float64) string { return input.Typed(alpha, false) }

// recordLabels are "Q1 quantity" labels of a record's questions by ID.
func recordLabels(r record.Record) map[int64]string {
	m := map[int64]string{}
	for _, q := range r.Questions {
		m[q.ID] = "Q" + strconv.Itoa(q.Position) + " " + q.Quantity
	}
	return m
}

func recordQuestions(r record.Record) []workshop.Question {
	qs := make([]workshop.Question, len(r.Questions))
	for i, q := range r.Questions {
		qs[i] = q.Question
	}
	return qs
}

func expertNames(es []workshop.Expert) map[int64]string {
	m := make(map[int64]string, len(es))
	for _, e := range es {
		m[e.ID] = e.Name
	}
	return m
}

// scoreLine is one expert's row of the scores table, with why their
// weight is what it is.
type scoreLine struct {
	workshop.PerformanceExpert
	Why string
	// Calibration written for the table: below the cut-off, with the
	// figures that keep it below (as Why writes it).
	CalibrationText string
}

// scoreLines explains each expert's weight under the cut-off alpha: the
// product calibration × information that earns it, or the reason it is 0.
func scoreLines(experts []workshop.PerformanceExpert, alpha float64, logAlpha *float64) []scoreLine {
	total, tiny := 0.0, false
	for _, e := range experts {
		if e.Weight > 0 {
			total += e.Combined
			tiny = tiny || elicit.BelowDouble(e.Calibration, e.LogCalibration)
		}
	}
	out := make([]scoreLine, len(experts))
	for i, e := range experts {
		l := scoreLine{PerformanceExpert: e, CalibrationText: fv(e.Calibration)}
		below := belowCut(e, alpha, logAlpha)
		switch {
		case elicit.BelowDouble(e.Calibration, e.LogCalibration):
			l.CalibrationText = elicit.FormatExp(e.LogCalibration, 4)
		case below:
			l.CalibrationText = chart.FormatValueBeside(e.Calibration, alpha)
		}
		switch {
		case e.Answered == 0:
			l.Why = "answered no scored calibration question, so has no score and weight 0"
		case e.Weight > 0 && tiny:
			// Scores below the smallest double: the products are written
			// from their logarithms, and the share is the weight itself.
			l.Why = "earns " + l.CalibrationText + " × " + fv(e.Information) + " = " + combinedText(e) +
				", " + pct(e.Weight) + " of what the experts at or above the cut-off earn"
		case e.Weight > 0:
			l.Why = "earns " + fv(e.Calibration) + " × " + fv(e.Information) + " = " + fv(e.Combined) +
				" of the " + fv(total) + " earned by the experts at or above the cut-off"
		case below && (logAlpha != nil || elicit.BelowDouble(e.Calibration, e.LogCalibration)):
			l.Why = "calibration score " + l.CalibrationText + " is below the cut-off " + alphaText(alpha, logAlpha) + ", so weight 0"
		case below:
			// Each with the figures that keep it on its own side of the
			// other: a cut-off typed as a score is shown (0.1878 for
			// 0.187753) lies above that score.
			l.Why = "calibration score " + l.CalibrationText + " is below the cut-off " +
				chart.FormatValueBeside(alpha, e.Calibration) + ", so weight 0"
		case e.Information > 0 && (e.Calibration > 0 || elicit.BelowDouble(e.Calibration, e.LogCalibration)):
			// At or above the cut-off with a product that is not 0, but a
			// share of e^(ln C + ln I − the largest) below the double
			// range beside the others': its weight is that share, read 0.
			l.Why = "earns " + l.CalibrationText + " × " + fv(e.Information) + " = " + combinedText(e) +
				", a share of what the experts at or above the cut-off earn too small for the computer's numbers (double precision) to hold, so weight 0"
		default:
			l.Why = "calibration × information is 0, so weight 0"
		}
		out[i] = l
	}
	return out
}

// scoresPicture is the weight map of the experts who have scores.
func scoresPicture(id string, experts []workshop.PerformanceExpert, pooled elicit.PooledScore, alpha float64, logAlpha *float64) chart.ScoresView {
	v := chart.ScoresView{ID: id, Alpha: alpha, LogAlpha: logAlpha}
	for _, e := range experts {
		if e.Answered > 0 {
			v.Rows = append(v.Rows, chart.ScoreRow{Expert: e.Name, Calibration: e.Calibration, LogCalibration: e.LogCalibration, Information: e.Information, Weight: e.Weight})
		}
	}
	if pooled.N > 0 {
		v.Pooled = &chart.ScoreRow{Expert: "performance-weighted pool", Calibration: pooled.Calibration, LogCalibration: pooled.LogCalibration, Information: pooled.Information}
	}
	return v
}

// belowCut reports whether an expert's calibration score is below the
// cut-off, comparing logarithms where either is below the smallest
// double (as elicit.ClassicalModel cuts).
func belowCut(e workshop.PerformanceExpert, alpha float64, logAlpha *float64) bool {
	tiny := elicit.BelowDouble(e.Calibration, e.LogCalibration)
	switch {
	case logAlpha != nil && tiny:
		return e.LogCalibration < *logAlpha
	case logAlpha != nil:
		return false
	case tiny:
		return alpha > 0
	}
	return e.Calibration < alpha
}

// alphaText writes the cut-off, from its logarithm where it is below the
// smallest double.
func alphaText(alpha float64, logAlpha *float64) string {
	if logAlpha != nil {
		return elicit.FormatExp(*logAlpha, 4)
	}
	return fv(alpha)
}

// calibrationText writes a calibration score, from its logarithm where it
// is below the smallest double: never a 0 that is not the score.
func calibrationText(c, logC float64) string {
	if elicit.BelowDouble(c, logC) {
		return elicit.FormatExp(logC, 4)
	}
	return fv(c)
}

// combinedText writes calibration × information as calibrationText does.
func combinedText(e workshop.PerformanceExpert) string {
	return pooledCombinedText(e.Calibration, e.LogCalibration, e.Information, e.Combined)
}

func pooledCombinedText(c, logC, info, combined float64) string {
	if elicit.BelowDouble(c, logC) && info > 0 {
		return elicit.FormatExp(logC+math.Log(info), 4)
	}
	return fv(combined)
}

// rerunLine is one rerun of the robustness analysis in the table behind
// the steadiness pictures.
type rerunLine struct {
	Label    string // what was left out, in words
	Alpha    string
	WeightTo string   // who carries the weight in the rerun
	Pools    []string // per watched question: "5% · 50% · 95%"
	Shift    string
	Error    string
}

// steadiness is the robustness analysis as the page shows it: a picture
// per watched question and the table behind them.
type steadiness struct {
	Picture chart.SteadinessView
	Watched []string // labels of the watched questions
	Full    []string // the whole panel's pools, as in rerunLine.Pools
	Rows    []rerunLine
	Largest string
	// NoneDone says no rerun could be done (one expert on one
	// question): Largest, 0, is then no shift measured.
	NoneDone bool
	Of       string // what the watched questions are, in words
}

// poolText writes a pool's 5%, 50% and 95% points on q's bounds, apart
// (pointsIn).
func poolText(p workshop.Percentiles, q workshop.Question) string {
	return strings.Join(pointsIn(q.Lower, q.Upper, p.P05, p.P50, p.P95), " · ")
}

// newSteadiness prepares rb for the page; questions give the labels and
// bounds of the watched questions, names the experts'.
func newSteadiness(id string, rb *workshop.Robustness, questions []workshop.Question, names map[int64]string) steadiness {
	byID := map[int64]workshop.Question{}
	for _, q := range questions {
		byID[q.ID] = q
	}
	label := func(id int64) string {
		if q, ok := byID[id]; ok {
			return "Q" + strconv.Itoa(q.Position) + " " + q.Quantity
		}
		return "question " + strconv.FormatInt(id, 10)
	}
	s := steadiness{Picture: chart.SteadinessView{ID: id}, Largest: fvSpread(rb.Largest), NoneDone: true}
	for _, r := range rb.Rows {
		s.NoneDone = s.NoneDone && r.Error != ""
	}
	full := map[int64]workshop.Percentiles{}
	for _, p := range rb.Full {
		full[p.QuestionID] = p.Percentiles
	}
	calib := true
	for _, t := range rb.Targets {
		calib = calib && byID[t].Calibration
		s.Watched = append(s.Watched, label(t))
		if p, ok := full[t]; ok {
			s.Full = append(s.Full, poolText(p, byID[t]))
		} else {
			s.Full = append(s.Full, "no pool")
		}
	}
	s.Of = "the target questions"
	if calib && len(rb.Targets) > 0 {
		s.Of = "the calibration questions themselves (the workshop has no target question with answers)"
	}
	for _, t := range rb.Targets {
		q := byID[t]
		ct := chart.SteadinessTarget{Title: label(t), Lower: q.Lower, Upper: q.Upper}
		if p, ok := full[t]; ok {
			ct.Full = [3]float64{p.P05, p.P50, p.P95}
		} else {
			ct.Full = [3]float64{math.NaN(), math.NaN(), math.NaN()}
		}
		s.Picture.Targets = append(s.Picture.Targets, ct)
	}
	scored := map[string]int{}
	for _, r := range rb.Rows {
		scored[r.LeftOut]++
	}
	for k, r := range rb.Rows {
		l := rerunLine{Error: rerunError(r, scored[r.LeftOut]), Alpha: alphaText(r.Alpha, r.LogAlpha), Shift: fvSpread(r.Shift)}
		// A rule under the whole panel's row, and between the reruns
		// without a question and those without an expert.
		newGroup := k == 0 || rb.Rows[k-1].LeftOut != r.LeftOut
		short := "without " + r.Label
		if r.LeftOut == elicit.LeaveOutQuestion {
			l.Label = "calibration question " + r.Label
			if q, ok := byID[r.ID]; ok {
				short = "without Q" + strconv.Itoa(q.Position)
			}
		} else {
			l.Label = "expert " + r.Label
		}
		l.WeightTo = weightGoesTo(r.Weights, names)
		pools := map[int64]workshop.Percentiles{}
		for _, p := range r.Pools {
			pools[p.QuestionID] = p.Percentiles
		}
		for i, t := range rb.Targets {
			row := chart.SteadinessRow{Label: short, NewGroup: newGroup}
			switch p, ok := pools[t]; {
			case r.Error != "":
				row.Note = "cannot be rerun"
				l.Pools = append(l.Pools, "—")
			case !ok:
				row.Note = "no expert with weight left"
				l.Pools = append(l.Pools, "no expert with weight left")
			default:
				row.Pool = &[3]float64{p.P05, p.P50, p.P95}
				if i < len(r.Shifts) {
					row.Shift = r.Shifts[i]
				}
				l.Pools = append(l.Pools, poolText(p, byID[t]))
			}
			s.Picture.Targets[i].Rows = append(s.Picture.Targets[i].Rows, row)
		}
		s.Rows = append(s.Rows, l)
	}
	return s
}

// rerunError says in words why a rerun without one question or expert
// cannot be done, or "" when it was; n is how many of that kind were
// scored. The model's own message stays in the record (LeaveOneOutCase).
func rerunError(r workshop.RobustnessRow, n int) string {
	switch {
	case r.Error == "":
		return ""
	case r.LeftOut == elicit.LeaveOutQuestion && n <= 1:
		return "Leaving out the only scored calibration question leaves nothing to score."
	case r.LeftOut == elicit.LeaveOutExpert && n <= 1:
		return "Leaving out the only scored expert leaves no one to score."
	case r.LeftOut == elicit.LeaveOutExpert:
		return "Without this expert, the classical model cannot score the panel."
	}
	return "Without this question, the classical model cannot score the panel."
}

// weightGoesTo names the experts with weight in a rerun, largest first.
func weightGoesTo(ws []workshop.ExpertWeight, names map[int64]string) string {
	ws = append([]workshop.ExpertWeight(nil), ws...)
	sort.SliceStable(ws, func(i, j int) bool { return ws[i].Weight > ws[j].Weight })
	var parts []string
	for _, w := range ws {
		if w.Weight <= 0 {
			continue
		}
		n, ok := names[w.ExpertID]
		if !ok {
			n = "expert " + strconv.FormatInt(w.ExpertID, 10)
		}
		parts = append(parts, n+" "+pct(w.Weight))
	}
	if len(parts) == 0 {
		return "nobody"
	}
	return strings.Join(parts, ", ")
}
