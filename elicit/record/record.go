package record

import (
	"errors"
	"fmt"
	"io"
	"strconv"
	"time"

	jsonv2 "github.com/go-json-experiment/json"
	"github.com/go-json-experiment/json/jsontext"
	jsonv1 "github.com/go-json-experiment/json/v1"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Version is the layout version of the export document, written as
// its "parley_record" key.
const Version = 1

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
	Format    int               `json:"parley_record"`
	Generated time.Time         `json:"generated_at"`
	Caution   string            `json:"caution"`
	Workshop  workshop.Workshop `json:"workshop"`
	Experts   []workshop.Expert `json:"experts"`
	Questions []Question        `json:"questions"`
	// Revisions is every saved answer, oldest first, with its fit.
	Revisions []Revision `json:"revisions"`
	// Weights is the set in force; WeightHistory is every set applied,
	// oldest first, each with what it was made from, so every pool the
	// record shows (the current pools and each agreed prior's, through
	// its weight_set_id) can be reproduced. WeightHistory is empty when
	// no set was ever applied, and in records made before Parley kept it.
	Weights       workshop.Weights   `json:"weights"`
	WeightHistory []workshop.Weights `json:"weight_history"`
	Events        []workshop.Event   `json:"events"`
	// StudyData is every batch of observed data recorded against the
	// questions' agreed priors, oldest first; empty in records made before
	// Parley kept data.
	StudyData []workshop.StudyData `json:"study_data"`
	// Performance is the scoring of the panel on the calibration questions
	// by Cooke's classical model (record_scores.go), present once every
	// calibration question's true value is revealed; PerformanceNote says
	// why it is absent when there are calibration questions.
	Performance     *workshop.Performance `json:"performance,omitempty"`
	PerformanceNote string                `json:"performance_note,omitempty"`
	// Fingerprint is the record's fingerprint as it was written: the last
	// value of its chain (package fingerprint), in 64 hex digits; Chain
	// lists every fact with the value after it. Both are absent in
	// records made before Parley kept them, and in a record narrowed to
	// one question, which leaves facts out.
	Fingerprint string `json:"fingerprint,omitempty"`
	Chain       *Chain `json:"chain,omitempty"`
	// OneQuestion is the question a record narrowed to one question
	// (ForQuestion) was narrowed to; 0 in a whole record. Such a record
	// leaves facts out, so the fingerprints worked from it are not the
	// workshop's.
	OneQuestion int64 `json:"one_question,omitempty"`
}

// Question is a question with its current state: each expert's
// latest fit, the pool of those fits, and the agreed priors. A
// calibration question's true value is present only once revealed.
type Question struct {
	workshop.Question
	CurrentFits []CurrentFit `json:"current_fits"`
	Pool        *Pool        `json:"pool,omitempty"`
	PoolError   string       `json:"pool_error,omitempty"`
	// AgreedPrior is the current agreed prior, with snippets for
	// modelling languages; PriorHistory is every agreement, oldest first.
	AgreedPrior  *Prior                 `json:"agreed_prior,omitempty"`
	PriorHistory []workshop.AgreedPrior `json:"prior_history"`
	// Update is the agreed prior updated with the question's recorded
	// data (workshop.StudyUpdate), present once data are recorded;
	// UpdateError says why it could not be computed.
	Update      *workshop.Update `json:"update,omitempty"`
	UpdateError string           `json:"update_error,omitempty"`
}

// CurrentFit is an expert's latest revision on a question and its fit.
type CurrentFit struct {
	ExpertID   int64  `json:"expert_id"`
	RevisionID int64  `json:"revision_id"`
	Round      int    `json:"round"`
	Fit        *Fit   `json:"fit,omitempty"`
	FitError   string `json:"fit_error,omitempty"`
}

// Revision is one saved answer with the Beta fitted to it. FitError
// is set instead of Fit when the answer cannot be fitted.
type Revision struct {
	workshop.Revision
	// Sheet is the answer sheet and row the judgement was read from, when
	// the facilitator imported it from one: derived from the log's
	// answers_imported entries (workshop.SheetSources), as the CSV's
	// sheet_file, sheet_row and sheet_sha256 are, and checked against
	// them when a record is read (RuleSheetMismatch).
	Sheet    *SheetRow `json:"sheet,omitempty"`
	Fit      *Fit      `json:"fit,omitempty"`
	FitError string    `json:"fit_error,omitempty"`
}

