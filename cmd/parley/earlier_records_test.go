package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Records exported by earlier builds import with this one
// (testdata/records, made by its make_records.sh from the invented demo
// at five commits). The builds before the Levenberg–Marquardt fit kept
// fits that stop elsewhere along the least-squares valley, α and β up to
// 4e-5 from this version's, and the import refused them at
// revisions[0].fit as fits that did not match their answers, though
// every chance they give lies within 8e-6 of this version's fit
// (record.sameFit). The build before the input rules of the fit's
// accuracy envelope saved an answer of three values a hair above 0
// (demo_7c8c05c_tiny.json), which the import refused at its values; it
// is kept unfitted (record.EarlierRule). The imported workshop exports a
// record that imports again. Where the record carries its fingerprint
// chain, parley fingerprint finds in it the value it was written with.
func TestRecordsOfEarlierBuildsImport(t *testing.T) {
	files, err := filepath.Glob("../../testdata/records/demo_*.json")
	check(t, err)
	if len(files) < 6 {
		t.Fatalf("%d records of earlier builds, want 6", len(files))
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			db := filepath.Join(t.TempDir(), "parley.db")
			code, out, errs := run("import", "--db", db, "--in", f)
			if code != exitOK {
				t.Fatalf("import: exit %d: %s", code, errs)
			}
			if strings.TrimSpace(out) == "" {
				t.Fatal("import printed no workshop id")
			}
			again := filepath.Join(t.TempDir(), "again.json")
			code, _, errs = run("export", "--db", db, "--workshop", strings.TrimSpace(out), "--format", "json", "--out", again)
			if code != exitOK {
				t.Fatalf("export of the imported workshop: exit %d: %s", code, errs)
			}
			if code, _, errs := run("import", "--db", filepath.Join(t.TempDir(), "again.db"), "--in", again); code != exitOK {
				t.Fatalf("import of that export: exit %d: %s", code, errs)
			}
			if code, _, errs := run("fingerprint", "--in", f); code != exitOK {
				t.Fatalf("fingerprint: exit %d: %s", code, errs)
			}
			b, err := os.ReadFile(f)
			check(t, err)
			var kept struct {
				Fingerprint string `json:"fingerprint"`
			}
			check(t, json.Unmarshal(b, &kept))
			if kept.Fingerprint != "" {
				// The value the record was written with is found in it.
				if code, _, errs := run("fingerprint", "--in", f, "--check", kept.Fingerprint); code != exitOK {
					t.Fatalf("fingerprint --check %s: exit %d: %s", kept.Fingerprint, code, errs)
				}
			}
		})
	}
}

// A database an earlier build wrote, holding an answer that build took
// and today's rules refuse (testdata/records/demo_7c8c05c_tiny.db, as
// that build left it), upgrades when this version opens it and exports
// a record that imports: its export had been refused by the import at
// the answer's values.
func TestADatabaseOfAnEarlierBuildUpgradesAndItsRecordImports(t *testing.T) {
	b, err := os.ReadFile("../../testdata/records/demo_7c8c05c_tiny.db")
	check(t, err)
	db := filepath.Join(t.TempDir(), "old.db")
	check(t, os.WriteFile(db, b, 0o600))
	out := filepath.Join(t.TempDir(), "upgraded.json")
	if code, _, errs := run("export", "--db", db, "--workshop", "1", "--format", "json", "--out", out); code != exitOK {
		t.Fatalf("export of the old database: exit %d: %s", code, errs)
	}
	js, err := os.ReadFile(out)
	check(t, err)
	if !strings.Contains(string(js), "5e-324") {
		t.Fatal("the upgraded database's record lacks the answer of 4.9e-324")
	}
	if code, _, errs := run("import", "--db", filepath.Join(t.TempDir(), "new.db"), "--in", out); code != exitOK {
		t.Fatalf("import of the upgraded database's record: exit %d: %s", code, errs)
	}
	if code, _, errs := run("export", "--db", db, "--workshop", "1", "--format", "csv"); code != exitOK {
		t.Fatalf("CSV export of the upgraded database: exit %d: %s", code, errs)
	}
}
