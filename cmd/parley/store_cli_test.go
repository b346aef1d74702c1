package main

import (
	"bytes"
	"context"
	"database/sql"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	_ "github.com/mattn/go-sqlite3"
	"github.com/santhosh-tekuri/jsonschema/v6"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

// cliWorkshop writes an invented workshop to a new database file: two
// questions, two experts, three revisions and an agreed prior.
func cliWorkshop(t *testing.T) (path string, workshopID, questionID int64) {
	t.Helper()
	path = filepath.Join(t.TempDir(), "parley.db")
	db, err := store.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	ctx := context.Background()
	w := workshop.Workshop{Title: "Hatchery survival (invented)", Invented: true}
	check(t, db.CreateWorkshop(ctx, &w))
	var qs []workshop.Question
	for _, wording := range []string{"Share of fry surviving a season?", "Share of tagged fish returning?"} {
		q := workshop.Question{WorkshopID: w.ID, Wording: wording, Quantity: "survival share", Lower: 0, Upper: 1,
			Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
		check(t, db.AddQuestion(ctx, &q))
		qs = append(qs, q)
	}
	for i, name := range []string{"Ines", "Jomo"} {
		e := workshop.Expert{WorkshopID: w.ID, Name: name}
		check(t, db.AddExpert(ctx, &e, []byte("token-"+name)))
		for _, q := range qs[:2-i] {
			r := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID,
				Answer: workshop.Answer{Values: []float64{0.1, 0.2 + 0.05*float64(i), 0.4}}}
			check(t, db.SaveRevision(ctx, &r))
		}
	}
	check(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: qs[0].ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 4, Beta: 14}), Rationale: "the pool, unchanged", RoundOpen: true}))
	return path, w.ID, qs[0].ID
}

// exportedRecord exports workshop wid of the database at path with
// parley export, as JSON, to a new file, and returns the file's path.
func exportedRecord(t *testing.T, path string, wid int64) string {
	t.Helper()
	file := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", strconv.FormatInt(wid, 10), "--out", file); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	return file
}

