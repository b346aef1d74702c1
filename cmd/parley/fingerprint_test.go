package main

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
)

// closedRoundWorkshop is cliWorkshop with round 1 closed, round 2 opened
// and one more answer and agreement after the close.
func closedRoundWorkshop(t *testing.T) (path string, workshopID int64) {
	t.Helper()
	path, wid, qid := cliWorkshop(t)
	db, err := store.Open(path)
	check(t, err)
	defer db.Close()
	ctx := context.Background()
	check(t, db.SetRound(ctx, wid, 1, false, "everyone has answered"))
	check(t, db.SetRound(ctx, wid, 2, true, "after the discussion"))
	es, err := db.Experts(ctx, wid)
	check(t, err)
	r := workshop.Revision{QuestionID: qid, ExpertID: es[0].ID, Reason: "moved after hearing the others",
		Answer: workshop.Answer{Values: []float64{0.12, 0.22, 0.38}}}
	check(t, db.SaveRevision(ctx, &r))
	check(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: qid, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 5, Beta: 15}), Rationale: "after round 2", RoundOpen: true}))
	return path, wid
}

var roundOneLine = regexp.MustCompile(`after round 1 closed \([^)]*\): ([0-9a-f]{4} [0-9a-f]{4} [0-9a-f]{4} [0-9a-f]{4})\n`)

// roundOneValue runs parley fingerprint on a record file and returns the
// fingerprint it lists after round 1's close, with the exit status.
func roundOneValue(t *testing.T, file string) (string, int) {
	t.Helper()
	code, out, errs := run("fingerprint", "--in", file)
	m := roundOneLine.FindStringSubmatch(out)
	if m == nil {
		t.Fatalf("fingerprint --in %s: exit %d, no round 1 in %q (%s)", filepath.Base(file), code, out, errs)
	}
	return m[1], code
}

// editJSON writes a copy of the record file with edit applied to its
// decoded document.
func editJSON(t *testing.T, file string, edit func(doc map[string]any)) string {
	t.Helper()
	b, err := os.ReadFile(file)
	check(t, err)
	var doc map[string]any
	check(t, json.Unmarshal(b, &doc))
	edit(doc)
	b, err = json.Marshal(doc)
	check(t, err)
	out := filepath.Join(t.TempDir(), "edited.json")
	check(t, os.WriteFile(out, b, 0o644))
	return out
}

