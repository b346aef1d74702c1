package main

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/store"
)

// parley import refuses a record whose facts are dated more than a day
// after this machine's clock (a record from a machine whose clock ran
// ahead): exit 2, one line naming the fact, its time, the clock's and
// the rule, and nothing written. Imported, such facts pinned the
// workshop's next stamps after them until the clock caught up.
func TestImportRefusesARecordDatedAheadOfTheClock(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	file := exportedRecord(t, path, wid)
	b, err := os.ReadFile(file)
	check(t, err)
	var doc map[string]any
	check(t, json.Unmarshal(b, &doc))
	// The writing machine's clock ran three days ahead from after the
	// workshop was created: every fact moves, the creation stays. The
	// chain, which hashes the times, goes, as in a record of a build
	// before the chain.
	ahead := 72 * time.Hour
	var shift func(v any)
	shift = func(v any) {
		switch v := v.(type) {
		case map[string]any:
			for k, x := range v {
				if s, ok := x.(string); ok && k == "at" {
					at, err := time.Parse(time.RFC3339Nano, s)
					check(t, err)
					v[k] = at.Add(ahead).Format(time.RFC3339Nano)
					continue
				}
				shift(x)
			}
		case []any:
			for _, x := range v {
				shift(x)
			}
		}
	}
	shift(doc)
	delete(doc, "chain")
	delete(doc, "fingerprint")
	b, err = json.Marshal(doc)
	check(t, err)
	forward := filepath.Join(t.TempDir(), "forward.json")
	check(t, os.WriteFile(forward, b, 0o644))

	empty := filepath.Join(t.TempDir(), "new.db")
	code, out, errs := run("import", "--db", empty, "--in", forward)
	if code != exitBadInput || out != "" {
		t.Fatalf("a record dated three days ahead: exit %d, stdout %q, stderr %q; want 2", code, out, errs)
	}
	for _, want := range []string{"parley import: bad input: revisions[0].at: must not be dated more than 24 hours after this machine's clock",
		"revision 1, of question 1 in round 1: dated ", "after this machine's clock, which reads "} {
		if !strings.Contains(errs, want) {
			t.Errorf("the refusal %q does not say %q", errs, want)
		}
	}
	if strings.Count(errs, "\n") != 1 {
		t.Errorf("the refusal is not one line: %q", errs)
	}
	if _, err := os.Stat(empty); !os.IsNotExist(err) {
		t.Error("a refused import created the database")
	}
	if code, _, errs := run("import", "--db", path, "--in", forward); code != exitBadInput {
		t.Fatalf("into a database: exit %d: %s", code, errs)
	}
	db, err := store.Open(path)
	check(t, err)
	defer db.Close()
	if ws, err := db.Workshops(context.Background()); err != nil || len(ws) != 1 {
		t.Fatalf("%d workshops after a refused import into a database of one (%v)", len(ws), err)
	}

	// The record as it was exported imports.
	if code, _, errs := run("import", "--db", empty, "--in", file); code != exitOK {
		t.Fatalf("the record as exported: exit %d: %s", code, errs)
	}
}

// An expert's created time dated ahead is refused as a fact is, by its
// place in the record (the chain does not hash it, so the record is
// otherwise sound).
func TestImportRefusesAnExpertAddedAheadOfTheClock(t *testing.T) {
	path, wid, _ := cliWorkshop(t)
	b, err := os.ReadFile(exportedRecord(t, path, wid))
	check(t, err)
	var doc map[string]any
	check(t, json.Unmarshal(b, &doc))
	expert := doc["experts"].([]any)[0].(map[string]any)
	created, err := time.Parse(time.RFC3339Nano, expert["created"].(string))
	check(t, err)
	expert["created"] = created.Add(72 * time.Hour).Format(time.RFC3339Nano)
	b, err = json.Marshal(doc)
	check(t, err)
	forward := filepath.Join(t.TempDir(), "forward.json")
	check(t, os.WriteFile(forward, b, 0o644))

	code, out, errs := run("import", "--db", filepath.Join(t.TempDir(), "new.db"), "--in", forward)
	if code != exitBadInput || out != "" {
		t.Fatalf("a record with an expert added three days ahead: exit %d, stdout %q, stderr %q; want 2", code, out, errs)
	}
	for _, want := range []string{"parley import: bad input: experts[0].created: must not be dated more than 24 hours after this machine's clock",
		"'s addition to the panel: dated ", "after this machine's clock, which reads "} {
		if !strings.Contains(errs, want) {
			t.Errorf("the refusal %q does not say %q", errs, want)
		}
	}
}
