package elicit

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"
)

// RecordFormat is the layout version of the export document, written as
// its "parley_record" key.
const RecordFormat = 1

// Caution is the note every record and report carries about what an
// elicited prior is.
const Caution = "An elicited prior is documented expert judgement, not data. " +
	"Review it, test how sensitive your conclusions are to it, and where it feeds clinical, " +
	"safety or environmental decisions, follow your field's own guidance and its regulators, " +
	"which take precedence over this record."

// Record is the export document of one workshop: everything a project lead
// or a reviewer needs to see how the prior was reached. Derived numbers
// (fits, pools) are recomputed from the judgements whenever a record is
// built; an import keeps only the judgements and decisions.
type Record struct {
	Format    int              `json:"parley_record"`
	Generated time.Time        `json:"generated_at"`
	Caution   string           `json:"caution"`
	Workshop  Workshop         `json:"workshop"`
	Experts   []Expert         `json:"experts"`
	Questions []RecordQuestion `json:"questions"`
	// Revisions is every saved answer, oldest first, with its fit.
	Revisions []RecordRevision `json:"revisions"`
	// Weights is the set in force; WeightHistory is every set applied,
	// oldest first, each with what it was made from, so every pool the
	// record shows (the current pools and each agreed prior's, through
	// its weight_set_id) can be reproduced. WeightHistory is empty when
	// no set was ever applied, and in records made before Parley kept it.
	Weights       Weights   `json:"weights"`
	WeightHistory []Weights `json:"weight_history"`
	Events        []Event   `json:"events"`
	// Performance is the scoring of the panel on the calibration questions
	// by Cooke's classical model (record_scores.go), present once every
	// calibration question's true value is revealed; PerformanceNote says
	// why it is absent when there are calibration questions.
	Performance     *Performance `json:"performance,omitempty"`
	PerformanceNote string       `json:"performance_note,omitempty"`
}

// RecordQuestion is a question with its current state: each expert's
// latest fit, the pool of those fits, and the agreed priors. A
// calibration question's true value is present only once revealed.
type RecordQuestion struct {
	Question
	CurrentFits []CurrentFit `json:"current_fits"`
	Pool        *RecordPool  `json:"pool,omitempty"`
	PoolError   string       `json:"pool_error,omitempty"`
	// AgreedPrior is the current agreed prior, with snippets for
	// modelling languages; PriorHistory is every agreement, oldest first.
	AgreedPrior  *RecordPrior  `json:"agreed_prior,omitempty"`
	PriorHistory []AgreedPrior `json:"prior_history"`
}

// CurrentFit is an expert's latest revision on a question and its fit.
type CurrentFit struct {
	ExpertID   int64      `json:"expert_id"`
	RevisionID int64      `json:"revision_id"`
	Round      int        `json:"round"`
	Fit        *RecordFit `json:"fit,omitempty"`
	FitError   string     `json:"fit_error,omitempty"`
}

// RecordRevision is one saved answer with the Beta fitted to it. FitError
// is set instead of Fit when the answer cannot be fitted.
type RecordRevision struct {
	Revision
	Fit      *RecordFit `json:"fit,omitempty"`
	FitError string     `json:"fit_error,omitempty"`
}

// RecordFit is a fit as the record shows it: the Beta on the question's
// scale, how well it meets the stated probabilities, its 5/50/95
// percentiles and any warnings.
type RecordFit struct {
	Dist         ScaledBeta      `json:"dist"`
	SSE          float64         `json:"sse"`
	MaxProbError float64         `json:"max_prob_error"`
	Probs        []float64       `json:"probs"`
	Stated       []float64       `json:"stated"`
	Fitted       []float64       `json:"fitted"`
	Percentiles  Percentiles     `json:"percentiles"`
	Warnings     []RecordWarning `json:"warnings"`
}

// Percentiles are a distribution's 5th, 50th and 95th percentiles.
type Percentiles struct {
	P05 float64 `json:"p05"`
	P50 float64 `json:"p50"`
	P95 float64 `json:"p95"`
}

