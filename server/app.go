package server

import (
	"crypto/sha256"
	"encoding/hex"
	"io/fs"
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
	etags := appETags(webui.Files())
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
		// Embedded files carry no dates; a content hash lets a phone without
		// the service worker (plain http on a LAN) revalidate instead of
		// downloading the whole app on every load.
		name := strings.TrimPrefix(r.URL.Path, "/")
		if name == "" {
			name = "index.html"
		}
		if tag, ok := etags[name]; ok {
			h.Set("ETag", tag)
		}
		if r.URL.Path == "/sw.js" {
			h.Set("Service-Worker-Allowed", "/")
		}
		if strings.HasSuffix(r.URL.Path, ".webmanifest") {
			h.Set("Content-Type", "application/manifest+json")
		}
		files.ServeHTTP(w, r)
	}))
}

// appETags returns a strong ETag for every file of the app, by path.
func appETags(files fs.FS) map[string]string {
	tags := map[string]string{}
	_ = fs.WalkDir(files, ".", func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := fs.ReadFile(files, path)
		if err != nil {
			return err
		}
		sum := sha256.Sum256(b)
		tags[path] = `"` + hex.EncodeToString(sum[:12]) + `"`
		return nil
	})
	return tags
}
