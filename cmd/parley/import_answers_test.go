package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

func revisionsIn(t *testing.T, path string, ws int64) []workshop.Revision {
	t.Helper()
	db, err := store.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	revs, err := db.Revisions(context.Background(), ws)
	if err != nil {
		t.Fatal(err)
	}
	return revs
}

func writeSheet(t *testing.T, text string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "answers.csv")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// import-answers saves a good sheet as the facilitator's entries, all at
// once; --dry-run checks and prints without saving.
func TestImportAnswers(t *testing.T) {
	path, ws, _ := cliWorkshop(t)
	before := len(revisionsIn(t, path, ws))
	sheet := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.6,From her notes (invented).\nJomo,2,0.2,0.35,0.5,\n")
	w := strconv.FormatInt(ws, 10)
	code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", sheet, "--dry-run")
	if code != 0 || !strings.Contains(out, "row 2: Ines, Q2: Beta(") || !strings.Contains(out, "would save 2 judgements") {
		t.Fatalf("dry run: %d %q %q", code, out, errOut)
	}
	if n := len(revisionsIn(t, path, ws)); n != before {
		t.Fatalf("--dry-run wrote %d revisions", n-before)
	}
	one := writeSheet(t, "expert,question,q05,q50,q95\nJomo,2,0.2,0.35,0.5\n")
	if code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", one, "--dry-run"); code != 0 ||
		!strings.HasSuffix(out, "would save 1 judgement in round 1 of workshop "+w+", entered by the facilitator (file)\n") {
		t.Fatalf("dry run of one row: %d %q %q", code, out, errOut)
	}
	code, out, errOut = run("import-answers", "--db", path, "--workshop", w, "--in", sheet, "--channel", "paper_form")
	if code != 0 || !strings.Contains(out, "saved 2 judgements") {
		t.Fatalf("import: %d %q %q", code, out, errOut)
	}
	revs := revisionsIn(t, path, ws)
	if len(revs) != before+2 {
		t.Fatalf("%d revisions saved", len(revs)-before)
	}
	for _, rv := range revs[before:] {
		if rv.EnteredBy != workshop.ByFacilitator || rv.Channel != workshop.ChannelPaperForm {
			t.Errorf("saved provenance %q %q", rv.EnteredBy, rv.Channel)
		}
	}
	if revs[before].Reason != "From her notes (invented)." || revs[before].Answer.Values[1] != 0.3 {
		t.Errorf("saved %+v", revs[before])
	}
}