// RecordWarning is one warning about a fit.
type RecordWarning struct {
	Code    string `json:"code"`
	Message string `json:"message"`
}

// RecordPool is the linear opinion pool of the experts' current fits.
type RecordPool struct {
	Weights     []ExpertWeight `json:"weights"` // normalised, summing to 1
	Mean        float64        `json:"mean"`
	SD          float64        `json:"sd"`
	Percentiles Percentiles    `json:"percentiles"`
	// BestBeta is the single Beta that represents the pool (Pool.BestBeta);
	// BestBetaError says why there is none.
	BestBeta      *RecordBestBeta `json:"best_beta,omitempty"`
	BestBetaError string          `json:"best_beta_error,omitempty"`
}

// RecordBestBeta is the single Beta that represents a pool and how far it
// is from the pool: the least-squares objective on the probability scale,
// the largest CDF gap, and its 5/50/95 percentiles minus the pool's.
type RecordBestBeta struct {
	Dist          ScaledBeta  `json:"dist"`
	SSE           float64     `json:"sse"`
	MaxCDFError   float64     `json:"max_cdf_error"`
	QuantileDiffs Percentiles `json:"quantile_diffs"`
}

// ExpertWeight is one expert's normalised weight in a pool.
type ExpertWeight struct {
	ExpertID int64   `json:"expert_id"`
	Weight   float64 `json:"weight"`
}

// RecordPrior is the current agreed prior with its summary (mean, SD and
// 5th, 50th and 95th percentiles, on the question's scale) and one-line
// snippets of it in modelling languages. The priors CSV and the report's
// summary table print these very numbers.
type RecordPrior struct {
	AgreedPrior
	Mean        float64     `json:"mean"`
	SD          float64     `json:"sd"`
	Percentiles Percentiles `json:"percentiles"`
	Snippets    []Snippet   `json:"snippets"`
}

// newRecordPrior summarises an agreed prior for the record.
func newRecordPrior(p AgreedPrior) *RecordPrior {
	d := p.Dist
	return &RecordPrior{AgreedPrior: p, Mean: d.Mean(), SD: d.SD(),
		Percentiles: Percentiles{d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95)},
		Snippets:    PriorSnippets(d)}
}

// Snippet is a prior written in one modelling language's notation.
type Snippet struct {
	Language string `json:"language"`
	Code     string `json:"code"`
}

// RecordSource is what a record is built from: one workshop's stored
// state, as storage returns it.
type RecordSource struct {
	Workshop  Workshop
	Questions []Question
	Experts   []Expert
	Revisions []Revision // oldest first
	Weights   Weights    // the current weights
	// WeightHistory is every weight set applied, oldest first; the last
	// is Weights.
	WeightHistory []Weights
	Priors        []AgreedPrior // oldest first
	Events        []Event       // oldest first
}

