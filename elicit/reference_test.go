package elicit

import (
	"bufio"
	"os"
	"strings"
	"testing"
)

// referenceTable reads one of the tables testdata's scripts generate: its
// first line names the tool and version that made it and must start with
// tool ("# R version" or "# scipy"), its second is the header, and every
// other line has cols comma-separated fields, which it returns.
func referenceTable(t *testing.T, path, tool string, cols int) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows [][]string
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 0, 64*1024), 1<<20)
	for line := 1; sc.Scan(); line++ {
		text := sc.Text()
		switch {
		case line == 1:
			if !strings.HasPrefix(text, tool) {
				t.Fatalf("%s: the first line should name the tool that made it (%q…), got %q", path, tool, text)
			}
			continue
		case line == 2:
			continue // the header
		}
		c := strings.Split(text, ",")
		if len(c) != cols {
			t.Fatalf("%s:%d: %d columns, want %d", path, line, len(c), cols)
		}
		rows = append(rows, c)
	}
	if err := sc.Err(); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if len(rows) == 0 {
		t.Fatalf("%s: no rows", path)
	}
	return rows
}
