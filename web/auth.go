package web

import (
	"context"
	"crypto/rand"
	"crypto/sha256"
	"encoding/base64"
	"errors"
	"fmt"
	"net/http"
	"time"

	"github.com/go-chi/chi/v5"
	"github.com/parley-elicit/parley/elicit/workshop"
	"golang.org/x/crypto/bcrypt"
)

// TokenBytes is the length of every secret Parley issues — the
// facilitator's secret, session tokens and experts' link tokens: 32
// random bytes (256 bits), written as unpadded base64url.
const TokenBytes = 32

// SessionLifetime is how long a facilitator stays signed in.
const sessionLifetime = 12 * time.Hour

const sessionCookie = "parley_session"

// bcryptCost is the work factor for the facilitator secret's hash. The
// secret has 256 bits, so the cost only guards a leaked database file.
var bcryptCost = bcrypt.DefaultCost

// newToken returns a fresh random token and the SHA-256 of its raw bytes,
// which is all that is stored.
func newToken() (token string, hash []byte, err error) {
	b := make([]byte, TokenBytes)
	if _, err := rand.Read(b); err != nil {
		return "", nil, fmt.Errorf("web: random token: %w", err)
	}
	sum := sha256.Sum256(b)
	return base64.RawURLEncoding.EncodeToString(b), sum[:], nil
}

// tokenLength is the length of a token as written: 32 bytes in unpadded
// base64 take 43 characters.
var tokenLength = base64.RawURLEncoding.EncodedLen(TokenBytes)

// tokenHash decodes a token and returns the SHA-256 of its raw bytes. A
// string that is not a Parley token gives ok false, so lookups of
// malformed tokens never reach the store. Each token has exactly one
// spelling: the decoder alone would also take other last characters
// (their unused low bits are ignored) and skip CR and LF anywhere, so the
// bytes must encode back to the very string given.
func tokenHash(token string) (hash []byte, ok bool) {
	if len(token) != tokenLength {
		return nil, false
	}
	b, err := base64.RawURLEncoding.Strict().DecodeString(token)
	if err != nil || len(b) != TokenBytes || base64.RawURLEncoding.EncodeToString(b) != token {
		return nil, false
	}
	sum := sha256.Sum256(b)
	return sum[:], true
}

// The facilitator's secret is a one-time password: the sign-in address
// that carries it signs one browser in once (for SessionLifetime), and is
// then spent. `parley serve` prints a new address at start when none is
// unspent; `parley facilitator-reset` prints one at any time.

// ResetFacilitatorSecret issues a new facilitator secret, stores only its
// bcrypt hash and ends every open session (for a secret that may have
// leaked). It returns the secret, which is shown once and never again.
func ResetFacilitatorSecret(ctx context.Context, st Store) (string, error) {
	return newFacilitatorSecret(ctx, st.SetFacilitatorHash)
}

// IssueFacilitatorSecret issues a new facilitator secret like
// ResetFacilitatorSecret, but leaves browsers already signed in signed
// in; an unspent earlier secret stops working.
func IssueFacilitatorSecret(ctx context.Context, st Store) (string, error) {
	return newFacilitatorSecret(ctx, st.IssueFacilitatorHash)
}

func newFacilitatorSecret(ctx context.Context, set func(context.Context, []byte) error) (string, error) {
	secret, _, err := newToken()
	if err != nil {
		return "", err
	}
	hash, err := bcrypt.GenerateFromPassword([]byte(secret), bcryptCost)
	if err != nil {
		return "", fmt.Errorf("web: hash facilitator secret: %w", err)
	}
	if err := set(ctx, hash); err != nil {
		return "", err
	}
	return secret, nil
}

// EnsureFacilitatorSecret issues a facilitator secret when the database
// has no unspent one (a new database, or the last sign-in address was
// used), leaving open sessions open. It returns the new secret, or ""
// when an unspent one exists (its value is unrecoverable; the address
// printed with it still works once, and facilitator-reset makes another).
func EnsureFacilitatorSecret(ctx context.Context, st Store) (string, error) {
	h, err := st.FacilitatorHash(ctx)
	if err != nil {
		return "", err
	}
	if len(h) > 0 {
		return "", nil
	}
	return IssueFacilitatorSecret(ctx, st)
}

// SignInPath returns the sign-in address for secret, which works once.
// The secret rides in the fragment, which browsers never send to a
// server or put in a Referer; the sign-in page's script moves it into the
// form, takes it out of the address bar and posts.
func SignInPath(secret string) string { return "/signin#" + secret }

// checkSecret compares a typed secret with the stored hash and returns
// the hash it matched, to be spent by UseFacilitatorHash; nil when it
// does not match or no secret is unspent.
func (s *Server) checkSecret(ctx context.Context, secret string) ([]byte, error) {
	h, err := s.store.FacilitatorHash(ctx)
	if err != nil || len(h) == 0 {
		return nil, err
	}
	err = bcrypt.CompareHashAndPassword(h, []byte(secret))
	if errors.Is(err, bcrypt.ErrMismatchedHashAndPassword) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	return h, nil
}