// SheetRow is where a judgement read from an answer sheet came from: the
// file's name (empty for a sheet pasted into the upload page), its row as
// a spreadsheet numbers rows, and the SHA-256 of the sheet as read.
type SheetRow struct {
	File   string `json:"file"`
	Row    int    `json:"row"`
	SHA256 string `json:"sha256"`
}

// sheetRows is each revision's SheetRow by the events (workshop.SheetSources).
func sheetRows(events []workshop.Event, revisions []workshop.Revision) map[int64]SheetRow {
	out := map[int64]SheetRow{}
	for id, s := range workshop.SheetSources(events, revisions) {
		out[id] = SheetRow{File: s.Name, Row: s.Row, SHA256: s.SHA256}
	}
	return out
}

// Fit is a fit as the record shows it: the Beta on the question's
// scale, how well it meets the stated probabilities, its 5/50/95
// percentiles and any warnings.
type Fit struct {
	Dist         elicit.ScaledBeta    `json:"dist"`
	SSE          float64              `json:"sse"`
	MaxProbError float64              `json:"max_prob_error"`
	Probs        []float64            `json:"probs"`
	Stated       []float64            `json:"stated"`
	Fitted       []float64            `json:"fitted"`
	Percentiles  workshop.Percentiles `json:"percentiles"`
	Warnings     []Warning            `json:"warnings"`
}

// Warning is one warning about a fit. Tail is a tail_misfit warning's
// particulars (elicit.Fit.TailMiss), for a page that lists many fits'
// misses and words the rule once; the export leaves it out, as the
// message says the same, and a record read back has none.
type Warning struct {
	Code    string           `json:"code"`
	Message string           `json:"message"`
	Tail    *elicit.TailMiss `json:"-"`
}

// Pool is the linear opinion pool of the experts' current fits.
type Pool struct {
	Weights     []workshop.ExpertWeight `json:"weights"` // normalised, summing to 1
	Mean        float64                 `json:"mean"`
	SD          float64                 `json:"sd"`
	Percentiles workshop.Percentiles    `json:"percentiles"`
	// BestBeta is the single Beta that represents the pool (elicit.Pool.BestBeta);
	// BestBetaError says why there is none.
	BestBeta      *BestBeta `json:"best_beta,omitempty"`
	BestBetaError string    `json:"best_beta_error,omitempty"`
}

// BestBeta is the single Beta that represents a pool and how far it
// is from the pool: the least-squares objective on the probability scale,
// the largest CDF gap, and its 5/50/95 percentiles minus the pool's.
type BestBeta struct {
	Dist          elicit.ScaledBeta    `json:"dist"`
	SSE           float64              `json:"sse"`
	MaxCDFError   float64              `json:"max_cdf_error"`
	QuantileDiffs workshop.Percentiles `json:"quantile_diffs"`
}

// Prior is the current agreed prior with its summary (mean, SD and
// 5th, 50th and 95th percentiles, on the question's scale) and one-line
// snippets of it in modelling languages. The priors CSV and the report's
// summary table print these very numbers.
type Prior struct {
	workshop.AgreedPrior
	Mean        float64              `json:"mean"`
	SD          float64              `json:"sd"`
	Percentiles workshop.Percentiles `json:"percentiles"`
	Snippets    []Snippet            `json:"snippets"`
	// Warnings are the prior's own (elicit.PriorWarnings): its shape, its
	// weight, and a 5%, 50% or 95% point written as a bound with its
	// value. A record written before they were kept has none.
	Warnings []Warning `json:"warnings,omitempty"`
	// Unsummarised is true for a prior read from a record written before
	// agreed_prior carried its summary (builds before 9dcc36a,
	// 2026-12-02), which has none of mean, sd and percentiles: its reader
	// was given no summary to check (set by Decode).
	Unsummarised bool `json:"-"`
}

