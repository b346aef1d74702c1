package web

import (
	"net/http"
	"strings"
)

func (s *Server) signInForm(w http.ResponseWriter, r *http.Request) {
	s.renderPage(w, r, http.StatusOK, PageMeta{Title: "Sign in", Scripts: []string{"/static/signin.js"}},
		signInPage(signInView{}))
}

// signIn checks the posted secret against the stored hash and starts a
// session. A wrong secret is 401 with the form again.
func (s *Server) signIn(w http.ResponseWriter, r *http.Request) {
	if !parseForm(w, r) {
		return
	}
	secret := strings.TrimSpace(r.PostForm.Get("secret"))
	ok := false
	// Only a string shaped like a Parley secret is worth a bcrypt comparison.
	if _, valid := tokenHash(secret); valid {
		var err error
		if ok, err = s.checkSecret(r.Context(), secret); err != nil {
			s.fail(w, r, err)
			return
		}
	}
	if !ok {
		s.renderPage(w, r, http.StatusUnauthorized, PageMeta{Title: "Sign in"}, signInPage(signInView{Failed: true}))
		return
	}
	if err := s.startSession(w, r); err != nil {
		s.fail(w, r, err)
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