// A value noted when round 1 closed is found in the record exported
// later; a record changed afterwards, in its JSON or in the database
// with the append-only trigger dropped, no longer shows it.
func TestFingerprintCommand(t *testing.T) {
	path, wid := closedRoundWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	file := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", file); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	noted, code := roundOneValue(t, file)
	if code != exitOK {
		t.Fatalf("fingerprint of the record as exported: exit %d", code)
	}
	b, err := os.ReadFile(file)
	check(t, err)
	rec, err := record.Parse(strings.NewReader(string(b)))
	check(t, err)
	code, out, errs := run("fingerprint", "--in", file)
	if code != exitOK || !strings.Contains(out, "now, after all "+strconv.Itoa(len(rec.Chain.Facts))+" facts: ") ||
		!strings.Contains(out, "(in full "+rec.Fingerprint+")") {
		t.Fatalf("listing: exit %d, %q %s", code, out, errs)
	}

	code, out, errs = run("fingerprint", "--check", noted, "--in", file)
	if code != exitOK || !strings.Contains(out, noted+" matches the record's fingerprint after round 1 closed") {
		t.Fatalf("check of the noted value: exit %d, %q %s", code, out, errs)
	}
	// Upper case, and all 64 digits of the head, are taken too.
	if code, out, errs := run("fingerprint", "--check", strings.ToUpper(noted), "--in", file); code != exitOK {
		t.Fatalf("upper case: exit %d, %q %s", code, out, errs)
	}
	if code, out, errs := run("fingerprint", "--check", rec.Fingerprint, "--in", file); code != exitOK || !strings.Contains(out, "fact "+strconv.Itoa(len(rec.Chain.Facts))+" of") {
		t.Fatalf("the head: exit %d, %q %s", code, out, errs)
	}

	// Imported into a fresh database, whose ids are the same, and
	// exported again: the same fingerprint.
	fresh := filepath.Join(t.TempDir(), "fresh.db")
	code, out, errs = run("import", "--db", fresh, "--in", file)
	if code != exitOK {
		t.Fatalf("import: %s", errs)
	}
	copied := filepath.Join(t.TempDir(), "copied.json")
	if code, _, errs := run("export", "--db", fresh, "--workshop", strings.TrimSpace(out), "--out", copied); code != exitOK {
		t.Fatalf("export of the copy: %s", errs)
	}
	if b, err := os.ReadFile(copied); err != nil || !strings.Contains(string(b), `"fingerprint": "`+rec.Fingerprint+`"`) {
		t.Errorf("the copy imported into a fresh database has another fingerprint (%v)", err)
	}

	// The JSON changed: a round 1 reason, and separately a round 1 value.
	for name, edit := range map[string]func(doc map[string]any){
		"a reason": func(doc map[string]any) {
			doc["revisions"].([]any)[0].(map[string]any)["reason"] = "added later"
		},
		"a value": func(doc map[string]any) {
			doc["revisions"].([]any)[0].(map[string]any)["answer"].(map[string]any)["values"] = []any{0.1, 0.21, 0.4}
		},
	} {
		changed := editJSON(t, file, edit)
		now, code := roundOneValue(t, changed)
		if now == noted || code != exitFailure {
			t.Errorf("%s changed: round 1's fingerprint %s (noted %s), exit %d, want another value and exit 1", name, now, noted, code)
		}
		code, out, errs := run("fingerprint", "--check", noted, "--in", changed)
		if code != exitFailure || out == "" || !strings.Contains(errs, noted+" is not a fingerprint of this record at any point") {
			t.Errorf("%s changed: check exit %d, %q %q", name, code, out, errs)
		}
		empty := filepath.Join(t.TempDir(), "empty.db")
		code, _, errs = run("import", "--db", empty, "--in", changed)
		if code != exitBadInput || !strings.Contains(errs, "revisions[0]") {
			t.Errorf("%s changed: import exit %d: %s", name, code, errs)
		}
		if name == "a reason" && !strings.Contains(errs, string(record.RuleChainMismatch)) {
			t.Errorf("a reason changed: import says %s, want %s", errs, record.RuleChainMismatch)
		}
	}

	// The database changed behind the triggers' back, then exported
	// again: the new record is consistent in itself, but round 1's
	// fingerprint is not the one noted.
	raw, err := sql.Open("sqlite3", path)
	check(t, err)
	if _, err := raw.Exec(`DROP TRIGGER revisions_no_update`); err != nil {
		t.Fatal(err)
	}
	if _, err := raw.Exec(`UPDATE revisions SET reason = 'added later' WHERE id = (SELECT MIN(id) FROM revisions)`); err != nil {
		t.Fatal(err)
	}
	check(t, raw.Close())
	again := filepath.Join(t.TempDir(), "again.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", again); code != exitOK {
		t.Fatalf("export after the change: %s", errs)
	}
	if now, code := roundOneValue(t, again); now == noted || code != exitOK {
		t.Errorf("after the database was changed: round 1's fingerprint %s (noted %s), exit %d", now, noted, code)
	}
	if code, _, errs := run("fingerprint", "--check", noted, "--in", again); code != exitFailure || !strings.Contains(errs, "is not a fingerprint") {
		t.Errorf("after the database was changed: check exit %d: %s", code, errs)
	}

	// A record made before Parley kept a chain is read from its facts:
	// the same values.
	old := editJSON(t, file, func(doc map[string]any) { delete(doc, "fingerprint"); delete(doc, "chain") })
	if v, code := roundOneValue(t, old); v != noted || code != exitOK {
		t.Errorf("record without a chain: round 1 %s (want %s), exit %d", v, noted, code)
	}
}