// newPrior summarises an agreed prior for the record.
func newPrior(p workshop.AgreedPrior) *Prior {
	d := p.Dist
	return &Prior{AgreedPrior: p, Mean: d.Mean(), SD: d.SD(),
		Percentiles: workshop.Percentiles{P05: d.Quantile(0.05), P50: d.Quantile(0.5), P95: d.Quantile(0.95)},
		Snippets:    PriorSnippets(d), Warnings: priorWarnings(d)}
}

// priorWarnings are elicit.PriorWarnings in the record's form.
func priorWarnings(d elicit.ScaledBeta) []Warning {
	out := []Warning{}
	for _, w := range elicit.PriorWarnings(d) {
		out = append(out, Warning{Code: string(w.Code), Message: w.Message})
	}
	return out
}

// Snippet is a prior written in one modelling language's notation.
type Snippet struct {
	Language string `json:"language"`
	Code     string `json:"code"`
}

// Build builds the export document at time now. Every revision is
// fitted with its question's Fit; each question's current fits, pool and
// single Beta are its panel state (workshop.PanelState) under the current
// weights (equal weights give each expert 1; other schemes give an expert
// without a weight 0). A true value is left out until the facilitator has
// revealed it.
func Build(src workshop.Snapshot, now time.Time) (Record, error) {
	return build(src, now, true)
}

// BuildHistory builds the record without the panels: every question,
// expert, revision with its fit, weight set and event, and the agreed
// priors, but no question's current fits, pool or single Beta and no
// performance scores. It is what the one-row-per-revision CSV needs, at a
// fraction of the cost for a large panel (no pool is formed).
func BuildHistory(src workshop.Snapshot, now time.Time) (Record, error) {
	return build(src, now, false)
}

