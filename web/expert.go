package web

import (
	"crypto/hmac"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"net/http"
	"runtime"
	"sort"
	"strconv"
	"strings"

	"github.com/a-h/templ"
	"github.com/go-chi/chi/v5"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/web/chart"
)

// An expert's pages: their home (the workshop and their questions) and one
// page per question, where they enter a judgement in the question's
// format, preview the fitted Beta, save revisions and, from round 2, see
// the other experts' curves without names.

// expertHomeView is what an expert's home page shows.
type expertHomeView struct {
	Base      string // "/e/{token}"
	Expert    string // the expert's own display name
	Title     string
	Purpose   string
	Decision  string
	Round     int
	Open      bool
	Questions []expertQuestionItem
}

type expertQuestionItem struct {
	Href        string
	Position    int
	Wording     string
	Quantity    string
	Units       string
	Calibration bool
	Answered    bool   // has a revision in the current round
	AnsweredAt  string // time of that revision
	Earlier     bool   // answered only in an earlier round
}

// expertQuestionView is one question's page.
type expertQuestionView struct {
	Base     string
	Action   string // the question's URL
	Title    string
	Round    int
	Open     bool
	Question expertQuestionInfo
	Form     answerForm
	Preview  *previewView
	Saved    bool
	Closed   string // a message when a save was refused because the round is closed
	History  []historyRow
	Panel    *chart.PanelView
	Spread   *chart.SpreadView // instead of Panel when the panel is large
	// FeedbackRound is the round whose close the panel shows.
	FeedbackRound int
	// PanelMissing is set when the panel could not be read.
	PanelMissing bool
}

type expertQuestionInfo struct {
	ID          int64
	Position    int
	Wording     string
	Quantity    string
	Units       string
	Lower       string
	Upper       string
	Format      elicit.AnswerFormat
	Calibration bool
	Revealed    string // the true value, only once revealed
}

// answerForm is the judgement form in the question's format, with the
// values as typed and any message beside its field.
type answerForm struct {
	Format      elicit.AnswerFormat
	Fields      []formField
	Reason      string
	ReasonError string
	Error       string // a message not tied to one field
	Invalid     bool   // some field has a message
	Chips       int    // chips to place, FormatChips
}

type formField struct {
	Name   string // the form key, also the elicit field name: "values[1]", "lowest"
	ID     string
	Label  string
	Hint   string
	Value  string
	Error  string
	Suffix string // "%" for confidence
}

// previewView is the fitted picture with its read-backs.
type previewView struct {
	Fit       chart.FitView
	Params    string
	ReadBacks []string
	Warnings  []string
	Problem   string // why no fit could be drawn
}

type historyRow struct {
	Round  int
	At     string
	Reason string
	Alpha  string
	Beta   string
	Values string
}

// chance says a probability the way people say odds: "1 in 20" when
// p is within 0.2% of 1/N for a whole N of at least 3, "about 1 in 39" for
// other probabilities below 0.2, otherwise a percentage ("a 47.5%
// chance"), which reads better than "1 in 2" for a value near a half.
func chance(p float64) string {
	switch {
	case math.IsNaN(p) || math.IsInf(p, 0) || p < 0 || p > 1:
		return "an unknown chance"
	case p == 0:
		return "no chance"
	case p == 1:
		return "certainty"
	case p < 0.001:
		return "less than 1 in 1000"
	}
	n := 1 / p
	r := math.Round(n)
	switch {
	case r >= 3 && math.Abs(p*r-1) <= 0.002:
		return fmt.Sprintf("a 1 in %d chance", int(r))
	case p < 0.2:
		return fmt.Sprintf("about a 1 in %d chance", int(r))
	}
	return "a " + chart.FormatPercent(p) + " chance"
}

// readBack turns one stated pair P(X ≤ x) = p into a sentence, speaking of
// the smaller tail so that 95% reads "1 in 20 ... above".
func readBack(p, x float64, units string) string {
	v := chart.FormatValue(x)
	if u := strings.TrimSpace(units); u != "" {
		v += " " + u
	}
	switch {
	case p == 0.5:
		return "You are saying the value is as likely to be below " + v + " as above it."
	case p < 0.5:
		return "You are saying there is " + chance(p) + " the value is below " + v + "."
	}
	return "You are saying there is " + chance(1-p) + " the value is above " + v + "."
}

