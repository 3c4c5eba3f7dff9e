package server

import (
	"context"
	"fmt"
	"net"
	"net/http"
	"slices"
	"strings"
	"sync"
	"time"

	"github.com/gorilla/mux"
	"github.com/skip2/go-qrcode"

	"fieldtab/schema"
)

type ctxKey int

const deviceKey ctxKey = iota

// withDevice authenticates the bearer token and puts the device in the request
// context; without a valid token the answer is 401 and the handler never runs.
func (s *Server) withDevice(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		// The scheme is case-insensitive (RFC 9110 §11.1).
		h := r.Header.Get("Authorization")
		ok := len(h) > len("Bearer ") && strings.EqualFold(h[:len("Bearer ")], "Bearer ")
		token := ""
		if ok {
			token = h[len("Bearer "):]
		}
		if !ok || strings.TrimSpace(token) == "" {
			s.writeError(w, r, schema.Errorf(schema.Unauthorized, "", "a device token is required: pair this device with a join code"))
			return
		}
		d, err := s.DB.DeviceByToken(r.Context(), strings.TrimSpace(token))
		if err != nil {
			s.writeError(w, r, err)
			return
		}
		next.ServeHTTP(w, r.WithContext(context.WithValue(r.Context(), deviceKey, d)))
	})
}

// leadOnly refuses a technician's device with 403.
func (s *Server) leadOnly(h http.HandlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		if deviceOf(r).Role != schema.RoleLead {
			s.writeError(w, r, schema.Errorf(schema.Forbidden, "", "only a lead's device may do this"))
			return
		}
		h(w, r)
	}
}

// writing counts a write request in flight so that a graceful shutdown waits
// for it to commit and answer.
func (s *Server) writing(h http.HandlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		s.inflight.Add(1)
		defer s.inflight.Done()
		h(w, r)
	}
}

func deviceOf(r *http.Request) schema.Device {
	d, _ := r.Context().Value(deviceKey).(schema.Device)
	return d
}

func actorOf(r *http.Request) schema.Actor {
	d := deviceOf(r)
	return schema.Actor{DeviceID: d.ID, Name: d.Name, Role: d.Role}
}

// Join codes are made and kept by the store (schema.CreateJoinCode), so that
// `fieldtab join-code` can make one beside a running server. Wrong guesses are
// limited here, per client (per address, per /64 for IPv6). There is no limit
// across clients: one would let any device on the network lock the whole crew
// out, and 31^8 codes behind 5 guesses a minute per client leave no guessing
// chance worth the name.
const (
	joinCodeTTL      = schema.JoinCodeTTL
	guessWindow      = time.Minute
	guessesPerClient = 5
)

// pairing counts wrong join codes per client, in memory: a restart forgets
// them, which gives a guesser little more than waiting a minute does.
type pairing struct {
	mu       sync.Mutex
	now      func() time.Time
	failures map[string][]time.Time // by client
}

func newPairing(now func() time.Time) *pairing {
	return &pairing{now: now, failures: map[string][]time.Time{}}
}

// NewJoinCode makes a join code for role, valid for joinCodeTTL by the
// server's clock, and returns it formatted for reading aloud ("ABCD-EFGH")
// with its expiry.
func (s *Server) NewJoinCode(role string) (string, time.Time, error) {
	return s.DB.CreateJoinCode(context.Background(), schema.Actor{Name: "server", Role: schema.RoleLead}, role, s.now())
}

// attempt counts a pairing attempt against client before its code is
// checked, so that guesses sent in parallel cannot slip past the limit, or
// answers 429 when client has guessed wrong too often lately. Call forget
// when the code turned out right (or was never looked at).
func (p *pairing) attempt(client string) (forget func(), err error) {
	p.mu.Lock()
	defer p.mu.Unlock()
	now := p.now()
	if p.tooMany(client, now) {
		return nil, &httpError{status: http.StatusTooManyRequests, field: "code",
			msg: "too many wrong join codes; wait a minute and ask the lead for the current code"}
	}
	p.failures[client] = append(p.failures[client], now)
	return func() {
		p.mu.Lock()
		defer p.mu.Unlock()
		ts := p.failures[client]
		if i := slices.IndexFunc(ts, now.Equal); i >= 0 {
			p.failures[client] = slices.Delete(ts, i, i+1)
		}
	}, nil
}