func check(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

func run(args ...string) (code int, stdout, stderr string) {
	var out, errb bytes.Buffer
	code = dispatch(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

func TestExportJSON(t *testing.T) {
	path, wid, qid := cliWorkshop(t)
	code, out, errs := run("export", "--db", path, "--workshop", strconv.FormatInt(wid, 10), "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	sch, err := jsonschema.NewCompiler().Compile("../../testdata/export.schema.json")
	check(t, err)
	doc, err := jsonschema.UnmarshalJSON(strings.NewReader(out))
	check(t, err)
	if err := sch.Validate(doc); err != nil {
		t.Fatalf("export does not match the schema: %v", err)
	}
	var rec record.Record
	check(t, json.Unmarshal([]byte(out), &rec))
	if len(rec.Revisions) != 3 || rec.Caution != record.Caution || rec.Questions[0].AgreedPrior == nil {
		t.Fatalf("record: %d revisions, caution %q, prior %v", len(rec.Revisions), rec.Caution, rec.Questions[0].AgreedPrior)
	}

	// --question narrows the record; --out writes a file.
	file := filepath.Join(t.TempDir(), "q.json")
	code, out, errs = run("export", "--db", path, "--workshop", strconv.FormatInt(wid, 10),
		"--question", strconv.FormatInt(qid, 10), "--out", file)
	if code != exitOK || out != "" {
		t.Fatalf("exit %d, stdout %q: %s", code, out, errs)
	}
	b, err := os.ReadFile(file)
	check(t, err)
	var one record.Record
	check(t, json.Unmarshal(b, &one))
	if len(one.Questions) != 1 || one.Questions[0].ID != qid || len(one.Revisions) != 2 {
		t.Fatalf("question export: %d questions, %d revisions", len(one.Questions), len(one.Revisions))
	}
}

func TestExportCSV(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	code, out, errs := run("export", "--db", path, "--workshop", strconv.FormatInt(wid, 10), "--format", "csv")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	check(t, err)
	if len(rows) != 4 || rows[0][0] != "workshop_id" || rows[1][5] != "Ines" {
		t.Fatalf("csv rows %q", rows)
	}
}

// `parley export --format priors`: the exact header of the issue, one row
// per question with an agreed prior, its numbers equal to the JSON
// export's (as text: shortest round-trip decimals of the same floats).
func TestExportPriorsCSV(t *testing.T) {
	path, wid, qid := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	code, out, errs := run("export", "--db", path, "--workshop", ws, "--format", "priors")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// The header the issue spelled, then the columns added since, at the end.
	if !strings.HasPrefix(out, "question_id,quantity,units,lower,upper,alpha,beta,mean,sd,q05,q50,q95,source,rationale,agreed_at,invented,caution,warnings,retired,pool_changed\n") {
		t.Fatalf("header:\n%s", out)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	check(t, err)
	_, js, _ := run("export", "--db", path, "--workshop", ws, "--format", "json")
	var rec record.Record
	check(t, json.Unmarshal([]byte(js), &rec))
	a := rec.Questions[0].AgreedPrior
	if len(rows) != 2 || a == nil {
		t.Fatalf("%d rows, want 1 (one agreed prior)", len(rows)-1)
	}
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	want := []string{strconv.FormatInt(qid, 10), "survival share", "", "0", "1", g(a.Dist.Alpha), g(a.Dist.Beta.Beta),
		g(a.Mean), g(a.SD), g(a.Percentiles.P05), g(a.Percentiles.P50), g(a.Percentiles.P95), "pool", "the pool, unchanged"}
	for i, w := range want {
		if rows[1][i] != w {
			t.Errorf("column %s = %q, want %q", rows[0][i], rows[1][i], w)
		}
	}
	if at, err := time.Parse(time.RFC3339Nano, rows[1][14]); err != nil || !at.Equal(a.At) {
		t.Errorf("agreed_at %q, want %v", rows[1][14], a.At)
	}
}

func TestExportBadInput(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	missing := filepath.Join(t.TempDir(), "nope.db")
	tests := []struct {
		name  string
		args  []string
		field string
	}{
		{"no db", []string{"--workshop", ws}, "--db"},
		{"missing db file", []string{"--db", missing, "--workshop", ws}, "--db"},
		{"no workshop", []string{"--db", path}, "--workshop"},
		{"unknown workshop", []string{"--db", path, "--workshop", "99"}, "--workshop"},
		{"unknown question", []string{"--db", path, "--workshop", ws, "--question", "99"}, "--question"},
		{"bad format", []string{"--db", path, "--workshop", ws, "--format", "xml"}, "--format"},
		{"not a number", []string{"--db", path, "--workshop", "one"}, "--workshop: must be an ID, a whole number from 1 to 9007199254740991"},
		{"question not a number", []string{"--db", path, "--workshop", ws, "--question", "abc"}, `--question: must be an ID, a whole number from 1 to 9007199254740991, got "abc"`},
		{"question below 1", []string{"--db", path, "--workshop", ws, "--question", "-3"}, "--question: must be an ID"},
		{"workshop beyond the ids", []string{"--db", path, "--workshop", "9007199254740992"}, "--workshop: must be an ID"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			code, out, errs := run(append([]string{"export"}, tt.args...)...)
			if code != exitBadInput || out != "" || !strings.Contains(errs, tt.field) {
				t.Fatalf("exit %d, stdout %q, stderr %q; want 2 naming %s", code, out, errs, tt.field)
			}
		})
	}
	if _, err := os.Stat(missing); !os.IsNotExist(err) {
		t.Fatal("export created the missing database file")
	}
}

// An export never writes over the database it reads, nor over the files
// SQLite keeps beside it. `export --db parley.db --out parley.db` (a
// slip of the shell's history) replaced the whole database, every
// workshop, with one workshop's record, and exited 0.
func TestExportRefusesToWriteOverTheDatabase(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	link := filepath.Join(t.TempDir(), "link.db")
	check(t, os.Symlink(path, link))
	before, err := os.ReadFile(path)
	check(t, err)
	for _, tt := range []struct{ db, out string }{
		{path, path},
		{path, path + "-wal"},
		{path, path + "-shm"},
		{path, path + "-journal"},
		{path, path + ".lock"},
		{link, path}, // the database reached through a link
		{path, filepath.Join(filepath.Dir(path), ".", filepath.Base(path))}, // another spelling
	} {
		code, out, errs := run("export", "--db", tt.db, "--workshop", ws, "--out", tt.out)
		if code != exitBadInput || out != "" || !strings.Contains(errs, "--out") {
			t.Errorf("--db %s --out %s: exit %d, stderr %q; want 2 naming --out", tt.db, tt.out, code, errs)
		}
		if after, err := os.ReadFile(path); err != nil || !bytes.Equal(before, after) {
			t.Fatalf("--db %s --out %s changed the database file (%v)", tt.db, tt.out, err)
		}
		if tt.out != path {
			if _, err := os.Lstat(tt.out); err == nil && !strings.HasSuffix(tt.out, "-wal") && !strings.HasSuffix(tt.out, "-shm") {
				t.Errorf("--out %s was written", tt.out)
			}
		}
	}
	// The database under a second name (a hard link here; another letter
	// case on a Mac) is the database too.
	second := filepath.Join(filepath.Dir(path), "second.db")
	check(t, os.Link(path, second))
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", second); code != exitBadInput || !strings.Contains(errs, "--out") {
		t.Errorf("--out a second name of the database: exit %d, stderr %q; want 2 naming --out", code, errs)
	}
	if after, _ := os.ReadFile(path); !bytes.Equal(before, after) {
		t.Fatal("--out a second name of the database changed it")
	}
	check(t, os.Remove(second))
	// --out is followed through its links: a link to the database is
	// the database.
	out := filepath.Join(t.TempDir(), "record.json")
	check(t, os.Symlink(path, out))
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", out); code != exitBadInput || !strings.Contains(errs, "--out") {
		t.Errorf("--out a link to the database: exit %d, %q; want 2 naming --out", code, errs)
	}
	if after, _ := os.ReadFile(path); !bytes.Equal(before, after) {
		t.Fatal("writing through a link changed the database it named")
	}
}

// An export to a pipe or a device writes into it. The record used to be
// written beside the name and renamed over it, so `--out /dev/null` run
// as root put a regular file in place of the system's /dev/null, and
// `--out /dev/stdout` in place of that link. A link is followed, as a
// shell's > follows it: the file it names gets the record, and the link
// stays.
func TestExportIntoAPipeOrThroughALink(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe")
	check(t, syscall.Mkfifo(fifo, 0o600))
	got := make(chan []byte, 1)
	go func() {
		f, err := os.Open(fifo) // waits for the export to open it
		if err != nil {
			got <- nil
			return
		}
		b, _ := io.ReadAll(f)
		f.Close()
		got <- b
	}()
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", fifo); code != exitOK {
		t.Fatalf("--out a pipe: exit %d, %s", code, errs)
	}
	if fi, err := os.Lstat(fifo); err != nil || fi.Mode()&os.ModeNamedPipe == 0 {
		t.Fatalf("the pipe was replaced (%v, %v)", fi.Mode(), err)
	}
	select {
	case b := <-got:
		if _, err := record.Parse(bytes.NewReader(b)); err != nil {
			t.Fatalf("the pipe carried no record: %v (%d bytes)", err, len(b))
		}
	case <-time.After(10 * time.Second):
		t.Fatal("nothing came through the pipe")
	}

	file := filepath.Join(dir, "record.json")
	check(t, os.WriteFile(file, []byte("old"), 0o644))
	link := filepath.Join(dir, "latest.json")
	check(t, os.Symlink(file, link))
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", link); code != exitOK {
		t.Fatalf("--out a link: exit %d, %s", code, errs)
	}
	if fi, err := os.Lstat(link); err != nil || fi.Mode()&os.ModeSymlink == 0 {
		t.Fatal("the link was replaced by a file")
	}
	b, err := os.ReadFile(file)
	check(t, err)
	if _, err := record.Parse(bytes.NewReader(b)); err != nil {
		t.Fatalf("the file the link names holds no record: %v", err)
	}

	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", dir); code != exitBadInput || !strings.Contains(errs, "--out") {
		t.Errorf("--out a folder: exit %d, %q; want 2 naming --out", code, errs)
	}
}

