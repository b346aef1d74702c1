package web

import (
	"context"
	"crypto/sha256"
	"io"
	"mime"
	"net/http"
	"net/url"
	"strings"
	"sync"
	"time"

	"github.com/a-h/templ"
)

// One form, sent twice, is saved once. A double click on a slow button,
// or a browser that sends a post again after a dropped connection, sends
// the same form twice; each copy used to be saved. For most forms that
// left a duplicate in the record (two agreed priors, two decisions of the
// same weights), but a batch of study data was counted twice in the
// posterior, and a second new link replaced the first.
//
// Every form that changes something carries a key of its own, new at
// each rendering (onceField). The first post of a key with given values
// runs; while it runs, a second post of the same key and values waits
// for it, and once it has sent the browser on (303 See Other) every later
// copy is sent to the same address without running again. A post that
// did not send the browser on (a refused form, a failure) is forgotten,
// so sending it again runs it again. Values that differ, such as a form
// corrected after going back, are a new post; and once another post to
// the same address is done, an earlier one is forgotten, so that values
// sent again after others (A, then B, then A again from a page kept by
// the back button) are saved, not taken for a retry of the first. A post without the key (a
// script, a page from before this version) runs as before. Keys are held
// in memory for onceLife; a restart forgets them.

// onceName is the hidden field carrying a form's key.
const onceName = "once"

const (
	// onceLife is how long a post that was done is remembered: a
	// browser's retry or a second click comes within seconds.
	onceLife = 10 * time.Minute
	// onceMax bounds the posts remembered at once. When it is reached
	// the post done longest ago is forgotten to make room (a retry comes
	// within seconds, so the oldest is the one least likely to be sent
	// again); only when every post held is still running is a new one
	// not remembered (and so may run twice), never refused.
	onceMax = 8192
)

// onceField is the hidden field every form that changes something
// carries, with a key new at each rendering.
func onceField() templ.Component {
	return templ.ComponentFunc(func(_ context.Context, w io.Writer) error {
		// crypto/rand does not fail on Linux; without a key the form
		// runs as a post without one.
		key, _ := randomKey()
		_, err := io.WriteString(w, `<input type="hidden" name="`+onceName+`" value="`+key+`"/>`)
		return err
	})
}

// sentOnce holds the posts that carried a form key.
type sentOnce struct {
	mu    sync.Mutex
	posts map[[sha256.Size]byte]*oncePost
	// last is the post last done at each address (at most one per post
	// held, so bounded as posts are).
	last map[string][sha256.Size]byte
}

type oncePost struct {
	done     chan struct{} // closed when the first copy has finished
	path     string        // the address posted to
	location string        // where it sent the browser; "" when it did not
	cookies  []string      // the confirmation it set with that (confirm_once.go)
	expires  time.Time     // set when done
}

func newSentOnce() *sentOnce {
	return &sentOnce{posts: map[[sha256.Size]byte]*oncePost{}, last: map[string][sha256.Size]byte{}}
}

// begin returns the post remembered under id, and first when this call
// made it (the caller runs the handler and calls end). remembered is
// false when no more posts can be held: the caller runs the handler and
// does not call end.
func (o *sentOnce) begin(id [sha256.Size]byte, path string, now time.Time) (p *oncePost, first, remembered bool) {
	o.mu.Lock()
	defer o.mu.Unlock()
	if p, ok := o.posts[id]; ok {
		if p.expires.IsZero() || now.Before(p.expires) {
			return p, false, true
		}
		o.forget(id, p)
	}
	if len(o.posts) >= onceMax {
		var (
			oldest    [sha256.Size]byte
			oldestP   *oncePost
			anyOldest bool
		)
		for k, p := range o.posts {
			switch {
			case p.expires.IsZero(): // still running
			case !now.Before(p.expires):
				o.forget(k, p)
			case !anyOldest || p.expires.Before(oldestP.expires):
				oldest, oldestP, anyOldest = k, p, true
			}
		}
		if len(o.posts) >= onceMax && anyOldest {
			o.forget(oldest, oldestP)
		}
		if len(o.posts) >= onceMax {
			return nil, true, false
		}
	}
	p = &oncePost{done: make(chan struct{}), path: path}
	o.posts[id] = p
	return p, true, true
}