func (p *pairing) tooMany(client string, now time.Time) bool {
	recent := func(key string) int {
		ts := p.failures[key]
		kept := ts[:0]
		for _, t := range ts {
			if now.Sub(t) < guessWindow {
				kept = append(kept, t)
			}
		}
		if len(kept) == 0 {
			delete(p.failures, key)
		} else {
			p.failures[key] = kept
		}
		return len(kept)
	}
	return recent(client) >= guessesPerClient
}

// guessClient is the key wrong guesses are counted under: the address, or its
// /64 for IPv6, where one device can use many addresses of its network.
func guessClient(host string) string {
	ip := net.ParseIP(host)
	if ip == nil || ip.To4() != nil {
		return host
	}
	return ip.Mask(net.CIDRMask(64, 128)).String() + "/64"
}

func (s *Server) registerPairingRoutes(r *mux.Router) {
	r.HandleFunc("/pair", s.writing(s.handlePair)).Methods(http.MethodPost)
	authed := r.NewRoute().Subrouter()
	authed.Use(s.withDevice)
	authed.HandleFunc("/join-codes", s.leadOnly(s.handleJoinCodeCreate)).Methods(http.MethodPost)
	authed.HandleFunc("/devices", s.leadOnly(s.handleDeviceList)).Methods(http.MethodGet)
	authed.HandleFunc("/devices/{id}/revoke", s.writing(s.leadOnly(s.handleDeviceRevoke))).Methods(http.MethodPost)
	authed.HandleFunc("/me", s.handleMe).Methods(http.MethodGet)
}

type pairRequest struct {
	Code string `json:"code"`
	Name string `json:"name"`
}

// handlePair exchanges a join code for a device token, shown this once.
func (s *Server) handlePair(w http.ResponseWriter, r *http.Request) {
	var req pairRequest
	if err := decodeJSON(w, r, &req); err != nil {
		s.writeError(w, r, err)
		return
	}
	host, _, err := net.SplitHostPort(r.RemoteAddr)
	if err != nil {
		host = r.RemoteAddr
	}
	forget, err := s.pairing.attempt(guessClient(host))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	d, token, err := s.DB.PairDevice(r.Context(), req.Code, req.Name, s.now())
	if schema.ErrorCode(err) != schema.Unauthorized {
		forget() // only a wrong code counts as a guess
	}
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusCreated, map[string]any{"token": token, "device": d})
}

type joinCodeRequest struct {
	Role string `json:"role"`
}

func (s *Server) handleJoinCodeCreate(w http.ResponseWriter, r *http.Request) {
	var req joinCodeRequest
	if err := decodeJSON(w, r, &req); err != nil {
		s.writeError(w, r, err)
		return
	}
	code, expires, err := s.DB.CreateJoinCode(r.Context(), actorOf(r), req.Role, s.now())
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	// The lead's screen shows the code and a QR code of an address the crew's
	// phones can reach: never this browser's own localhost.
	urls, note := JoinURLs(r.Host, s.LANAddrs())
	out := map[string]any{"code": code, "role": req.Role, "expires_at": expires, "join_urls": []string{}}
	if len(urls) == 0 {
		out["join_url"], out["join_url_note"] = "", s.joinNoteOr(note)
		writeJSON(w, http.StatusCreated, out)
		return
	}
	links := make([]string, len(urls))
	for i, u := range urls {
		links[i] = JoinLink(u, code)
	}
	png, err := qrcode.Encode(links[0], qrcode.Medium, 256)
	if err != nil {
		s.writeError(w, r, fmt.Errorf("join code QR: %w", err))
		return
	}
	out["join_url"], out["join_urls"], out["qr_png"] = links[0], links, png
	writeJSON(w, http.StatusCreated, out)
}

func (s *Server) handleDeviceList(w http.ResponseWriter, r *http.Request) {
	ds, err := s.DB.Devices(r.Context())
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, map[string]any{"devices": ds})
}

func (s *Server) handleDeviceRevoke(w http.ResponseWriter, r *http.Request) {
	if err := s.DB.RevokeDevice(r.Context(), actorOf(r), mux.Vars(r)["id"]); err != nil {
		s.writeError(w, r, err)
		return
	}
	w.WriteHeader(http.StatusNoContent)
}

func (s *Server) handleMe(w http.ResponseWriter, r *http.Request) {
	writeJSON(w, http.StatusOK, map[string]any{"device": deviceOf(r)})
}