func TestBackupCommand(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	dest := filepath.Join(t.TempDir(), "copy.db")
	if code, _, errs := run("backup", "--db", path, "--out", dest); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	cp, err := store.Open(dest)
	check(t, err)
	defer cp.Close()
	if v, err := cp.IntegrityCheck(context.Background()); v != "ok" || err != nil {
		t.Fatalf("copy integrity %q, %v", v, err)
	}
	if rs, err := cp.Revisions(context.Background(), wid); err != nil || len(rs) != 3 {
		t.Fatalf("copy has %d revisions, %v", len(rs), err)
	}
	before, _ := os.ReadFile(dest)
	code, _, errs := run("backup", "--db", path, "--out", dest)
	if code != exitBadInput || !strings.Contains(errs, "--out") {
		t.Fatalf("backup over an existing file: exit %d, %s", code, errs)
	}
	if after, _ := os.ReadFile(dest); !bytes.Equal(before, after) {
		t.Fatal("refused backup changed the existing file")
	}
	if code, _, _ := run("backup", "--db", filepath.Join(t.TempDir(), "nope.db"), "--out", dest+"2"); code != exitBadInput {
		t.Fatalf("backup of a missing database: exit %d", code)
	}
}

// A backup is never written under a name the database keeps beside it.
// `backup --db parley.db --out parley.db-wal` wrote the copy there,
// checked it and said "backup written to parley.db-wal (integrity check
// ok)"; then the command closed the database, SQLite removed its
// journal, parley.db-wal, and the copy was gone.
func TestBackupRefusesTheDatabasesOwnFiles(t *testing.T) {
	path, _, _ := cliWorkshop(t)
	for _, out := range []string{path + "-wal", path + "-shm", path + "-journal"} {
		code, stdout, errs := run("backup", "--db", path, "--out", out)
		if code != exitBadInput || stdout != "" || !strings.Contains(errs, "--out") {
			t.Errorf("--out %s: exit %d, stdout %q, stderr %q; want 2 naming --out", filepath.Base(out), code, stdout, errs)
		}
	}
}