// Bad input: exit 2 with the flag and the rule named, nothing else said.
func TestFingerprintBadInput(t *testing.T) {
	path, wid := closedRoundWorkshop(t)
	file := exportedRecord(t, path, wid)
	notJSON := filepath.Join(t.TempDir(), "notes.txt")
	check(t, os.WriteFile(notJSON, []byte("3f2a 91c0 7be4 0d15\n"), 0o644))
	emptyJSON := filepath.Join(t.TempDir(), "empty.json")
	check(t, os.WriteFile(emptyJSON, []byte("{}\n"), 0o644))
	noWorkshop := filepath.Join(t.TempDir(), "no-workshop.json")
	check(t, os.WriteFile(noWorkshop, []byte(`{"parley_record": 1}`+"\n"), 0o644))
	// A record of a later format may lay its facts out otherwise; its
	// values were worked out as if it were this one's.
	b, err := os.ReadFile(file)
	check(t, err)
	later := filepath.Join(t.TempDir(), "later.json")
	check(t, os.WriteFile(later, []byte(strings.Replace(string(b), `"parley_record": 1`, `"parley_record": 2`, 1)), 0o644))
	for _, tt := range []struct {
		args []string
		want string
	}{
		{[]string{"--check", "3f2a 91c0 7be4", "--in", file}, "--check: must be 16 hex digits"},
		{[]string{"--check", "3f2a 91c0 7be4 0d1x", "--in", file}, "--check: must be 16 hex digits"},
		{[]string{"--check", "3f2a_91c0_7be4_0d15", "--in", file}, "--check: must be 16 hex digits"},
		{[]string{"--in", file + ".missing"}, "--in:"},
		{[]string{"--check", "3f2a 91c0 7be4 0d15"}, "--in: a JSON record file is required"},
		{[]string{"--in", notJSON}, "record: " + string(record.RuleJSON)},
		{[]string{file}, "unexpected argument"},
		{[]string{"--in", emptyJSON}, "parley_record: is required (the file is not a Parley record"},
		{[]string{"--in", noWorkshop}, "--in: the file is not a workshop's record"},
		{[]string{"--in", later}, "parley_record: unknown value (format 2; this version reads 1)"},
	} {
		code, out, errs := run(append([]string{"fingerprint"}, tt.args...)...)
		if code != exitBadInput || out != "" || !strings.Contains(errs, tt.want) || strings.Count(errs, "\n") != 1 {
			t.Errorf("fingerprint %q: exit %d, stdout %q, stderr %q, want exit 2 and %q", tt.args, code, out, errs, tt.want)
		}
	}
}

