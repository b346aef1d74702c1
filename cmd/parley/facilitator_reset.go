package main

import (
	"context"
	"fmt"
	"io"
	"net"

	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

func init() {
	command("facilitator-reset", "issue a new one-time facilitator sign-in address; signs every browser out unless --keep-signed-in (--db, --addr or --base-url)", runFacilitatorReset)
}

// runFacilitatorReset replaces the facilitator secret: the new sign-in
// address works once, and any earlier unused one stops working. Open
// sessions end, unless --keep-signed-in (for signing in another browser).
func runFacilitatorReset(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("facilitator-reset", stderr)
	dbPath := fs.String("db", "", "database `file`")
	addr := fs.String("addr", "127.0.0.1:8080", "`host:port` the server listens on, for the printed address")
	base := fs.String("base-url", "", "the server's address as browsers reach it, e.g. https://192.168.1.20:8443 when it serves TLS (default: http:// and --addr)")
	keep := fs.Bool("keep-signed-in", false, "leave browsers already signed in signed in (default: sign them all out)")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	printed, err := checkBaseURL(*base)
	if err != nil {
		return fail(stderr, "facilitator-reset", err)
	}
	if printed == "" {
		// The address printed is the one serve prints for --addr.
		host, port, err := net.SplitHostPort(*addr)
		if ip := net.ParseIP(host); err == nil && (host == "" || (ip != nil && ip.IsUnspecified())) {
			host = "127.0.0.1"
		}
		if err == nil {
			printed, err = checkBaseURL("http://" + net.JoinHostPort(host, port))
		}
		if err != nil || port == "" {
			return fail(stderr, "facilitator-reset", badInput("addr", "must be host:port as given to parley serve, such as 127.0.0.1:8080, got %q", *addr))
		}
	}
	// The secret is written: a file that cannot be written is said as
	// serve says it, not as SQLite's "attempt to write a readonly database".
	if *dbPath != "" && existingDatabase(*dbPath) == nil {
		if err := store.CheckWritable(*dbPath); err != nil {
			return fail(stderr, "facilitator-reset", err)
		}
	}
	db, err := openExisting(*dbPath, commandLog(stderr))
	if err != nil {
		return fail(stderr, "facilitator-reset", err)
	}
	defer db.Close()
	issue, ended := web.ResetFacilitatorSecret, "browsers signed in before are signed out"
	if *keep {
		issue, ended = web.IssueFacilitatorSecret, "browsers already signed in stay signed in"
	}
	secret, err := issue(context.Background(), db)
	if err != nil {
		return fail(stderr, "facilitator-reset", err)
	}
	fmt.Fprintf(stdout, "parley: new facilitator secret set; any earlier sign-in address stops working, and %s.\n", ended)
	fmt.Fprintf(stdout, "parley: facilitator sign-in address (works once; keep it private): %s%s\n", printed, web.SignInPath(secret))
	return exitOK
}