func TestImportCommand(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	file := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", file); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	other := filepath.Join(t.TempDir(), "other.db")
	code, out, errs := run("import", "--db", other, "--in", file)
	if code != exitOK {
		t.Fatalf("import: exit %d: %s", code, errs)
	}
	newID := strings.TrimSpace(out)
	code, again, errs := run("export", "--db", other, "--workshop", newID, "--format", "csv")
	code0, orig, _ := run("export", "--db", path, "--workshop", ws, "--format", "csv")
	if code != exitOK || code0 != exitOK {
		t.Fatalf("re-export: %s", errs)
	}
	if again != orig { // a fresh database assigns the same IDs in the same order
		t.Fatalf("CSV after import differs:\n%s\n---\n%s", orig, again)
	}

	// A broken record is refused with the field named, and nothing is written.
	b, err := os.ReadFile(file)
	check(t, err)
	var doc map[string]any
	check(t, json.Unmarshal(b, &doc))
	ans := doc["revisions"].([]any)[1].(map[string]any)["answer"].(map[string]any)
	ans["values"] = []any{0.1, 0.05, 0.4}
	bad := filepath.Join(t.TempDir(), "bad.json")
	b, _ = json.Marshal(doc)
	check(t, os.WriteFile(bad, b, 0o644))
	empty := filepath.Join(t.TempDir(), "empty.db")
	code, out, errs = run("import", "--db", empty, "--in", bad)
	if code != exitBadInput || out != "" || !strings.Contains(errs, "revisions[1].answer.values[1]") {
		t.Fatalf("bad record: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	if _, err := os.Stat(empty); !os.IsNotExist(err) {
		t.Fatal("a refused import created the database")
	}
	code, _, errs = run("import", "--db", other, "--in", bad)
	if code != exitBadInput {
		t.Fatalf("bad record into a database: exit %d: %s", code, errs)
	}
	db, err := store.Open(other)
	check(t, err)
	defer db.Close()
	if ws, _ := db.Workshops(context.Background()); len(ws) != 1 {
		t.Fatalf("%d workshops after one good and one refused import, want 1", len(ws))
	}
	for _, args := range [][]string{{"--in", file}, {"--db", other}, {"--db", other, "--in", file + ".missing"}} {
		if code, _, _ := run(append([]string{"import"}, args...)...); code != exitBadInput {
			t.Errorf("import %v: exit %d, want 2", args, code)
		}
	}
}

// parley import refuses what encoding/json alone would take (control
// characters, duplicate keys, keys in another letter case) and numbers
// outside their range, each with exit status 2 and one line naming the
// path into the document; it creates no database file and adds nothing
// to an existing one.
func TestImportRefusesWithThePathAndWritesNothing(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	file := exportedRecord(t, path, wid)
	b, err := os.ReadFile(file)
	check(t, err)
	good := string(b)
	existing := filepath.Join(t.TempDir(), "existing.db")
	if code, _, errs := run("import", "--db", existing, "--in", file); code != exitOK {
		t.Fatalf("import of the good record: %s", errs)
	}
	for _, tt := range []struct{ name, old, new, path string }{
		{"ESC in the title", `"title": "Hatchery`, `"title": "\u001b[2JHatchery`, "workshop.title"},
		{"NUL in a name", `"name": "Ines"`, `"name": "In\u0000es"`, "experts[0].name"},
		{"BEL in a rationale", `"rationale": "the pool`, `"rationale": "\u0007the pool`, "questions[0].agreed_prior.rationale"},
		{"duplicate key", `"name": "Jomo"`, `"name": "Jomo", "name": "Mallory"`, "experts[1].name"},
		{"key in another case", `"title": "Hatchery`, `"TITLE": "Hatchery`, "workshop.TITLE"},
		{"round out of range", `"round": 1,`, `"round": 101,`, "workshop.round"},
		{"round that overflows", `"round": 1,`, `"round": 9223372036854775807,`, "workshop.round"},
		{"id beyond 2^53 - 1", `"id": 1,`, `"id": 9007199254740993,`, "workshop.id"},
		{"current prior not the history's last", `"rationale": "the pool`, `"rationale": "edited: the pool`, "questions[0].agreed_prior"},
		// 200 kB nested 100,000 deep inside a time: the scan wrote out
		// the path of every level and took gigabytes, then crashed.
		{"nested 100,000 deep", `"generated_at": "`, `"generated_at": ` + strings.Repeat("[", 100_000) +
			strings.Repeat("]", 100_000) + `, "x": "`, "generated_at" + strings.Repeat("[0]", input.MaxJSONDepth-1)},
	} {
		t.Run(tt.name, func(t *testing.T) {
			if !strings.Contains(good, tt.old) {
				t.Fatalf("the export has no %q", tt.old)
			}
			dir := t.TempDir()
			bad := filepath.Join(dir, "bad.json")
			check(t, os.WriteFile(bad, []byte(strings.Replace(good, tt.old, tt.new, 1)), 0o644))
			fresh := filepath.Join(dir, "fresh.db")
			code, out, errs := run("import", "--db", fresh, "--in", bad)
			if code != exitBadInput || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, ": "+tt.path+": ") {
				t.Errorf("exit %d, stdout %q, stderr %q; want 2 and one line naming %s", code, out, errs, tt.path)
			}
			if strings.ContainsAny(errs, "\x00\x07\x1b") {
				t.Errorf("the message carries a control character: %q", errs)
			}
			if entries, _ := os.ReadDir(dir); len(entries) != 1 { // bad.json alone
				t.Errorf("a refused import left files: %v", entries)
			}
			if code, _, _ := run("import", "--db", existing, "--in", bad); code != exitBadInput {
				t.Errorf("into an existing database: exit %d, want 2", code)
			}
			db, err := store.Open(existing)
			check(t, err)
			defer db.Close()
			if ws, _ := db.Workshops(context.Background()); len(ws) != 1 {
				t.Errorf("%d workshops after refused imports, want the 1 imported before", len(ws))
			}
		})
	}
}

// The store commands read their flags as the scripting commands do: a
// bad flag is one line on stderr naming it, exit 2, and -h prints the
// flags on stdout with exit 0 (they printed Go's message and the whole
// usage, and -h exited 2).
func TestStoreCommandsReadFlagsInOneLine(t *testing.T) {
	for _, cmd := range []string{"export", "backup", "import", "import-answers", "facilitator-reset", "serve"} {
		code, out, errs := run(cmd, "--no-such-flag")
		if code != exitBadInput || strings.Count(strings.TrimSpace(errs), "\n") != 0 || !strings.Contains(errs, "no-such-flag") || out != "" {
			t.Errorf("%s --no-such-flag: exit %d, stderr %q, stdout %q", cmd, code, errs, out)
		}
		if code, out, errs := run(cmd, "-h"); code != exitOK || !strings.Contains(out, "-db") && cmd != "serve" || errs != "" {
			t.Errorf("%s -h: exit %d, stdout %q, stderr %q", cmd, code, out, errs)
		}
	}
	code, _, errs := run("export", "--db", "x.db", "--workshop", "abc")
	if code != exitBadInput || strings.Count(strings.TrimSpace(errs), "\n") != 0 || !strings.Contains(errs, "workshop") {
		t.Errorf("export --workshop abc: exit %d, %q", code, errs)
	}
}

// Every command that opens a database refuses one with a second name
// (hard link), as serve does, and writes nothing: SQLite keeps a journal
// per name, so a command through one name beside a server on the other
// would miss the server's commits, and its own writes could corrupt the
// file. The refusal names the file and says how to go on.
func TestStoreCommandsRefuseADatabaseWithTwoNames(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	record := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", record); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	hard := filepath.Join(t.TempDir(), "hard.db")
	check(t, os.Link(path, hard))
	before, err := os.ReadFile(path)
	check(t, err)
	sheet := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.6,\n")
	outDir := t.TempDir()
	for _, name := range []string{path, hard} {
		for _, args := range [][]string{
			{"export", "--db", name, "--workshop", ws},
			{"export", "--db", name, "--workshop", ws, "--format", "csv"},
			{"backup", "--db", name, "--out", filepath.Join(outDir, "copy.db")},
			{"import", "--db", name, "--in", record},
			{"import-answers", "--db", name, "--workshop", ws, "--in", sheet},
			{"facilitator-reset", "--db", name},
		} {
			code, out, errs := run(args...)
			if code != exitFailure || out != "" || !strings.Contains(errs, name+" is one file with 2 names (hard links)") {
				t.Errorf("%v: exit %d, stdout %q, stderr %q", args, code, out, errs)
			}
		}
	}
	if _, err := os.Stat(filepath.Join(outDir, "copy.db")); !os.IsNotExist(err) {
		t.Error("a refused backup wrote its copy")
	}
	if after, _ := os.ReadFile(path); !bytes.Equal(before, after) {
		t.Error("a refused command changed the database")
	}
	for _, suffix := range []string{"-wal", "-shm"} {
		if _, err := os.Stat(hard + suffix); !os.IsNotExist(err) {
			t.Errorf("a refused command made %s%s", hard, suffix)
		}
	}
}