// A record restored from its export into another database shows the
// values the room noted: the import keeps the record's ids where the
// database has none of them, as in a new database, or one the exports of
// the same database's other workshops were restored into, in any order.
func TestFingerprintSurvivesARestore(t *testing.T) {
	path, wid := closedRoundWorkshop(t)
	dir := t.TempDir()
	export := func(db, workshop, name string) (file, fingerprint string) {
		t.Helper()
		file = filepath.Join(dir, name)
		if code, _, errs := run("export", "--db", db, "--workshop", workshop, "--out", file); code != exitOK {
			t.Fatalf("export %s of %s: %s", workshop, filepath.Base(db), errs)
		}
		b, err := os.ReadFile(file)
		check(t, err)
		rec, err := record.Parse(strings.NewReader(string(b)))
		check(t, err)
		return file, rec.Fingerprint
	}
	importInto := func(db, file string) string {
		t.Helper()
		code, out, errs := run("import", "--db", db, "--in", file)
		if code != exitOK {
			t.Fatalf("import %s: %s", filepath.Base(file), errs)
		}
		return strings.TrimSpace(out)
	}
	// The source database holds two workshops: the first, and a copy of
	// it imported beside it (so its ids follow the first's).
	first, firstPrint := export(path, strconv.FormatInt(wid, 10), "first.json")
	second := importInto(path, first)
	secondFile, secondPrint := export(path, second, "second.json")
	if secondPrint == firstPrint {
		t.Fatal("the copy beside the first has the first's ids and fingerprint; the test needs another")
	}

	// Restored into a new database, the second first.
	restored := filepath.Join(t.TempDir(), "restored.db")
	got := importInto(restored, secondFile)
	if got != second {
		t.Errorf("the second workshop restored as %s, want its own id %s", got, second)
	}
	if _, fp := export(restored, got, "second-again.json"); fp != secondPrint {
		t.Errorf("the second workshop restored alone into a new database: fingerprint %s, its record's %s", fp, secondPrint)
	}
	if got := importInto(restored, first); got != strconv.FormatInt(wid, 10) {
		t.Errorf("the first workshop restored as %s, want its own id %d", got, wid)
	}
	if _, fp := export(restored, strconv.FormatInt(wid, 10), "first-again.json"); fp != firstPrint {
		t.Errorf("the first workshop restored beside the second: fingerprint %s, its record's %s", fp, firstPrint)
	}
	if v, _ := roundOneValue(t, filepath.Join(dir, "second-again.json")); v != mustRoundOne(t, secondFile) {
		t.Errorf("round 1's close after the restore reads %s, the room noted %s", v, mustRoundOne(t, secondFile))
	}

	// Where the database already uses the record's ids, the import
	// numbers the rows anew, and the imported workshop's values are its
	// own (the record file keeps the original's).
	if again := importInto(restored, secondFile); again == second {
		t.Errorf("a second import of the same record kept the ids %s already taken", again)
	}
}

func mustRoundOne(t *testing.T, file string) string {
	t.Helper()
	v, _ := roundOneValue(t, file)
	return v
}

// A question's bounds changed in the database without an event: the
// chain, which does not cover the questions' rows, is consistent, but
// parley fingerprint says the question is not what its events give
// (exit 1) and import refuses the record.
func TestFingerprintQuestionChangedWithoutAnEvent(t *testing.T) {
	path, wid := closedRoundWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	raw, err := sql.Open("sqlite3", path)
	check(t, err)
	if _, err := raw.Exec(`UPDATE questions SET upper = 0.9 WHERE id = (SELECT MIN(id) FROM questions WHERE workshop_id = ?)`, wid); err != nil {
		t.Fatal(err)
	}
	check(t, raw.Close())
	file := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", file); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	code, out, errs := run("fingerprint", "--in", file)
	if code != exitFailure || !strings.Contains(out, "after round 1 closed") ||
		!strings.Contains(errs, "a question, an expert or a withheld reason is not what its events in the decision log give: questions[0].upper: "+string(record.RuleDefinitionMismatch)) {
		t.Errorf("fingerprint: exit %d, %q %q", code, out, errs)
	}
	code, _, errs = run("import", "--db", filepath.Join(t.TempDir(), "new.db"), "--in", file)
	if code != exitBadInput || !strings.Contains(errs, "questions[0]") {
		t.Errorf("import: exit %d: %s", code, errs)
	}
}

