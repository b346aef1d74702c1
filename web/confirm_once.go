package web

import (
	"net/http"
	"slices"
	"strconv"
	"strings"
)

// A form that saved says so on the page it sends the browser to, once.
// The confirmation used to ride in that page's address (?done=corrected),
// so every reload of the page confirmed the save again. It now rides in a
// cookie for that page only, set with the redirect and cleared by the
// page that shows it: no script is needed, and a reload, or the page
// opened later, says nothing. A form sent twice (a double click, a
// browser's retry) is sent on with the same cookie (sendOnce).

// doneCookie carries what the form saved to the page it leads to.
const doneCookie = "parley_done"

// doneSaved confirms an answer saved, on its question's page: the
// expert's own, or the facilitator's entry page for the expert.
const doneSaved = "saved"

// doneSheetSaved confirms an answer sheet saved, on the workshop's
// overview, which names what the last sheet saved.
const doneSheetSaved = "sheet"

// sheetSavedConfirmation is doneSheetSaved with the number of the
// sheet's rows left out as unchanged, "sheet-3", which the overview says
// beside what was saved (the decision log names the rows saved only).
func sheetSavedConfirmation(unchanged int) string {
	if unchanged == 0 {
		return doneSheetSaved
	}
	return doneSheetSaved + "-" + strconv.Itoa(unchanged)
}

// sheetSavedOf reads a confirmation of sheetSavedConfirmation back: the
// number of rows left out as unchanged, and whether v is one. A value of
// any other shape is none; a count a client forged can at most misstate
// a count on its own page.
func sheetSavedOf(v string) (unchanged int, ok bool) {
	if v == doneSheetSaved {
		return 0, true
	}
	digits, ok := strings.CutPrefix(v, doneSheetSaved+"-")
	if !ok || digits == "" || len(digits) > 5 || strings.Trim(digits, "0123456789") != "" {
		return 0, false
	}
	n, err := strconv.Atoi(digits)
	return n, err == nil && n > 0
}

// doneDeleted confirms a workshop deleted, on the workshop list. Its
// cookie names the workshop: doneDeleted and the workshop's id
// (deletedConfirmation), which takeDeleted reads back.
const doneDeleted = "deleted-"

// doneLife bounds how long a confirmation waits for its page: the
// redirect is followed at once.
const doneLife = 60 // seconds

// confirmOnce sets the confirmation what for the page at path; the caller
// then redirects there.
func (s *Server) confirmOnce(w http.ResponseWriter, r *http.Request, path, what string) {
	http.SetCookie(w, &http.Cookie{
		Name: doneCookie, Value: what, Path: path, MaxAge: doneLife,
		HttpOnly: true, Secure: s.opt.SecureCookies || r.TLS != nil, SameSite: http.SameSiteStrictMode,
	})
}

// takeConfirmation returns the confirmation left for the page at path,
// if it is one of known, and clears it so that it is shown once; "" when
// there is none.
func (s *Server) takeConfirmation(w http.ResponseWriter, r *http.Request, path string, known ...string) string {
	return s.takeConfirmationIf(w, r, path, func(v string) bool { return slices.Contains(known, v) })
}

// deletedConfirmation is the confirmation of the workshop id deleted.
func deletedConfirmation(id int64) string { return doneDeleted + strconv.FormatInt(id, 10) }

// takeDeleted returns the id of the workshop whose deletion the workshop
// list is to confirm, 0 when there is none. A value of any other shape
// than doneDeleted and a positive id in digits is read as none; the list
// names the workshop from its own record of deletions, so a cookie a
// client forged can at most name a workshop that was deleted.
func (s *Server) takeDeleted(w http.ResponseWriter, r *http.Request) int64 {
	var id int64
	s.takeConfirmationIf(w, r, "/", func(v string) bool {
		digits, ok := strings.CutPrefix(v, doneDeleted)
		if !ok || digits == "" || strings.Trim(digits, "0123456789") != "" {
			return false
		}
		n, err := strconv.ParseInt(digits, 10, 64)
		if err != nil || n <= 0 {
			return false
		}
		id = n
		return true
	})
	return id
}

// takeConfirmationIf returns the confirmation left for the page at path
// if ok accepts it, and clears it; "" when there is none.
func (s *Server) takeConfirmationIf(w http.ResponseWriter, r *http.Request, path string, ok func(string) bool) string {
	c, err := r.Cookie(doneCookie)
	if err != nil {
		return ""
	}
	http.SetCookie(w, &http.Cookie{
		Name: doneCookie, Value: "", Path: path, MaxAge: -1,
		HttpOnly: true, Secure: s.opt.SecureCookies || r.TLS != nil, SameSite: http.SameSiteStrictMode,
	})
	if !ok(c.Value) {
		return ""
	}
	return c.Value
}
