package main

import (
	"context"
	"crypto/tls"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"net/url"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/store"
	"github.com/parley-elicit/parley/web"
)

func init() {
	command("serve", "run the workshop server (--addr, --db, --no-demo, --tls-cert, --tls-key, --base-url, --expert-save-burst, --expert-page-burst); the default command", runServe)
}

// serveConfig is what `parley serve` was asked to do.
type serveConfig struct {
	addr, db, baseURL string
	noDemo            bool
	// saveBurst is how many answers one expert link may save at once
	// before its saves are paced (web.Options.SaveBurst).
	saveBurst int
	// pageBurst is how many pages one expert link may open at once
	// before its pages are paced (web.Options.PageBurst).
	pageBurst       int
	tlsCert, tlsKey string
	// grace is how long a shutdown waits for requests in flight
	// (shutdownGrace when zero).
	grace time.Duration
}

// shutdownGrace is how long a shutdown waits for requests in flight:
// saves and pages finish in milliseconds, a body still arriving from a
// slow phone in a few seconds.
const shutdownGrace = 15 * time.Second

func runServe(args []string, _ io.Reader, stdout, stderr io.Writer) int {
	fs := newFlags("serve", stderr)
	var c serveConfig
	fs.StringVar(&c.addr, "addr", "127.0.0.1:8080", "`host:port` to listen on; anything but loopback prints a warning")
	fs.StringVar(&c.db, "db", "parley.db", "SQLite database `file`, created if missing")
	fs.BoolVar(&c.noDemo, "no-demo", false, "do not create the invented demo workshop in an empty database")
	fs.StringVar(&c.tlsCert, "tls-cert", "", "TLS certificate `file` (with --tls-key)")
	fs.StringVar(&c.tlsKey, "tls-key", "", "TLS private key `file` (with --tls-cert)")
	fs.StringVar(&c.baseURL, "base-url", "", "address printed in links handed out, e.g. http://192.168.1.20:8080 (default: from --addr)")
	fs.IntVar(&c.saveBurst, "expert-save-burst", web.SaveBurst, "answers one expert link may save at once; further saves from that link are taken at one a second")
	fs.IntVar(&c.pageBurst, "expert-page-burst", web.PageBurst, "pages one expert link may open at once; further pages from that link are shown at four a second")
	if code, ok := parseArgs(fs, args, stdout, stderr); !ok {
		return code
	}
	if fs.NArg() > 0 {
		return fail(stderr, "serve", badInput("addr", "unexpected argument %q", fs.Arg(0)))
	}
	if c.saveBurst < 1 {
		return fail(stderr, "serve", badInput("expert-save-burst", "must be a whole number of at least 1, not %d", c.saveBurst))
	}
	if c.pageBurst < 1 {
		return fail(stderr, "serve", badInput("expert-page-burst", "must be a whole number of at least 1, not %d", c.pageBurst))
	}
	if (c.tlsCert == "") != (c.tlsKey == "") {
		return fail(stderr, "serve", badInput("tls-cert", "--tls-cert and --tls-key go together"))
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	if err := serve(ctx, c, stdout, stderr); err != nil {
		return fail(stderr, "serve", err)
	}
	return exitOK
}

// serve runs the server until ctx ends, then shuts down gracefully: stop
// accepting, let in-flight requests finish (up to 15 s), close the DB.
func serve(ctx context.Context, c serveConfig, stdout, stderr io.Writer) error {
	host, port, err := net.SplitHostPort(c.addr)
	if err != nil {
		return badInput("addr", "%v", err)
	}
	// Digits only: net.Listen also takes a service's name ("http") and
	// forms such as "+80", and an empty port as any free one.
	if n, err := strconv.Atoi(port); err != nil || n < 0 || n > 65535 || strings.TrimLeft(port, "0123456789") != "" {
		return badInput("addr", "the port must be a number from 0 to 65535 (0: any free port), got %q", port)
	}
	baseURL, err := checkBaseURL(c.baseURL)
	if err != nil {
		return err
	}
	// The certificate is read before anything is opened or printed: read
	// by ServeTLS, a missing or broken one stopped the server after it
	// had said "serving at" and printed the one-time sign-in address and
	// the demo's expert links, which are shown once.
	var tlsConfig *tls.Config
	if c.tlsCert != "" {
		cert, err := loadKeyPair(c.tlsCert, c.tlsKey)
		if err != nil {
			return err
		}
		tlsConfig = &tls.Config{Certificates: []tls.Certificate{cert}}
	}
	dbPath, err := filepath.Abs(c.db)
	if err != nil {
		return badInput("db", "%v", err)
	}
	if fi, err := os.Stat(dbPath); err == nil && fi.IsDir() {
		return badInput("db", "%s is a folder; name the database file in it (a new one is created)", c.db)
	}
	// Before anything is opened: the file must be writable (or the first
	// save would be the first to find out), and no other server may be
	// serving it (each would serve rows the other changed).
	if err := store.CheckWritable(dbPath); err != nil {
		return err
	}
	claim, err := store.ClaimServing(dbPath)
	if err != nil {
		return err
	}
	defer claim.Release()
	if _, err := os.Stat(dbPath); err == nil {
		if err := notAnothersDatabase(c.db); err != nil {
			return err
		}
	}
	// The address is bound after the database is claimed (a second start
	// on the same file and address is told the file is being served, not
	// to change its port) and before the database is opened, so that an
	// address this machine cannot listen on (a host it does not have, a
	// port in use) leaves no new database behind, and before a new secret
	// is issued: a port in use had stopped the server after it issued a
	// secret it never printed, and the next start said that "the sign-in
	// address printed earlier is still unused". Nothing is served until
	// the secret exists (hs.Serve, below), so a non-loopback address is
	// never served without one.
	ln, err := net.Listen(listenNetwork(host), c.addr)
	if err != nil {
		return fmt.Errorf("--addr %s: %w (give another host:port with --addr)", c.addr, err)
	}
	defer ln.Close() // closed by the server's shutdown once served
	// The server's log: its requests' failures, and the store's warning
	// of a workshop stamped ahead of this machine's clock.
	logger := commandLog(stderr)
	db, err := openStore(dbPath, logger)
	if err != nil {
		return notADatabase(c.db, err)
	}
	defer db.Close()
	fmt.Fprintf(stdout, "parley: database %s\n", dbPath)
	if _, err := db.PurgeSessions(ctx, time.Now()); err != nil {
		return err
	}
	// Revisions saved before fits were kept are fitted once, now.
	if n, err := db.KeepMissingFits(ctx, workshop.Question.Fit); err != nil {
		return err
	} else if n > 0 {
		fmt.Fprintf(stdout, "parley: kept the fits of %d earlier revisions\n", n)
	}

	secret, err := web.EnsureFacilitatorSecret(ctx, db)
	if err != nil {
		return err
	}
	if h, err := db.FacilitatorHash(ctx); err != nil || len(h) == 0 {
		return fmt.Errorf("no facilitator secret is set, so Parley will not serve (%v)", err)
	}
	scheme := "http"
	if c.tlsCert != "" {
		scheme = "https"
	}
	base := baseURL
	if base == "" {
		base = scheme + "://" + printableAddr(host, ln.Addr())
	}
	if !isLoopback(host) {
		fmt.Fprintf(stderr, "parley: WARNING: listening on %s, reachable from other machines on the network. "+
			"Only the facilitator (signed in) and holders of private expert links can use it; prefer --tls-cert/--tls-key.\n", listening(ln.Addr()))
		if ip := net.ParseIP(host); baseURL == "" && (host == "" || (ip != nil && ip.IsUnspecified())) {
			fmt.Fprintln(stderr, "parley: links are printed for 127.0.0.1; pass --base-url http://THIS-MACHINE'S-ADDRESS:PORT so experts' links work on their own devices.")
		}
	}

	srv, err := web.New(db, web.Options{
		BaseURL:       base,
		Logger:        logger,
		SecureCookies: c.tlsCert != "",
		SaveBurst:     c.saveBurst,
		PageBurst:     c.pageBurst,
	})
	if err != nil {
		return err
	}
	if !c.noDemo {
		links, err := web.SeedDemo(ctx, db)
		if err != nil {
			return err
		}
		if links != nil {
			fmt.Fprintln(stdout, "parley: created the invented demo workshop; its experts' private links (shown once):")
			for _, l := range links {
				fmt.Fprintf(stdout, "  %-16s %s%s\n", l.Name, base, l.Path)
			}
		}
	}
	fmt.Fprintf(stdout, "parley: serving at %s/\n", base)
	if secret != "" {
		fmt.Fprintf(stdout, "parley: facilitator sign-in address (works once; keep it private): %s%s\n", base, web.SignInPath(secret))
	} else {
		fmt.Fprintf(stdout, "parley: facilitator sign-in at %s/signin: the sign-in address printed earlier is still unused and works once "+
			"(lost it? parley facilitator-reset --db %s --keep-signed-in --base-url %s)\n", base, shellWord(dbPath), base)
	}

	hs := &http.Server{
		TLSConfig:         tlsConfig,
		Handler:           srv.Handler(),
		ReadHeaderTimeout: 10 * time.Second,
		ReadTimeout:       30 * time.Second,
		WriteTimeout:      60 * time.Second,
		IdleTimeout:       120 * time.Second,
		MaxHeaderBytes:    32 << 10,
	}
	// Live event streams are requests that never finish on their own; a
	// graceful shutdown ends them first rather than wait for them.
	hs.RegisterOnShutdown(srv.EndStreams)
	// Commits are folded from the journal into the file every few
	// seconds, so that a copy of the file alone (cp, which the README
	// warns against) misses at most the last few seconds' work.
	folding, stopFolding := context.WithCancel(context.Background())
	defer stopFolding()
	go foldJournal(folding, db, foldEvery, stderr)
	errc := make(chan error, 1)
	go func() {
		if c.tlsCert != "" {
			errc <- hs.ServeTLS(ln, "", "") // the pair loaded at start
		} else {
			errc <- hs.Serve(ln)
		}
	}()
	select {
	case err := <-errc:
		return err
	case <-ctx.Done():
	}
	fmt.Fprintln(stdout, "parley: shutting down")
	grace := c.grace
	if grace <= 0 {
		grace = shutdownGrace
	}
	sctx, cancel := context.WithTimeout(context.Background(), grace)
	defer cancel()
	err = hs.Shutdown(sctx)
	if errors.Is(err, context.DeadlineExceeded) {
		// A client that stopped sending mid-request (a phone that left
		// the Wi-Fi) would hold the server open, and the stop would end
		// in a bare "context deadline exceeded". Its connection is
		// closed instead: a request whose body never came saved nothing.
		fmt.Fprintf(stdout, "parley: closed the connections still open after %v (requests not finished by their clients)\n", grace)
		err = hs.Close()
	}
	if e := <-errc; !errors.Is(e, http.ErrServerClosed) && err == nil {
		err = e
	}
	return err
}

// loadKeyPair reads the TLS certificate and key, naming the flag whose
// file is missing or unreadable, or, for a pair that does not make a
// key pair, the flag the error concerns.
func loadKeyPair(certFile, keyFile string) (tls.Certificate, error) {
	certPEM, err := os.ReadFile(certFile)
	if err != nil {
		return tls.Certificate{}, badInput("tls-cert", "%v", err)
	}
	keyPEM, err := os.ReadFile(keyFile)
	if err != nil {
		return tls.Certificate{}, badInput("tls-key", "%v", err)
	}
	cert, err := tls.X509KeyPair(certPEM, keyPEM)
	if err != nil {
		flag := "tls-cert"
		if strings.Contains(err.Error(), "key input") || strings.Contains(err.Error(), "private key") {
			flag = "tls-key"
		}
		return tls.Certificate{}, badInput(flag, "%s and %s make no TLS key pair: %v", certFile, keyFile, err)
	}
	return cert, nil
}

// checkBaseURL reads --base-url: "" (links from --addr), or http:// or
// https:// with a host and nothing after it but a closing slash, given
// back as scheme://host. Every printed link is the base and a path that
// starts with "/": a base typed with its closing slash printed each
// expert's link and the one-time sign-in address with "//" in them.
func checkBaseURL(raw string) (string, error) {
	if raw == "" {
		return "", nil
	}
	u, err := url.Parse(raw)
	if err != nil || (u.Scheme != "http" && u.Scheme != "https") || u.Host == "" || u.User != nil ||
		strings.Trim(u.Path, "/") != "" || u.RawQuery != "" || u.Fragment != "" || u.ForceQuery || strings.HasSuffix(raw, "#") {
		return "", badInput("base-url", "must be http:// or https:// with a host and port and nothing after them, got %q", raw)
	}
	// The port may be left out (the scheme's own, as behind a proxy); one
	// given must be one a browser can reach.
	if n, err := strconv.Atoi(u.Port()); u.Port() != "" && (err != nil || n < 1 || n > 65535) {
		return "", badInput("base-url", "the port must be a number from 1 to 65535, got %q in %q", u.Port(), raw)
	}
	return u.Scheme + "://" + u.Host, nil
}

// listenNetwork is the network to listen on for host: an IPv4 address,
// 0.0.0.0 included, means IPv4 only ("tcp4"; plain "tcp" would make
// 0.0.0.0 listen on every IPv6 address too), an IPv6 address IPv6 only;
// a name or no host leaves the choice to the system.
func listenNetwork(host string) string {
	ip := net.ParseIP(host)
	switch {
	case ip == nil:
		return "tcp"
	case ip.To4() != nil:
		return "tcp4"
	}
	return "tcp6"
}

// listening describes a listener's address for the start-up warning,
// saying in words what a wildcard address covers.
func listening(a net.Addr) string {
	host, _, err := net.SplitHostPort(a.String())
	if err != nil {
		return a.String()
	}
	ip := net.ParseIP(host)
	switch {
	case ip == nil || !ip.IsUnspecified():
		return a.String()
	case ip.To4() != nil:
		return a.String() + " (every IPv4 address of this machine)"
	}
	return a.String() + " (every IPv6 address of this machine, and IPv4 where the system maps it)"
}

// isLoopback reports whether host names only this machine.
func isLoopback(host string) bool {
	if host == "localhost" {
		return true
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback()
}

// printableAddr is the address to print for a listener: the wildcard
// host is shown as 127.0.0.1, which works from this machine.
func printableAddr(host string, a net.Addr) string {
	_, port, err := net.SplitHostPort(a.String())
	if err != nil {
		return a.String()
	}
	ip := net.ParseIP(host)
	if host == "" || (ip != nil && ip.IsUnspecified()) {
		host = "127.0.0.1"
	}
	return net.JoinHostPort(host, port)
}

// shellWord writes s as one word a POSIX shell reads back as s: as it
// is when it holds only letters, digits and _ . / - : + , @ %, else in
// single quotes, a quote mark inside closing them, escaped and opening
// them again. The command serve suggests for a lost sign-in address
// named a database in "My workshops" unquoted, which a copy and paste
// split at the space.
func shellWord(s string) string {
	plain := s != ""
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("_./-:+,@%", r)) {
			plain = false
			break
		}
	}
	if plain {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

// foldEvery is how often serve folds the journal into the database file.
var foldEvery = 5 * time.Second

// foldJournal calls db.FoldJournal every interval until ctx ends; a
// failure is logged and tried again at the next tick (the commits stay
// safe in the journal meanwhile).
func foldJournal(ctx context.Context, db *store.DB, interval time.Duration, stderr io.Writer) {
	t := time.NewTicker(interval)
	defer t.Stop()
	for {
		select {
		case <-ctx.Done():
			return
		case <-t.C:
			if err := db.FoldJournal(ctx); err != nil && ctx.Err() == nil {
				fmt.Fprintf(stderr, "parley: %v (the commits stay in the journal; tried again in %s)\n", err, interval)
			}
		}
	}
}