// A question's agreed_prior, the record's headline number, is a copy of
// the last agreement of its prior_history that the chain does not cover;
// changed in the JSON, or made another agreement by reversing the history
// (whose order the chain does not cover either), parley fingerprint had
// said the record was as noted. Now it exits 1 naming the field, and the
// import refuses the file.
func TestFingerprintAgreedPriorChanged(t *testing.T) {
	path, wid := closedRoundWorkshop(t)
	file := exportedRecord(t, path, wid)
	doc, err := os.ReadFile(file)
	check(t, err)
	for _, c := range []struct {
		name, field string
		change      func(q map[string]any)
	}{
		{"rationale", "questions[0].agreed_prior", func(q map[string]any) {
			q["agreed_prior"].(map[string]any)["rationale"] = "the pool, unchanged"
		}},
		{"history reversed", "questions[0].prior_history[1].id", func(q map[string]any) {
			h := q["prior_history"].([]any)
			slices.Reverse(h)
		}},
	} {
		var rec map[string]any
		check(t, json.Unmarshal(doc, &rec))
		c.change(rec["questions"].([]any)[0].(map[string]any))
		b, err := json.Marshal(rec)
		check(t, err)
		forged := filepath.Join(t.TempDir(), "forged.json")
		check(t, os.WriteFile(forged, b, 0o644))
		code, _, errs := run("fingerprint", "--in", forged)
		if code != exitFailure || !strings.Contains(errs, "the weights or an agreed prior in force are not the last of their history: "+c.field+": ") {
			t.Errorf("%s: fingerprint: exit %d, %q", c.name, code, errs)
		}
		code, _, errs = run("import", "--db", filepath.Join(t.TempDir(), "new.db"), "--in", forged)
		if code != exitBadInput || !strings.Contains(errs, c.field) {
			t.Errorf("%s: import: exit %d: %s", c.name, code, errs)
		}
	}
}

// An answer added to round 1 after round 1 closed, by a plain INSERT into
// the database (the append-only triggers allow inserts): the chain puts it
// after the close, so the value the room noted at the close is still
// found, and parley fingerprint said "the record up to there is as it was
// when the value was noted" and nothing more, while round 1's answers,
// the round-2 feedback and the expert's current answer were no longer
// those of the room. A revision is saved only while its round is open, so
// one chained after its round's close (and no reopening) was added behind
// Parley's back: fingerprint's listing exits 1 naming it, --check says so
// beside its match (as README has it for a question changed without an
// event), and import refuses the record.
func TestFingerprintAnswerAddedToAClosedRound(t *testing.T) {
	path, wid := closedRoundWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	file := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", file); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	noted, code := roundOneValue(t, file)
	if code != exitOK {
		t.Fatalf("fingerprint of the record as exported: exit %d", code)
	}
	raw, err := sql.Open("sqlite3", path)
	check(t, err)
	// Jomo's round-1 answer to the first question, given again in round 1
	// with other values, stamped now (after round 1's close).
	if _, err := raw.Exec(`INSERT INTO revisions (question_id, expert_id, round, at, reason,
		 answer_values, lowest, highest, best, confidence, counts, percent, entered_by, channel)
		 SELECT question_id, expert_id, 1, ?, 'said in round 1', '[0.3,0.5,0.7]', lowest, highest, best, confidence, counts, percent, entered_by, channel
		 FROM revisions WHERE id = (SELECT MAX(r.id) FROM revisions r JOIN experts e ON e.id = r.expert_id WHERE e.name = 'Jomo' AND r.round = 1)`,
		time.Now().UTC().Format(time.RFC3339Nano)); err != nil {
		t.Fatal(err)
	}
	check(t, raw.Close())
	forged := filepath.Join(t.TempDir(), "forged.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", forged); code != exitOK {
		t.Fatalf("export after the insert: %s", errs)
	}
	if v, _ := roundOneValue(t, forged); v != noted {
		t.Fatalf("round 1's value moved (%s, noted %s): the test needs the insert after the close", v, noted)
	}
	want := "revisions[4].round: " + string(record.RuleSavedInItsRound)
	code, out, errs := run("fingerprint", "--check", noted, "--in", forged)
	if code != exitOK || !strings.Contains(out, noted+" matches") || !strings.Contains(errs, "parley fingerprint: but an answer comes after its round closed (it was added later): "+want) {
		t.Errorf("fingerprint --check of round 1's value: exit %d, %q %q, want the match and, on stderr, %q", code, out, errs, want)
	}
	// --strict: the same, with exit 1, for a script that reads the exit
	// status alone; a sound record still exits 0.
	code, out, errs = run("fingerprint", "--check", noted, "--strict", "--in", forged)
	if code != exitFailure || !strings.Contains(out, noted+" matches") || !strings.Contains(errs, want) {
		t.Errorf("fingerprint --check --strict of round 1's value: exit %d, %q %q, want the match, exit 1 and, on stderr, %q", code, out, errs, want)
	}
	if code, _, errs := run("fingerprint", "--check", noted, "--strict", "--in", file); code != exitOK {
		t.Errorf("fingerprint --check --strict of the record as exported: exit %d, %s", code, errs)
	}
	if code, _, errs := run("fingerprint", "--in", forged); code != exitFailure || !strings.Contains(errs, want) {
		t.Errorf("fingerprint: exit %d, %q, want exit 1 and %q", code, errs, want)
	}
	code, _, errs = run("import", "--db", filepath.Join(t.TempDir(), "new.db"), "--in", forged)
	if code != exitBadInput || !strings.Contains(errs, want) {
		t.Errorf("import: exit %d: %s, want %q", code, errs, want)
	}
}

