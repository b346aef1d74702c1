package web

import (
	"errors"
	"fmt"
	"io"
	"net/http"
	"strconv"
	"strings"
	"time"

	"github.com/a-h/templ"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Importing an answer sheet on the facilitator's pages: upload (or
// paste) the CSV, see every row's fit and warnings, then confirm. The
// sheet waits between the two steps in memory for sheetFor; the
// confirmation reads it again against the workshop as it is then, so
// what is saved is what the preview showed, or nothing.

// sheetFor is how long an uploaded sheet waits for its confirmation.
const sheetFor = 30 * time.Minute

// keptSheet is an uploaded sheet waiting for its confirmation.
type keptSheet struct {
	workshop int64
	file     answersheet.File
	channel  workshop.Channel
	// follows is, for each row's expert and question, the revision the
	// preview showed the row following (0 for none): the confirmation
	// saves nothing when another has come since.
	follows map[workshop.Key]int64
	// reading is how the preview read each row against its expert's
	// current answer (rowReading): a reasoning withheld from the feedback
	// or shown again since changes it without a new answer.
	reading map[workshop.Key]rowReading
}

// unchanged counts the rows the preview left out as unchanged.
func (sh keptSheet) unchanged() int {
	n := 0
	for _, r := range sh.reading {
		if r == readUnchanged {
			n++
		}
	}
	return n
}

// rowReading is how a row reads against its expert's current answer.
type rowReading int

const (
	readToSave        rowReading = iota // saved as it stands
	readToSaveCarried                   // saved, keeping the current answer's reasoning
	readUnchanged                       // left out
)

// readings are how changes read each row.
func readings(changes answersheet.Changes) map[workshop.Key]rowReading {
	out := make(map[workshop.Key]rowReading, len(changes.Save)+len(changes.Unchanged))
	for _, row := range changes.Save {
		k := workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}
		out[k] = readToSave
		if row.ReasonCarried {
			out[k] = readToSaveCarried
		}
	}
	for _, row := range changes.Unchanged {
		out[workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}] = readUnchanged
	}
	return out
}

// reasoningMeanwhile says, for each row that reads otherwise than the
// preview read it (was) with no new answer in between, that the
// reasoning of its expert's current answer was withheld from the
// feedback or shown again: confirmed, the row would have saved without
// the reasoning the preview said it kept, or kept one the preview said
// it would not.
func reasoningMeanwhile(rows []answersheet.Row, was map[workshop.Key]rowReading, changes answersheet.Changes, cur map[workshop.Key]workshop.Revision) []string {
	now := readings(changes)
	var out []string
	for _, row := range rows {
		k := workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}
		if now[k] == was[k] {
			continue
		}
		what := "shown again in the feedback"
		if cur[k].ReasonWithheld {
			what = "withheld from the feedback"
		}
		out = append(out, fmt.Sprintf("Row %d: the reasoning of %s's current answer to Q%d was %s.", row.Line, row.Expert.Name, row.Question.Position, what))
	}
	return out
}

// sheetView is the upload page: the form, or the preview of a sheet.
type sheetView struct {
	Workshop workshop.Workshop
	Form     *Form
	// Rows are the rows the confirmation saves; Unchanged the rows that
	// repeat their expert's current answer, which it leaves out
	// (answersheet.Against).
	Rows      []answersheet.Row
	Unchanged []unchangedRow
	Key       string
	Channel   workshop.Channel
	// Questions are the workshop's questions that take answers, whose
	// columns the upload page lists.
	Questions []workshop.Question
	// Replaces holds, by row index, the current answer a row would
	// follow as the expert's latest, when there is one.
	Replaces map[int]workshop.Revision
	// Meanwhile says which answers were saved between the preview and
	// its confirmation, which saved nothing and shows the preview again.
	Meanwhile []string
	// MeanwhileReasoning says Meanwhile names reasonings withheld or
	// shown again, not answers saved.
	MeanwhileReasoning bool
	// file is the sheet the preview keeps for its confirmation.
	file answersheet.File
}

// unchangedRow is a row of a sheet that repeats its expert's current
// answer, and that answer.
type unchangedRow struct {
	Row     answersheet.Row
	Current workshop.Revision
}

// sheetRefusedSummary follows a refusal of the sheet's own content (a
// row, a column), which marks no field of the form.
const sheetRefusedSummary = "Nothing was saved. Correct the sheet and check it again."

// refusedSummary is what the page says under a refusal: the form's own
// summary points to the marked fields, and a refusal of the sheet's
// content marks none, so it said "Correct the marked fields" above a form
// with nothing marked.
func (v sheetView) refusedSummary() string {
	for name := range v.Form.Errors {
		if name != "" {
			return nothingSavedSummary
		}
	}
	return sheetRefusedSummary
}