// startSession spends the secret whose stored hash is secretHash and, if
// it was still unspent, stores a new session and sets its cookie:
// HttpOnly, SameSite=Strict, Secure when serving TLS, with an expiry. It
// reports false when the secret was spent or replaced meanwhile.
func (s *Server) startSession(w http.ResponseWriter, r *http.Request, secretHash []byte) (bool, error) {
	token, hash, err := newToken()
	if err != nil {
		return false, err
	}
	now := s.now()
	expires := now.Add(sessionLifetime)
	ok, err := s.store.UseFacilitatorHash(r.Context(), secretHash, hash, expires, now)
	if !ok || err != nil {
		return false, err
	}
	http.SetCookie(w, &http.Cookie{
		Name:     sessionCookie,
		Value:    token,
		Path:     "/",
		Expires:  expires,
		MaxAge:   int(sessionLifetime / time.Second),
		HttpOnly: true,
		Secure:   s.opt.SecureCookies || r.TLS != nil,
		SameSite: http.SameSiteStrictMode,
	})
	return true, nil
}

func (s *Server) endSession(w http.ResponseWriter, r *http.Request) {
	http.SetCookie(w, &http.Cookie{
		Name: sessionCookie, Value: "", Path: "/", MaxAge: -1,
		HttpOnly: true, Secure: s.opt.SecureCookies || r.TLS != nil, SameSite: http.SameSiteStrictMode,
	})
}

// signedIn reports whether the request carries a valid facilitator session.
func (s *Server) signedIn(r *http.Request) (bool, error) {
	c, err := r.Cookie(sessionCookie)
	if err != nil {
		return false, nil
	}
	hash, ok := tokenHash(c.Value)
	if !ok {
		return false, nil
	}
	return s.store.SessionValid(r.Context(), hash, s.now())
}

// requireFacilitator lets signed-in facilitators through. Others are sent
// to the sign-in page (GET) or refused with 401 (anything else).
func (s *Server) requireFacilitator(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		ok, err := s.signedIn(r)
		if err != nil {
			s.fail(w, r, err)
			return
		}
		if ok {
			next.ServeHTTP(w, r.WithContext(context.WithValue(r.Context(), facilitatorKey{}, true)))
			return
		}
		if r.Method == http.MethodGet || r.Method == http.MethodHead {
			http.Redirect(w, r, "/signin", http.StatusSeeOther)
			return
		}
		s.renderPage(w, r, http.StatusUnauthorized, pageMeta{Title: "Sign in first"},
			messagePage("Sign in first", "This action needs the facilitator to be signed in. Nothing was saved."))
	})
}

type expertKey struct{}

// facilitatorKey marks a request requireFacilitator let through, so that
// the pages any handler may end on (a refusal, not found, a server error)
// keep the facilitator's menu: the refusal page had no way on but its
// one link back.
type facilitatorKey struct{}

// shell is the page shell of such a page titled title: with the
// facilitator's menu on a facilitator's request, bare of it on an
// expert's or a stranger's.
func shell(r *http.Request, title string) pageMeta {
	fac, _ := r.Context().Value(facilitatorKey{}).(bool)
	return pageMeta{Title: title, Facilitator: fac}
}

// expertFrom returns the expert whose private link the request came
// through. Only handlers mounted under /e/{token} may call it.
func expertFrom(ctx context.Context) workshop.Expert {
	e, _ := ctx.Value(expertKey{}).(workshop.Expert)
	return e
}

// requireExpert resolves the {token} in the path to its expert. Unknown,
// malformed and revoked tokens all get the same 404, which tells the
// person what to do without saying which of the three it was.
func (s *Server) requireExpert(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		hash, ok := tokenHash(chi.URLParam(r, "token"))
		if !ok {
			s.linkGone(w, r)
			return
		}
		e, err := s.store.ExpertByToken(r.Context(), hash)
		if errors.Is(err, workshop.ErrNotFound) || (err == nil && e.Revoked) {
			s.linkGone(w, r)
			return
		}
		if err != nil {
			s.fail(w, r, err)
			return
		}
		next.ServeHTTP(w, r.WithContext(context.WithValue(r.Context(), expertKey{}, e)))
	})
}

// expertPath is the private link of the expert holding token.
func expertPath(token string) string { return "/e/" + token + "/" }

// linkGone answers a private link that leads nowhere: mistyped, replaced
// by a new one, or ended.
func (s *Server) linkGone(w http.ResponseWriter, r *http.Request) {
	s.renderPage(w, r, http.StatusNotFound, pageMeta{Title: "This link does not work"},
		messagePage("This link does not work", "This private link does not open anything: it may have been mistyped, "+
			"replaced by a new one, or ended. Please ask the facilitator for your current link."))
}

// NewExpertToken makes a private link's token and the hash the store
// keeps, for tools and tests that add experts without the pages.
func NewExpertToken() (token string, hash []byte, err error) { return newToken() }
