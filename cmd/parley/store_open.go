package main

import (
	"io"
	"log/slog"

	"github.com/parley-elicit/parley/store"
)

// openStore is the one way a command opens a database for writing: with
// the command's log, so that the store's warnings (a workshop whose facts
// are stamped ahead of this machine's clock, store.DB.SetLogger) reach
// the command's own stderr in the form parley serve writes them. A
// database opened without one warned through Go's default log, in
// another form and past what the command's caller reads;
// TestEveryCommandOpensItsStoreWithItsLog holds every other call of
// store.Open in this package to this function.
func openStore(path string, log *slog.Logger) (*store.DB, error) {
	db, err := store.Open(path)
	if err != nil {
		return nil, err
	}
	db.SetLogger(log)
	return db, nil
}

// commandLog is a command's log: slog's text lines on its stderr, as
// parley serve writes its own.
func commandLog(stderr io.Writer) *slog.Logger {
	return slog.New(slog.NewTextHandler(stderr, nil))
}