// The workshop's round and round_open are not bound to any event: set
// again in the database after round 1 closed, without round_reopened
// (or moved on to round 2 without round_opened), they let answers in
// through Parley itself. One comes after round 1's close in the chain,
// the other is of a round no event opened, and the record refuses them
// as an answer INSERTed there.
func TestFingerprintAnswerSavedInARoundOpenedWithoutAnEvent(t *testing.T) {
	for _, set := range []string{`UPDATE workshops SET round_open = 1 WHERE id = ?`, `UPDATE workshops SET round = 2, round_open = 1 WHERE id = ?`} {
		answerSavedAfter(t, set)
	}
}

func answerSavedAfter(t *testing.T, set string) {
	t.Helper()
	path, wid, qid := cliWorkshop(t)
	ctx := context.Background()
	db, err := store.Open(path)
	check(t, err)
	check(t, db.SetRound(ctx, wid, 1, false, "everyone has answered"))
	check(t, db.Close())
	raw, err := sql.Open("sqlite3", path)
	check(t, err)
	if _, err := raw.Exec(set, wid); err != nil {
		t.Fatal(err)
	}
	check(t, raw.Close())
	db, err = store.Open(path)
	check(t, err)
	es, err := db.Experts(ctx, wid)
	check(t, err)
	r := workshop.Revision{QuestionID: qid, ExpertID: es[1].ID, Reason: "after the close",
		Answer: workshop.Answer{Values: []float64{0.3, 0.5, 0.7}}}
	check(t, db.SaveRevision(ctx, &r))
	check(t, db.Close())
	file := exportedRecord(t, path, wid)
	if code, _, errs := run("fingerprint", "--in", file); code != exitFailure || !strings.Contains(errs, ".round: "+string(record.RuleSavedInItsRound)) {
		t.Errorf("%s: fingerprint: exit %d, %q", set, code, errs)
	}
}