// A batch whose day observed is before 1900 was recorded before the form
// refused such days (a year typed as 0026); `parley export` wrote it and
// `parley import` refused the record, so a workshop holding one could not
// be brought back. The import takes the record as written; new batches,
// typed or added through the store, keep the 1900 rule. The old batches
// are written into the SQLite file as the earlier version stored them,
// each with its study_data_recorded event (without one, import refuses
// the batch as added behind Parley's back, record.CheckLogged).
func TestImportTakesADayObservedBeforeTheRule(t *testing.T) {
	path, wid, qid := cliWorkshop(t)
	ctx := context.Background()
	db, err := store.Open(path)
	check(t, err)
	check(t, db.RecordData(ctx, &workshop.StudyData{QuestionID: qid, Successes: 2, Trials: 30, Source: "pilot (invented)", ObservedOn: "2026-01-15"}))
	check(t, db.Close())
	raw, err := sql.Open("sqlite3", path)
	check(t, err)
	at := time.Now().UTC().Format(time.RFC3339Nano)
	for _, day := range []string{"0026-03-31", "1899-12-31"} {
		if _, err := raw.Exec(`INSERT INTO study_data (question_id, successes, trials, source, observed_on, at) VALUES (?, 1, 20, 'site log (invented)', ?, ?)`, qid, day, at); err != nil {
			t.Fatal(err)
		}
		if _, err := raw.Exec(`INSERT INTO events (workshop_id, question_id, kind, at, reason, detail) VALUES (?, ?, ?, ?, 'site log (invented)', ?)`,
			wid, qid, string(workshop.EventDataRecorded), at, `{"successes":1,"trials":20,"observed_on":"`+day+`"}`); err != nil {
			t.Fatal(err)
		}
	}
	check(t, raw.Close())

	ws := strconv.FormatInt(wid, 10)
	file := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", file); code != exitOK {
		t.Fatalf("export: exit %d: %s", code, errs)
	}
	other := filepath.Join(t.TempDir(), "other.db")
	code, out, errs := run("import", "--db", other, "--in", file)
	if code != exitOK {
		t.Fatalf("import of a record holding days observed before 1900: exit %d: %s", code, errs)
	}
	id, err := strconv.ParseInt(strings.TrimSpace(out), 10, 64)
	check(t, err)
	back, err := store.Open(other)
	check(t, err)
	defer back.Close()
	data, err := back.StudyData(ctx, id)
	check(t, err)
	var days []string
	for _, d := range data {
		days = append(days, d.ObservedOn)
	}
	if strings.Join(days, " ") != "2026-01-15 0026-03-31 1899-12-31" {
		t.Errorf("days observed after the import: %v", days)
	}
	code, again, errs := run("export", "--db", other, "--workshop", strings.TrimSpace(out), "--format", "csv")
	_, orig, _ := run("export", "--db", path, "--workshop", ws, "--format", "csv")
	if code != exitOK || again != orig {
		t.Errorf("the imported workshop exports otherwise (exit %d, %s)", code, errs)
	}
	// A new batch keeps the rule.
	qs, err := back.Questions(ctx, id)
	check(t, err)
	var ie *elicit.InputError
	err = back.RecordData(ctx, &workshop.StudyData{QuestionID: qs[0].ID, Successes: 1, Trials: 5, Source: "typed (invented)", ObservedOn: "0026-04-30"})
	if !errors.As(err, &ie) || ie.Field != "observed_on" || ie.Rule != input.RuleDateTooEarly {
		t.Errorf("a new batch observed in 0026: %v, want %q", err, input.RuleDateTooEarly)
	}
}

// TestStoreCommandsNameAFolderOrAMissingOne: a --db that is a folder, or
// an --out or new --db in a folder that does not exist, is refused as
// bad input (exit 2) naming the flag and the folder, and nothing is
// written. A folder given as --db was said to be "one file with 3392
// names (hard links)" (a folder's "." and ".." are links), exit 1; a
// missing folder was named by a temporary file nobody typed
// ("open /nowhere/.x.json.351948201"), exit 1.
func TestStoreCommandsNameAFolderOrAMissingOne(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	record := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", record); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	sheet := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.6,\n")
	folder := t.TempDir()
	missing := filepath.Join(t.TempDir(), "nowhere")
	for _, c := range []struct {
		args []string
		says string
	}{
		{[]string{"export", "--db", folder, "--workshop", ws}, "--db: " + folder + " is a folder"},
		{[]string{"backup", "--db", folder, "--out", filepath.Join(t.TempDir(), "copy.db")}, "--db: " + folder + " is a folder"},
		{[]string{"import", "--db", folder, "--in", record}, "--db: " + folder + " is a folder"},
		{[]string{"import-answers", "--db", folder, "--workshop", ws, "--in", sheet}, "--db: " + folder + " is a folder"},
		{[]string{"facilitator-reset", "--db", folder}, "--db: " + folder + " is a folder"},
		{[]string{"export", "--db", path, "--workshop", ws, "--out", filepath.Join(missing, "r.json")}, "--out: the folder " + missing + " does not exist"},
		{[]string{"export", "--db", path, "--workshop", ws, "--out", filepath.Join(record, "r.json")}, "--out: " + record + " is not a folder"},
		{[]string{"backup", "--db", path, "--out", filepath.Join(missing, "copy.db")}, "--out: the folder " + missing + " does not exist"},
		{[]string{"import", "--db", filepath.Join(missing, "new.db"), "--in", record}, "--db: the folder " + missing + " does not exist"},
	} {
		code, out, errs := run(c.args...)
		if code != exitBadInput || out != "" || !strings.Contains(errs, c.says) || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want 2 saying %q", c.args, code, out, errs, c.says)
		}
	}
	if entries, _ := os.ReadDir(folder); len(entries) != 0 {
		t.Errorf("a refused command wrote into the folder given as --db: %v", entries)
	}
	if _, err := os.Stat(missing); !os.IsNotExist(err) {
		t.Error("a refused command made the missing folder")
	}
}

