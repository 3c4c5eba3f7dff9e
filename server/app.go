package server

import (
	"net/http"
	"strings"

	"github.com/gorilla/mux"

	"fieldtab/webui"
)

// appCSP allows only the app's own files. Images may also be data: URLs, for
// the join-code QR the API returns as PNG bytes.
const appCSP = "default-src 'self'; img-src 'self' data:; object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'"

// registerAppRoutes serves the field app at / from webui's embedded files.
func (s *Server) registerAppRoutes() {
	files := http.FileServerFS(webui.Files())
	notAPI := func(r *http.Request, _ *mux.RouteMatch) bool { return !strings.HasPrefix(r.URL.Path, "/api/") }
	s.router.PathPrefix("/").Methods(http.MethodGet, http.MethodHead).MatcherFunc(notAPI).Handler(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h := w.Header()
		h.Set("Content-Security-Policy", appCSP)
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("Referrer-Policy", "no-referrer")
		// The service worker keeps its own copy for offline use; the browser
		// must ask again each time so a new fieldtab's app is picked up.
		h.Set("Cache-Control", "no-cache")
		if r.URL.Path == "/sw.js" {
			h.Set("Service-Worker-Allowed", "/")
		}
		if strings.HasSuffix(r.URL.Path, ".webmanifest") {
			h.Set("Content-Type", "application/manifest+json")
		}
		files.ServeHTTP(w, r)
	}))
}
