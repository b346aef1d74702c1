package main

import (
	"database/sql"
	"encoding/json"
	"io"
	"io/fs"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/migrations"
	"github.com/parley-elicit/parley/store"
)

// oldDatabase makes a database at schema version k by applying the first
// k embedded migration files by hand, as a Parley of that version did, and
// fills it with an invented workshop written in version 2's columns only
// (every later migration adds columns with defaults or fills them): two
// questions, one of them a calibration question whose truth was revealed
// in round 1, three experts, answers in two rounds, equal weights and an
// agreed prior from the pool, each with its event.
func oldDatabase(t *testing.T, k int) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "v"+strconv.Itoa(k)+".db")
	db, err := sql.Open("sqlite3", path)
	check(t, err)
	defer db.Close()
	db.SetMaxOpenConns(1)
	exec := func(q string, args ...any) {
		t.Helper()
		if _, err := db.Exec(q, args...); err != nil {
			t.Fatalf("version %d: %s: %v", k, q, err)
		}
	}
	exec(`CREATE TABLE schema_migrations (version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied TEXT NOT NULL)`)
	names, err := fs.Glob(migrations.FS, "*.sql")
	check(t, err)
	for i, n := range names[:k] {
		b, err := fs.ReadFile(migrations.FS, n)
		check(t, err)
		exec(string(b))
		exec(`INSERT INTO schema_migrations VALUES (?, ?, '2026-01-05T09:00:00Z')`, i+1, n)
	}
	clock := time.Date(2026, 1, 5, 9, 0, 0, 0, time.UTC)
	at := func() string {
		clock = clock.Add(7*time.Minute + 123456*time.Microsecond)
		return clock.Format(time.RFC3339Nano)
	}
	eventAt := func(q any, kind, when, reason, detail string) {
		exec(`INSERT INTO events (workshop_id, question_id, kind, at, reason, detail) VALUES (1, ?, ?, ?, ?, ?)`, q, kind, when, reason, detail)
	}
	event := func(q any, kind, reason, detail string) { eventAt(q, kind, at(), reason, detail) }
	exec(`INSERT INTO workshops (id, title, purpose, invented, created) VALUES (1, 'Culvert blockage after storms (invented)', 'A prior for the inspection plan', 1, ?)`, at())
	event(nil, "workshop_created", "", "")
	exec(`INSERT INTO questions (id, workshop_id, position, wording, quantity, lower, upper, format, probs) VALUES
		(1, 1, 1, 'Share of culverts blocked after a 10-year storm?', 'blocked share', 0, 1, 'quantiles', '[0.05,0.5,0.95]')`)
	event(1, "question_added", "", "")
	exec(`INSERT INTO questions (id, workshop_id, position, wording, quantity, lower, upper, format, probs, calibration, true_value) VALUES
		(2, 1, 2, 'Share of last year''s inspected culverts found blocked?', 'blocked share', 0, 1, 'quantiles', '[0.05,0.5,0.95]', 1, 0.22)`)
	event(2, "question_added", "", "")
	for e, name := range []string{"Ines Varga", "Jomo Otieno", "Ole Brandt"} {
		exec(`INSERT INTO experts (id, workshop_id, name, token_hash, created) VALUES (?, 1, ?, ?, ?)`, e+1, name, []byte("token-"+name), at())
		event(nil, "expert_added", "", "")
	}
	answer := func(q, e, round int, vals string) {
		exec(`INSERT INTO revisions (question_id, expert_id, round, at, reason, answer_values) VALUES (?, ?, ?, ?, 'from the storm logs', ?)`, q, e, round, at(), vals)
	}
	answer(1, 1, 1, "[0.05,0.15,0.35]")
	answer(1, 2, 1, "[0.1,0.25,0.5]")
	answer(1, 3, 1, "[0.02,0.08,0.2]")
	answer(2, 1, 1, "[0.1,0.2,0.4]")
	answer(2, 2, 1, "[0.15,0.3,0.5]")
	exec(`UPDATE questions SET revealed = 1 WHERE id = 2`)
	event(2, "truth_revealed", "", "")
	answer(2, 3, 1, "[0.05,0.1,0.3]") // after the reveal: not counted by its score
	exec(`UPDATE workshops SET round_open = 0`)
	event(nil, "round_closed", "end of the first round", `{"round":1}`)
	exec(`UPDATE workshops SET round = 2, round_open = 1`)
	event(nil, "round_opened", "second round", `{"round":2}`)
	answer(1, 3, 2, "[0.04,0.12,0.3]")
	if k >= 2 {
		// A decision and its entry in the log share their time, as the
		// store writes them in one transaction.
		when := at()
		exec(`INSERT INTO weight_sets (id, workshop_id, scheme, reason, at) VALUES (1, 1, 'equal', 'no calibration yet', ?)`, when)
		eventAt(nil, "weights_set", when, "no calibration yet", "")
		when = at()
		exec(`INSERT INTO agreed_priors (question_id, source, alpha, beta, lower, upper, rationale, round, at) VALUES (1, 'pool', 2.1, 9.4, 0, 1, 'the pool after round 2', 2, ?)`, when)
		eventAt(1, "prior_agreed", when, "the pool after round 2", "")
	}
	return path
}

