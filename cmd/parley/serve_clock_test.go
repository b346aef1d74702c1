package main

import (
	"database/sql"
	"net/http"
	"net/url"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// The server's log says when a workshop's facts are stamped ahead of
// this machine's clock (its latest fact dated more than a minute after
// the clock): one warning naming the workshop and both times, on the
// server's stderr beside its other log lines, so the operator sees the
// clock is wrong. Here the demo workshop's kept latest time is moved two
// hours ahead, as an import of a record from a machine whose clock ran
// ahead, or a clock set back, leaves it; two saves then give one warning.
func TestServeWarnsOfStampsAheadOfTheClock(t *testing.T) {
	dbPath := filepath.Join(t.TempDir(), "parley.db")
	base, out, errs, stop := startServe(t, serveConfig{addr: "127.0.0.1:0", db: dbPath})
	link := regexp.MustCompile(`/e/[A-Za-z0-9_-]{43}/`).FindString(out.String())
	if link == "" {
		t.Fatalf("no demo link printed:\n%s", out)
	}
	raw, err := sql.Open("sqlite3", "file:"+dbPath+"?_busy_timeout=5000")
	check(t, err)
	defer raw.Close()
	ahead := time.Now().UTC().Add(2 * time.Hour).Format(time.RFC3339Nano)
	res, err := raw.Exec(`UPDATE fact_clock SET last = ? WHERE workshop_id = 1`, ahead)
	check(t, err)
	if n, _ := res.RowsAffected(); n != 1 {
		t.Fatalf("the demo workshop has no kept latest time (%d rows)", n)
	}
	client := &http.Client{Timeout: 20 * time.Second, CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	for _, median := range []string{"0.04", "0.05"} {
		form := url.Values{"values[0]": {"0.01"}, "values[1]": {median}, "values[2]": {"0.12"}}
		req, err := http.NewRequest(http.MethodPost, base+link+"q/1/save", strings.NewReader(form.Encode()))
		check(t, err)
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", base)
		resp, err := client.Do(req)
		check(t, err)
		resp.Body.Close()
		if resp.StatusCode != http.StatusSeeOther {
			t.Fatalf("save: status %d", resp.StatusCode)
		}
	}
	if err := stop(); err != nil {
		t.Fatal(err)
	}
	log := errs.String()
	if n := strings.Count(log, "level=WARN msg=\"store: a workshop's latest fact is dated after this machine's clock"); n != 1 {
		t.Fatalf("%d warnings of stamps ahead of the clock after two saves, want 1:\n%s", n, log)
	}
	for _, want := range []string{"workshop=1 ", `title="Invented demo: first-year failures of the HX-40 inverter"`,
		"latest_fact=" + ahead, " clock="} {
		if !strings.Contains(log, want) {
			t.Errorf("the warning does not say %q:\n%s", want, log)
		}
	}
	// Two hours less the time from the move to the first save.
	if !regexp.MustCompile(`ahead=(2h0m0s|1h59m\d+s)`).MatchString(log) {
		t.Errorf("the warning does not say it is two hours ahead:\n%s", log)
	}
}

// parley import-answers stamps what it saves as the server does, so a
// workshop whose latest fact lies two hours ahead of the clock is warned
// of on its stderr in the same form as parley serve's, where it went to
// the log package's default in another form.
func TestImportAnswersWarnsOfStampsAheadOfTheClock(t *testing.T) {
	path, ws, _ := cliWorkshop(t)
	sheet := writeSheet(t, "expert,question,q05,q50,q95\nJomo,2,0.2,0.35,0.5\n")
	// A save first, so that the workshop keeps its latest time.
	w := strconv.FormatInt(ws, 10)
	if code, _, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", sheet); code != 0 {
		t.Fatalf("import: %d %s", code, errOut)
	}
	raw, err := sql.Open("sqlite3", "file:"+path+"?_busy_timeout=5000")
	check(t, err)
	defer raw.Close()
	ahead := time.Now().UTC().Add(2 * time.Hour).Format(time.RFC3339Nano)
	res, err := raw.Exec(`UPDATE fact_clock SET last = ? WHERE workshop_id = ?`, ahead, ws)
	check(t, err)
	if n, _ := res.RowsAffected(); n != 1 {
		t.Fatalf("the workshop has no kept latest time (%d rows)", n)
	}
	again := writeSheet(t, "expert,question,q05,q50,q95\nJomo,2,0.2,0.36,0.5\n")
	code, _, errOut := run("import-answers", "--db", path, "--workshop", w, "--in", again)
	if code != 0 {
		t.Fatalf("import: %d %s", code, errOut)
	}
	if n := strings.Count(errOut, "level=WARN msg=\"store: a workshop's latest fact is dated after this machine's clock"); n != 1 {
		t.Fatalf("%d warnings in the form serve writes, want 1:\n%s", n, errOut)
	}
	if !strings.Contains(errOut, "latest_fact="+ahead) {
		t.Errorf("the warning does not name the latest fact's time:\n%s", errOut)
	}
}
