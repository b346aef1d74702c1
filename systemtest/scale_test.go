package systemtest

import (
	"context"
	"fmt"
	"io"
	mrand "math/rand/v2"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

// The record at scale (issue 16): a workshop of 200 experts × 10
// questions × 2 rounds, exported by the real binary, imported into a new
// database by the real binary, and served by the real binary. The sizes
// are asserted (TestRecordAtScale); the CPU figures are a benchmark
// (BenchmarkRecordAtScale), since timings on a shared machine are not
// assertions.
const (
	scaleExperts   = 200
	scaleQuestions = 10

	// The targets.
	maxReportBytes = 2 << 20
	maxPanelBytes  = 300 << 10
)

// scaleFigures are what one run measured.
type scaleFigures struct {
	revisions               int
	reportBytes, panelBytes int
	reportCPU, panelCPU     time.Duration // the server's CPU for one request
	exportJSONCPU           time.Duration // `parley export --format json`, the whole process
	exportCSVCPU            time.Duration // `--format csv`
	importCPU               time.Duration // `parley import` of the JSON
	recordBytes             int
}

// seedScale writes the workshop to dbPath through the store: every expert
// answers every question in round 1 and revises it in round 2 (invented
// 5/50/95 judgements), and each question gets an agreed prior.
func seedScale(tb testing.TB, dbPath string) (wsID int64, qids []int64) {
	tb.Helper()
	s := seedWorkshop(tb, dbPath, scaleExperts, scaleQuestions)
	ctx := context.Background()
	db, err := store.Open(dbPath)
	if err != nil {
		tb.Fatal(err)
	}
	defer db.Close()
	rng := mrand.New(mrand.NewPCG(16, 200))
	for round := 1; round <= 2; round++ {
		if round == 2 {
			if err := db.SetRound(ctx, s.workshopID, 2, true, "Invented: the panel revises after the discussion."); err != nil {
				tb.Fatal(err)
			}
		}
		var revs []workshop.Revision
		for _, e := range s.experts {
			for _, q := range s.questions {
				a := quantileAnswer(rng, fmt.Sprintf("Invented reason of expert %d, round %d: field returns and audits.", e.id, round))
				rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.id, Reason: a.form.Get("reason"),
					Answer: workshop.Answer{Values: a.values}}
				// Fitted and kept as a save from the form does.
				f, err := q.Fit(rv.Answer)
				if err != nil {
					tb.Fatal(err)
				}
				rv.Kept = &f
				revs = append(revs, rv)
			}
		}
		if err := db.SaveRevisions(ctx, revs); err != nil {
			tb.Fatal(err)
		}
		if err := db.SetRound(ctx, s.workshopID, round, false, ""); err != nil {
			tb.Fatal(err)
		}
	}
	for i, q := range s.questions {
		p := workshop.AgreedPrior{QuestionID: q.ID, Source: workshop.PriorFromPool,
			Dist:      elicit.Unit(elicit.Beta{Alpha: 2 + 0.1*float64(i), Beta: 9}),
			Rationale: "Invented: the pool's single Beta, accepted by the panel."}
		if err := db.AgreePrior(ctx, &p); err != nil {
			tb.Fatal(err)
		}
		qids = append(qids, q.ID)
	}
	return s.workshopID, qids
}

// childCPU runs the binary and returns its CPU time (user + system).
func childCPU(tb testing.TB, bin string, args ...string) time.Duration {
	tb.Helper()
	cmd := exec.Command(bin, args...)
	out, err := cmd.CombinedOutput()
	if err != nil {
		tb.Fatalf("parley %v: %v\n%s", args, err, out)
	}
	return cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()
}