// toSave says what the preview's confirmation saves, and that the
// unchanged rows are listed apart.
func (v sheetView) toSave() string {
	s := "Nothing is saved yet. " + plural(len(v.Rows), "This judgement", "These "+strconv.Itoa(len(v.Rows))+" judgements") +
		" will be saved in round " + strconv.Itoa(v.Workshop.Round) + ", as entered by you " + channelRecorded(v.Channel)
	switch n := len(v.Unchanged); n {
	case 0:
		return s + ":"
	case 1:
		return s + "; one row repeats its expert's current answer and is listed below the button, not to be saved again."
	default:
		return s + "; " + strconv.Itoa(n) + " rows repeat their experts' current answers and are listed below the button, not to be saved again."
	}
}

// everyRowRepeats says that every one of a sheet's n rows repeats its
// expert's current answer: "both rows", not "all 2 rows".
func everyRowRepeats(n int) string {
	switch n {
	case 1:
		return "the sheet's one row repeats its expert's current answer"
	case 2:
		return "both rows of the sheet repeat their experts' current answers"
	}
	return "all " + strconv.Itoa(n) + " rows of the sheet repeat their experts' current answers"
}

// meanwhileHeading says why a confirmation saved nothing.
func (v sheetView) meanwhileHeading() string {
	if v.MeanwhileReasoning {
		return "Nothing was saved: " + plural(len(v.Meanwhile), "a reasoning was", "reasonings were") + " withheld from the feedback or shown again since you checked the sheet."
	}
	return "Nothing was saved: " + plural(len(v.Meanwhile), "an answer was", "answers were") + " saved since you checked the sheet."
}

// replacesOwn counts the rows that would follow an answer the expert
// saved themselves.
func (v sheetView) replacesOwn() int {
	n := 0
	for _, rv := range v.Replaces {
		if rv.EnteredBy != workshop.ByFacilitator {
			n++
		}
	}
	return n
}

// replacedWho is whose judgement a row follows, "Ada Quell's own answer"
// or "your entry"; the preview adds its time and round.
func replacedWho(row answersheet.Row, rv workshop.Revision) string {
	if rv.EnteredBy == workshop.ByFacilitator {
		return "your entry"
	}
	return row.Expert.Name + "'s own answer"
}

// sheetHeader is a header naming every column the questions use, in the
// order of the questions, for a sheet to start from.
func sheetHeader(qs []workshop.Question) string {
	cols := []string{"expert", "question"}
	seen := map[string]bool{}
	for _, q := range qs {
		for _, c := range answersheet.Columns(q) {
			if !seen[c] {
				seen[c] = true
				cols = append(cols, c)
			}
		}
	}
	return strings.Join(append(cols, "reason"), ",")
}

// sheetHeaderHTML is sheetHeader as HTML with a line break allowed after
// each comma (<wbr>, which a copy leaves out), so that on a phone the
// header wraps between its columns: it broke "reason" as "re" over "ason".
func sheetHeaderHTML(qs []workshop.Question) string {
	return columnsHTML(sheetHeader(qs))
}

// columnsHTML is a comma-separated list of columns, escaped, that may
// break after each comma (<wbr>) and nowhere else: as one unbroken word a
// four-value question's "lowest,highest,best,confidence" ran past a
// phone's screen in the table of each question's columns, its last
// column out of sight. Copied, it is the same text.
func columnsHTML(list string) string {
	cols := strings.SplitAfter(list, ",")
	for i, c := range cols {
		cols[i] = templ.EscapeString(c)
	}
	return strings.Join(cols, "<wbr>")
}

func sheetPath(ws int64) string { return workshopPath(ws) + "/answers/import" }

// sheetSavedPath is the overview at the words of what the last sheet
// saved, which it says once (doneSheetSaved): the confirmation used to
// land on the overview without a word of it, and then said it in the
// address (?imported=1), again at every reload.
func sheetSavedPath(ws int64) string { return workshopPath(ws) + "#sheet-saved" }

func (s *Server) sheetForm(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	if ws.Archived {
		// Nothing links here once a workshop is archived (the overview's
		// link shows while a round is open), but a bookmark or a tab left
		// open still does: the form's check would be refused by the
		// archive's guard, so the page offers no form.
		s.renderPage(w, r, http.StatusOK, facilitatorMeta(ws, "Import judgements", "overview"),
			messagePage("Import judgements from a spreadsheet", "This workshop is archived, so no judgements can be imported into it. To import some, bring it back from its overview page first; that is recorded in the decision log."))
		return
	}
	f := newForm(nil)
	f.Values.Set("channel", string(workshop.ChannelFile))
	s.renderSheet(w, r, http.StatusOK, sheetView{Workshop: ws, Form: f})
}