// A bad sheet or flag: exit 2, one line naming the row and column (or
// the flag) and the rule, nothing written.
func TestImportAnswersRefusals(t *testing.T) {
	path, ws, _ := cliWorkshop(t)
	before := len(revisionsIn(t, path, ws))
	w := strconv.FormatInt(ws, 10)
	good := "expert,question,q05,q50,q95\nInes,Q2,0.1,0.3,0.6\n"
	// A file named with an invisible text-direction override, whose
	// name the record could not carry: it was saved, and the workshop's
	// exported record was then refused by parley import.
	overridden := filepath.Join(t.TempDir(), "answers\u202evsc.csv")
	check(t, os.WriteFile(overridden, []byte(good), 0o644))
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"unknown expert", []string{"--in", writeSheet(t, good+"Nobody,Q2,0.1,0.3,0.6\n")}, "row 3, column expert"},
		{"broken rule", []string{"--in", writeSheet(t, good+"Jomo,Q1,0.3,0.2,0.6\n")}, "row 3, column q50: values must strictly increase"},
		{"wrong column", []string{"--in", writeSheet(t, "expert,question,q05,q50,q95,lowest\nInes,Q2,0.1,0.3,0.6,0.2\n")}, `row 1, column "lowest"`},
		{"a value beyond the header", []string{"--in", writeSheet(t, good+"Jomo,Q1,0.1,0.3,0.6,from the logs\n")}, "row 3, column 6: is beyond the columns the header names"},
		// A quote mark inside a cell crashed the command (a panic in the
		// CSV reader's FieldPos).
		{"a quote mark inside a cell", []string{"--in", writeSheet(t, good+"Jomo \"J\" K,Q1,0.1,0.3,0.6\n")}, `row 3, column expert: a quote mark (")`},
		{"a file's name the record cannot carry", []string{"--in", overridden}, "--in: the file's name must be plain text"},
		{"no sheet", []string{}, "--in"},
		{"bad channel", []string{"--in", writeSheet(t, good), "--channel", "carrier-pigeon"}, "--channel"},
		// The command read any file whole (a 200 MB one took 1.9 GB and
		// crashed), and quoted a bad column's whole name.
		{"larger than the upload's limit", []string{"--in", writeSheet(t, good+strings.Repeat("Jomo,Q1,0.1,0.3,0.6\n", 60_000))},
			"sheet: is too long (more than 1048576 bytes"},
		{"a column name of 1 MB", []string{"--in", writeSheet(t, strings.Repeat("x", 1<<20-1)+"\n")}, `row 1, column "xxxxxxxx`},
	} {
		t.Run(c.name, func(t *testing.T) {
			args := append([]string{"import-answers", "--db", path, "--workshop", w}, c.args...)
			code, _, errOut := run(args...)
			if code != 2 || !strings.Contains(errOut, c.want) || strings.Count(strings.TrimSpace(errOut), "\n") != 0 {
				t.Fatalf("exit %d, stderr %.300q; want 2 naming %s", code, errOut, c.want)
			}
			if len(errOut) > 320 {
				t.Errorf("the message is %d bytes long: %.300q", len(errOut), errOut)
			}
		})
	}
	if code, _, errOut := run("import-answers", "--db", path, "--workshop", "999", "--in", writeSheet(t, good)); code != 2 || !strings.Contains(errOut, "--workshop") {
		t.Errorf("unknown workshop: %d %q", code, errOut)
	}
	// An archived workshop says so: its round is closed too, but no
	// round of it can be opened.
	arch := workshop.Workshop{Title: "Archived (invented)", Invented: true}
	db, err := store.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	check(t, db.CreateWorkshop(context.Background(), &arch))
	check(t, db.SetArchived(context.Background(), arch.ID, true, "invented: finished"))
	db.Close()
	if code, _, errOut := run("import-answers", "--db", path, "--workshop", strconv.FormatInt(arch.ID, 10), "--in", writeSheet(t, good)); code != 2 || !strings.Contains(errOut, "--workshop") || !strings.Contains(errOut, "is archived") {
		t.Errorf("archived workshop: %d %q", code, errOut)
	}
	// A closed round refuses the sheet at its first row.
	db, err = store.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	check(t, db.SetRound(context.Background(), ws, 1, false, ""))
	db.Close()
	if code, _, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", writeSheet(t, good)); code != 2 || !strings.Contains(errOut, "row 2, column question") {
		t.Errorf("closed round: %d %q", code, errOut)
	}
	// So does a dry run, which must not promise what the save would refuse.
	if code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", writeSheet(t, good), "--dry-run"); code != 2 || !strings.Contains(errOut, "row 2, column question") || strings.Contains(out, "would save") {
		t.Errorf("dry run in a closed round: %d %q %q", code, out, errOut)
	}
	if n := len(revisionsIn(t, path, ws)); n != before {
		t.Fatalf("refused sheets wrote %d revisions", n-before)
	}
}

