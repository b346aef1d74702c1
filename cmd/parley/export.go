package main

import (
	"bytes"
	"context"
	"errors"
	"io"
	"os"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
)

func init() {
	command("export", "write a workshop's record as JSON or CSV, or its agreed priors as CSV (--db, --workshop, --format json|csv|priors, --question, --out)", runExport)
}

func runExport(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("export", stderr)
	dbPath := fs.String("db", "", "database `file`")
	workshopID := fs.Int64("workshop", 0, "workshop `ID`")
	format := fs.String("format", "json", "json (the whole record), csv (one row per revision) or priors (one row per agreed prior, CSV)")
	question := fs.Int64("question", 0, "export only this question `ID`")
	out := fs.String("out", "", "write to `file` instead of standard output")
	if err := fs.Parse(args); err != nil {
		return exitBadInput
	}
	if *format != "json" && *format != "csv" && *format != "priors" {
		return fail(stderr, "export", badInput("format", "must be json, csv or priors, got %q", *format))
	}
	if *workshopID <= 0 {
		return fail(stderr, "export", badInput("workshop", "a workshop ID (a whole number above 0) is required"))
	}
	db, err := openExisting(*dbPath)
	if err != nil {
		return fail(stderr, "export", err)
	}
	defer db.Close()
	build := db.Record
	if *format != "json" {
		build = db.RecordHistory // the CSVs need no pool
	}
	rec, err := build(context.Background(), *workshopID, time.Now())
	if errors.Is(err, workshop.ErrNotFound) {
		return fail(stderr, "export", badInput("workshop", "no workshop %d in %s", *workshopID, *dbPath))
	}
	if err != nil {
		return fail(stderr, "export", err)
	}
	if *question != 0 {
		if rec, err = rec.ForQuestion(*question); err != nil {
			return fail(stderr, "export", badInput("question", "no question %d in workshop %d", *question, *workshopID))
		}
	}
	var buf bytes.Buffer
	switch *format {
	case "csv":
		err = rec.WriteCSV(&buf)
	case "priors":
		err = rec.WritePriorsCSV(&buf)
	default:
		err = rec.WriteJSON(&buf)
	}
	if err != nil {
		return fail(stderr, "export", err)
	}
	if *out == "" {
		_, err = stdout.Write(buf.Bytes())
	} else {
		err = os.WriteFile(*out, buf.Bytes(), 0o644)
	}
	if err != nil {
		return fail(stderr, "export", err)
	}
	return exitOK
}