// BuildRecord builds the export document at time now. Every revision is
// fitted with its question's Fit; each question's pool is the linear
// opinion pool (LinearPool) of the current fits of the experts who are not
// revoked, weighted by the current weights (equal weights give each expert
// 1; other schemes give an expert without a weight 0). A true value is
// left out until the facilitator has revealed it.
func BuildRecord(src RecordSource, now time.Time) (Record, error) {
	r := Record{
		Format:        RecordFormat,
		Generated:     now.UTC(),
		Caution:       Caution,
		Workshop:      src.Workshop,
		Experts:       append([]Expert{}, src.Experts...),
		Questions:     []RecordQuestion{},
		Revisions:     []RecordRevision{},
		Weights:       src.Weights,
		WeightHistory: []Weights{},
		Events:        append([]Event{}, src.Events...),
	}
	questions := map[int64]Question{}
	for _, q := range src.Questions {
		if q.WorkshopID != src.Workshop.ID {
			return Record{}, fmt.Errorf("elicit: record: question %d belongs to workshop %d, not %d",
				q.ID, q.WorkshopID, src.Workshop.ID)
		}
		questions[q.ID] = q
	}
	// A weight set's basis shows a true value only once it is revealed,
	// as the question does.
	withheld := func(w Weights) Weights {
		if w.Basis != nil {
			b := w.Basis.withheld(questions)
			w.Basis = &b
		}
		return w
	}
	r.Weights = withheld(r.Weights)
	for _, w := range src.WeightHistory {
		r.WeightHistory = append(r.WeightHistory, withheld(w))
	}
	latest := map[[2]int64]int{} // (question, expert) → index in r.Revisions
	for _, rv := range src.Revisions {
		q, ok := questions[rv.QuestionID]
		if !ok {
			return Record{}, fmt.Errorf("elicit: record: revision %d: question %d: %w", rv.ID, rv.QuestionID, ErrNotFound)
		}
		rr := RecordRevision{Revision: rv}
		if rr.EnteredBy == "" {
			rr.EnteredBy = ByExpert // records older than the field were all the experts' own
		}
		if f, err := q.Fit(rv.Answer); err != nil {
			rr.FitError = err.Error()
		} else {
			rr.Fit = RecordFitOf(f)
		}
		latest[[2]int64{rv.QuestionID, rv.ExpertID}] = len(r.Revisions)
		r.Revisions = append(r.Revisions, rr)
	}
	for _, q := range src.Questions {
		rq := RecordQuestion{Question: q, CurrentFits: []CurrentFit{}, PriorHistory: []AgreedPrior{}}
		if !q.Revealed {
			rq.TrueValue = nil
		}
		var panel []PanelFit
		for _, e := range src.Experts {
			i, ok := latest[[2]int64{q.ID, e.ID}]
			if !ok {
				continue
			}
			rv := r.Revisions[i]
			rq.CurrentFits = append(rq.CurrentFits, CurrentFit{
				ExpertID: e.ID, RevisionID: rv.ID, Round: rv.Round, Fit: rv.Fit, FitError: rv.FitError,
			})
			m := PanelFit{ExpertID: e.ID, Revoked: e.Revoked}
			if rv.Fit != nil {
				d := rv.Fit.Dist
				m.Dist = &d
			}
			panel = append(panel, m)
		}
		switch pp, err := PoolPanel(panel, src.Weights); {
		case errors.Is(err, ErrNoFits):
		case err != nil:
			rq.PoolError = err.Error()
		default:
			rq.Pool = recordPool(pp)
		}
		for _, ap := range src.Priors {
			if ap.QuestionID == q.ID {
				rq.PriorHistory = append(rq.PriorHistory, ap)
			}
		}
		if n := len(rq.PriorHistory); n > 0 {
			cur := rq.PriorHistory[n-1]
			rq.AgreedPrior = newRecordPrior(cur)
		}
		r.Questions = append(r.Questions, rq)
	}
	r.Performance, r.PerformanceNote = recordPerformance(src)
	return r, nil
}

// recordPool is a panel's pool as the record writes it.
func recordPool(pp PanelPool) *RecordPool {
	pool := pp.Pool
	rp := &RecordPool{
		Weights:     make([]ExpertWeight, len(pp.Experts)),
		Mean:        pool.Mean(),
		SD:          pool.SD(),
		Percentiles: Percentiles{pool.Quantile(0.05), pool.Quantile(0.5), pool.Quantile(0.95)},
	}
	if best, err := pool.BestBeta(); err != nil {
		rp.BestBetaError = err.Error()
	} else {
		d := best.QuantileDiffs
		rp.BestBeta = &RecordBestBeta{Dist: best.Dist, SSE: best.SSE, MaxCDFError: best.MaxCDFError,
			QuantileDiffs: Percentiles{d[0], d[1], d[2]}}
	}
	for i, id := range pp.Experts {
		rp.Weights[i] = ExpertWeight{ExpertID: id, Weight: pp.Weights[i]}
	}
	return rp
}