func (s *Server) renderSheet(w http.ResponseWriter, r *http.Request, status int, v sheetView) {
	qs, err := s.store.Questions(r.Context(), v.Workshop.ID)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v.Questions = nil
	for _, q := range qs {
		if !q.Retired && !q.Frozen() {
			v.Questions = append(v.Questions, q)
		}
	}
	s.renderPage(w, r, status, facilitatorMeta(v.Workshop, "Import judgements", "overview"), sheetPage(v))
}

// readSheetUpload reads the posted sheet: a file (multipart) or text
// pasted into the form.
func readSheetUpload(w http.ResponseWriter, r *http.Request) (*Form, answersheet.File, bool) {
	if strings.HasPrefix(r.Header.Get("Content-Type"), "multipart/form-data") {
		if err := r.ParseMultipartForm(answersheet.MaxBytes); err != nil {
			var mbe *http.MaxBytesError
			if errors.As(err, &mbe) {
				tooLarge(w, mbe.Limit)
				return nil, answersheet.File{}, false
			}
			// Only a broken client sends this; Go's own words ("multipart:
			// NextPart: EOF") would tell the facilitator nothing.
			http.Error(w, "The upload could not be read as a file upload (multipart/form-data): the request was cut short or malformed. Nothing was saved; send the sheet again.", http.StatusBadRequest)
			return nil, answersheet.File{}, false
		}
		// As every form: a field, the file included, sent twice is
		// refused, not half-read (a second file was ignored in silence).
		if !oneValueEach(w, r.MultipartForm.Value) {
			return nil, answersheet.File{}, false
		}
		files := make(map[string][]string, len(r.MultipartForm.File))
		for name, fhs := range r.MultipartForm.File {
			files[name] = make([]string, len(fhs))
		}
		if !oneValueEach(w, files) {
			return nil, answersheet.File{}, false
		}
	} else if !parseForm(w, r) {
		return nil, answersheet.File{}, false
	}
	f := newForm(r.PostForm)
	text, name := f.Value("sheet"), ""
	if r.MultipartForm != nil {
		if files := r.MultipartForm.File["file"]; len(files) > 0 {
			fh, err := files[0].Open()
			if err == nil {
				b, rerr := io.ReadAll(io.LimitReader(fh, answersheet.MaxBytes+1))
				fh.Close()
				err = rerr
				if len(b) > answersheet.MaxBytes {
					err = nil
					f.set("file", string(input.RuleTooLong)+" (at most 1 MiB, 1,048,576 bytes); nothing was saved")
				} else if strings.TrimSpace(string(b)) != "" {
					text, name = string(b), files[0].Filename
					if nerr := (answersheet.File{Name: name}).CheckName(); nerr != nil {
						var ie *elicit.InputError
						errors.As(nerr, &ie)
						f.set("file", "the file's name "+string(ie.Rule)+detailSuffix(ie.Detail)+"; rename the file and choose it again")
					}
				}
			}
			if err != nil {
				f.set("file", "could not be read: "+err.Error())
			}
		}
	}
	return f, answersheet.File{Name: name, Text: text}, true
}

// sheetPreview checks an uploaded sheet and shows every row with its fit,
// or the first broken rule; nothing is saved.
func (s *Server) sheetPreview(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok {
		return
	}
	f, file, ok := readSheetUpload(w, r)
	if !ok {
		return
	}
	channel := workshop.Channel(f.Choice("channel", string(workshop.ChannelFile), channelNames()...))
	v := sheetView{Workshop: ws, Form: f, Channel: channel, file: file}
	if strings.TrimSpace(file.Text) == "" && f.OK() {
		f.set("file", "choose a CSV file, or paste the sheet below")
	}
	rows, err := s.checkSheet(r, ws, file.Text)
	if f.OK() {
		if err != nil {
			if !isInputError(err) {
				s.fail(w, r, err)
				return
			}
			failSheet(f, err)
		}
	}
	if !f.OK() {
		s.renderSheet(w, r, http.StatusUnprocessableEntity, v)
		return
	}
	cur, err := s.currentAnswers(r, ws)
	if err != nil {
		s.fail(w, r, err)
		return
	}
	s.showPreview(w, r, http.StatusOK, v, rows, cur)
}