// TestAnOldDatabaseUpgradesWithItsRecord opens a database at every
// earlier schema version that holds a workshop with today's binary: every
// migration applies, the export is a valid record with every revision,
// the values later migrations compute are right (the reveal's cut-off,
// the weights in force at the agreement), and fingerprint reads the
// record without a complaint.
func TestAnOldDatabaseUpgradesWithItsRecord(t *testing.T) {
	latest := store.LatestVersion()
	for k := 2; k < latest; k++ {
		path := oldDatabase(t, k)
		out := filepath.Join(t.TempDir(), "record.json")
		if code, _, errs := run("export", "--db", path, "--workshop", "1", "--out", out); code != exitOK {
			t.Fatalf("from version %d: export exit %d: %s", k, code, errs)
		}
		db, err := store.Open(path)
		check(t, err)
		var (
			v, revealedThrough int
			weightSet          sql.NullInt64
		)
		raw, err := sql.Open("sqlite3", path)
		check(t, err)
		check(t, raw.QueryRow(`SELECT MAX(version) FROM schema_migrations`).Scan(&v))
		check(t, raw.QueryRow(`SELECT revealed_through FROM questions WHERE id = 2`).Scan(&revealedThrough))
		check(t, raw.QueryRow(`SELECT weight_set_id FROM agreed_priors`).Scan(&weightSet))
		raw.Close()
		if v != latest {
			t.Errorf("from version %d: schema version %d, want %d", k, v, latest)
		}
		if k < 5 && revealedThrough != 5 {
			// The fifth revision is the last saved before the reveal.
			t.Errorf("from version %d: the reveal counts revisions through %d, want 5", k, revealedThrough)
		}
		if k < 7 && (!weightSet.Valid || weightSet.Int64 != 1) {
			t.Errorf("from version %d: the agreed prior's weight set %v, want 1 (in force when it was agreed)", k, weightSet)
		}
		db.Close()

		b, err := os.ReadFile(out)
		check(t, err)
		var rec struct {
			Revisions []json.RawMessage `json:"revisions"`
		}
		check(t, json.Unmarshal(b, &rec))
		if len(rec.Revisions) != 7 {
			t.Errorf("from version %d: the record holds %d revisions, want 7", k, len(rec.Revisions))
		}
		code, stdout, errs := run("fingerprint", "--in", out)
		if code != exitOK || !strings.Contains(stdout, "round 1") {
			t.Errorf("from version %d: fingerprint exit %d, stdout %q, stderr %q", k, code, stdout, errs)
		}
	}
}

// notANumber finds a NaN or an infinity written out, not the word
// Information.
var notANumber = regexp.MustCompile(`\bNaN\b|[+-]?\bInf\b|\bInfinity\b`)

