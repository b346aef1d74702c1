package main

import (
	"context"
	"fmt"
	"io"

	"github.com/parley-elicit/parley/web"
)

func init() {
	command("facilitator-reset", "issue a new facilitator secret and print its sign-in address (--db, --addr)", runFacilitatorReset)
}

// runFacilitatorReset replaces the facilitator secret; open sessions end.
func runFacilitatorReset(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("facilitator-reset", stderr)
	dbPath := fs.String("db", "", "database `file`")
	addr := fs.String("addr", "127.0.0.1:8080", "`host:port` the server listens on, for the printed address")
	if err := fs.Parse(args); err != nil {
		return exitBadInput
	}
	db, err := openExisting(*dbPath)
	if err != nil {
		return fail(stderr, "facilitator-reset", err)
	}
	defer db.Close()
	secret, err := web.ResetFacilitatorSecret(context.Background(), db)
	if err != nil {
		return fail(stderr, "facilitator-reset", err)
	}
	fmt.Fprintln(stdout, "parley: new facilitator secret set; earlier sign-ins are ended.")
	fmt.Fprintf(stdout, "parley: facilitator sign-in (shown once, keep it private): http://%s%s\n", *addr, web.SignInPath(secret))
	return exitOK
}