// TestStoreCommandsRefuseAFileThatIsNoDatabase: a --db that names some
// other file (the exported record, by a slip) is bad input naming --db,
// exit 2, and the file is left as it was; it was "store: open …: file is
// not a database", exit 1.
func TestStoreCommandsRefuseAFileThatIsNoDatabase(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	record := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", record); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	before, err := os.ReadFile(record)
	check(t, err)
	sheet := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.6,\n")
	for _, args := range [][]string{
		{"export", "--db", record, "--workshop", ws},
		{"backup", "--db", record, "--out", filepath.Join(t.TempDir(), "copy.db")},
		{"import", "--db", record, "--in", record},
		{"import-answers", "--db", record, "--workshop", ws, "--in", sheet},
		{"facilitator-reset", "--db", record},
	} {
		code, out, errs := run(args...)
		if code != exitBadInput || out != "" || !strings.Contains(errs, "--db: "+record+" is not a Parley database") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want 2 naming --db", args, code, out, errs)
		}
	}
	if after, _ := os.ReadFile(record); !bytes.Equal(before, after) {
		t.Error("a refused command changed the file given as --db")
	}
}

// TestNewFileWhereNoneCanBeMade: backup's --out and import's new --db in
// a folder where no file can be made (here /proc, as a read-only or
// foreign folder refuses) are bad input naming the flag, checked before
// the work; they exited 1 after it, "store: backup to …: unable to open
// database" and "open /proc/.new.db.importing-…", a name nobody typed.
func TestNewFileWhereNoneCanBeMade(t *testing.T) {
	if fi, err := os.Stat("/proc"); err != nil || !fi.IsDir() {
		t.Skip("no /proc folder here")
	}
	if f, err := os.CreateTemp("/proc", "parley-*"); err == nil {
		f.Close()
		os.Remove(f.Name())
		t.Skip("/proc takes files here")
	}
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	record := filepath.Join(t.TempDir(), "record.json")
	if code, _, errs := run("export", "--db", path, "--workshop", ws, "--out", record); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	for _, c := range []struct {
		args []string
		says string
	}{
		{[]string{"backup", "--db", path, "--out", "/proc/parley-copy.db"}, "--out: cannot make a file in /proc"},
		{[]string{"import", "--db", "/proc/parley-new.db", "--in", record}, "--db: cannot make a file in /proc"},
	} {
		code, out, errs := run(c.args...)
		if code != exitBadInput || out != "" || !strings.Contains(errs, c.says) {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want 2 saying %q", c.args, code, out, errs, c.says)
		}
	}
}

// TestImportOfARecordWithoutItsWorkshop: a record with no "workshop"
// object is refused saying the workshop is required; it said
// "workshop.id: must be greater than 0 (got 0)", of an id nobody wrote.
func TestImportOfARecordWithoutItsWorkshop(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	var rec map[string]json.RawMessage
	code, out, errs := run("export", "--db", path, "--workshop", strconv.FormatInt(wid, 10))
	if code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	check(t, json.Unmarshal([]byte(out), &rec))
	delete(rec, "workshop")
	b, err := json.Marshal(rec)
	check(t, err)
	in := filepath.Join(t.TempDir(), "record.json")
	check(t, os.WriteFile(in, b, 0o644))
	newDB := filepath.Join(t.TempDir(), "new.db")
	code, out, errs = run("import", "--db", newDB, "--in", in)
	if code != exitBadInput || out != "" || !strings.Contains(errs, "workshop: "+string(elicit.RuleRequired)) {
		t.Errorf("exit %d, stdout %q, stderr %q; want 2 saying the workshop is required", code, out, errs)
	}
	if _, err := os.Stat(newDB); !os.IsNotExist(err) {
		t.Error("a refused import created the database")
	}
}

// TestStoreCommandsRefuseADatabaseFromANewerParley: a database a newer
// Parley has upgraded (a schema version past this binary's) is refused by
// every command that opens one, exit 1, naming both versions and saying
// to run the newer Parley; the file keeps its version. Each command
// panicked ("slice bounds out of range [14:13]"), exit 2 with a stack.
func TestStoreCommandsRefuseADatabaseFromANewerParley(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	newer := store.LatestVersion() + 1
	raw, err := sql.Open("sqlite3", path)
	check(t, err)
	_, err = raw.Exec(`INSERT INTO schema_migrations (version, name, applied) VALUES (?, 'from_a_newer_parley.sql', '2030-01-01T00:00:00Z')`, newer)
	check(t, err)
	check(t, raw.Close())
	sheet := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.6,\n")
	says := "schema version " + strconv.Itoa(newer) + ", and this Parley knows versions up to " + strconv.Itoa(newer-1)
	for _, args := range [][]string{
		{"export", "--db", path, "--workshop", ws},
		{"backup", "--db", path, "--out", filepath.Join(t.TempDir(), "copy.db")},
		{"import-answers", "--db", path, "--workshop", ws, "--in", sheet},
		{"facilitator-reset", "--db", path},
	} {
		code, out, errs := run(args...)
		if code != exitFailure || out != "" || !strings.Contains(errs, says) || !strings.Contains(errs, "run that newer Parley") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want 1 saying %q", args, code, out, errs, says)
		}
	}
	raw, err = sql.Open("sqlite3", path)
	check(t, err)
	defer raw.Close()
	var v int
	check(t, raw.QueryRow(`SELECT MAX(version) FROM schema_migrations`).Scan(&v))
	if v != newer {
		t.Errorf("after the refusals the schema version is %d, want %d", v, newer)
	}
}