// import-answers records which file the judgements came from: the
// decision log's answers_imported event carries the SHA-256 of the
// file's bytes (crypto/sha256 here), its name and the rows; a sheet read
// from standard input has no name.
func TestImportAnswersNamesItsFile(t *testing.T) {
	path, ws, _ := cliWorkshop(t)
	text := "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.6,From her notes (invented).\nJomo,2,0.2,0.35,0.5,\n"
	sheet := writeSheet(t, text)
	w := strconv.FormatInt(ws, 10)
	if code, _, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", sheet, "--dry-run"); code != 0 {
		t.Fatalf("dry run: %s", errOut)
	}
	if imp := lastImport(t, path, ws); imp != nil {
		t.Fatalf("a dry run recorded an import: %+v", imp)
	}
	if code, _, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", sheet, "--channel", "paper_form"); code != 0 {
		t.Fatalf("import: %s", errOut)
	}
	sum := sha256.Sum256([]byte(text))
	imp := lastImport(t, path, ws)
	if imp == nil || imp.SHA256 != hex.EncodeToString(sum[:]) || imp.Name != "answers.csv" || !slices.Equal(imp.Rows, []int{2, 3}) || imp.Channel != workshop.ChannelPaperForm {
		t.Fatalf("recorded %+v", imp)
	}
	var out bytes.Buffer
	var errb bytes.Buffer
	stdin := "expert,question,q05,q50,q95\nJomo,Q2,0.25,0.4,0.55\n"
	if code := dispatch([]string{"import-answers", "--db", path, "--workshop", w, "--in", "-"}, strings.NewReader(stdin), &out, &errb); code != 0 {
		t.Fatalf("from standard input: %s", errb.String())
	}
	sum = sha256.Sum256([]byte(stdin))
	if imp := lastImport(t, path, ws); imp == nil || imp.SHA256 != hex.EncodeToString(sum[:]) || imp.Name != "" || !slices.Equal(imp.Rows, []int{2}) {
		t.Fatalf("from standard input, recorded %+v", imp)
	}
}

// lastImport is the workshop's latest answers_imported event's detail, or
// nil when there is none.
func lastImport(t *testing.T, path string, ws int64) *workshop.SheetImport {
	t.Helper()
	db, err := store.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	evs, err := db.Events(context.Background(), ws)
	if err != nil {
		t.Fatal(err)
	}
	for i := len(evs) - 1; i >= 0; i-- {
		if evs[i].Kind == workshop.EventAnswersImported {
			var imp workshop.SheetImport
			if err := json.Unmarshal([]byte(evs[i].Detail), &imp); err != nil {
				t.Fatal(err)
			}
			return &imp
		}
	}
	return nil
}

// The listing says which rows follow an answer the expert saved
// themselves, as the upload's preview does: each will replace it as the
// expert's current answer, which a sheet older than that answer should
// not. A row following the facilitator's own entry says nothing.
func TestImportAnswersSaysWhatARowFollows(t *testing.T) {
	path, ws, _ := cliWorkshop(t)
	w := strconv.FormatInt(ws, 10)
	sheet := writeSheet(t, "expert,question,q05,q50,q95\nInes,Q2,0.1,0.3,0.6\n")
	code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", sheet, "--dry-run")
	if code != 0 || !regexp.MustCompile(`row 2: Ines, Q2: Beta\([^)]*\) — follows Ines's own answer of \d{4}-\d\d-\d\d \d\d:\d\d UTC \(round 1\)\n`).MatchString(out) {
		t.Fatalf("dry run: %d %q %q", code, out, errOut)
	}
	if code, out, errOut = run("import-answers", "--db", path, "--workshop", w, "--in", sheet); code != 0 {
		t.Fatalf("import: %d %q %q", code, out, errOut)
	}
	// A row put right follows the facilitator's entry, which it does not name (TestImportAnswersSkipsUnchangedRows).
	again := writeSheet(t, "expert,question,q05,q50,q95\nInes,Q2,0.1,0.3,0.65\n")
	if code, out, errOut = run("import-answers", "--db", path, "--workshop", w, "--in", again, "--dry-run"); code != 0 || strings.Contains(out, "follows") {
		t.Fatalf("after the facilitator's entry: %d %q %q", code, out, errOut)
	}
}

// TestImportAnswersRefusedAtTheSavePrintsNoRows: a sheet whose rows pass
// but whose save is refused (here by a trigger on the real SQLite file,
// as a round closed in the server between the check and the save would
// be) prints no rows on stdout, only the refusal; the rows were listed
// first, as if saved, above it.
func TestImportAnswersRefusedAtTheSavePrintsNoRows(t *testing.T) {
	path, ws, _ := cliWorkshop(t)
	sqlDB, err := sql.Open("sqlite3", path)
	check(t, err)
	_, err = sqlDB.Exec(`CREATE TRIGGER refuse_all BEFORE INSERT ON revisions BEGIN SELECT RAISE(ABORT, 'refused for the test'); END`)
	check(t, err)
	check(t, sqlDB.Close())
	sheet := writeSheet(t, "expert,question,q05,q50,q95\nJomo,2,0.2,0.35,0.5\n")
	code, out, errOut := run("import-answers", "--db", path, "--workshop", strconv.FormatInt(ws, 10), "--in", sheet)
	if code == exitOK || out != "" || !strings.Contains(errOut, "refused for the test") {
		t.Errorf("exit %d, stdout %q, stderr %q; want a failure and nothing on stdout", code, out, errOut)
	}
}

