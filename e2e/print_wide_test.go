package e2e

import (
	"context"
	"fmt"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"unicode"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web"
)

// TestReportPrintsEveryRerunOfAWideWorkshop: the report's table of the
// robustness reruns has a column for each target question. A workshop of
// 30 experts and 25 questions (19 of them targets, invented) drew it 4,638
// px wide; printed on A4 the columns past the fourth target question were
// cut off at the paper's edge, so the printed record lost the reruns'
// pools of 15 of its 19 target questions (and Chromium shrank every page
// of the report to fit as much of it as it could). Printed on A4 and
// Letter, every number of the table must be on paper.
func TestReportPrintsEveryRerunOfAWideWorkshop(t *testing.T) {
	poppler(t, "pdftotext")
	s := startSite(t)
	ws := wideCalibratedWorkshop(t, s, 4, 3, 12)
	fac := signedInFacilitator(t, s)
	// The report prints the reruns where something rests on them: with
	// the performance weights in force.
	fac.open(s.URL + "/w/" + strconv.FormatInt(ws.ID, 10) + "/")
	fac.postFromPage(s.URL+"/w/"+strconv.FormatInt(ws.ID, 10)+"/calibration/weights", "scheme=performance&reason=Classical+model+weights+%28invented%29.")
	fac.open(s.URL + "/w/" + strconv.FormatInt(ws.ID, 10) + "/report")
	cells := eval[[]string](fac, "the reruns' numbers", `Array.from(document.querySelectorAll(".table-steadiness td.num")).map(td => td.textContent.trim()).filter(s => s !== "")`)
	if len(cells) < 12*4 {
		t.Fatalf("the report's table of reruns shows %d numbers; want a pool for each of the 12 target questions in every rerun", len(cells))
	}
	dir := t.TempDir()
	for _, pp := range papers {
		pdf := fac.printPDF(pp, filepath.Join(dir, "report-wide-"+pp.name+".pdf"))
		out, err := exec.Command("pdftotext", pdf, "-").Output()
		if err != nil {
			t.Fatalf("pdftotext: %v", err)
		}
		printed := withoutSpace(string(out))
		var lost []string
		for _, c := range cells {
			if !strings.Contains(printed, withoutSpace(c)) {
				lost = append(lost, c)
			}
		}
		if len(lost) > 0 {
			t.Errorf("%s: %d of the reruns' %d numbers are not on paper, such as %q", pp.name, len(lost), len(cells), lost[:min(3, len(lost))])
		}
	}
}

func withoutSpace(s string) string {
	return strings.Map(func(r rune) rune {
		if unicode.IsSpace(r) {
			return -1
		}
		return r
	}, s)
}

// wideCalibratedWorkshop stores an invented workshop of n experts who
// answered calib calibration questions (their true values shown) and
// targets target questions, each expert's judgements spread differently,
// so that performance weights and their reruns differ by question.
func wideCalibratedWorkshop(t *testing.T, s *site, n, calib, targets int) workshop.Workshop {
	t.Helper()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Invented: culvert inspections", Invented: true,
		Purpose: "Invented: priors for the share of culverts blocked after a storm."}
	if err := s.DB.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	var qs []workshop.Question
	for i := range calib + targets {
		q := workshop.Question{WorkshopID: ws.ID, Units: "proportion", Lower: 0, Upper: 1,
			Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
		if i < calib {
			q.Calibration = true
			q.Wording = fmt.Sprintf("Invented: what share of the culverts on route C%d were blocked last winter?", i+1)
			q.Quantity = fmt.Sprintf("blocked, route C%d", i+1)
		} else {
			q.Wording = fmt.Sprintf("Invented: what share of the culverts in district D%d will be blocked after the next storm?", i-calib+1)
			q.Quantity = fmt.Sprintf("blocked, district D%d", i-calib+1)
		}
		if err := s.DB.AddQuestion(ctx, &q); err != nil {
			t.Fatal(err)
		}
		qs = append(qs, q)
	}
	for e := range n {
		_, hash, err := web.NewExpertToken()
		if err != nil {
			t.Fatal(err)
		}
		ex := workshop.Expert{WorkshopID: ws.ID, Name: fmt.Sprintf("Invented engineer %d", e+1)}
		if err := s.DB.AddExpert(ctx, &ex, hash); err != nil {
			t.Fatal(err)
		}
		var revs []workshop.Revision
		for i, q := range qs {
			m := 0.08 + 0.05*float64((e*3+i*5)%7)
			w := 1.4 + 0.5*float64(e)
			rv := workshop.Revision{QuestionID: q.ID, ExpertID: ex.ID,
				Answer: workshop.Answer{Values: []float64{m / w, m, min(m*w, 0.95)}}}
			f, err := q.Fit(rv.Answer)
			if err != nil {
				t.Fatal(err)
			}
			rv.Kept = &f
			revs = append(revs, rv)
		}
		if err := s.DB.SaveRevisions(ctx, revs); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.DB.SetRound(ctx, ws.ID, 1, false, "Invented: the panel has answered."); err != nil {
		t.Fatal(err)
	}
	for i := range calib {
		if err := s.DB.SetTrueValue(ctx, qs[i].ID, 0.1+0.04*float64(i), true, "Invented: the inspection results."); err != nil {
			t.Fatal(err)
		}
	}
	return ws
}