func runScale(tb testing.TB) scaleFigures {
	tb.Helper()
	dir := tb.TempDir()
	src := filepath.Join(dir, "generated.db")
	wsID, _ := seedScale(tb, src)
	bin := parleyBinary(tb)
	var f scaleFigures
	f.revisions = 2 * scaleExperts * scaleQuestions
	ws := strconv.FormatInt(wsID, 10)
	recPath := filepath.Join(dir, "record.json")
	f.exportJSONCPU = childCPU(tb, bin, "export", "--db", src, "--workshop", ws, "--format", "json", "--out", recPath)
	f.exportCSVCPU = childCPU(tb, bin, "export", "--db", src, "--workshop", ws, "--format", "csv", "--out", filepath.Join(dir, "record.csv"))
	if st, err := os.Stat(recPath); err == nil {
		f.recordBytes = int(st.Size())
	}

	// The generated record, imported into a new database and served.
	dst := filepath.Join(dir, "imported.db")
	f.importCPU = childCPU(tb, bin, "import", "--db", dst, "--in", recPath)
	db, err := store.Open(dst)
	if err != nil {
		tb.Fatal(err)
	}
	ctx := context.Background()
	wss, err := db.Workshops(ctx)
	if err != nil || len(wss) != 1 {
		tb.Fatalf("imported workshops: %d, %v", len(wss), err)
	}
	qs, err := db.Questions(ctx, wss[0].ID)
	if err != nil {
		tb.Fatal(err)
	}
	secret, err := web.ResetFacilitatorSecret(ctx, db)
	if err != nil {
		tb.Fatal(err)
	}
	db.Close()
	server := startServer(tb, bin, dst, freeAddr(tb))
	defer server.kill()
	cl := newClient(2)
	status, cookies, err := postRaw(ctx, cl, server.base, "/signin", url.Values{"secret": {secret}})
	if err != nil || status != http.StatusSeeOther {
		tb.Fatalf("sign-in: %d %v", status, err)
	}
	fetch := func(path string) (int, time.Duration) {
		req, _ := http.NewRequestWithContext(ctx, http.MethodGet, server.base+path, nil)
		for _, c := range cookies {
			req.AddCookie(c)
		}
		before := pidCPU(server.cmd.Process.Pid)
		res, err := cl.Do(req)
		if err != nil {
			tb.Fatalf("GET %s: %v", path, err)
		}
		body, err := io.ReadAll(res.Body)
		res.Body.Close()
		after := pidCPU(server.cmd.Process.Pid)
		if err != nil || res.StatusCode != http.StatusOK {
			tb.Fatalf("GET %s: %d %v", path, res.StatusCode, err)
		}
		if dir := os.Getenv("PARLEY_SCALE_OUT"); dir != "" {
			// Keep the pages to look at them.
			name := strings.NewReplacer("/", "_").Replace(path) + ".html"
			if err := os.WriteFile(filepath.Join(dir, name), body, 0o644); err != nil {
				tb.Fatal(err)
			}
		}
		return len(body), after - before
	}
	wp := "/w/" + strconv.FormatInt(wss[0].ID, 10)
	fetch(wp + "/") // warm the caches the way an overview visit does
	f.reportBytes, f.reportCPU = fetch(wp + "/report")
	f.panelBytes, f.panelCPU = fetch(wp + "/q/" + strconv.FormatInt(qs[0].ID, 10))
	return f
}

func (f scaleFigures) String() string {
	return fmt.Sprintf("%d revisions; record %.2f MB; report %.2f MB, %v server CPU; question panel %.0f KB, %v server CPU; "+
		"export JSON %v CPU, CSV %v CPU (whole process); import %v CPU",
		f.revisions, float64(f.recordBytes)/(1<<20), float64(f.reportBytes)/(1<<20), f.reportCPU,
		float64(f.panelBytes)/(1<<10), f.panelCPU, f.exportJSONCPU, f.exportCSVCPU, f.importCPU)
}

// TestRecordAtScale asserts the sizes the issue sets for a panel of 200:
// the report at most 2 MB, a question's panel at most 300 KB.
func TestRecordAtScale(t *testing.T) {
	if testing.Short() {
		t.Skip("the 200-expert record takes a while; run without -short")
	}
	f := runScale(t)
	t.Log(f)
	if f.reportBytes > maxReportBytes {
		t.Errorf("the report is %d bytes, more than %d", f.reportBytes, maxReportBytes)
	}
	if f.panelBytes > maxPanelBytes {
		t.Errorf("the question panel is %d bytes, more than %d", f.panelBytes, maxPanelBytes)
	}
}

// BenchmarkRecordAtScale reports the CPU figures of one 200-expert run
// (targets: report 0.5 s, JSON and CSV exports 0.3 s each):
// go test ./systemtest -run '^$' -bench RecordAtScale -benchtime 1x -v
func BenchmarkRecordAtScale(b *testing.B) {
	for b.Loop() {
		f := runScale(b)
		b.Log(f)
		b.ReportMetric(f.reportCPU.Seconds(), "report-cpu-s")
		b.ReportMetric(f.exportJSONCPU.Seconds(), "export-json-cpu-s")
		b.ReportMetric(f.exportCSVCPU.Seconds(), "export-csv-cpu-s")
		b.ReportMetric(float64(f.reportBytes)/(1<<20), "report-MB")
		b.ReportMetric(float64(f.panelBytes)/(1<<10), "panel-KB")
	}
}