// end records where the first copy sent the browser, or forgets the post
// when it sent it nowhere, and lets waiting copies go on.
func (o *sentOnce) end(id [sha256.Size]byte, p *oncePost, location string, cookies []string, now time.Time) {
	o.mu.Lock()
	if location == "" {
		delete(o.posts, id)
	} else {
		p.location, p.cookies, p.expires = location, cookies, now.Add(onceLife)
		if prev, ok := o.last[p.path]; ok && prev != id {
			if q, ok := o.posts[prev]; ok && !q.expires.IsZero() {
				delete(o.posts, prev)
			}
		}
		o.last[p.path] = id
	}
	o.mu.Unlock()
	close(p.done)
}

// forget drops a post that was done, and its address's note of it.
func (o *sentOnce) forget(id [sha256.Size]byte, p *oncePost) {
	delete(o.posts, id)
	if o.last[p.path] == id {
		delete(o.last, p.path)
	}
}

// onceID names a post: its address, its key and all its other values.
func onceID(r *http.Request, key string) [sha256.Size]byte {
	values := make(url.Values, len(r.PostForm))
	for k, v := range r.PostForm {
		if k != onceName {
			values[k] = v
		}
	}
	h := sha256.New()
	io.WriteString(h, r.URL.Path)
	h.Write([]byte{0})
	io.WriteString(h, key)
	h.Write([]byte{0})
	io.WriteString(h, values.Encode()) // sorted by name
	var id [sha256.Size]byte
	h.Sum(id[:0])
	return id
}

// sendOnce is the middleware of the forms that change something: a
// posted form with a key runs once (see above).
func (s *Server) sendOnce(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.Method != http.MethodPost || !urlEncoded(r) {
			next.ServeHTTP(w, r)
			return
		}
		if !parseForm(w, r) {
			return
		}
		key := r.PostForm.Get(onceName)
		if key == "" || len(key) > 64 {
			next.ServeHTTP(w, r)
			return
		}
		id := onceID(r, key)
		p, first, remembered := s.once.begin(id, r.URL.Path, s.now())
		if !remembered {
			next.ServeHTTP(w, r)
			return
		}
		if !first {
			select {
			case <-p.done:
			case <-r.Context().Done():
				return
			}
			if p.location != "" {
				// The copy that reaches the browser says what the
				// first said: the first's answer may have been dropped.
				for _, c := range p.cookies {
					w.Header().Add("Set-Cookie", c)
				}
				http.Redirect(w, r, p.location, http.StatusSeeOther)
				return
			}
			next.ServeHTTP(w, r)
			return
		}
		rw := &sentOnOrNot{ResponseWriter: w}
		defer func() { s.once.end(id, p, rw.location, rw.cookies, s.now()) }()
		next.ServeHTTP(rw, r)
	})
}

// urlEncoded says a request's body is a URL-encoded form, as every form
// that changes something sends (the answer sheet's upload, multipart,
// saves nothing: its confirmation has its own key, facilitator_sheet.go).
func urlEncoded(r *http.Request) bool {
	ct, _, err := mime.ParseMediaType(r.Header.Get("Content-Type"))
	return err == nil && ct == "application/x-www-form-urlencoded"
}

// sentOnOrNot notes where a handler sent the browser with 303 See Other,
// and the confirmation cookie it set with it.
type sentOnOrNot struct {
	http.ResponseWriter
	location string
	cookies  []string
}

func (w *sentOnOrNot) WriteHeader(code int) {
	if code == http.StatusSeeOther {
		w.location = w.Header().Get("Location")
		// Only the confirmation is said again to a second copy: any
		// other cookie a handler set is its first answer's alone.
		for _, c := range w.Header().Values("Set-Cookie") {
			if strings.HasPrefix(c, doneCookie+"=") {
				w.cookies = append(w.cookies, c)
			}
		}
	}
	w.ResponseWriter.WriteHeader(code)
}

func (w *sentOnOrNot) Unwrap() http.ResponseWriter { return w.ResponseWriter }