// TestBackupCutShortLeavesNoFile: a backup that fails as it writes (here
// a file-size limit of 64 KiB, as a full disk stops it) exits 1 saying
// why and leaves nothing at --out, so that the next attempt, on a disk
// with room, is not refused as "already exists"; an empty file was left.
func TestBackupCutShortLeavesNoFile(t *testing.T) {
	path, _, _ := cliWorkshop(t)
	if fi, err := os.Stat(path); err != nil || fi.Size() <= 64<<10 {
		t.Fatalf("the database must be over 64 KiB for the limit to cut its copy: %v, %v", fi.Size(), err)
	}
	bin := parleyBinary(t)
	out := filepath.Join(t.TempDir(), "copy.db")
	// The Go runtime ignores SIGXFSZ, so the write past the limit fails
	// with EFBIG instead of ending the process.
	cmd := exec.Command("/bin/sh", "-c", `ulimit -f 64 && exec "$0" "$@"`, bin, "backup", "--db", path, "--out", out)
	var errb bytes.Buffer
	cmd.Stderr = &errb
	err := cmd.Run()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != exitFailure {
		t.Fatalf("backup under a 64 KiB limit: %v, stderr %q; want exit 1", err, errb.String())
	}
	if !strings.Contains(errb.String(), "nothing was kept at "+out) {
		t.Errorf("stderr %q does not say nothing was kept", errb.String())
	}
	if _, err := os.Lstat(out); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("a failed backup left %s behind (%v)", out, err)
	}
	if code, _, errs := run("backup", "--db", path, "--out", out); code != exitOK {
		t.Fatalf("the next backup: exit %d, %s", code, errs)
	}
}

// TestStoreCommandsRefuseAFileWithoutParleysTables: a --db that SQLite
// reads but that holds no Parley database is bad input naming --db, exit
// 2, and the file is left byte for byte as it was, with no journal files
// made beside it. The commands wrote Parley's empty tables into it and
// then said only "no workshop 1": into another program's database, and
// into a copy (cp) of a database taken while the server ran, whose
// contents were all still in the -wal journal the copy left behind,
// so that a facilitator read their workshop as lost. Such a copy is
// named as one, with how to copy instead.
func TestStoreCommandsRefuseAFileWithoutParleysTables(t *testing.T) {
	dir := t.TempDir()
	// A server's database, still open: its contents are in its journal.
	served := filepath.Join(dir, "parley.db")
	db, err := store.Open(served)
	check(t, err)
	defer db.Close()
	check(t, db.CreateWorkshop(context.Background(), &workshop.Workshop{Title: "Still in the journal (invented)"}))
	copied := filepath.Join(dir, "copied.db")
	b, err := os.ReadFile(served)
	check(t, err)
	check(t, os.WriteFile(copied, b, 0o644))

	other := filepath.Join(dir, "notes.sqlite")
	raw, err := sql.Open("sqlite3", other)
	check(t, err)
	_, err = raw.Exec(`CREATE TABLE notes (body TEXT)`)
	check(t, err)
	check(t, raw.Close())

	empty := filepath.Join(dir, "empty.db")
	check(t, os.WriteFile(empty, nil, 0o644))

	sheet := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q1,0.1,0.3,0.6,\n")
	for _, c := range []struct{ file, says string }{
		{copied, "it looks like a copy of a Parley database taken while the server ran, without its " + copied + "-wal journal"},
		{other, "is an SQLite database of another program (1 table, not Parley's)"},
		{empty, "holds no Parley database (it is empty)"},
	} {
		before, err := os.ReadFile(c.file)
		check(t, err)
		for _, args := range [][]string{
			{"export", "--db", c.file, "--workshop", "1"},
			{"backup", "--db", c.file, "--out", filepath.Join(t.TempDir(), "copy.db")},
			{"import-answers", "--db", c.file, "--workshop", "1", "--in", sheet},
			{"facilitator-reset", "--db", c.file},
		} {
			code, out, errs := run(args...)
			if code != exitBadInput || out != "" || !strings.Contains(errs, "--db: "+c.file) || !strings.Contains(errs, c.says) {
				t.Errorf("%v: exit %d, stdout %q, stderr %q; want 2 saying %q", args, code, out, errs, c.says)
			}
		}
		if after, _ := os.ReadFile(c.file); !bytes.Equal(before, after) {
			t.Errorf("a refused command changed %s", c.file)
		}
		for _, suffix := range []string{"-wal", "-shm"} {
			if _, err := os.Lstat(c.file + suffix); err == nil {
				t.Errorf("a refused command made %s%s", c.file, suffix)
			}
		}
	}
	// The database itself, open in the server, is read as it stands.
	if code, out, errs := run("export", "--db", served, "--workshop", "1"); code != exitOK || !strings.Contains(out, "Still in the journal") {
		t.Errorf("export of the served database: exit %d, %s", code, errs)
	}
}