// currentAnswers are the workshop's current revisions, by expert and
// question.
func (s *Server) currentAnswers(r *http.Request, ws workshop.Workshop) (map[workshop.Key]workshop.Revision, error) {
	revs, err := s.store.Revisions(r.Context(), ws.ID)
	if err != nil {
		return nil, err
	}
	return workshop.Current(revs, nil), nil
}

// showPreview keeps the sheet of v for its confirmation and shows its
// rows to save, each with the current answer it would follow (cur), and
// its unchanged rows with the answer each repeats.
func (s *Server) showPreview(w http.ResponseWriter, r *http.Request, status int, v sheetView, rows []answersheet.Row, cur map[workshop.Key]workshop.Revision) {
	follows := make(map[workshop.Key]int64, len(rows))
	for _, row := range rows {
		k := workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}
		follows[k] = cur[k].ID
	}
	changes := answersheet.Against(rows, cur, v.Workshop.Round)
	for _, row := range changes.Unchanged {
		v.Unchanged = append(v.Unchanged, unchangedRow{Row: row, Current: cur[workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}]})
	}
	for i, row := range changes.Save {
		if rv, ok := cur[workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}]; ok {
			if v.Replaces == nil {
				v.Replaces = map[int]workshop.Revision{}
			}
			v.Replaces[i] = rv
		}
	}
	key, err := s.sheets.keep(keptSheet{workshop: v.Workshop.ID, file: v.file, channel: v.Channel, follows: follows, reading: readings(changes)}, s.now())
	if err != nil {
		s.fail(w, r, err)
		return
	}
	v.Rows, v.Key = changes.Save, key
	s.renderSheet(w, r, status, v)
}

// answeredMeanwhile says, for each row whose expert and question have a
// current answer other than the one the preview showed it following,
// who saved it and when: confirmed, the row would have put the sheet's
// judgement after an answer the preview never showed, the expert's own
// saved on their phone a moment before, without a word.
func answeredMeanwhile(rows []answersheet.Row, follows map[workshop.Key]int64, cur map[workshop.Key]workshop.Revision) []string {
	var out []string
	for _, row := range rows {
		k := workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}
		rv := cur[k]
		if was, ok := follows[k]; ok && was == rv.ID {
			continue
		}
		who := row.Expert.Name + " saved their own answer"
		if rv.EnteredBy == workshop.ByFacilitator {
			who = "you entered " + row.Expert.Name + "'s answer"
		}
		if rv.ID == 0 {
			// Read against the workshop as it now is, the row names
			// another expert or question than the preview showed.
			out = append(out, fmt.Sprintf("Row %d now reads as %s's answer to Q%d.", row.Line, row.Expert.Name, row.Question.Position))
			continue
		}
		out = append(out, fmt.Sprintf("Row %d: %s to Q%d at %s.", row.Line, who, row.Question.Position, rv.At.UTC().Format(timeLayout)))
	}
	return out
}

// failSheet says a refusal of the sheet's content at the top of the
// page, as a refusal naming a row and column is said: one naming the
// sheet as a whole (its separators, its encoding, no rows) was set beside
// the paste box, which is empty when the sheet came as a file, far below
// the columns' help, under "Correct the marked fields".
func failSheet(f *Form, err error) {
	var ie *elicit.InputError
	if errors.As(err, &ie) && ie.Field == "sheet" {
		// "The sheet must separate its columns with commas…", "The
		// sheet has no rows".
		msg := strings.TrimPrefix(string(ie.Rule), "the sheet ")
		f.set("", "The sheet "+msg+detailSuffix(ie.Detail)+".")
		return
	}
	f.Fail(err, nil)
}

// checkSheet reads text as an answer sheet of ws, refusing it at once
// when the round is closed.
func (s *Server) checkSheet(r *http.Request, ws workshop.Workshop, text string) ([]answersheet.Row, error) {
	qs, err := s.store.Questions(r.Context(), ws.ID)
	if err != nil {
		return nil, err
	}
	es, err := s.store.Experts(r.Context(), ws.ID)
	if err != nil {
		return nil, err
	}
	rows, err := answersheet.Read(strings.NewReader(text), qs, es)
	if err == nil && !ws.Open {
		err = answersheet.RoundClosed(ws.Round, rows)
	}
	return rows, err
}