// fittedBack says what the fitted Beta gives for the same statement.
func fittedBack(p, fittedP float64) string {
	if p <= 0.5 {
		return "The fitted curve gives " + chance(fittedP) + " below it."
	}
	return "The fitted curve gives " + chance(1-fittedP) + " above it."
}

// newAnswerForm lays out the question's form with the typed values.
func newAnswerForm(q elicit.Question, typed map[string]string) answerForm {
	f := answerForm{Format: q.Format, Chips: q.Chips}
	add := func(name, label, hint, suffix string) {
		f.Fields = append(f.Fields, formField{
			Name: name, ID: "f-" + strings.NewReplacer("[", "-", "]", "").Replace(name),
			Label: label, Hint: hint, Value: typed[name], Suffix: suffix,
		})
	}
	units := ""
	if u := strings.TrimSpace(q.Units); u != "" {
		units = " (" + u + ")"
	}
	switch q.Format {
	case elicit.FormatInterval:
		add("lowest", "Lowest plausible value"+units, "", "")
		add("highest", "Highest plausible value"+units, "", "")
		add("best", "Best estimate"+units, "", "")
		add("confidence", "How sure are you that the true value lies between your lowest and highest?", "A percentage, for example 80.", "%")
	case elicit.FormatChips:
		for i := 0; i+1 < len(q.BinEdges); i++ {
			add(fmt.Sprintf("counts[%d]", i),
				fmt.Sprintf("Chips from %s to %s", chart.FormatValue(q.BinEdges[i]), chart.FormatValue(q.BinEdges[i+1])), "", "")
		}
	default:
		for i, p := range q.Probs {
			hint := ""
			if p == 0.5 {
				hint = "Your median: as likely below as above."
			}
			add(fmt.Sprintf("values[%d]", i),
				fmt.Sprintf("The value with a %s chance of being lower%s", chart.FormatPercent(p), units), hint, "")
		}
	}
	return f
}

// answerValues writes a saved answer back as form values, for pre-filling.
func answerValues(q elicit.Question, a elicit.Answer) map[string]string {
	m := map[string]string{}
	switch q.Format {
	case elicit.FormatInterval:
		m["lowest"] = fmt.Sprint(a.Lowest)
		m["highest"] = fmt.Sprint(a.Highest)
		m["best"] = fmt.Sprint(a.Best)
		m["confidence"] = chart.FormatValue(a.Confidence * 100)
	case elicit.FormatChips:
		for i, c := range a.Counts {
			m[fmt.Sprintf("counts[%d]", i)] = fmt.Sprint(c)
		}
	default:
		for i, v := range a.Values {
			m[fmt.Sprintf("values[%d]", i)] = fmt.Sprint(v)
		}
	}
	return m
}

func fieldClass(f formField) string {
	if f.Error != "" {
		return "field field-invalid"
	}
	return "field"
}

func ariaInvalid(f formField) string {
	if f.Error != "" {
		return "true"
	}
	return "false"
}

// describedBy links the input to its hint and message, when it has them.
func describedBy(f formField) templ.Attributes {
	var ids []string
	if f.Hint != "" {
		ids = append(ids, f.ID+"-hint")
	}
	if f.Error != "" {
		ids = append(ids, f.ID+"-error")
	}
	if len(ids) == 0 {
		return nil
	}
	return templ.Attributes{"aria-describedby": strings.Join(ids, " ")}
}

// expertRoutes are mounted under /e/{token} behind requireExpert, so
// every handler here acts for expertFrom(ctx) and no other. No expert or
// revision id ever appears in these URLs.
func (s *Server) expertRoutes(r chi.Router) {
	// Previews and saves go before pages when the server is busy (turns.go).
	r.Get("/", s.inTurn(pagePriority, s.expertHomePage))
	r.Get("/q/{qid}", s.inTurn(pagePriority, s.expertQuestionPage))
	r.Post("/q/{qid}/preview", s.inTurn(interactivePriority, s.expertPreviewPost))
	r.Post("/q/{qid}/save", s.inTurn(interactivePriority, s.expertSavePost))
}

func expertBase(r *http.Request) string { return "/e/" + chi.URLParam(r, "token") }

const timeLayout = "2006-01-02 15:04 UTC"

