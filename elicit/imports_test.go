package elicit

import (
	"go/parser"
	"go/token"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// The dependencies point inward: the mathematics imports nothing of
// Parley, the input rules only its errors, the workshop the mathematics
// and the input rules, the record's fingerprint the workshop, the record
// and the answer sheet those and the workshop (the record also the
// fingerprint, and the calibration sheet, whose columns its calibration
// download writes), the calibration sheet the answer sheet's reading of
// a spreadsheet's CSV (DEVELOPERS.md, "Layout"). Test files may import more.
func TestImportsPointInward(t *testing.T) {
	const module = "github.com/parley-elicit/parley/"
	allowed := map[string][]string{
		".":                     nil,
		"input":                 {"elicit"},
		"workshop":              {"elicit", "elicit/input"},
		"workshop/workshoptest": {"elicit", "elicit/workshop"},
		"fingerprint":           {"elicit", "elicit/workshop"},
		"record":                {"elicit", "elicit/input", "elicit/workshop", "elicit/fingerprint", "elicit/calibsheet"},
		"answersheet":           {"elicit", "elicit/input", "elicit/workshop"},
		"calibsheet":            {"elicit", "elicit/input", "elicit/answersheet"},
	}
	dirs := 0
	err := filepath.WalkDir(".", func(path string, d os.DirEntry, err error) error {
		if err != nil || !d.IsDir() || path == "testdata" {
			return err
		}
		want, known := allowed[path]
		files, _ := filepath.Glob(filepath.Join(path, "*.go"))
		for _, f := range files {
			if strings.HasSuffix(f, "_test.go") {
				continue
			}
			if !known {
				t.Errorf("package elicit/%s is not in this test's table of allowed imports", path)
				break
			}
			af, err := parser.ParseFile(token.NewFileSet(), f, nil, parser.ImportsOnly)
			if err != nil {
				t.Fatal(err)
			}
			for _, im := range af.Imports {
				p, _ := strconv.Unquote(im.Path.Value)
				if rest, ok := strings.CutPrefix(p, module); ok && !slices.Contains(want, rest) {
					t.Errorf("%s imports %s", f, p)
				}
			}
		}
		if known {
			dirs++
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if dirs != len(allowed) {
		t.Errorf("found %d of the %d packages in the table", dirs, len(allowed))
	}
}
