package web

import (
	"embed"
	"net/http"

	"github.com/go-chi/chi/v5"
)

// static holds every file in web/static: stylesheets, the chart styles
// and the small same-origin scripts.
//
//go:embed static
var static embed.FS

// routes builds the whole URL space.
//
//	GET  /static/*            embedded assets, by name (no listings)
//	GET  /signin              sign-in form (the sign-in address, good once, carries the secret in #fragment)
//	POST /signin              check the secret (throttled), spend it, start a session
//	POST /signout             end the session
//	/e/{token}/...            an expert's private pages (expert.go), token resolved by requireExpert
//	everything else           the facilitator's pages (facilitator*.go), behind requireFacilitator
func (s *Server) routes() http.Handler {
	r := chi.NewRouter()
	r.Use(s.recoverPanics, securityHeaders, limitBody, crossOrigin)
	r.NotFound(s.notFound)
	r.MethodNotAllowed(func(w http.ResponseWriter, r *http.Request) {
		s.renderPage(w, r, http.StatusMethodNotAllowed, pageMeta{Title: "Not allowed"},
			messagePage("Not allowed", "This address does not accept that kind of request. Changes are only made by the forms on Parley's pages."))
	})

	r.Handle("/static/*", http.StripPrefix("/static/", http.HandlerFunc(s.serveAsset))) // static_assets.go

	r.Get("/signin", s.signInForm)
	r.Post("/signin", s.signIn)
	r.Post("/signout", s.signOut)

	r.Route("/e/{token}", func(r chi.Router) {
		r.Use(s.requireExpert, s.sendOnce)
		s.expertRoutes(r) // expert.go
	})

	// The live stream answers 404 to anyone but the signed-in facilitator.
	r.With(s.requireFacilitatorStream).Get("/w/{workshop}/events", s.liveEvents)

	r.Group(func(r chi.Router) {
		r.Use(s.requireFacilitator, s.sendOnce)
		s.facilitatorRoutes(r)
	})
	return r
}