// TestAnOldDatabaseIsServed: parley serve on a database written at an
// earlier schema version upgrades it, keeps the fits of its revisions,
// and every page of the facilitator's (the workshop, both questions and
// their history, room, reasons and study pages, the calibration page,
// the entry page, the log, the report and the downloads) answers 200
// without a NaN or an Inf.
func TestAnOldDatabaseIsServed(t *testing.T) {
	for _, k := range []int{2, 8, store.LatestVersion() - 1} {
		path := oldDatabase(t, k)
		base, out, _, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: path, noDemo: true})
		text := out.String()
		if k < 9 && !strings.Contains(text, "kept the fits of 7 earlier revisions") {
			t.Errorf("from version %d: the fits kept are not said:\n%s", k, text)
		}
		m := signInLine.FindStringSubmatch(text)
		if m == nil {
			t.Fatalf("from version %d: no sign-in address:\n%s", k, text)
		}
		jar, _ := cookiejar.New(nil)
		c := &http.Client{Jar: jar}
		req, _ := http.NewRequest(http.MethodPost, base+"/signin", strings.NewReader(url.Values{"secret": {m[2]}}.Encode()))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", base)
		res, err := c.Do(req)
		check(t, err)
		res.Body.Close()
		for _, p := range []string{"/", "/w/1/", "/w/1/q/1", "/w/1/q/2", "/w/1/q/1/history", "/w/1/q/1/room",
			"/w/1/q/2/room", "/w/1/q/1/reasons", "/w/1/q/1/study", "/w/1/calibration", "/w/1/experts/3",
			"/w/1/q/1/enter/3", "/w/1/quick-priors", "/w/1/log", "/w/1/report", "/w/1/export.json",
			"/w/1/export.csv", "/w/1/priors.csv"} {
			res, err := c.Get(base + p)
			check(t, err)
			b, _ := io.ReadAll(res.Body)
			res.Body.Close()
			if bad := notANumber.FindString(string(b)); res.StatusCode != http.StatusOK || bad != "" {
				t.Errorf("from version %d: %s: %d %q", k, p, res.StatusCode, bad)
			}
		}
		if err := stop(); err != nil {
			t.Fatal(err)
		}
	}
}

// TestAnOldRecordWithCloseProbabilitiesReadsBack: a question made before
// its probabilities had to be 0.001 apart (workshop.MinProbGap), asking
// for 0.5 and 0.5000001, is exported from the upgraded database and its
// record imported again, as it was written; the import refused the
// record ("questions[2].probs[2]: must be at least 0.001 … above the
// probability before it"), so the workshop's record no longer read back.
func TestAnOldRecordWithCloseProbabilitiesReadsBack(t *testing.T) {
	path := oldDatabase(t, 8)
	raw, err := sql.Open("sqlite3", path)
	check(t, err)
	for _, q := range []string{
		`INSERT INTO questions (id, workshop_id, position, wording, quantity, lower, upper, format, probs) VALUES
			(3, 1, 3, 'Share of culverts cleared within a week?', 'cleared share', 0, 1, 'quantiles', '[0.05,0.5,0.5000001,0.95]')`,
		`INSERT INTO events (workshop_id, question_id, kind, at) VALUES (1, 3, 'question_added', '2026-01-05T13:00:00Z')`,
		`INSERT INTO revisions (question_id, expert_id, round, at, reason, answer_values) VALUES (3, 1, 2, '2026-01-05T13:01:00Z', 'crew logs', '[0.1,0.3,0.31,0.6]')`,
	} {
		_, err := raw.Exec(q)
		check(t, err)
	}
	check(t, raw.Close())
	rec := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", "1", "--out", rec); code != exitOK {
		t.Fatalf("export: exit %d, %s", code, errs)
	}
	into := filepath.Join(t.TempDir(), "restored.db")
	code, out, errs := run("import", "--db", into, "--in", rec)
	if code != exitOK {
		t.Fatalf("import of the record: exit %d, %s", code, errs)
	}
	again := filepath.Join(t.TempDir(), "again.json")
	if code, _, errs := run("export", "--db", into, "--workshop", strings.TrimSpace(out), "--out", again); code != exitOK {
		t.Fatalf("export of the restored workshop: exit %d, %s", code, errs)
	}
	b, err := os.ReadFile(again)
	check(t, err)
	if !strings.Contains(string(b), "0.5000001") {
		t.Error("the restored question does not ask for 0.5000001")
	}
}