// A sheet imported again in its round after one row was put right saves
// that row alone: the rows that repeat their expert's current answer,
// values and reasoning alike, are listed as unchanged and counted, in the
// dry run and the save. The sheet was refused as a whole, exit 2, naming
// every such row. A sheet whose every row is unchanged saves nothing and
// says so, exit 0, or 3 under --signal-unchanged; a bad row is still
// refused beside unchanged ones. A row whose reasoning differs is saved,
// and so is the same sheet in the next round, where it is that round's
// judgement.
func TestImportAnswersSkipsUnchangedRows(t *testing.T) {
	path, ws, _ := cliWorkshop(t)
	w := strconv.FormatInt(ws, 10)
	sheet := "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.6,Her notes (invented).\nJomo,2,20%,35%,50%,\n"
	if code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", writeSheet(t, sheet)); code != 0 {
		t.Fatalf("first import: %d %q %q", code, out, errOut)
	}
	before := len(revisionsIn(t, path, ws))
	fixed := writeSheet(t, strings.Replace(sheet, "0.1,0.3,0.6", "0.1,0.3,0.65", 1))
	unchangedJomo := regexp.MustCompile(`(?m)^row 3: Jomo, Q2: unchanged, the same as your entry of \d{4}-\d\d-\d\d \d\d:\d\d UTC, not saved again$`)
	code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", fixed, "--dry-run")
	if code != 0 || !strings.Contains(out, "row 2: Ines, Q2: Beta(") || !unchangedJomo.MatchString(out) ||
		!strings.HasSuffix(out, "would save 1 judgement in round 1 of workshop "+w+", entered by the facilitator (file); 1 row unchanged, not saved again\n") {
		t.Fatalf("dry run of the sheet put right: %d %q %q", code, out, errOut)
	}
	if n := len(revisionsIn(t, path, ws)); n != before {
		t.Fatalf("--dry-run saved %d revisions", n-before)
	}
	code, out, errOut = run("import-answers", "--db", path, "--workshop", w, "--in", fixed)
	if code != 0 || !unchangedJomo.MatchString(out) || !strings.Contains(out, "saved 1 judgement in round 1 of workshop "+w+", entered by the facilitator (file); 1 row unchanged, not saved again\n") {
		t.Fatalf("the sheet put right: %d %q %q", code, out, errOut)
	}
	revs := revisionsIn(t, path, ws)
	if len(revs) != before+1 || revs[len(revs)-1].Answer.Values[2] != 0.65 {
		t.Fatalf("saved %d revisions; want Ines's alone", len(revs)-before)
	}
	before = len(revs)

	// Every row unchanged: nothing saved, said plainly; the exit status
	// says it only when asked.
	for _, c := range []struct {
		args []string
		code int
		says string
	}{
		{nil, exitOK, "saved nothing: both rows repeat their experts' current answers of round 1 of workshop " + w + "\n"},
		{[]string{"--dry-run"}, exitOK, "would save nothing: both rows repeat their experts' current answers of round 1 of workshop " + w + "\n"},
		{[]string{"--signal-unchanged"}, exitUnchanged, "saved nothing: both rows"},
	} {
		args := append([]string{"import-answers", "--db", path, "--workshop", w, "--in", fixed}, c.args...)
		code, out, errOut := run(args...)
		if code != c.code || !strings.Contains(out, c.says) || !unchangedJomo.MatchString(out) || errOut != "" {
			t.Errorf("every row unchanged %v: %d %q %q", c.args, code, out, errOut)
		}
	}
	one := writeSheet(t, "expert,question,q05,q50,q95\nJomo,2,0.2,0.35,0.5\n") // in proportions: the same judgement
	if code, out, _ := run("import-answers", "--db", path, "--workshop", w, "--in", one); code != 0 ||
		!strings.HasSuffix(out, "saved nothing: the sheet's one row repeats its expert's current answer of round 1 of workshop "+w+"\n") {
		t.Errorf("one row unchanged: %d %q", code, out)
	}
	bad := writeSheet(t, strings.Replace(sheet, "0.1,0.3,0.6", "0.1,0.3,0.65", 1)+"Ines,Q1,0.5,0.3,0.6,\n")
	if code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", bad); code != exitBadInput || out != "" || !strings.Contains(errOut, "row 4, column ") {
		t.Errorf("a bad row beside unchanged ones: %d %q %q", code, out, errOut)
	}
	if n := len(revisionsIn(t, path, ws)); n != before {
		t.Fatalf("unchanged or refused sheets saved %d revisions", n-before)
	}
	reason := writeSheet(t, "expert,question,q05,q50,q95,reason\nJomo,2,0.2,0.35,0.5,Said on the phone (invented).\n")
	if code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", reason); code != 0 || !strings.HasSuffix(out, "saved 1 judgement in round 1 of workshop "+w+", entered by the facilitator (file)\n") {
		t.Fatalf("a new reasoning: %d %q %q", code, out, errOut)
	}
	db, err := store.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	err = db.SetRound(context.Background(), ws, 1, false, "")
	if err == nil {
		err = db.SetRound(context.Background(), ws, 2, true, "The next round (invented).")
	}
	db.Close()
	if err != nil {
		t.Fatal(err)
	}
	if code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", fixed); code != 0 || !strings.Contains(out, "saved 2 judgements in round 2") {
		t.Fatalf("the sheet in round 2: %d %q %q", code, out, errOut)
	}
}

