package answersheet

import (
	"bytes"
	"errors"
	"fmt"
	"regexp"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// largePanel is an invented panel at the sheet's limit: 200 experts
// and 50 quantile questions of a share, and a sheet of rows of their
// answers, the first n of the 10,000 pairs.
func largePanel(n int) ([]workshop.Question, []workshop.Expert, string) {
	qs := make([]workshop.Question, 50)
	for i := range qs {
		qs[i] = workshop.Question{ID: int64(100 + i), Position: i + 1, Wording: fmt.Sprintf("Invented question %d: share blocked?", i+1),
			Quantity: "blocked share", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	}
	es := make([]workshop.Expert, 200)
	for i := range es {
		es[i] = workshop.Expert{ID: int64(1000 + i), Name: fmt.Sprintf("Expert %d (invented)", i+1)}
	}
	var b strings.Builder
	b.WriteString("expert,question,q05,q50,q95,reason\n")
	for k := range n {
		ei, qi := k/50%200, k%50
		m := 0.1 + 0.6*float64((ei*7+qi*3)%20)/20
		fmt.Fprintf(&b, "%s,Q%d,%.4f,%.4f,%.4f,Invented: inspection logs.\n", es[ei].Name, qi+1, m*0.5, m, m+(1-m)*0.4)
	}
	return qs, es, b.String()
}

// A sheet of more rows than the limit is refused as a whole, before any
// row is read: its second row, naming nobody, is not what is said. It
// was refused at its 10,001st row, after every row before it was fitted.
func TestTooManyRowsAreRefusedFirst(t *testing.T) {
	qs, es, sheet := largePanel(maxRows + 1)
	sheet = strings.Replace(sheet, "Expert 1 (invented),Q1,", "Nobody (invented),Q1,", 1)
	_, err := Read(strings.NewReader(sheet), qs, es)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "sheet" || ie.Rule != RuleRows || ie.Detail != "it has 10001 rows" {
		t.Fatalf("got %v, want sheet: %s (it has 10001 rows)", err, RuleRows)
	}
	// At the limit, rows of empty cells and comments do not count: the
	// sheet is read, and refused at its second row.
	qs, es, sheet = largePanel(maxRows)
	sheet = strings.Replace(sheet, "Expert 1 (invented),Q1,", "Nobody (invented),Q1,", 1) + ",,,,,\n# invented\n,,,,,\n"
	if _, err := Read(strings.NewReader(sheet), qs, es); !errors.As(err, &ie) || ie.Field != "row 2, column expert" {
		t.Fatalf("a sheet at the limit: %v, want row 2, column expert", err)
	}
}

// BenchmarkReadLargestSheet reads a sheet at the limit, 10,000 rows, each
// fitted: the time and memory a facilitator's largest upload costs.
//
//	go test ./elicit/answersheet -run '^$' -bench LargestSheet -benchtime 3x -benchmem
func BenchmarkReadLargestSheet(b *testing.B) {
	qs, es, sheet := largePanel(maxRows)
	b.SetBytes(int64(len(sheet)))
	b.ReportAllocs()
	for b.Loop() {
		rows, err := Read(strings.NewReader(sheet), qs, es)
		if err != nil || len(rows) != maxRows {
			b.Fatalf("%d rows, %v", len(rows), err)
		}
	}
}

// FuzzReadAnswerSheet: whatever the bytes, Read neither panics nor
// refuses without naming where, the sheet or a row and column. A quote
// mark inside a cell panicked (the CSV reader's FieldPos asked of a row
// it had refused).
//
//	go test -fuzz FuzzReadAnswerSheet -fuzztime 60s ./elicit/answersheet/
func FuzzReadAnswerSheet(f *testing.F) {
	qs, es, sheet := largePanel(3)
	qs = append(qs,
		workshop.Question{ID: 900, Position: 51, Wording: "Invented: share coated?", Quantity: "coated share", Lower: 0, Upper: 1, Format: workshop.FormatInterval},
		workshop.Question{ID: 901, Position: 52, Wording: "Invented: share clogged?", Quantity: "clogged share", Lower: 0, Upper: 1, Format: workshop.FormatChips,
			BinEdges: []float64{0, 0.1, 0.5, 1}, Chips: 10},
		workshop.Question{ID: 902, Position: 53, Wording: "Invented: retired", Quantity: "x", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault, Retired: true})
	es = append(es, workshop.Expert{ID: 5000, Name: "Expert 1 (Invented)"}, workshop.Expert{ID: 5001, Name: "Gone (invented)", Revoked: true})
	for _, s := range []string{
		sheet,
		"\ufeff\"expert\",\"question\",\"lowest\",\"highest\",\"best\",\"confidence\",,\r\nid:1000,Q51,5%,30%,12%,80,,\r\n",
		"expert,question,bin1,bin2,bin3,reason\rExpert 2 (invented),52,3,5,2,\"a\r\nb\"\r",
		"expert;question;q05\n\"a\";\"b\"\n",
		"expert,question,q05,q50,q95,reason\nExpert 2 (invented),Q1,0.1,0.2,0.3,12\" pipes\n",
		"# c\nexpert,,question,q05,q50,q95\nGone (invented),,Q53,0,02,0,06\n",
		"\xff\xfee\x00",
		"expert,question,q05,q50,q95\nExpert 1 (invented),Q1,0.1,0.2,0.3\n",
	} {
		f.Add([]byte(s))
	}
	field := regexp.MustCompile(`^(sheet|row [1-9]\d*, column .+)$`)
	f.Fuzz(func(t *testing.T, b []byte) {
		rows, err := Read(bytes.NewReader(b), qs, es)
		if err == nil {
			if len(rows) == 0 {
				t.Fatal("no rows and no refusal")
			}
			return
		}
		var ie *elicit.InputError
		if !errors.As(err, &ie) || !field.MatchString(ie.Field) {
			t.Fatalf("refused with %#v", err)
		}
	})
}

// A panel whose experts are named #1, #2, … (invented): a row starting
// with such a name is a comment to CSV and was left out without a word.
// It is refused, naming the row and saying to quote the name; a quoted
// "#1" is read as the expert's row, and comments above the header and
// below it that name nobody are still comments.
func TestARowReadAsACommentThatNamesAnExpertIsRefused(t *testing.T) {
	qs := []workshop.Question{{ID: 7, Position: 1, Wording: "Invented: share blocked?", Quantity: "blocked share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}}
	es := []workshop.Expert{{ID: 1, Name: "#1"}, {ID: 2, Name: "#2"}}
	head := "# Sent by the site team (invented)\nexpert,question,q05,q50,q95\n"
	_, err := Read(strings.NewReader(head+"#1,Q1,0.02,0.06,0.15\n\"#2\",Q1,0.03,0.07,0.2\n"), qs, es)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "row 3, column expert" || ie.Rule != RuleHashName {
		t.Fatalf("a row of #1 unquoted: %v, want row 3, column expert: %s", err, RuleHashName)
	}
	rows, err := Read(strings.NewReader(head+"\"#1\",Q1,0.02,0.06,0.15\n# checked by phone (invented)\n\"#2\",Q1,0.03,0.07,0.2\n"), qs, es)
	if err != nil || len(rows) != 2 || rows[0].Expert.ID != 1 || rows[1].Expert.ID != 2 {
		t.Fatalf("quoted names: %d rows, %v; want both experts' rows", len(rows), err)
	}
}

// A note with a quote mark in it (“5" pipes”, “the "blocked" share”) is
// no CSV a strict reader takes: the search for rows read as comments
// stopped at it, and the row of expert #1 below it was left out without
// a word.
func TestARowReadAsACommentBelowAQuotedNoteIsRefused(t *testing.T) {
	qs := []workshop.Question{{ID: 7, Position: 1, Wording: "Invented: share blocked?", Quantity: "blocked share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}}
	es := []workshop.Expert{{ID: 1, Name: "#1"}, {ID: 2, Name: "B"}}
	for _, note := range []string{`# the "blocked" share (invented)`, `# 5" pipes (invented)`} {
		_, err := Read(strings.NewReader(note+"\nexpert,question,q05,q50,q95\n#1,Q1,0.02,0.06,0.15\nB,Q1,0.03,0.07,0.2\n"), qs, es)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != "row 3, column expert" || ie.Rule != RuleHashName {
			t.Errorf("under %s: %v, want row 3, column expert: %s", note, err, RuleHashName)
		}
	}
}

// A panel from before the roster refused such names may hold an expert
// named "id:5": a sheet's id:5 then names two experts, the one of id 5
// and the one so named, and the row is refused saying so. It went to
// expert 5 without a word (review, 2026-12-05). A cell that names one
// expert only, by its id or by such a name, is still read.
func TestAnIDThatIsAlsoANameIsRefused(t *testing.T) {
	qs := []workshop.Question{{ID: 7, Position: 1, Wording: "Invented: share blocked?", Quantity: "blocked share",
		Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}}
	es := []workshop.Expert{{ID: 5, Name: "Ana Ferreira (invented)"}, {ID: 6, Name: "id:5"}, {ID: 8, Name: "id:9"}}
	head := "expert,question,q05,q50,q95\n"
	_, err := Read(strings.NewReader(head+"id:5,Q1,0.02,0.06,0.15\n"), qs, es)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "row 2, column expert" || ie.Rule != RuleTwoExperts ||
		ie.Detail != `"id:5" is the id of Ana Ferreira (invented) and the name of id:6 (id:5): write the expert named "id:5" by the id given here for the name, and Ana Ferreira (invented) by name` {
		t.Fatalf("id:5 naming expert 5 and the expert named id:5: %v; want %s naming both", err, RuleTwoExperts)
	}
	// Expert 5's link revoked: the row is not credited to the expert
	// named id:5 unseen either (a review found it was).
	revoked := append([]workshop.Expert(nil), es...)
	revoked[0].Revoked = true
	_, err = Read(strings.NewReader(head+"id:5,Q1,0.02,0.06,0.15\n"), qs, revoked)
	if !errors.As(err, &ie) || ie.Rule != RuleTwoExperts ||
		ie.Detail != `"id:5" is the id of Ana Ferreira (invented), whose link was revoked, and the name of id:6 (id:5): write the expert named "id:5" by the id given here for the name` {
		t.Fatalf("id:5 naming revoked expert 5 and the expert named id:5: %v", err)
	}
	for cell, want := range map[string]int64{"id:6": 6, "Ana Ferreira (invented)": 5, "id:9": 8, "id:8": 8} {
		rows, err := Read(strings.NewReader(head+cell+",Q1,0.02,0.06,0.15\n"), qs, es)
		if err != nil || len(rows) != 1 || rows[0].Expert.ID != want {
			t.Errorf("%s: %v, %v; want expert %d", cell, rows, err, want)
		}
	}
	for name, want := range map[string]bool{"id:5": true, " ID:12 ": true, "id: 5": true, "Idris": false, "id:0": false, "id:x": false} {
		if NamedLikeAnID(name) != want {
			t.Errorf("NamedLikeAnID(%q) = %v", name, !want)
		}
	}
}