func build(src workshop.Snapshot, now time.Time, panels bool) (Record, error) {
	r := Record{
		Format:        Version,
		Generated:     now.UTC(),
		Caution:       Caution,
		Workshop:      src.Workshop,
		Experts:       append([]workshop.Expert{}, src.Experts...),
		Questions:     []Question{},
		Revisions:     []Revision{},
		Weights:       src.Weights,
		WeightHistory: []workshop.Weights{},
		Events:        append([]workshop.Event{}, src.Events...),
		StudyData:     append([]workshop.StudyData{}, src.Data...),
	}
	questions := map[int64]workshop.Question{}
	for _, q := range src.Questions {
		if q.WorkshopID != src.Workshop.ID {
			return Record{}, fmt.Errorf("elicit: record: question %d belongs to workshop %d, not %d",
				q.ID, q.WorkshopID, src.Workshop.ID)
		}
		questions[q.ID] = q
	}
	// A weight set's basis shows a true value only once it is revealed,
	// as the question does.
	withheld := func(w workshop.Weights) workshop.Weights {
		if w.Basis != nil {
			b := w.Basis.Withheld(questions)
			w.Basis = &b
		}
		return w
	}
	r.Weights = withheld(r.Weights)
	for _, w := range src.WeightHistory {
		r.WeightHistory = append(r.WeightHistory, withheld(w))
	}
	// Every revision's fit, kept since it was saved (or fitted once here);
	// the panels read these fits.
	type fitted struct {
		fit elicit.Fit
		err error
	}
	fits := make(map[int64]fitted, len(src.Revisions))
	index := make(map[int64]int, len(src.Revisions)) // revision id → index in r.Revisions
	sheets := sheetRows(src.Events, src.Revisions)
	for _, rv := range src.Revisions {
		q, ok := questions[rv.QuestionID]
		if !ok {
			return Record{}, fmt.Errorf("elicit: record: revision %d: question %d: %w", rv.ID, rv.QuestionID, workshop.ErrNotFound)
		}
		rr := Revision{Revision: rv}
		if s, ok := sheets[rv.ID]; ok {
			rr.Sheet = &s
		}
		if rr.EnteredBy == "" {
			rr.EnteredBy = workshop.ByExpert // records older than the field were all the experts' own
		}
		f, err := rv.FitOf(q) // the kept fit, fitted afresh only for revisions older than kept fits
		if err != nil {
			rr.FitError = err.Error()
		} else {
			rr.Fit = FitOf(f)
		}
		fits[rv.ID] = fitted{f, err}
		index[rv.ID] = len(r.Revisions)
		r.Revisions = append(r.Revisions, rr)
	}
	fitOf := func(_ workshop.Question, rv workshop.Revision) (elicit.Fit, error) {
		f := fits[rv.ID]
		return f.fit, f.err
	}
	for _, q := range src.Questions {
		rq := Question{Question: q, CurrentFits: []CurrentFit{}, PriorHistory: []workshop.AgreedPrior{}}
		if !q.Revealed {
			rq.TrueValue = nil
		}
		for _, ap := range src.Priors {
			if ap.QuestionID == q.ID {
				rq.PriorHistory = append(rq.PriorHistory, ap)
			}
		}
		if n := len(rq.PriorHistory); n > 0 {
			cur := rq.PriorHistory[n-1]
			rq.AgreedPrior = newPrior(cur)
			if _, _, batches := workshop.DataTotals(src.Data, q.ID); batches > 0 {
				if u, err := workshop.StudyUpdate(q, cur, src.Data); err != nil {
					rq.UpdateError = workshop.UpdateFailure(q, cur, src.Data, err)
				} else {
					rq.Update = &u
				}
			}
		}
		if !panels {
			r.Questions = append(r.Questions, rq)
			continue
		}
		panel := workshop.PanelState(workshop.PanelInput{Question: q, Experts: src.Experts,
			Revisions: src.Revisions, Weights: src.Weights, Fit: fitOf})
		for _, m := range panel.Members {
			if m.Revision == nil {
				continue
			}
			rv := r.Revisions[index[m.Revision.ID]]
			rq.CurrentFits = append(rq.CurrentFits, CurrentFit{
				ExpertID: m.Expert.ID, RevisionID: rv.ID, Round: rv.Round, Fit: rv.Fit, FitError: rv.FitError,
			})
		}
		switch {
		case errors.Is(panel.PoolErr, workshop.ErrNoFits):
		case panel.PoolErr != nil:
			rq.PoolError = panel.PoolErr.Error()
		default:
			rq.Pool = recordPool(panel)
		}
		r.Questions = append(r.Questions, rq)
	}
	if panels {
		r.Performance, r.PerformanceNote = recordPerformance(src)
	}
	r.seal()
	return r, nil
}

// recordPool is a panel's pool as the record writes it.
func recordPool(p workshop.Panel) *Pool {
	pts := p.Points
	rp := &Pool{
		Weights:     []workshop.ExpertWeight{},
		Mean:        p.Pool.Mean(),
		SD:          p.Pool.SD(),
		Percentiles: workshop.Percentiles{P05: pts[0].Value, P50: pts[1].Value, P95: pts[2].Value},
	}
	if p.Single == nil {
		rp.BestBetaError = p.SingleErr.Error()
	} else {
		d := p.Single.QuantileDiffs
		rp.BestBeta = &BestBeta{Dist: p.Single.Dist, SSE: p.Single.SSE, MaxCDFError: p.Single.MaxCDFError,
			QuantileDiffs: workshop.Percentiles{P05: d[0], P50: d[1], P95: d[2]}}
	}
	for _, m := range p.Members {
		if m.Pooled {
			rp.Weights = append(rp.Weights, workshop.ExpertWeight{ExpertID: m.Expert.ID, Weight: m.Share})
		}
	}
	return rp
}