// PriorSnippets writes d as Stan, R, PyMC and JAGS write a Beta prior on a
// parameter p. A Beta on [Lower, Upper] other than [0, 1] is written for
// the unit-scale parameter, with the rescaling alongside.
func PriorSnippets(d ScaledBeta) []Snippet {
	a, b := num(d.Alpha), num(d.Beta.Beta)
	unit := d.Lower == 0 && d.Upper == 1
	name, scale := "p", ""
	if !unit {
		name = "p_unit"
		scale = fmt.Sprintf("p = %s + %s * p_unit", num(d.Lower), num(d.Upper-d.Lower))
	}
	with := func(code, comment string) string {
		if unit {
			return code
		}
		return code + "  " + comment + " " + scale
	}
	return []Snippet{
		{"Stan", with(fmt.Sprintf("%s ~ beta(%s, %s);", name, a, b), "//")},
		{"R", with(fmt.Sprintf("dbeta(%s, %s, %s)", name, a, b), "#")},
		{"PyMC", with(fmt.Sprintf("pm.Beta(%q, alpha=%s, beta=%s)", name, a, b), "#")},
		{"JAGS", with(fmt.Sprintf("%s ~ dbeta(%s, %s)", name, a, b), "#")},
	}
}

// num writes a parameter with six significant digits, enough to
// reproduce every printed percentile.
func num(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }

// RecordFitOf converts a fit to the record's form.
func RecordFitOf(f Fit) *RecordFit {
	rf := &RecordFit{
		Dist:         f.Dist,
		SSE:          f.SSE,
		MaxProbError: f.MaxProbError,
		Probs:        f.Probs,
		Stated:       f.Stated,
		Fitted:       f.Fitted,
		Percentiles:  Percentiles{f.Percentiles[0], f.Percentiles[1], f.Percentiles[2]},
		Warnings:     []RecordWarning{},
	}
	for _, w := range f.Warnings {
		rf.Warnings = append(rf.Warnings, RecordWarning{Code: string(w.Code), Message: w.Message})
	}
	return rf
}

// ForQuestion narrows the record to one question: its revisions, its
// events and the workshop-wide events. The panel and weights stay whole,
// and so does the evidence behind any performance weights (the
// calibration questions their bases scored or left out, and the
// revisions they scored), so the narrowed record still reproduces the
// question's pools.
func (r Record) ForQuestion(id int64) (Record, error) {
	out := r
	out.Questions, out.Revisions, out.Events = nil, nil, nil
	keepQ, keepR := map[int64]bool{id: true}, map[int64]bool{}
	found := false
	for _, q := range r.Questions {
		found = found || q.ID == id
	}
	if !found {
		return Record{}, fmt.Errorf("elicit: question %d of workshop %d: %w", id, r.Workshop.ID, ErrNotFound)
	}
	for _, w := range r.WeightHistory {
		if w.Basis == nil {
			continue
		}
		for _, q := range w.Basis.Questions {
			keepQ[q.QuestionID] = true
		}
		for _, q := range w.Basis.Skipped {
			keepQ[q.ID] = true
		}
		for _, a := range w.Basis.CalibrationAnswers {
			keepR[a.RevisionID] = true
		}
	}
	for _, q := range r.Questions {
		if keepQ[q.ID] {
			out.Questions = append(out.Questions, q)
		}
	}
	for _, rv := range r.Revisions {
		if rv.QuestionID == id || keepR[rv.ID] {
			out.Revisions = append(out.Revisions, rv)
		}
	}
	for _, e := range r.Events {
		if e.QuestionID == 0 || e.QuestionID == id {
			out.Events = append(out.Events, e)
		}
	}
	return out, nil
}

// csvHeader names the columns of WriteCSV, one row per revision.
var csvHeader = []string{
	"workshop_id", "workshop", "question_id", "question", "expert_id", "expert",
	"revision_id", "round", "at", "entered_by", "channel", "reason", "format", "stated",
	"alpha", "beta", "lower", "upper", "sse", "max_prob_error", "p05", "p50", "p95", "warnings",
}

