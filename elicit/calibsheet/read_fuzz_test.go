package calibsheet

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// FuzzRead: whatever the bytes, Read returns a sheet or refuses it with
// an *elicit.InputError whose message is one line naming a field (a
// strings.Reader never fails, so no other error is the reader's own);
// never a panic. A sheet read holds at least one assessment, one file
// line per assessment in increasing order, each assessment by the
// model's rule of one answer (SeedAssessment.Validate) on the header's
// probabilities, and a true value for each question, inside its bounds.
func FuzzRead(f *testing.F) {
	files, err := filepath.Glob("../../testdata/calibration/*.csv")
	if err != nil || len(files) == 0 {
		f.Fatalf("no invented calibration files: %v", err)
	}
	for _, name := range files {
		b, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	const head = "expert,question,realization,lower,upper,background,q05,q50,q95\n"
	for _, s := range []string{
		"",
		"\ufeffexpert,question,realisation,q10,q90\r\"A\",s1,1,0,2\r",
		head + "A,s1,1,0,9,log-uniform,0.5,1,2\nB,s1,1,0,9,,0.5,1,2\n",
		head + "A,s1,1,0,9,,0.5,1,2,3\n",
		head + "#1,s1,1,0,9,,0.5,1,2\n",
		head + "\"A\nB\",s1,1,0,9,uniform,0.5,1,2\n",
		head + "\"A,s1,1,0,9,,0.5,1,2\n",
		"expert;question;realization;q05\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, in []byte) {
		s, err := Read(bytes.NewReader(in))
		if err != nil {
			var ie *elicit.InputError
			if !errors.As(err, &ie) || ie.Field == "" || ie.Rule == "" {
				t.Fatalf("refused with %T %v, want an *elicit.InputError naming a field and a rule", err, err)
			}
			if strings.ContainsAny(err.Error(), "\r\n") {
				t.Fatalf("a refusal of more than one line: %q", err.Error())
			}
			return
		}
		if len(s.Assessments) == 0 || len(s.Rows) != len(s.Assessments) {
			t.Fatalf("%d assessments on rows %v", len(s.Assessments), s.Rows)
		}
		for i, a := range s.Assessments {
			if i > 0 && !(s.Rows[i] > s.Rows[i-1]) {
				t.Fatalf("rows %v do not increase", s.Rows)
			}
			if err := a.Validate(); err != nil || len(a.Quantiles) != len(s.QuantileColumns) {
				t.Fatalf("row %d: %v, %d quantiles under %v", s.Rows[i], err, len(a.Quantiles), s.QuantileColumns)
			}
			x, ok := s.Realisations[a.Question]
			if b, bounded := s.Bounds[a.Question]; !ok || bounded && (x < b[0] || x > b[1]) {
				t.Fatalf("row %d: question %q has true value %v (%v), bounds %v", s.Rows[i], a.Question, x, ok, s.Bounds[a.Question])
			}
		}
	})
}