// answeredOnQ2 is the command-line workshop with its first expert's
// answer to Q2 saved with the given reasoning.
func answeredOnQ2(t *testing.T, reason string) (path string, ws int64, own workshop.Revision) {
	t.Helper()
	path, ws, _ = cliWorkshop(t)
	db, err := store.Open(path)
	check(t, err)
	ctx := context.Background()
	qs, err := db.Questions(ctx, ws)
	check(t, err)
	es, err := db.Experts(ctx, ws)
	check(t, err)
	own = workshop.Revision{QuestionID: qs[1].ID, ExpertID: es[0].ID, Reason: reason,
		Answer: workshop.Answer{Values: []float64{0.1, 0.3, 0.6}}}
	check(t, db.SaveRevision(ctx, &own))
	check(t, db.Close())
	return path, ws, own
}

// A row correcting an expert's answer of the open round, its reason cell
// empty, keeps the reasoning of that answer, and the listing says so; it
// saved the answer without it, lost from the feedback, the reasons page
// and the room. A reasoning of an earlier round is not kept: the expert
// has not restated it.
func TestImportAnswersKeepsTheReasoning(t *testing.T) {
	path, ws, own := answeredOnQ2(t, "Ten seasons of counts (invented).")
	w := strconv.FormatInt(ws, 10)
	ctx := context.Background()
	sheet := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.65,\n")
	code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", sheet)
	if code != 0 || !strings.Contains(out, " — the reason cell is empty: keeps the reasoning of Ines's current answer\n") {
		t.Fatalf("the correction: %d %q %q", code, out, errOut)
	}
	revs := revisionsIn(t, path, ws)
	if last := revs[len(revs)-1]; last.Reason != own.Reason || last.Answer.Values[2] != 0.65 {
		t.Fatalf("saved %+v; want the reasoning kept", last)
	}
	db, err := store.Open(path)
	check(t, err)
	err = db.SetRound(ctx, ws, 1, false, "")
	if err == nil {
		err = db.SetRound(ctx, ws, 2, true, "The next round (invented).")
	}
	check(t, db.Close())
	check(t, err)
	next := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.7,\n")
	code, out, errOut = run("import-answers", "--db", path, "--workshop", w, "--in", next)
	if code != 0 || strings.Contains(out, "reasoning") {
		t.Fatalf("round 2: %d %q %q", code, out, errOut)
	}
	revs = revisionsIn(t, path, ws)
	if last := revs[len(revs)-1]; last.Reason != "" || last.Round != 2 {
		t.Fatalf("round 2 saved %+v; want no reasoning", last)
	}
}

