package calibsheet

import (
	"errors"
	"reflect"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// TestReadsASpreadsheetsLines: a calibration file as a spreadsheet saves
// it, with lines ended by a carriage return alone ("CSV (Macintosh)") or
// a byte order mark before a quoted header ("CSV UTF-8"), is read as the
// same file with plain lines, as the answer sheet reads it; the first was
// one row, refused as naming the header column "q95\ra", the second by
// CSV's rule of quote marks.
func TestReadsASpreadsheetsLines(t *testing.T) {
	plain := "expert,question,realization,q05,q50,q95\nA,q1,3,2,5,8\nB,q1,3,4,5,6\n"
	want, err := Read(strings.NewReader(plain))
	if err != nil {
		t.Fatal(err)
	}
	for name, file := range map[string]string{
		"carriage returns":        strings.ReplaceAll(plain, "\n", "\r"),
		"byte order mark, quoted": "\ufeff" + `"expert","question","realization","q05","q50","q95"` + plain[strings.IndexByte(plain, '\n'):],
	} {
		got, err := Read(strings.NewReader(file))
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if !reflect.DeepEqual(got.Assessments, want.Assessments) || !reflect.DeepEqual(got.Realisations, want.Realisations) {
			t.Errorf("%s: read %+v, want %+v", name, got.Assessments, want.Assessments)
		}
	}
}

// TestReadRefusesNamingTheRowColumnAndRule: every refusal is an
// *elicit.InputError whose field names the row (the line in the file,
// comments counted) and the column, and whose rule a caller can tell
// apart without reading the message.
func TestReadRefusesNamingTheRowColumnAndRule(t *testing.T) {
	const head = "expert,question,realization,q05,q50,q95\n"
	const boundsHead = "expert,question,realization,lower,upper,q05,q50,q95\n"
	const backgroundHead = "expert,question,realization,lower,upper,background,q05,q50,q95\n"
	for _, c := range []struct {
		name, csv, field string
		rule             elicit.Rule
	}{
		{"empty", "", "header", elicit.RuleRequired},
		{"UTF-16", "\xff\xfee\x00x\x00", "input", RuleUTF8},
		{"semicolons", "expert;question;realization;q05;q50;q95\n", "header", "must separate its columns with commas: save it as CSV (comma-separated), with a point for decimals"},
		{"lower without upper", "expert,question,realization,lower,q05\n", `header column "lower"`, RuleHeader},
		{"no quantile column", "expert,question,realization\nA,s1,1\n", "header", elicit.RuleRequired},
		{"unterminated quote", head + "\"A,s1,1,0,1,2\n", "row 2", RuleCSV},
		{"Windows-1252", head + "Jos\xe9,s1,1,0,1,2\n", "row 2: expert", RuleUTF8},
		{"long row", head + "A,s1,1,0,1,2,3\n", "row 2: columns", elicit.RuleCount},
		{"comment lines count", "# invented\n" + head + "A,s1,1,0,1,2\nA,s2,1,3,1,2\n", "row 4: q50", elicit.RuleValueIncreasing},
		{"realisation spelled so", "expert,question,realisation,q05,q50,q95\nA,s1,1,0,1,2\nB,s1,2,0,1,2\n", "row 3: realisation", RuleSameRealisation},
		{"duplicate", head + "A,s1,1,0,1,2\nA,s1,1,0,1,3\n", "row 3: expert, question", elicit.RuleDuplicate},
		{"one bound", boundsHead + "A,s1,1,0,,0.5,1,2\n", "row 2: lower, upper", RuleBoundsPair},
		{"bounds out of order", boundsHead + "A,s1,1,9,0,0.5,1,2\n", "row 2: upper", elicit.RuleBoundsOrder},
		{"realisation outside", boundsHead + "A,s1,12,0,9,0.5,1,2\n", "row 2: realization", elicit.RuleInRange},
		{"bounds differ", boundsHead + "A,s1,1,0,9,0.5,1,2\nB,s1,1,,,0.5,1,2\n", "row 3: lower, upper", RuleSameBounds},
		{"background word", backgroundHead + "A,s1,1,0,9,logarithmic,0.5,1,2\n", "row 2: background", RuleBackgroundWord},
		{"log-uniform at 0", backgroundHead + "A,s1,1,0,9,log-uniform,0,1,2\n", "row 2: q05", elicit.RuleLogScalePositive},
		{"backgrounds differ", backgroundHead + "A,s1,1,0,9,log-uniform,0.5,1,2\nB,s1,1,0,9,,0.5,1,2\n", "row 3: background", RuleSameBackground},
		{"every row a comment", head + "#1,s1,1,0,1,2\n", "rows", elicit.RuleCount},
	} {
		_, err := Read(strings.NewReader(c.csv))
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != c.rule {
			t.Errorf("%s: %v; want field %q, rule %q", c.name, err, c.field, c.rule)
		}
	}
}

// TestRowErrorNamesTheRowAndColumn: the classical model's refusal of an
// assessment is said at the sheet's row and column, and the rows read as
// comments are counted and named.
func TestRowErrorNamesTheRowAndColumn(t *testing.T) {
	s, err := Read(strings.NewReader("# invented seeds\nexpert,question,realization,lower,upper,q10,q50,q90\n#1,s1,1,0,9,0.5,1,2\nB,s1,1,0,9,0.5,1,2\nA,s1,1,0,9,0,1,2\n"))
	if err != nil {
		t.Fatal(err)
	}
	if want := []int{4, 5}; !reflect.DeepEqual(s.Rows, want) {
		t.Errorf("rows %v, want %v", s.Rows, want)
	}
	if note := s.CommentNote(); !strings.HasPrefix(note, "row 3 starts with #") {
		t.Errorf("note %q, want one naming row 3", note)
	}
	_, err = elicit.ClassicalModel(s.Assessments, s.Realisations, s.Bounds, elicit.ModelOptions{})
	var ie *elicit.InputError
	if err = s.RowError(err); !errors.As(err, &ie) || ie.Field != "row 5: q10" || ie.Rule != elicit.RuleValueInBounds {
		t.Errorf("%v; want row 5: q10 and %q", err, elicit.RuleValueInBounds)
	}
}
