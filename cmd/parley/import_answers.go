package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
	"github.com/parley-elicit/parley/elicit/workshop"
)

func init() {
	command("import-answers", "save experts' judgements from a CSV answer sheet, entered by the facilitator (--db, --workshop, --in, --dry-run, --channel, --signal-unchanged)", runImportAnswers)
}

// exitUnchanged is import-answers' status, under --signal-unchanged, for
// a sheet that saves nothing because every row repeats its expert's
// current answer: not a failure (1) nor bad input (2).
const exitUnchanged = 3

// runImportAnswers reads an answer sheet (answersheet.Read) against
// the workshop's questions and panel and saves every row as a revision
// the facilitator entered, all in one transaction, or none: any bad row
// is refused with exit status 2 naming its row, column and rule. Rows
// that repeat their expert's current answer of the round are listed as
// unchanged and not saved again (answersheet.Against).
func runImportAnswers(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("import-answers", stderr)
	dbPath := fs.String("db", "", "database `file`")
	workshopID := fs.String("workshop", "", "workshop `ID`")
	in := fs.String("in", "", "answer sheet `file` (CSV), or - for standard input")
	dryRun := fs.Bool("dry-run", false, "check the sheet and print what would be saved, without saving")
	channel := fs.String("channel", string(workshop.ChannelFile), "how the judgements reached you: in_person, phone, paper_form, message or file")
	signalUnchanged := fs.Bool("signal-unchanged", false, "exit 3, not 0, when every row repeats its expert's current answer, so nothing is saved (for a script that reads the exit status alone)")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	if fs.NArg() > 0 {
		return fail(stderr, "import-answers", badInput(fs.Arg(0), "unexpected argument"))
	}
	if *dbPath == "" {
		return fail(stderr, "import-answers", badInput("db", "a database file is required"))
	}
	wid, err := id("workshop", *workshopID)
	if err != nil {
		return fail(stderr, "import-answers", err)
	}
	if wid == 0 {
		return fail(stderr, "import-answers", badInput("workshop", "must be a workshop ID, a whole number above 0"))
	}
	ch := workshop.Channel(*channel)
	if err := (workshop.Revision{EnteredBy: workshop.ByFacilitator, Channel: ch}).CheckProvenance(); err != nil {
		return fail(stderr, "import-answers", badInput("channel", "must be one of in_person, phone, paper_form, message, file"))
	}
	var r io.Reader = stdin
	switch *in {
	case "":
		return fail(stderr, "import-answers", badInput("in", "an answer sheet file is required"))
	case "-":
	default:
		f, err := os.Open(*in)
		if err != nil {
			return fail(stderr, "import-answers", badInput("in", "%v", err))
		}
		defer f.Close()
		r = f
	}
	if err := existingDatabase(*dbPath); err != nil {
		return fail(stderr, "import-answers", err)
	}
	if err := parleyDatabase(*dbPath); err != nil {
		return fail(stderr, "import-answers", err)
	}
	// The store's warning of a workshop stamped ahead of this clock goes
	// to stderr in the form parley serve writes it.
	db, err := openStore(*dbPath, commandLog(stderr))
	if err != nil {
		return fail(stderr, "import-answers", notADatabase(*dbPath, err))
	}
	defer db.Close()
	ctx := context.Background()
	ws, err := db.Workshop(ctx, wid)
	if err != nil {
		return fail(stderr, "import-answers", badInput("workshop", "no workshop %d in %s", wid, *dbPath))
	}
	if ws.Archived {
		// Said before the sheet is read, as the upload page says it: an
		// archived workshop's round is closed, and "round 3 is closed"
		// sent the facilitator to open a round, which an archived
		// workshop cannot until it is brought back.
		return fail(stderr, "import-answers", badInput("workshop", "workshop %d is archived, so no judgements can be imported into it; bring it back from its overview page first", wid))
	}
	qs, err := db.Questions(ctx, wid)
	if err != nil {
		return fail(stderr, "import-answers", err)
	}
	es, err := db.Experts(ctx, wid)
	if err != nil {
		return fail(stderr, "import-answers", err)
	}
	// The sheet's bytes as read, whose SHA-256 the record keeps.
	text, err := io.ReadAll(io.LimitReader(r, answersheet.MaxBytes+1))
	if err != nil {
		return fail(stderr, "import-answers", badInput("in", "%v", err))
	}
	file := answersheet.File{Text: string(text)}
	if *in != "-" {
		file.Name = filepath.Base(*in)
		var ie *elicit.InputError
		if err := file.CheckName(); errors.As(err, &ie) {
			return fail(stderr, "import-answers", badInput("in", "the file's name %s (%s); rename the file", ie.Rule, ie.Detail))
		}
	}
	rows, err := answersheet.Read(bytes.NewReader(text), qs, es)
	if err != nil {
		return fail(stderr, "import-answers", err)
	}
	if !ws.Open {
		// The same refusal as the save's, named at the first row.
		return fail(stderr, "import-answers", answersheet.RoundClosed(ws.Round, rows))
	}
	verb := "saved"
	if *dryRun {
		verb = "would save"
	}
	revs, err := db.Revisions(ctx, wid)
	if err != nil {
		return fail(stderr, "import-answers", err)
	}
	cur := workshop.Current(revs, nil)
	changes := answersheet.Against(rows, cur, ws.Round)
	// The listing is printed once the rows are saved (or, with
	// --dry-run, checked): printed before a save that was then refused,
	// it listed rows as if saved above the refusal.
	var listing strings.Builder
	unchanged := map[int]bool{}
	for _, row := range changes.Unchanged {
		unchanged[row.Line] = true
	}
	toSave := map[int]answersheet.Row{}
	for _, row := range changes.Save {
		toSave[row.Line] = row
	}
	for _, row := range rows {
		rv := cur[workshop.Key{Question: row.Question.ID, Expert: row.Expert.ID}]
		if saved, ok := toSave[row.Line]; ok {
			row = saved // with the reasoning it keeps
		}
		if unchanged[row.Line] {
			fmt.Fprintf(&listing, "row %d: %s, Q%d: unchanged, the same as %s, not saved again\n", row.Line, row.Expert.Name, row.Question.Position, currentNote(row.Expert.Name, rv))
			continue
		}
		fmt.Fprintf(&listing, "row %d: %s, Q%d: Beta(%s, %s)%s%s%s\n", row.Line, row.Expert.Name, row.Question.Position,
			fmtG(row.Fit.Dist.Alpha), fmtG(row.Fit.Dist.Beta.Beta), warningsNote(row.Fit),
			followsNote(row.Expert.Name, rv), reasonNote(row))
	}
	if len(changes.Save) == 0 {
		// Not an error: the workshop holds the sheet already. Said
		// plainly, and by the exit status when asked.
		every := fmt.Sprintf("all %d rows repeat their experts' current answers", len(rows))
		switch len(rows) {
		case 1:
			every = "the sheet's one row repeats its expert's current answer"
		case 2:
			every = "both rows repeat their experts' current answers"
		}
		fmt.Fprintf(&listing, "%s nothing: %s of round %d of workshop %d\n", verb, every, ws.Round, wid)
		io.WriteString(stdout, listing.String())
		if *signalUnchanged {
			return exitUnchanged
		}
		return exitOK
	}
	if !*dryRun {
		err := db.SaveImportedRevisions(ctx, ws.ID, answersheet.Revisions(changes.Save, ch), answersheet.Import(changes.Save, ch, file))
		if err != nil {
			return fail(stderr, "import-answers", answersheet.RefusalAtRow(err, ws.Round, changes.Save))
		}
	}
	fmt.Fprintf(&listing, "%s %s in round %d of workshop %d, entered by the facilitator (%s)", verb, countOf(len(changes.Save), "judgement", "judgements"), ws.Round, wid, ch)
	if n := len(changes.Unchanged); n > 0 {
		fmt.Fprintf(&listing, "; %s unchanged, not saved again", countOf(n, "row", "rows"))
	}
	listing.WriteString("\n")
	io.WriteString(stdout, listing.String())
	return exitOK
}