func (s *Server) expertHomePage(w http.ResponseWriter, r *http.Request) {
	e := expertFrom(r.Context())
	ws, err := s.store.Workshop(r.Context(), e.WorkshopID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	qs, err := s.store.Questions(r.Context(), ws.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	revs, err := s.store.ExpertRevisions(r.Context(), e.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	base := expertBase(r)
	v := expertHomeView{Base: base, Expert: e.Name, Title: ws.Title, Purpose: ws.Purpose, Decision: ws.Decision, Round: ws.Round, Open: ws.Open}
	for _, q := range qs {
		it := expertQuestionItem{
			Href: base + "/q/" + strconv.FormatInt(q.ID, 10), Position: q.Position,
			Wording: q.Wording, Quantity: q.Quantity, Units: q.Units, Calibration: q.Calibration,
		}
		for _, rv := range revs {
			if rv.ExpertID != e.ID || rv.QuestionID != q.ID {
				continue
			}
			if rv.Round == ws.Round {
				it.Answered, it.AnsweredAt = true, rv.At.UTC().Format(timeLayout)
			} else {
				it.Earlier = true
			}
		}
		v.Questions = append(v.Questions, it)
	}
	s.renderPage(w, r, http.StatusOK, PageMeta{Title: ws.Title, Invented: ws.Invented, Caution: true}, expertHome(v))
}

// expertScope is what a question's handlers work on: the expert, their
// workshop, the question, and the expert's own revisions of it.
type expertScope struct {
	expert   elicit.Expert
	workshop elicit.Workshop
	question elicit.Question
	own      []elicit.Revision // oldest first; read by readOwn
}

// loadExpertScope finds the question in the expert's own workshop. A
// question of another workshop is as absent as one that does not exist.
func (s *Server) loadExpertScope(r *http.Request) (expertScope, error) {
	ctx := r.Context()
	sc := expertScope{expert: expertFrom(ctx)}
	qid, err := strconv.ParseInt(chi.URLParam(r, "qid"), 10, 64)
	if err != nil || qid <= 0 {
		return sc, elicit.ErrNotFound
	}
	if sc.question, err = s.store.Question(ctx, qid); err != nil {
		return sc, err
	}
	if sc.question.WorkshopID != sc.expert.WorkshopID {
		return sc, elicit.ErrNotFound
	}
	if sc.workshop, err = s.store.Workshop(ctx, sc.expert.WorkshopID); err != nil {
		return sc, err
	}
	return sc, nil
}

// readOwn reads the expert's own revisions of the question, for the
// pages that show them; the preview fragment does without.
func (s *Server) readOwn(r *http.Request, sc *expertScope) error {
	var err error
	sc.own, err = s.store.QuestionExpertRevisions(r.Context(), sc.question.ID, sc.expert.ID)
	return err
}

func (s *Server) expertQuestionPage(w http.ResponseWriter, r *http.Request) {
	sc, err := s.loadExpertScope(r)
	if err == nil {
		err = s.readOwn(r, &sc)
	}
	if err != nil {
		s.fail(w, r, err)
		return
	}
	// Go's scheduler has no priorities: once running, a page would keep
	// its CPU until done while the goroutines that read and answer
	// previews and saves wait for one. The page lets them run first
	// between its parts.
	runtime.Gosched()
	var typed map[string]string
	var preview *previewView
	if n := len(sc.own); n > 0 {
		cur := sc.own[n-1]
		typed = answerValues(sc.question, cur.Answer)
		if fit, err := fits.fit(sc.question, cur); err == nil {
			preview = newPreview(sc.question, fit)
		}
	}
	v := s.questionView(r, sc, typed, "")
	v.Preview = preview
	v.Saved = r.URL.Query().Get("saved") == "1"
	runtime.Gosched()
	s.renderQuestion(w, r, http.StatusOK, sc, v)
}

// readAnswer parses the posted form into the question's format through
// the one form parser, then fits it with elicit, which applies the
// judgement's own rules. Errors land beside the fields they name.
func readAnswer(q elicit.Question, f *Form) (elicit.Answer, elicit.Fit, bool) {
	var a elicit.Answer
	switch q.Format {
	case elicit.FormatInterval:
		a.Lowest = f.Float("lowest")
		a.Highest = f.Float("highest")
		a.Best = f.Float("best")
		a.Confidence = f.Float("confidence") / 100
	case elicit.FormatChips:
		a.Counts = make([]int, max(0, len(q.BinEdges)-1))
		for i := range a.Counts {
			a.Counts[i] = f.Int(fmt.Sprintf("counts[%d]", i), 0, 1_000_000)
		}
	default:
		a.Values = make([]float64, len(q.Probs))
		for i := range a.Values {
			a.Values[i] = f.Float(fmt.Sprintf("values[%d]", i))
		}
	}
	if !f.OK() {
		return a, elicit.Fit{}, false
	}
	fit, err := q.Fit(a)
	if err != nil {
		var ie *elicit.InputError
		switch {
		case errors.As(err, &ie) && ie.Field == "confidence":
			// The form takes a percentage; say the rule in its terms.
			f.set("confidence", "must lie strictly between 0% and 100%")
		case errors.As(err, &ie) && ie.Field == "counts":
			// A rule about all the bins together belongs to the whole form.
			f.set("", "Your chips "+string(ie.Rule)+detailSuffix(ie.Detail)+".")
		case errors.As(err, &ie) && ie.Rule == elicit.RuleFitRange && q.Format == elicit.FormatChips:
			f.set("", "No distribution Parley can draw matches where your chips are. Please spread them over more bins.")
		case errors.As(err, &ie) && ie.Rule == elicit.RuleFitRange:
			// The rule's own words speak of alpha and beta; an expert
			// reads what to change.
			f.set("", "These values lie too close together, or too close to a bound, for any distribution Parley can draw to match them. Please spread them out or move them away from the bounds.")
		case errors.Is(err, elicit.ErrFitFailed):
			// Never the fitter's own words on an expert's screen.
			f.set("", "No distribution could be drawn through these answers. Please check them: each value above the one before, none at a bound, and not all crowded together.")
		default:
			f.Fail(err, nil)
		}
		return a, fit, false
	}
	return a, fit, true
}

func (s *Server) expertPreviewPost(w http.ResponseWriter, r *http.Request) {
	sc, err := s.loadExpertScope(r)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	if !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	_, fit, ok := readAnswer(sc.question, f)
	fragment := r.URL.Query().Get("fragment") == "1"
	status := http.StatusOK
	var p *previewView
	if ok {
		p = newPreview(sc.question, fit)
	} else {
		status = http.StatusUnprocessableEntity
		p = &previewView{Problem: problemSummary(newAnswerForm(sc.question, nil), f)}
	}
	if fragment {
		s.render(w, r, status, expertPreview(p))
		return
	}
	if err := s.readOwn(r, &sc); err != nil {
		s.fail(w, r, err)
		return
	}
	v := s.questionView(r, sc, formValues(f), f.Value("reason"))
	applyErrors(&v.Form, f)
	v.Preview = p
	s.renderQuestion(w, r, status, sc, v)
}

func (s *Server) expertSavePost(w http.ResponseWriter, r *http.Request) {
	sc, err := s.loadExpertScope(r)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	if !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	reason := f.Text("reason", MaxLongText, false)
	a, fit, ok := readAnswer(sc.question, f)
	// The page is drawn again only when the save is refused; a saved
	// answer redirects to the question's page.
	again := func(status int, closed string, fit *elicit.Fit) {
		if err := s.readOwn(r, &sc); err != nil {
			s.fail(w, r, err)
			return
		}
		v := s.questionView(r, sc, formValues(f), f.Value("reason"))
		applyErrors(&v.Form, f)
		if fit == nil {
			v.Preview = &previewView{Problem: problemSummary(v.Form, f)}
		} else {
			v.Preview = newPreview(sc.question, *fit)
		}
		if closed != "" {
			v.Open, v.Closed = false, closed
		}
		s.renderQuestion(w, r, status, sc, v)
	}
	if !ok || !f.OK() {
		again(http.StatusUnprocessableEntity, "", nil)
		return
	}
	closed := "Round " + strconv.Itoa(sc.workshop.Round) + " is closed, so your answer was not saved. Your values are kept below; the facilitator will open the next round."
	if !sc.workshop.Open {
		again(http.StatusConflict, closed, &fit)
		return
	}
	rev := elicit.Revision{QuestionID: sc.question.ID, ExpertID: sc.expert.ID, Reason: reason, Answer: a}
	// The write waits on the disk, not on a CPU: previews go on meanwhile.
	stepAway(r)
	err = s.store.SaveRevision(r.Context(), &rev)
	if err != nil {
		if !stepBack(r) {
			return
		}
		if errors.Is(err, elicit.ErrRoundClosed) {
			again(http.StatusConflict, closed, &fit)
			return
		}
		s.fail(w, r, err)
		return
	}
	http.Redirect(w, r, expertBase(r)+"/q/"+strconv.FormatInt(sc.question.ID, 10)+"?saved=1", http.StatusSeeOther)
}

func (s *Server) renderQuestion(w http.ResponseWriter, r *http.Request, status int, sc expertScope, v expertQuestionView) {
	m := PageMeta{
		Title:    "Question " + strconv.Itoa(sc.question.Position) + " · " + sc.workshop.Title,
		Invented: sc.workshop.Invented, Caution: true,
		Scripts: []string{"/static/preview.js"},
	}
	s.renderPage(w, r, status, m, expertQuestion(v))
}

// questionView builds the page around the form; the caller adds the
// preview, notices and errors.
func (s *Server) questionView(r *http.Request, sc expertScope, typed map[string]string, reason string) expertQuestionView {
	q := sc.question
	base := expertBase(r)
	v := expertQuestionView{
		Base: base, Action: base + "/q/" + strconv.FormatInt(q.ID, 10),
		Title: sc.workshop.Title, Round: sc.workshop.Round, Open: sc.workshop.Open,
		Question: expertQuestionInfo{
			ID: q.ID, Position: q.Position, Wording: q.Wording, Quantity: q.Quantity, Units: q.Units,
			Lower: chart.FormatValue(q.Lower), Upper: chart.FormatValue(q.Upper),
			Format: q.Format, Calibration: q.Calibration,
		},
		Form: newAnswerForm(q, typed),
	}
	v.Form.Reason = reason
	// A calibration question's true value reaches an expert's page only
	// once the facilitator has revealed it.
	if q.Calibration && q.Revealed && q.TrueValue != nil {
		v.Question.Revealed = chart.FormatValue(*q.TrueValue)
	}
	for i := len(sc.own) - 1; i >= 0; i-- {
		v.History = append(v.History, newHistoryRow(q, sc.own[i]))
	}
	if v.FeedbackRound = sc.workshop.FeedbackRound(); v.FeedbackRound > 0 {
		v.Panel, v.Spread, v.PanelMissing = s.anonymousPanel(r, sc)
	}
	return v
}

func newHistoryRow(q elicit.Question, rv elicit.Revision) historyRow {
	h := historyRow{Round: rv.Round, At: rv.At.UTC().Format(timeLayout), Reason: rv.Reason,
		Values: answerSummary(q, rv.Answer), Alpha: "—", Beta: "—"}
	if fit, err := fits.fit(q, rv); err == nil {
		h.Alpha, h.Beta = chart.FormatValue(fit.Dist.Alpha), chart.FormatValue(fit.Dist.Beta.Beta)
	}
	return h
}

// answerSummary writes a saved answer on one line.
func answerSummary(q elicit.Question, a elicit.Answer) string {
	var parts []string
	switch q.Format {
	case elicit.FormatInterval:
		parts = append(parts, "lowest "+chart.FormatValue(a.Lowest), "highest "+chart.FormatValue(a.Highest),
			"best "+chart.FormatValue(a.Best), "sure "+chart.FormatPercent(a.Confidence))
	case elicit.FormatChips:
		for _, c := range a.Counts {
			parts = append(parts, strconv.Itoa(c))
		}
		return "chips " + strings.Join(parts, ", ")
	default:
		for i, x := range a.Values {
			p := "?"
			if i < len(q.Probs) {
				p = chart.FormatPercent(q.Probs[i])
			}
			parts = append(parts, p+": "+chart.FormatValue(x))
		}
	}
	return strings.Join(parts, "; ")
}

// newPreview turns a fit into the picture and its read-backs.
func newPreview(q elicit.Question, fit elicit.Fit) *previewView {
	p := &previewView{
		Params: fmt.Sprintf("Beta(α = %s, β = %s)", chart.FormatValue(fit.Dist.Alpha), chart.FormatValue(fit.Dist.Beta.Beta)),
		Fit: chart.FitView{
			ID: "fit-q" + strconv.FormatInt(q.ID, 10), Quantity: q.Quantity, Units: q.Units,
			Lower: q.Lower, Upper: q.Upper, Dist: fit.Dist, Percentiles: fit.Percentiles,
		},
	}
	for i := range fit.Probs {
		if i >= len(fit.Stated) {
			break
		}
		pr, x := fit.Probs[i], fit.Stated[i]
		p.Fit.Points = append(p.Fit.Points, chart.Point{X: x, P: pr})
		line := readBack(pr, x, q.Units)
		if i < len(fit.ProbErrors) {
			line += " " + fittedBack(pr, pr+fit.ProbErrors[i])
		}
		p.ReadBacks = append(p.ReadBacks, line)
	}
	p.ReadBacks = append(p.ReadBacks, fmt.Sprintf("Taken together, the fitted %s puts the middle 90%% of the chance between %s and %s, with median %s.",
		p.Params, chart.FormatValue(fit.Percentiles[0]), chart.FormatValue(fit.Percentiles[2]), chart.FormatValue(fit.Percentiles[1])))
	for _, w := range fit.Warnings {
		p.Warnings = append(p.Warnings, w.Message)
	}
	return p
}

// formValues keeps the typed values for showing the form again.
func formValues(f *Form) map[string]string {
	m := map[string]string{}
	for k := range f.Values {
		m[k] = f.Values.Get(k)
	}
	return m
}

// applyErrors copies the parser's messages beside the fields.
func applyErrors(af *answerForm, f *Form) {
	for i := range af.Fields {
		af.Fields[i].Error = f.Error(af.Fields[i].Name)
	}
	af.ReasonError = f.Error("reason")
	af.Error = f.Error("")
	af.Invalid = !f.OK()
}

// problemSummary says, for the live preview, which field stops the fit.
func problemSummary(af answerForm, f *Form) string {
	for _, fl := range af.Fields {
		if msg := f.Error(fl.Name); msg != "" {
			return "No fit yet. " + fl.Label + ": " + msg + "."
		}
	}
	if msg := f.Error(""); msg != "" {
		return "No fit yet: " + msg + "."
	}
	return "No fit yet: check the marked fields."
}

// anonymousPanel draws, from round 2, the panel as it stood when the
// previous round closed (elicit's FeedbackRound): the other experts'
// fitted curves without names, in the order of panelOrder (not by name,
// id or time of answer), beside
// the asking expert's own current curve and the equal-weight pool of the
// whole panel at that close. Beyond overlayLimit other experts it
// returns a spread instead: the own curve and the pool, with each other
// expert as one interval.
func (s *Server) anonymousPanel(r *http.Request, sc expertScope) (*chart.PanelView, *chart.SpreadView, bool) {
	fb, err := s.feedbackFor(r, sc)
	if err != nil {
		// The page is still useful without the panel; it says so, and the
		// cause is logged.
		s.log.ErrorContext(r.Context(), "round feedback", "question", sc.question.ID, "err", err)
		return nil, nil, true
	}
	if fb == nil {
		return nil, nil, false
	}
	q := sc.question
	var own *elicit.ScaledBeta
	if n := len(sc.own); n > 0 {
		if fit, err := fits.fit(q, sc.own[n-1]); err == nil {
			d := fit.Dist
			own = &d
		}
	}
	var others []elicit.ScaledBeta
	for _, m := range fb.members {
		if m.expertID != sc.expert.ID {
			others = append(others, m.dist)
		}
	}
	if len(others) == 0 {
		return nil, nil, false
	}
	var curves []chart.Curve
	if own != nil {
		curves = append(curves, chart.Curve{Label: "You", Role: chart.RoleExpert, Dist: *own})
	}
	id := "panel-q" + strconv.FormatInt(q.ID, 10)
	if len(others) > overlayLimit {
		if fb.poolErr == nil {
			curves = append(curves, poolCurve(fb.pool))
		}
		return nil, &chart.SpreadView{ID: id, Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper, Curves: curves, Others: others}, false
	}
	for i, d := range others {
		curves = append(curves, chart.Curve{Label: "Expert " + strconv.Itoa(i+1), Role: chart.RoleExpert, Dist: d})
	}
	if fb.poolErr == nil {
		curves = append(curves, poolCurve(fb.pool))
	}
	return &chart.PanelView{ID: id, Quantity: q.Quantity, Units: q.Units, Lower: q.Lower, Upper: q.Upper, Curves: curves}, nil, false
}

// feedback is what every expert's page of a question shares through a
// round: the fits of the panel's active experts as the previous round
// closed, in the panel's order, and their equal-weight pool.
type feedback struct {
	members []feedbackMember
	pool    elicit.Pool
	poolErr error
}

type feedbackMember struct {
	expertID int64
	dist     elicit.ScaledBeta
}

// feedbackKey names one question's feedback in a round: the round fed
// back and the experts revoked when it was read. The revisions of a
// closed round never change (saves go to the open round, and revisions
// are append-only), so the feedback is read and pooled once per key; a
// revocation, or a reissued token lifting one, gives a new key.
type feedbackKey struct {
	question int64
	through  int
	revoked  string
}

// feedbackFor returns the panel fed back on sc's question in sc's round,
// or nil when there is none yet.
func (s *Server) feedbackFor(r *http.Request, sc expertScope) (*feedback, error) {
	through := sc.workshop.FeedbackRound()
	if through == 0 {
		return nil, nil
	}
	revoked, err := s.store.RevokedExperts(r.Context(), sc.workshop.ID)
	if err != nil {
		return nil, err
	}
	key := feedbackKey{question: sc.question.ID, through: through, revoked: fmt.Sprint(revoked)}
	fb, err := s.feedbacks.GetErr(key, func() (*feedback, error) {
		revs, err := s.store.LatestRevisions(r.Context(), sc.question.ID, through)
		if err != nil {
			return nil, err
		}
		salt, err := s.store.PanelSalt(r.Context(), sc.workshop.ID)
		if err != nil {
			return nil, err
		}
		gone := map[int64]bool{}
		for _, id := range revoked {
			gone[id] = true
		}
		var kept []elicit.Revision
		for _, rv := range revs {
			if !gone[rv.ExpertID] {
				kept = append(kept, rv)
			}
		}
		return newFeedback(sc.question, kept, salt), nil
	})
	if err != nil {
		return nil, err
	}
	if len(fb.members) == 0 {
		return nil, nil
	}
	return fb, nil
}

// newFeedback fits the revisions (through the fit cache), orders the
// experts by panelOrder, and pools them with equal weights. Revisions
// that cannot be fitted are left out.
func newFeedback(q elicit.Question, revs []elicit.Revision, salt []byte) *feedback {
	type keyed struct {
		key string
		m   feedbackMember
	}
	var ks []keyed
	var panel []elicit.PanelFit
	for _, rv := range revs {
		fit, err := fits.fit(q, rv)
		if err != nil {
			continue
		}
		panel = append(panel, elicit.PanelFit{ExpertID: rv.ExpertID, Dist: &fit.Dist})
		ks = append(ks, keyed{panelOrder(salt, q.ID, rv.ExpertID), feedbackMember{rv.ExpertID, fit.Dist}})
	}
	sort.Slice(ks, func(i, j int) bool { return ks[i].key < ks[j].key })
	fb := &feedback{}
	for _, k := range ks {
		fb.members = append(fb.members, k.m)
	}
	// The same pooling rule as the facilitator's panel, with equal weights.
	pp, err := elicit.PoolPanel(panel, elicit.Weights{Scheme: elicit.WeightsEqual})
	fb.pool, fb.poolErr = pp.Pool, err
	return fb
}

// panelOrder is an expert's sort key in a question's anonymised feedback:
// HMAC-SHA-256 under the workshop's secret panel salt of the question's
// and the expert's ids. The order says nothing about names, ids or times
// of answer, differs from question to question, and cannot be recomputed
// by anyone without the salt, which is never shown.
func panelOrder(salt []byte, questionID, expertID int64) string {
	m := hmac.New(sha256.New, salt)
	fmt.Fprintf(m, "parley panel order %d %d", questionID, expertID)
	return hex.EncodeToString(m.Sum(nil))
}

// overlayLimit is the most other experts whose curves are overlaid one by
// one. Beyond a dozen, overlaid curves cannot be told apart anyway (the
// line styles repeat and the lines merge into a band), and the page grows
// with every curve; a larger panel is drawn as a spread of intervals.
const overlayLimit = 12

// poolCurve is the equal-weight pool as a curve to draw.
func poolCurve(pool elicit.Pool) chart.Curve {
	return chart.Curve{Label: "Equal-weight pool", Role: chart.RolePool,
		PDF: pool.PDF, CDF: pool.CDF, Quantile: pool.Quantile, Quantiles: pool.Quantiles, Components: pool.Components}
}
