package main

import (
	"context"
	"crypto/ecdsa"
	"crypto/elliptic"
	"crypto/rand"
	"crypto/tls"
	"crypto/x509"
	"crypto/x509/pkix"
	"encoding/pem"
	"io"
	"math/big"
	"net"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

// selfSigned writes a certificate and key for 127.0.0.1 into dir and
// returns their paths and a pool that trusts the certificate.
func selfSigned(t *testing.T, dir string) (certPath, keyPath string, pool *x509.CertPool) {
	t.Helper()
	key, err := ecdsa.GenerateKey(elliptic.P256(), rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	tmpl := &x509.Certificate{
		SerialNumber:          big.NewInt(1),
		Subject:               pkix.Name{CommonName: "parley test"},
		NotBefore:             time.Now().Add(-time.Hour),
		NotAfter:              time.Now().Add(time.Hour),
		IPAddresses:           []net.IP{net.ParseIP("127.0.0.1")},
		KeyUsage:              x509.KeyUsageDigitalSignature,
		ExtKeyUsage:           []x509.ExtKeyUsage{x509.ExtKeyUsageServerAuth},
		BasicConstraintsValid: true,
	}
	der, err := x509.CreateCertificate(rand.Reader, tmpl, tmpl, &key.PublicKey, key)
	if err != nil {
		t.Fatal(err)
	}
	kder, err := x509.MarshalECPrivateKey(key)
	if err != nil {
		t.Fatal(err)
	}
	certPath, keyPath = filepath.Join(dir, "cert.pem"), filepath.Join(dir, "key.pem")
	if err := os.WriteFile(certPath, pem.EncodeToMemory(&pem.Block{Type: "CERTIFICATE", Bytes: der}), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(keyPath, pem.EncodeToMemory(&pem.Block{Type: "EC PRIVATE KEY", Bytes: kder}), 0o600); err != nil {
		t.Fatal(err)
	}
	cert, _ := x509.ParseCertificate(der)
	pool = x509.NewCertPool()
	pool.AddCert(cert)
	return certPath, keyPath, pool
}

var tlsSignInLine = regexp.MustCompile(`facilitator sign-in address \(works once; keep it private\): (https://[^ ]+)/signin#([A-Za-z0-9_-]{43})\n`)

// With --tls-cert/--tls-key the server speaks only TLS, prints https
// links, and the facilitator's session cookie is marked Secure.
func TestServeTLS(t *testing.T) {
	dir := t.TempDir()
	certPath, keyPath, pool := selfSigned(t, dir)
	base, out, _, stop := startServe(t, serveConfig{
		addr: "127.0.0.1:0", db: filepath.Join(dir, "parley.db"), noDemo: true,
		tlsCert: certPath, tlsKey: keyPath,
	})
	if !strings.HasPrefix(base, "https://") {
		t.Fatalf("base address %q is not https", base)
	}
	m := tlsSignInLine.FindStringSubmatch(out.String())
	if m == nil {
		t.Fatalf("no https sign-in address printed:\n%s", out)
	}

	c := &http.Client{
		Transport:     &http.Transport{TLSClientConfig: &tls.Config{RootCAs: pool}},
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse },
	}
	req, _ := http.NewRequest(http.MethodPost, base+"/signin", strings.NewReader(url.Values{"secret": {m[2]}}.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", base)
	res, err := c.Do(req)
	if err != nil {
		t.Fatalf("sign-in over TLS: %v", err)
	}
	io.Copy(io.Discard, res.Body)
	res.Body.Close()
	var session *http.Cookie
	for _, ck := range res.Cookies() {
		if ck.Name == "parley_session" {
			session = ck
		}
	}
	if session == nil {
		t.Fatalf("sign-in over TLS set no session cookie (status %d)", res.StatusCode)
	}
	if !session.Secure || !session.HttpOnly || session.SameSite != http.SameSiteStrictMode {
		t.Errorf("session cookie over TLS: Secure=%v HttpOnly=%v SameSite=%v; want all strict", session.Secure, session.HttpOnly, session.SameSite)
	}

	// Plain HTTP to the TLS port gets no page.
	plain := strings.Replace(base, "https://", "http://", 1)
	if res, err := http.Get(plain + "/signin"); err == nil {
		body, _ := io.ReadAll(res.Body)
		res.Body.Close()
		if res.StatusCode == http.StatusOK {
			t.Errorf("plain HTTP on the TLS port served a page: %s", body)
		}
	}
	if err := stop(); err != nil {
		t.Fatalf("graceful shutdown: %v", err)
	}
}

// TestServeRefusesABadCertificateBeforeItStarts: a missing or broken
// certificate or key is bad input naming its flag, and the server opens
// nothing and prints nothing: it said "serving at https://…", printed the
// one-time sign-in address (and, on a first start, the demo's expert
// links, shown once), then stopped with exit 1 and "open …: no such
// file or directory".
func TestServeRefusesABadCertificateBeforeItStarts(t *testing.T) {
	dir := t.TempDir()
	certPath, keyPath, _ := selfSigned(t, dir)
	broken := filepath.Join(dir, "broken.pem")
	if err := os.WriteFile(broken, []byte("not a certificate"), 0o600); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ cert, key, flag string }{
		{filepath.Join(dir, "missing.pem"), keyPath, "--tls-cert"},
		{certPath, filepath.Join(dir, "missing.key"), "--tls-key"},
		{broken, keyPath, "--tls-cert"},
		{certPath, broken, "--tls-key"},
		{keyPath, certPath, "--tls-"},
		{dir, keyPath, "--tls-cert"},
	} {
		dbPath := filepath.Join(t.TempDir(), "parley.db")
		ctx, cancel := context.WithCancel(context.Background())
		cancel() // a server that starts anyway stops at once
		var out, errOut syncBuffer
		err := serve(ctx, serveConfig{addr: "127.0.0.1:0", db: dbPath, tlsCert: c.cert, tlsKey: c.key}, &out, &errOut)
		if err == nil || fail(io.Discard, "serve", err) != exitBadInput || !strings.Contains(err.Error(), c.flag) {
			t.Errorf("--tls-cert %s --tls-key %s: %v; want bad input naming %s", c.cert, c.key, err, c.flag)
		}
		if out.String() != "" {
			t.Errorf("--tls-cert %s --tls-key %s printed:\n%s", c.cert, c.key, out.String())
		}
		if _, serr := os.Stat(dbPath); serr == nil {
			t.Errorf("--tls-cert %s --tls-key %s: the database was created", c.cert, c.key)
		}
	}
}
