package main

import (
	"context"
	"fmt"
	"io"
	"os"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/store"
)

func init() {
	command("import", "add a workshop from an exported JSON record (--db, --in); prints its new ID", runImport)
}

func runImport(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("import", stderr)
	dbPath := fs.String("db", "", "database `file` (created if missing)")
	in := fs.String("in", "", "JSON record `file`, or - for standard input")
	if err := fs.Parse(args); err != nil {
		return exitBadInput
	}
	if *dbPath == "" {
		return fail(stderr, "import", badInput("db", "a database file is required"))
	}
	var r io.Reader = stdin
	switch *in {
	case "":
		return fail(stderr, "import", badInput("in", "a JSON record file is required"))
	case "-":
	default:
		f, err := os.Open(*in)
		if err != nil {
			return fail(stderr, "import", badInput("in", "%v", err))
		}
		defer f.Close()
		r = f
	}
	// The record is parsed and validated before the database is touched.
	rec, err := elicit.ParseRecord(r)
	if err != nil {
		return fail(stderr, "import", err)
	}
	db, err := store.Open(*dbPath)
	if err != nil {
		return fail(stderr, "import", err)
	}
	defer db.Close()
	id, err := db.Import(context.Background(), rec)
	if err != nil {
		return fail(stderr, "import", err)
	}
	fmt.Fprintln(stdout, id)
	return exitOK
}