// TestStoreCommandsSayADamagedDatabaseIsDamaged: a database cut short (a
// copy taken as the server wrote, a failing disk) is named as damaged,
// with how to restore it, exit 1, and left as it was; the commands said
// only "store: open …: database disk image is malformed".
func TestStoreCommandsSayADamagedDatabaseIsDamaged(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	ws := strconv.FormatInt(wid, 10)
	b, err := os.ReadFile(path)
	check(t, err)
	torn := filepath.Join(t.TempDir(), "torn.db")
	check(t, os.WriteFile(torn, b[:len(b)*2/3], 0o644))
	sheet := writeSheet(t, "expert,question,q05,q50,q95,reason\nInes,Q2,0.1,0.3,0.6,\n")
	for _, args := range [][]string{
		{"export", "--db", torn, "--workshop", ws},
		{"backup", "--db", torn, "--out", filepath.Join(t.TempDir(), "copy.db")},
		{"import-answers", "--db", torn, "--workshop", ws, "--in", sheet},
		{"facilitator-reset", "--db", torn},
	} {
		code, out, errs := run(args...)
		if code != exitFailure || out != "" || !strings.Contains(errs, torn+" is damaged (SQLite: ") || !strings.Contains(errs, "restore it from a backup") {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want 1 saying the file is damaged", args, code, out, errs)
		}
	}
	if after, _ := os.ReadFile(torn); !bytes.Equal(after, b[:len(b)*2/3]) {
		t.Error("a command changed the damaged file")
	}
}

// TestExportCutShortNamesTheFileAsked: an export that fails as it is
// written (a full disk, here a file-size limit) names the file asked for
// and says nothing was written there; it named the temporary file it
// writes first ("write …/.record.json.1950597273: file too large"), a
// name the user never gave, and leaves neither behind.
func TestExportCutShortNamesTheFileAsked(t *testing.T) {
	// The invented demo, whose record is larger than the limit, while
	// opening its database stays under it (as for the backup above).
	path, wid := demoDatabase(t)
	bin := parleyBinary(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "record.json")
	// The Go runtime ignores SIGXFSZ, so the write past the limit fails
	// with EFBIG instead of ending the process.
	cmd := exec.Command("/bin/sh", "-c", `ulimit -f 64 && exec "$0" "$@"`, bin, "export", "--db", path, "--workshop", wid, "--out", out)
	var errb bytes.Buffer
	cmd.Stderr = &errb
	err := cmd.Run()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != exitFailure {
		t.Fatalf("export under a 64-block limit: %v, stderr %q; want exit 1", err, errb.String())
	}
	if msg := errb.String(); !strings.Contains(msg, "writing "+out+": ") || !strings.Contains(msg, "nothing was written there") || strings.Contains(msg, ".record.json.") {
		t.Errorf("stderr %q: want the file asked for named, not the temporary one", msg)
	}
	if left, _ := os.ReadDir(dir); len(left) != 0 {
		t.Errorf("a failed export left %v behind", left)
	}
}

// TestExportToStdoutCutShortSaysSo: an export to standard output that
// fails part way (here a redirection into a file under a size limit,
// as a full disk would) cannot take back what went out; it says how much
// did and that it is cut short, not a whole record, and names --out.
// It said only "write /dev/stdout: file too large", while the file
// under the redirection held half a record that read as JSON up to its
// cut.
func TestExportToStdoutCutShortSaysSo(t *testing.T) {
	path, wid := demoDatabase(t)
	bin := parleyBinary(t)
	out := filepath.Join(t.TempDir(), "record.json")
	cmd := exec.Command("/bin/sh", "-c", `ulimit -f 64 && exec "$0" "$@" > "$OUT"`, bin, "export", "--db", path, "--workshop", wid)
	cmd.Env = append(os.Environ(), "OUT="+out)
	var errb bytes.Buffer
	cmd.Stderr = &errb
	err := cmd.Run()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != exitFailure {
		t.Fatalf("export to a limited stdout: %v, stderr %q; want exit 1", err, errb.String())
	}
	fi, err := os.Stat(out)
	check(t, err)
	want := fmt.Sprintf("parley export: standard output failed after %d bytes (", fi.Size())
	if msg := errb.String(); !strings.HasPrefix(msg, want) || !strings.Contains(msg, "what was written there is cut short, not a whole export; --out FILE writes the whole output or nothing") {
		t.Errorf("stderr %q: want it to begin %q and say the output is cut short", msg, want)
	}
	// /dev/full takes nothing: nothing was written.
	cmd = exec.Command(bin, "export", "--db", path, "--workshop", wid)
	full, err := os.OpenFile("/dev/full", os.O_WRONLY, 0)
	if err != nil {
		t.Skip("no /dev/full here")
	}
	defer full.Close()
	cmd.Stdout = full
	errb.Reset()
	cmd.Stderr = &errb
	if err := cmd.Run(); !errors.As(err, &ee) || ee.ExitCode() != exitFailure || !strings.Contains(errb.String(), "standard output took nothing (") {
		t.Errorf("export to /dev/full: %v, stderr %q", err, errb.String())
	}
}

// demoDatabase is a database file holding the invented demo workshop,
// closed, and the workshop's ID as typed on a command line.
func demoDatabase(t *testing.T) (path, workshopID string) {
	t.Helper()
	path = filepath.Join(t.TempDir(), "parley.db")
	db, err := store.Open(path)
	check(t, err)
	if _, err := web.SeedDemo(context.Background(), db); err != nil {
		t.Fatal(err)
	}
	ws, err := db.Workshops(context.Background())
	check(t, err)
	check(t, db.Close())
	return path, strconv.FormatInt(ws[0].ID, 10)
}
