package web

import (
	"net/http"
	"strings"
)

// signInMeta is every sign-in page's shell. The script is on the refused
// page too, so an address pasted into that tab still signs in.
var signInMeta = pageMeta{Title: "Sign in", Scripts: []string{"/static/signin.js"}}

func (s *Server) signInForm(w http.ResponseWriter, r *http.Request) {
	s.renderPage(w, r, http.StatusOK, signInMeta, signInPage(signInView{}))
}

// signIn checks the posted secret against the stored hash and starts a
// session. A wrong secret is 401 with the form again; an attempt over the
// limits of signin_throttle.go is 429 and checks nothing.
func (s *Server) signIn(w http.ResponseWriter, r *http.Request) {
	if !parseForm(w, r) {
		return
	}
	if wait := s.signIns.admit(clientAddress(r), fromOwnMachine(r), s.now()); wait > 0 {
		s.tooManySignIns(w, r, wait)
		return
	}
	secret := strings.TrimSpace(r.PostForm.Get("secret"))
	ok := false
	// Only a string shaped like a Parley secret is worth a bcrypt comparison.
	if _, valid := tokenHash(secret); valid {
		var matched []byte
		err := s.signIns.compare(r.Context(), func() (err error) {
			matched, err = s.checkSecret(r.Context(), secret)
			return err
		})
		if err == nil && matched != nil {
			ok, err = s.startSession(w, r, matched)
		}
		if err != nil {
			s.fail(w, r, err)
			return
		}
	}
	if !ok {
		s.renderPage(w, r, http.StatusUnauthorized, signInMeta, signInPage(signInView{Failed: true}))
		return
	}
	http.Redirect(w, r, "/", http.StatusSeeOther)
}

// signOut ends the session in the store, so its token stops working even
// if a copy of the cookie survives, and clears the cookie.
func (s *Server) signOut(w http.ResponseWriter, r *http.Request) {
	if c, err := r.Cookie(sessionCookie); err == nil {
		if hash, ok := tokenHash(c.Value); ok {
			if err := s.store.EndSession(r.Context(), hash); err != nil {
				s.fail(w, r, err)
				return
			}
		}
	}
	s.endSession(w, r)
	http.Redirect(w, r, "/signin", http.StatusSeeOther)
}