// PriorSnippets writes d as Stan, R, PyMC and JAGS write a Beta prior on a
// parameter p. A Beta on [Lower, Upper] other than [0, 1] is written for
// the unit-scale parameter, with the rescaling alongside.
func PriorSnippets(d elicit.ScaledBeta) []Snippet {
	a, b := num(d.Alpha), num(d.Beta.Beta)
	unit := d.OnUnit()
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

// FitOf converts a fit to the record's form.
func FitOf(f elicit.Fit) *Fit {
	rf := &Fit{
		Dist:         f.Dist,
		SSE:          f.SSE,
		MaxProbError: f.MaxProbError,
		Probs:        f.Probs,
		Stated:       f.Stated,
		Fitted:       f.Fitted,
		Percentiles:  workshop.Percentiles{P05: f.Percentiles[0], P50: f.Percentiles[1], P95: f.Percentiles[2]},
		Warnings:     []Warning{},
	}
	for _, w := range f.Warnings {
		rw := Warning{Code: string(w.Code), Message: w.Message}
		if w.Code == elicit.WarnTailMisfit {
			if m, ok := f.TailMiss(); ok {
				rw.Tail = &m
			}
		}
		rf.Warnings = append(rf.Warnings, rw)
	}
	return rf
}

// ForQuestion narrows the record to one question: its revisions, its
// events, its study data and the workshop-wide events. The panel and weights stay whole,
// and so does the evidence behind any performance weights (the
// calibration questions their bases scored or left out with their
// events, the revisions they scored, and the revision each such
// question's freeze names), so the narrowed record still reproduces the
// question's pools and reads back. A withdrawal's event goes with its
// revision, and is left out with it.
func (r Record) ForQuestion(id int64) (Record, error) {
	out := r
	out.Questions, out.Revisions, out.Events, out.StudyData = nil, nil, nil, []workshop.StudyData{}
	// The narrowed record leaves facts out, so it cannot carry the
	// workshop's chain, and says what it was narrowed to.
	out.Fingerprint, out.Chain, out.OneQuestion = "", nil, id
	keepQ, keepR := map[int64]bool{id: true}, map[int64]bool{}
	found := false
	for _, q := range r.Questions {
		found = found || q.ID == id
	}
	if !found {
		return Record{}, fmt.Errorf("elicit: question %d of workshop %d: %w", id, r.Workshop.ID, workshop.ErrNotFound)
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
			// The revision its freeze names, which a record must hold.
			if q.RevealedThrough > 0 {
				keepR[q.RevealedThrough] = true
			}
		}
	}
	kept, withdrawnBy := map[int64]bool{}, map[int64]int64{} // withdrawal event's id → its revision
	for rev, e := range workshop.Withdrawals(r.Events) {
		withdrawnBy[e.ID] = rev
	}
	for _, rv := range r.Revisions {
		if rv.QuestionID == id || keepR[rv.ID] {
			out.Revisions = append(out.Revisions, rv)
			kept[rv.ID] = true
		}
	}
	// The data recorded against the kept questions: another question's
	// data named a question the narrowed record lacks, and it did not
	// read back.
	for _, d := range r.StudyData {
		if keepQ[d.QuestionID] {
			out.StudyData = append(out.StudyData, d)
		}
	}
	for _, e := range r.Events {
		// The kept questions' events too: the decisions on the evidence
		// (a scored answer's reason withheld, a reveal) go with it.
		// A withdrawal goes with its revision: one the narrowed record
		// leaves out (an answer to a calibration question the weights
		// did not score) would be named by its event alone.
		if rev, ok := withdrawnBy[e.ID]; ok && e.Kind == workshop.EventRevisionWithdrawn && !kept[rev] {
			continue
		}
		if e.QuestionID == 0 || keepQ[e.QuestionID] {
			out.Events = append(out.Events, e)
		}
	}
	return out, nil
}

// WriteJSON writes the record as one JSON document indented by two
// spaces, as `parley export` and the facilitator's download give it. It
// is the one JSON writer of records.
//
// It encodes with go-json-experiment's encoder under encoding/json's
// (v1) options, which indents as it writes instead of indenting a second
// copy: half the CPU of encoding/json for a 200-expert record, and the
// same bytes, which TestWriteJSONMatchesEncodingJSON checks against
// encoding/json itself.
func (r Record) WriteJSON(w io.Writer) error {
	if err := jsonv2.MarshalWrite(w, r, jsonv1.DefaultOptionsV1(), jsontext.WithIndent("  ")); err != nil {
		return err
	}
	_, err := io.WriteString(w, "\n") // as json.Encoder ends a value
	return err
}