// import-answers saves a row whose clear_reason cell says yes without
// reasoning, where an empty reason cell keeps the current answer's, and
// says so in its listing; a reasoning beside it exits 2 naming the cell.
func TestImportAnswersClearsTheReasoning(t *testing.T) {
	path, ws, _ := answeredOnQ2(t, "Meant for another question (invented).")
	w := strconv.FormatInt(ws, 10)
	before := len(revisionsIn(t, path, ws))
	code, _, errOut := run("import-answers", "--db", path, "--workshop", w, "--in",
		writeSheet(t, "expert,question,q05,q50,q95,reason,clear_reason\nInes,Q2,0.1,0.3,0.65,Counts (invented).,x\n"))
	if code != 2 || !strings.Contains(errOut, "row 2, column reason: must be empty in a row whose clear_reason cell says yes") {
		t.Errorf("a reasoning beside clear_reason: %d %q", code, errOut)
	}
	if n := len(revisionsIn(t, path, ws)); n != before {
		t.Fatalf("a refused sheet saved %d revisions", n-before)
	}
	code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in",
		writeSheet(t, "expert,question,q05,q50,q95,reason,clear_reason\nInes,Q2,0.1,0.3,0.65,,yes\n"))
	if code != 0 || !strings.Contains(out, " — its clear_reason cell says yes: saved without reasoning\n") {
		t.Fatalf("the correction: %d %q %q", code, out, errOut)
	}
	revs := revisionsIn(t, path, ws)
	if last := revs[len(revs)-1]; len(revs) != before+1 || last.Reason != "" || last.Answer.Values[2] != 0.65 {
		t.Fatalf("saved %+v; want the answer without reasoning", last)
	}
}

// import-answers reads the question cell as the upload does (one
// parser, answersheet): 2.0 and "Question 1" name their questions, and a
// cell only a guess could read exits 2 naming the row, the column and
// the rule, nothing saved.
func TestImportAnswersReadsTheQuestionAsSheetsWriteIt(t *testing.T) {
	path, ws, _ := cliWorkshop(t)
	w := strconv.FormatInt(ws, 10)
	before := len(revisionsIn(t, path, ws))
	for _, c := range []struct{ cell, want string }{
		{"2.5", "row 2, column question: must name the question by its number, 3, Q3 or Question 3"},
		{"Q 2b", "row 2, column question: must name the question by its number"},
		{"Q2 hatch share", `row 2, column question: names a quantity, units or wording other than the question's of that number ("Q2 hatch share", but Q2 asks for "survival share")`},
	} {
		code, _, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", writeSheet(t, "expert,question,q05,q50,q95\nInes,"+c.cell+",0.1,0.3,0.6\n"))
		if code != 2 || !strings.Contains(errOut, c.want) {
			t.Errorf("%q: exit %d, %q; want 2 naming %s", c.cell, code, errOut, c.want)
		}
	}
	if n := len(revisionsIn(t, path, ws)); n != before {
		t.Fatalf("refused sheets wrote %d revisions", n-before)
	}
	sheet := writeSheet(t, "expert,question,q05,q50,q95\nInes,2.0,0.1,0.3,0.6\nJomo,Question 1,0.15,0.3,0.5\nJomo,\"Question 2, survival share\",0.1,0.25,0.45\n")
	code, out, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", sheet)
	if code != 0 || !strings.Contains(out, "row 2: Ines, Q2:") || !strings.Contains(out, "row 3: Jomo, Q1:") || !strings.Contains(out, "row 4: Jomo, Q2:") {
		t.Fatalf("import: %d %q %q", code, out, errOut)
	}
	if n := len(revisionsIn(t, path, ws)); n != before+3 {
		t.Errorf("saved %d revisions, want 3", n-before)
	}
}
