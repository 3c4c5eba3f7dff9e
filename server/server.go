// Package server is fieldtab's HTTP side: the JSON API under /api/v1, pairing
// of phones and tablets, and (later) the field app's files. It is the only
// package that speaks HTTP; every figure it returns comes from schema's results,
// computed by measure.
package server

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net"
	"net/http"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/gorilla/mux"

	"fieldtab/schema"
)

// Server is the HTTP server over one store.
type Server struct {
	DB     *schema.DB
	Addr   string // listen address, host:port; ":0" picks a free port
	Logger *slog.Logger

	// Now is the clock for join codes and results, in the site's local time
	// zone: calibration is due on a calendar date there, not in UTC.
	Now func() time.Time

	// SignerDir holds the key and certificate reports are signed with
	// (report.LoadSignerDir); "" or missing files make signing answer 503.
	SignerDir string

	// lanAddrs are the host:port addresses where phones on the site network
	// reach this server (SetLANAddrs); join links use them.
	lanAddrs atomic.Pointer[[]string]
	joinNote atomic.Pointer[string] // why there is no join link, when the caller knows better (SetJoinNote)

	ln      net.Listener
	srv     *http.Server
	router  *mux.Router
	pairing *pairing

	// inflight counts write requests, so Close can wait for them to finish.
	inflight sync.WaitGroup

	// signing holds one mutex per job, so that signs of a job run one at a time.
	signMu  sync.Mutex
	signing map[string]*sync.Mutex
}

// maxBody bounds every request body; a readings batch of 500 fits well inside,
// and so does a report sign-off with its drawn signature (maxSignaturePNG).
const maxBody = 1 << 20

// New returns a server over db with its routes registered. Call Open to listen.
func New(db *schema.DB, addr string, logger *slog.Logger) *Server {
	if logger == nil {
		logger = slog.New(slog.DiscardHandler)
	}
	s := &Server{DB: db, Addr: addr, Logger: logger, Now: time.Now}
	s.pairing = newPairing(s.now)
	s.router = mux.NewRouter()
	s.router.NotFoundHandler = http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		// gorilla/mux reports a method mismatch as not found when a later route
		// shares the path prefix, so 405 is decided here.
		if allow := s.allowedMethods(r); len(allow) > 0 {
			w.Header().Set("Allow", strings.Join(allow, ", "))
			s.writeError(w, r, &httpError{status: http.StatusMethodNotAllowed, msg: "method not allowed; use " + strings.Join(allow, " or ")})
			return
		}
		s.writeError(w, r, schema.Errorf(schema.NotFound, "", "no such endpoint: %s %s", r.Method, r.URL.Path))
	})
	s.router.MethodNotAllowedHandler = http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		s.writeError(w, r, &httpError{status: http.StatusMethodNotAllowed, msg: "method not allowed"})
	})
	api := s.router.PathPrefix("/api/v1").Subrouter()
	s.registerHealthRoutes(api)
	s.registerPairingRoutes(api)
	s.registerRoutes(api)
	s.registerAppRoutes() // last: it takes every other GET path
	s.srv = &http.Server{
		Handler:           s.router,
		ReadHeaderTimeout: 10 * time.Second,
		ReadTimeout:       30 * time.Second,
		// Room for a large job's snapshot and, later, report generation.
		WriteTimeout: 120 * time.Second,
		IdleTimeout:  120 * time.Second,
		ErrorLog:     slog.NewLogLogger(logger.Handler(), slog.LevelWarn),
	}
	return s
}

func (s *Server) now() time.Time { return s.Now() }

// allowedMethods lists the methods that a route serves at r's path.
func (s *Server) allowedMethods(r *http.Request) []string {
	var allow []string
	for _, m := range []string{http.MethodGet, http.MethodPost, http.MethodPut, http.MethodDelete} {
		if m == r.Method {
			continue
		}
		probe := r.Clone(r.Context())
		probe.Method = m
		var match mux.RouteMatch
		if s.router.Match(probe, &match) && match.MatchErr == nil && match.Route != nil {
			allow = append(allow, m)
		}
	}
	return allow
}

// Handler returns the full handler stack, for httptest.
func (s *Server) Handler() http.Handler { return s.router }

// Open listens on Addr and serves in the background.
func (s *Server) Open() error {
	ln, err := net.Listen("tcp", s.Addr)
	if err != nil {
		return fmt.Errorf("listen on %s: %w", s.Addr, err)
	}
	s.ln = ln
	go func() {
		if err := s.srv.Serve(ln); err != nil && !errors.Is(err, http.ErrServerClosed) {
			s.Logger.Error("serve", "err", err)
		}
	}()
	return nil
}

// Port returns the port Open listens on.
func (s *Server) Port() int {
	if s.ln == nil {
		return 0
	}
	return s.ln.Addr().(*net.TCPAddr).Port
}

// Close stops accepting requests and waits, up to ctx's deadline, for those in
// flight to finish, so an acknowledged write is always committed.
func (s *Server) Close(ctx context.Context) error {
	err := s.srv.Shutdown(ctx)
	done := make(chan struct{})
	go func() { s.inflight.Wait(); close(done) }()
	select {
	case <-done:
	case <-ctx.Done():
		err = errors.Join(err, ctx.Err())
	}
	return err
}

func (s *Server) registerHealthRoutes(r *mux.Router) {
	r.HandleFunc("/health", s.handleHealth).Methods(http.MethodGet)
}

// handleHealth answers scripts and load balancers; it needs no token.
func (s *Server) handleHealth(w http.ResponseWriter, r *http.Request) {
	writeJSON(w, http.StatusOK, map[string]any{"status": "ok", "schema_version": schema.SchemaVersion(), "boot_id": s.DB.BootID()})
}