// fmtG writes a fitted α or β to four figures, or more to keep its side
// of 1 (elicit.ShapeDigits).
func fmtG(x float64) string { return strconv.FormatFloat(x, 'g', elicit.ShapeDigits(x, 4), 64) }

func warningsNote(f elicit.Fit) string {
	if len(f.Warnings) == 0 {
		return ""
	}
	s := " — "
	for i, w := range f.Warnings {
		if i > 0 {
			s += "; "
		}
		s += w.Message
	}
	return s
}

// followsNote says when a row follows an answer the expert saved
// themselves, which it will replace as their current answer.
func followsNote(name string, rv workshop.Revision) string {
	if rv.ID == 0 || rv.EnteredBy == workshop.ByFacilitator {
		return ""
	}
	return fmt.Sprintf(" — follows %s's own answer of %s (round %d)", name, rv.At.UTC().Format("2006-01-02 15:04 UTC"), rv.Round)
}

// currentNote names the current answer an unchanged row repeats: who
// saved it, and when.
func currentNote(name string, rv workshop.Revision) string {
	when := rv.At.UTC().Format("2006-01-02 15:04 UTC")
	if rv.EnteredBy == workshop.ByFacilitator {
		return "your entry of " + when
	}
	return name + "'s own answer of " + when
}

// reasonNote says what a row with an empty reason cell keeps of the
// reasoning of its expert's current answer (answersheet.Against), or
// that it clears it.
func reasonNote(row answersheet.Row) string {
	switch {
	case row.ReasonCleared:
		return " — its clear_reason cell says yes: saved without reasoning"
	case row.ReasonCarried:
		return " — the reason cell is empty: keeps the reasoning of " + row.Expert.Name + "'s current answer"
	case row.ReasonNotCarried:
		return " — the reason cell is empty, and the reasoning of " + row.Expert.Name + "'s current answer is withheld from the feedback, so it is not kept"
	}
	return ""
}