// WriteCSV writes one row per revision, oldest first. Stated values are
// listed in the question's order, separated by spaces; for the interval
// format they are lowest, highest, best, confidence. Text that a
// spreadsheet would run as a formula is prefixed with an apostrophe.
func (r Record) WriteCSV(w io.Writer) error {
	questions := map[int64]Question{}
	for _, q := range r.Questions {
		questions[q.ID] = q.Question
	}
	experts := map[int64]string{}
	for _, e := range r.Experts {
		experts[e.ID] = e.Name
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(csvHeader); err != nil {
		return err
	}
	for _, rv := range r.Revisions {
		q := questions[rv.QuestionID]
		row := []string{
			strconv.FormatInt(r.Workshop.ID, 10), cell(r.Workshop.Title),
			strconv.FormatInt(q.ID, 10), cell(q.Quantity),
			strconv.FormatInt(rv.ExpertID, 10), cell(experts[rv.ExpertID]),
			strconv.FormatInt(rv.ID, 10), strconv.Itoa(rv.Round), rv.At.UTC().Format(time.RFC3339Nano),
			string(rv.EnteredBy), string(rv.Channel), cell(rv.Reason), string(q.Format), stated(q.Format, rv.Answer),
		}
		if f := rv.Fit; f != nil {
			codes := make([]string, len(f.Warnings))
			for i, w := range f.Warnings {
				codes[i] = w.Code
			}
			row = append(row, floats(f.Dist.Alpha, f.Dist.Beta.Beta, f.Dist.Lower, f.Dist.Upper,
				f.SSE, f.MaxProbError, f.Percentiles.P05, f.Percentiles.P50, f.Percentiles.P95)...)
			row = append(row, strings.Join(codes, " "))
		} else {
			row = append(row, make([]string, 9)...)
			row = append(row, cell(rv.FitError))
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

func stated(f AnswerFormat, a Answer) string {
	switch f {
	case FormatInterval:
		return strings.Join(floats(a.Lowest, a.Highest, a.Best, a.Confidence), " ")
	case FormatChips:
		parts := make([]string, len(a.Counts))
		for i, c := range a.Counts {
			parts[i] = strconv.Itoa(c)
		}
		return strings.Join(parts, " ")
	}
	return strings.Join(floats(a.Values...), " ")
}

func floats(xs ...float64) []string {
	out := make([]string, len(xs))
	for i, x := range xs {
		out[i] = strconv.FormatFloat(x, 'g', -1, 64)
	}
	return out
}

// cell guards free text against spreadsheet formula injection (OWASP,
// "CSV Injection").
func cell(s string) string {
	if s != "" && strings.ContainsRune("=+-@\t\r", rune(s[0])) {
		return "'" + s
	}
	return s
}

// MaxRecordBytes is the largest record ParseRecord reads.
const MaxRecordBytes = 64 << 20

// RuleRecordJSON is the rule that an imported record is one JSON object of
// the record's layout, with no unknown keys.
const RuleRecordJSON Rule = "must be one JSON object in the layout of a Parley record"

// ParseRecord reads one record as JSON, strictly: unknown keys, a wrong
// type, trailing data or more than MaxRecordBytes are refused. The record
// is then checked with Validate. Every error is an *InputError.
func ParseRecord(rd io.Reader) (Record, error) {
	b, err := io.ReadAll(io.LimitReader(rd, MaxRecordBytes+1))
	if err != nil {
		return Record{}, inputErr("record", RuleRecordJSON, "%v", err)
	}
	if len(b) > MaxRecordBytes {
		return Record{}, inputErr("record", RuleTooLong, "more than %d bytes", MaxRecordBytes)
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	var r Record
	if err := dec.Decode(&r); err != nil {
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) && te.Field != "" {
			return Record{}, inputErr(te.Field, RuleRecordJSON, "%s is not a %s", te.Value, te.Type)
		}
		return Record{}, inputErr("record", RuleRecordJSON, "%v", err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return Record{}, inputErr("record", RuleRecordJSON, "data after the record")
	}
	return r, r.Validate()
}

// Limits on a record's free text, checked on import.
const (
	maxTitle = 200
	maxText  = 20000
)

// Validate checks a record as an import would receive it: the format
// marker, every field of every entity, and that every reference points at
// an entity of the record. Answers and consensus judgements are re-checked
// by fitting them. Derived numbers (fits, pools, snippets) are not trusted
// and not checked: an import drops them. The first broken rule is
// returned as an *InputError whose Field is the path into the document,
// e.g. "revisions[3].answer.values[1]".
func (r Record) Validate() error {
	if r.Format != RecordFormat {
		return inputErr("parley_record", RuleUnknown, "format %d; this version reads %d", r.Format, RecordFormat)
	}
	w := r.Workshop
	if err := checkWorkshop(w); err != nil {
		return err
	}
	experts := map[int64]bool{}
	for i, e := range r.Experts {
		p := fmt.Sprintf("experts[%d]", i)
		if err := checkID(p+".id", e.ID, experts); err != nil {
			return err
		}
		if e.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", RuleUnknown, "%d is not the workshop's id %d", e.WorkshopID, w.ID)
		}
		if err := checkText(p+".name", e.Name, true, maxTitle); err != nil {
			return err
		}
		if err := checkText(p+".affiliation", e.Affiliation, false, maxTitle); err != nil {
			return err
		}
		if err := checkText(p+".expertise", e.Expertise, false, maxText); err != nil {
			return err
		}
		if e.Created.IsZero() {
			return inputErr(p+".created", RuleRequired, "")
		}
		experts[e.ID] = true
	}
	questions := map[int64]Question{}
	seenQ := map[int64]bool{}
	positions := map[int]bool{}
	for i, q := range r.Questions {
		p := fmt.Sprintf("questions[%d]", i)
		if err := checkID(p+".id", q.ID, seenQ); err != nil {
			return err
		}
		if q.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", RuleUnknown, "%d is not the workshop's id %d", q.WorkshopID, w.ID)
		}
		if err := checkQuestion(p, q.Question); err != nil {
			return err
		}
		if positions[q.Position] {
			return inputErr(p+".position", RuleUnknown, "position %d appears twice", q.Position)
		}
		positions[q.Position] = true
		seenQ[q.ID] = true
		questions[q.ID] = q.Question
		for j, ap := range q.PriorHistory {
			if err := checkPrior(fmt.Sprintf("%s.prior_history[%d]", p, j), ap, q.Question, w); err != nil {
				return err
			}
		}
	}
	seenR := map[int64]bool{}
	for i, rv := range r.Revisions {
		p := fmt.Sprintf("revisions[%d]", i)
		if err := checkID(p+".id", rv.ID, seenR); err != nil {
			return err
		}
		seenR[rv.ID] = true
		q, ok := questions[rv.QuestionID]
		if !ok {
			return inputErr(p+".question_id", RuleUnknown, "no question %d in the record", rv.QuestionID)
		}
		if !experts[rv.ExpertID] {
			return inputErr(p+".expert_id", RuleUnknown, "no expert %d in the record", rv.ExpertID)
		}
		if err := checkRound(p+".round", rv.Round, w); err != nil {
			return err
		}
		if rv.At.IsZero() {
			return inputErr(p+".at", RuleRequired, "")
		}
		if err := checkText(p+".reason", rv.Reason, false, maxText); err != nil {
			return err
		}
		if err := rv.CheckProvenance(); err != nil {
			return under(p, err)
		}
		if _, err := q.Fit(rv.Answer); err != nil {
			return under(p+".answer", err)
		}
	}
	if err := r.checkWeightHistory(experts, questions); err != nil {
		return err
	}
	seenE := map[int64]bool{}
	for i, e := range r.Events {
		p := fmt.Sprintf("events[%d]", i)
		if err := checkID(p+".id", e.ID, seenE); err != nil {
			return err
		}
		seenE[e.ID] = true
		if e.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", RuleUnknown, "%d is not the workshop's id %d", e.WorkshopID, w.ID)
		}
		if _, ok := questions[e.QuestionID]; e.QuestionID != 0 && !ok {
			return inputErr(p+".question_id", RuleUnknown, "no question %d in the record", e.QuestionID)
		}
		if !knownEvent(e.Kind) {
			return inputErr(p+".kind", RuleUnknown, "%q", e.Kind)
		}
		if e.At.IsZero() {
			return inputErr(p+".at", RuleRequired, "")
		}
		if err := checkText(p+".reason", e.Reason, false, maxText); err != nil {
			return err
		}
		if err := checkText(p+".detail", e.Detail, false, maxText); err != nil {
			return err
		}
	}
	return nil
}

func checkWorkshop(w Workshop) error {
	if w.ID <= 0 {
		return inputErr("workshop.id", RulePositive, "got %d", w.ID)
	}
	if err := checkText("workshop.title", w.Title, true, maxTitle); err != nil {
		return err
	}
	for _, f := range []struct{ name, v string }{
		{"workshop.purpose", w.Purpose}, {"workshop.decision", w.Decision}, {"workshop.notes", w.Notes},
	} {
		if err := checkText(f.name, f.v, false, maxText); err != nil {
			return err
		}
	}
	if w.Round < 1 {
		return inputErr("workshop.round", RulePositive, "got %d", w.Round)
	}
	if w.Created.IsZero() {
		return inputErr("workshop.created", RuleRequired, "")
	}
	return nil
}

func checkQuestion(p string, q Question) error {
	if q.Position < 1 {
		return inputErr(p+".position", RulePositive, "got %d", q.Position)
	}
	if q.TrueValue != nil && !q.Calibration {
		return inputErr(p+".true_value", RuleUnknown, "only a calibration question has a true value")
	}
	if q.RevealedThrough < 0 {
		return inputErr(p+".revealed_through", RuleNonNegative, "got %d", q.RevealedThrough)
	}
	if (q.RevealedAt != nil || q.RevealedThrough > 0) && !q.Frozen() {
		return inputErr(p+".revealed_at", RuleUnknown, "only a calibration question whose true value is revealed has a reveal")
	}
	return under(p, q.Validate())
}

func checkPrior(p string, ap AgreedPrior, q Question, w Workshop) error {
	if ap.ID <= 0 {
		return inputErr(p+".id", RulePositive, "got %d", ap.ID)
	}
	if ap.QuestionID != q.ID {
		return inputErr(p+".question_id", RuleUnknown, "%d is not the question's id %d", ap.QuestionID, q.ID)
	}
	switch ap.Source {
	case PriorFromPool, PriorFromConsensus:
	default:
		return inputErr(p+".source", RuleUnknown, "%q", ap.Source)
	}
	if err := ap.Dist.Validate(); err != nil {
		return under(p+".dist", err)
	}
	if ap.Consensus != nil {
		if _, err := q.Fit(*ap.Consensus); err != nil {
			return under(p+".consensus", err)
		}
	}
	if err := checkText(p+".rationale", ap.Rationale, false, maxText); err != nil {
		return err
	}
	if err := checkRound(p+".round", ap.Round, w); err != nil {
		return err
	}
	if ap.At.IsZero() {
		return inputErr(p+".at", RuleRequired, "")
	}
	return nil
}

// checkWeightHistory checks the weights in force, every set in the
// history with its basis, and that the history ends with the set in
// force. A record without a history (made before Parley kept one) must
// not name a set it does not carry.
func (r Record) checkWeightHistory(experts map[int64]bool, questions map[int64]Question) error {
	w := r.Workshop
	if err := checkRecordWeights("weights", r.Weights, w, experts); err != nil {
		return err
	}
	sets := map[int64]bool{}
	var last Weights
	for i, wt := range r.WeightHistory {
		p := fmt.Sprintf("weight_history[%d]", i)
		if err := checkRecordWeights(p, wt, w, experts); err != nil {
			return err
		}
		if wt.ID <= last.ID {
			return inputErr(p+".id", RuleUnknown, "set %d after set %d: the history runs oldest first", wt.ID, last.ID)
		}
		if wt.At.IsZero() {
			return inputErr(p+".at", RuleRequired, "")
		}
		if wt.Basis != nil {
			if err := checkBasis(p+".basis", *wt.Basis, wt, r, experts, questions); err != nil {
				return err
			}
		}
		sets[wt.ID], last = true, wt
	}
	switch {
	case len(r.WeightHistory) > 0 && r.Weights.ID != last.ID:
		return inputErr("weights.id", RuleUnknown, "set %d is in force, but the history ends with set %d", r.Weights.ID, last.ID)
	case len(r.WeightHistory) == 0 && r.Weights.ID != 0:
		return inputErr("weights.id", RuleUnknown, "set %d is not in weight_history", r.Weights.ID)
	case r.Weights.Basis != nil && len(r.WeightHistory) == 0:
		return inputErr("weights.basis", RuleUnknown, "a basis needs its set in weight_history")
	}
	for i, q := range r.Questions {
		for j, ap := range q.PriorHistory {
			if ap.WeightSetID != 0 && !sets[ap.WeightSetID] {
				return inputErr(fmt.Sprintf("questions[%d].prior_history[%d].weight_set_id", i, j), RuleUnknown,
					"no weight set %d in weight_history", ap.WeightSetID)
			}
		}
	}
	return nil
}

func checkRecordWeights(p string, wt Weights, w Workshop, experts map[int64]bool) error {
	if wt.ID < 0 {
		return inputErr(p+".id", RuleNonNegative, "got %d", wt.ID)
	}
	if wt.WorkshopID != w.ID {
		return inputErr(p+".workshop_id", RuleUnknown, "%d is not the workshop's id %d", wt.WorkshopID, w.ID)
	}
	switch wt.Scheme {
	case WeightsEqual, WeightsCustom, WeightsPerformance:
	default:
		return inputErr(p+".scheme", RuleUnknown, "%q", wt.Scheme)
	}
	ids := make([]int64, 0, len(wt.ByExpert))
	for id := range wt.ByExpert {
		ids = append(ids, id)
	}
	sort.Slice(ids, func(i, j int) bool { return ids[i] < ids[j] })
	total := 0.0
	for _, id := range ids {
		f := fmt.Sprintf("%s.by_expert[%d]", p, id)
		if !experts[id] {
			return inputErr(f, RuleUnknown, "no expert %d in the record", id)
		}
		v := wt.ByExpert[id]
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return inputErr(f, RuleFinite, "got %v", v)
		}
		if v < 0 {
			return inputErr(f, RuleNonNegative, "got %v", v)
		}
		total += v
	}
	if wt.Scheme != WeightsEqual && total == 0 {
		return inputErr(p+".by_expert", RuleWeightsNotAllZero, "")
	}
	return checkText(p+".reason", wt.Reason, false, maxText)
}

func checkRound(field string, round int, w Workshop) error {
	if round < 1 || round > w.Round {
		return inputErr(field, RuleCountRange, "round %d; the workshop has rounds 1 to %d", round, w.Round)
	}
	return nil
}

func checkID(field string, id int64, seen map[int64]bool) error {
	if id <= 0 {
		return inputErr(field, RulePositive, "got %d", id)
	}
	if seen[id] {
		return inputErr(field, RuleUnknown, "id %d appears twice", id)
	}
	return nil
}

func checkText(field, s string, required bool, max int) error {
	if required && strings.TrimSpace(s) == "" {
		return inputErr(field, RuleRequired, "")
	}
	if len(s) > max {
		return inputErr(field, RuleTooLong, "%d bytes, at most %d", len(s), max)
	}
	return nil
}

func knownEvent(k EventKind) bool {
	for _, known := range EventKinds {
		if k == known {
			return true
		}
	}
	return false
}

// under puts an InputError's field below a path in the document, so
// "values[1]" from a fit becomes "revisions[3].answer.values[1]". Other
// errors are returned as they are.
func under(path string, err error) error {
	var ie *InputError
	if !errors.As(err, &ie) {
		return err
	}
	return &InputError{Field: path + "." + ie.Field, Rule: ie.Rule, Detail: ie.Detail}
}