// sheetConfirm saves the previewed sheet, read again against the
// workshop as it now is, all rows or none.
func (s *Server) sheetConfirm(w http.ResponseWriter, r *http.Request) {
	ws, ok := s.loadWorkshop(w, r)
	if !ok || !parseForm(w, r) {
		return
	}
	f := newForm(r.PostForm)
	key := f.Value("key")
	sh, found, taken := s.sheets.take(key, s.now())
	for taken {
		// Sent twice (a double click on a slow save, a replay): the
		// first is saving it, or has. This one waits for the first to
		// end and says what it did; it said "saved" at once, and the
		// first could then fail. The first saves only what the preview
		// read (else it saves nothing and gives the sheet back), so the
		// rows it left out as unchanged are the preview's.
		if s.sheets.await(r.Context(), key) {
			s.confirmOnce(w, r, workshopPath(ws.ID), sheetSavedConfirmation(sh.unchanged()))
			http.Redirect(w, r, sheetSavedPath(ws.ID), http.StatusSeeOther)
			return
		}
		if r.Context().Err() != nil {
			return // the browser went: no one to answer
		}
		// The first saved nothing and gave the sheet back: this one
		// confirms it in its turn, as if sent after the first's answer,
		// and answers with what that does.
		sh, found, taken = s.sheets.take(key, s.now())
	}
	if found && sh.workshop != ws.ID {
		s.sheets.untake(key)
		found = false
	}
	if !found {
		f.set("file", "the sheet waited too long for its confirmation (or the server restarted); upload it again")
		s.renderSheet(w, r, http.StatusUnprocessableEntity, sheetView{Workshop: ws, Form: f})
		return
	}
	// The claim ends once this answer is written, whatever happens in
	// between, so a copy awaiting it is never left waiting.
	saved := false
	defer func() {
		if saved {
			s.sheets.settle(key)
		} else {
			s.sheets.untake(key)
		}
	}()
	saved = s.saveSheet(w, r, ws, f, sh)
}

// saveSheet saves a kept sheet confirmed, read again against the
// workshop, and answers: the overview when it saved, else the preview
// as it now reads or the refusal. It reports whether it saved.
func (s *Server) saveSheet(w http.ResponseWriter, r *http.Request, ws workshop.Workshop, f *Form, sh keptSheet) (saved bool) {
	rows, err := s.checkSheet(r, ws, sh.file.Text)
	if err == nil {
		var cur map[workshop.Key]workshop.Revision
		if cur, err = s.currentAnswers(r, ws); err != nil {
			s.fail(w, r, err)
			return false
		}
		if meanwhile := answeredMeanwhile(rows, sh.follows, cur); len(meanwhile) > 0 {
			// Nothing is saved: the preview again, as it now reads,
			// under a new key. The old one is given back, and shows
			// this again if sent again (its preview stays out of date).
			v := sheetView{Workshop: ws, Form: newForm(nil), Channel: sh.channel, file: sh.file, Meanwhile: meanwhile}
			s.showPreview(w, r, http.StatusConflict, v, rows, cur)
			return false
		}
		changes := answersheet.Against(rows, cur, ws.Round)
		if meanwhile := reasoningMeanwhile(rows, sh.reading, changes, cur); len(meanwhile) > 0 {
			v := sheetView{Workshop: ws, Form: newForm(nil), Channel: sh.channel, file: sh.file, Meanwhile: meanwhile, MeanwhileReasoning: true}
			s.showPreview(w, r, http.StatusConflict, v, rows, cur)
			return false
		}
		if len(changes.Save) == 0 {
			// Only a confirmation sent by hand comes here: a preview
			// with nothing to save offers none. Nothing is saved; the
			// preview says why.
			v := sheetView{Workshop: ws, Form: newForm(nil), Channel: sh.channel, file: sh.file}
			s.showPreview(w, r, http.StatusOK, v, rows, cur)
			return false
		}
		if err = SaveSheet(r.Context(), s.store, ws, changes.Save, sh.channel, sh.file); err == nil {
			// Each expert whose answers the sheet saved sees them on
			// their own pages; the others hear nothing of it.
			told := map[int64]bool{}
			for _, row := range changes.Save {
				if !told[row.Expert.ID] {
					told[row.Expert.ID] = true
					s.live.publishOwn(ws.ID, row.Expert.ID)
				}
			}
			s.confirmOnce(w, r, workshopPath(ws.ID), sheetSavedConfirmation(len(changes.Unchanged)))
			http.Redirect(w, r, sheetSavedPath(ws.ID), http.StatusSeeOther)
			return true
		}
	}
	// Refused, when read again or by the store: nothing was saved.
	switch {
	case s.notSaved(r, f, err):
	case !isInputError(err):
		s.fail(w, r, err)
		return false
	default:
		f.Fail(err, nil)
	}
	s.renderSheet(w, r, f.refusedStatus(), sheetView{Workshop: ws, Form: f})
	return false
}

func channelNames() []string {
	out := make([]string, len(workshop.Channels))
	for i, c := range workshop.Channels {
		out[i] = string(c)
	}
	return out
}