// A weight set or an agreed prior INSERTed into the database (the
// append-only triggers allow inserts), stamped after every noted value,
// changed the weights in force or the record's headline prior with no
// entry in the decision log, which the facilitator and a reviewer read;
// parley fingerprint said nothing. Parley writes each with its event in
// one transaction at one time: fingerprint now exits 1 naming the item.
func TestFingerprintDecisionWithoutItsLogEntry(t *testing.T) {
	for _, c := range []struct {
		name, insert, want string
	}{
		{"weight set", `INSERT INTO weight_sets (workshop_id, scheme, by_expert, reason, at)
			SELECT id, 'equal', '{}', 'set quietly', ? FROM workshops`, "weight_history[0]: " + string(record.RuleNotLogged)},
		{"agreed prior", `INSERT INTO agreed_priors (question_id, source, alpha, beta, lower, upper, consensus, rationale, round, at,
			round_open, weight_set_id, construction, pooled_revisions)
			SELECT question_id, source, 40, 4, lower, upper, consensus, 'agreed quietly', round, ?, round_open, weight_set_id, construction, pooled_revisions
			FROM agreed_priors WHERE id = (SELECT MAX(id) FROM agreed_priors)`, "questions[0].prior_history[2]: " + string(record.RuleNotLogged)},
	} {
		path, wid := closedRoundWorkshop(t)
		raw, err := sql.Open("sqlite3", path)
		check(t, err)
		if _, err := raw.Exec(c.insert, time.Now().UTC().Format(time.RFC3339Nano)); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		check(t, raw.Close())
		file := filepath.Join(t.TempDir(), "record.json")
		if code, _, errs := run("export", "--db", path, "--workshop", strconv.FormatInt(wid, 10), "--out", file); code != exitOK {
			t.Fatalf("%s: export: %s", c.name, errs)
		}
		code, _, errs := run("fingerprint", "--in", file)
		if code != exitFailure || !strings.Contains(errs, "a decision is in the record without its entry in the decision log (it was added later): "+c.want) {
			t.Errorf("%s: fingerprint: exit %d, %q, want exit 1 and %q", c.name, code, errs, c.want)
		}
		// import refuses it too, naming the item, and creates nothing:
		// restored, the quiet decision stood as one the log never had.
		into := filepath.Join(t.TempDir(), "restored.db")
		code, _, errs = run("import", "--db", into, "--in", file)
		if code != exitBadInput || !strings.Contains(errs, c.want) {
			t.Errorf("%s: import: exit %d, %q, want exit 2 and %q", c.name, code, errs, c.want)
		}
		if _, err := os.Stat(into); !errors.Is(err, fs.ErrNotExist) {
			t.Errorf("%s: import left a database behind: %v", c.name, err)
		}
	}
}

// A record narrowed to one question (export --question) leaves the
// workshop's other facts out. fingerprint listed values of its own for
// it, and a value noted when round 1 closed was "not a fingerprint of
// this record at any point: either the record was changed after the
// value was noted, or ...": a question's file handed to a reviewer read
// as tampered with. It is refused, naming the whole record to check.
func TestFingerprintRefusesARecordOfOneQuestion(t *testing.T) {
	path, wid := closedRoundWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	whole := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", whole); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	noted, _ := roundOneValue(t, whole)
	b, err := os.ReadFile(whole)
	check(t, err)
	rec, err := record.Parse(strings.NewReader(string(b)))
	check(t, err)
	qid := strconv.FormatInt(rec.Questions[0].ID, 10)
	one := filepath.Join(t.TempDir(), "one.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--question", qid, "--out", one); code != exitOK {
		t.Fatalf("export --question: %s", errs)
	}
	for _, args := range [][]string{{"fingerprint", "--in", one}, {"fingerprint", "--in", one, "--check", noted}} {
		code, out, errs := run(args...)
		if code != exitBadInput || out != "" || !strings.Contains(errs, "--in: the file holds question id "+qid+" alone") ||
			!strings.Contains(errs, "without --question") || strings.Contains(errs, "changed") {
			t.Errorf("%q: exit %d, %q %q", args, code, out, errs)
		}
	}
	// The narrowed record says so, and still imports.
	b, err = os.ReadFile(one)
	check(t, err)
	narrowed, err := record.Parse(strings.NewReader(string(b)))
	check(t, err)
	if strconv.FormatInt(narrowed.OneQuestion, 10) != qid {
		t.Errorf("the narrowed record's one_question is %d, want %s", narrowed.OneQuestion, qid)
	}
	if code, _, errs := run("import", "--db", filepath.Join(t.TempDir(), "other.db"), "--in", one); code != exitOK {
		t.Errorf("import of the narrowed record: exit %d, %s", code, errs)
	}
}
