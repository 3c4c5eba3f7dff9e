package server

import (
	"context"
	"crypto/rand"
	"fmt"
	"net"
	"net/http"
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

// Join codes: short, typed or scanned once per device, valid for joinCodeTTL.
// A technician code may be used by the whole crew until it expires; a lead code
// is used once. Wrong guesses are limited per client (per address, per /64 for
// IPv6). There is no limit across clients: one would let any device on the
// network lock the whole crew out, and 31^8 codes behind 5 guesses a minute per
// client leave no guessing chance worth the name.
const (
	joinCodeTTL      = 15 * time.Minute
	joinCodeLen      = 8
	joinCodeAlphabet = "23456789ABCDEFGHJKMNPQRSTUVWXYZ" // no 0/O, 1/I/L
	guessWindow      = time.Minute
	guessesPerClient = 5
)

type joinCode struct {
	role    string
	expires time.Time
}

type pairing struct {
	mu       sync.Mutex
	now      func() time.Time
	codes    map[string]joinCode
	failures map[string][]time.Time // by client host; "" holds every failure
}

func newPairing(now func() time.Time) *pairing {
	return &pairing{now: now, codes: map[string]joinCode{}, failures: map[string][]time.Time{}}
}

// NewJoinCode makes a join code for role, valid for joinCodeTTL, and returns it
// formatted for reading aloud ("ABCD-EFGH") with its expiry.
func (s *Server) NewJoinCode(role string) (string, time.Time, error) {
	if role != schema.RoleLead && role != schema.RoleTechnician {
		return "", time.Time{}, schema.Errorf(schema.Invalid, "role", "%q is not a role; accepted values are lead and technician", role)
	}
	return s.pairing.newCode(role)
}

func (p *pairing) newCode(role string) (string, time.Time, error) {
	b := make([]byte, joinCodeLen)
	if _, err := rand.Read(b); err != nil {
		return "", time.Time{}, err
	}
	for i := range b {
		// 256 is not a multiple of 31; the bias (under 1 %) does not matter for a
		// code that lives minutes behind a guess limit.
		b[i] = joinCodeAlphabet[int(b[i])%len(joinCodeAlphabet)]
	}
	code := string(b)
	p.mu.Lock()
	defer p.mu.Unlock()
	now := p.now()
	for c, jc := range p.codes {
		if now.After(jc.expires) {
			delete(p.codes, c)
		}
	}
	expires := now.Add(joinCodeTTL)
	p.codes[code] = joinCode{role: role, expires: expires}
	return code[:4] + "-" + code[4:], expires, nil
}

// redeem checks a typed code and returns it (normalised) with its role and
// expiry. Failed guesses are counted against the client; past the limit the
// answer is 429.
func (p *pairing) redeem(typed, client string) (string, joinCode, error) {
	code := strings.ToUpper(strings.NewReplacer("-", "", " ", "").Replace(typed))
	p.mu.Lock()
	defer p.mu.Unlock()
	now := p.now()
	if p.tooMany(client, now) {
		return "", joinCode{}, &httpError{status: http.StatusTooManyRequests, field: "code",
			msg: "too many wrong join codes; wait a minute and ask the lead for the current code"}
	}
	jc, ok := p.codes[code]
	if !ok || now.After(jc.expires) {
		p.failures[client] = append(p.failures[client], now)
		return "", joinCode{}, schema.Errorf(schema.Unauthorized, "code", "this join code is wrong or has expired; ask the lead for the current code")
	}
	if jc.role == schema.RoleLead {
		delete(p.codes, code)
	}
	return code, jc, nil
}

// restore gives back a single-use code whose pairing failed after it was
// redeemed (a refused device name), so the lead need not make a new one.
func (p *pairing) restore(code string, jc joinCode) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.now().Before(jc.expires) {
		p.codes[code] = jc
	}
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
	code, jc, err := s.pairing.redeem(req.Code, guessClient(host))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	d, token, err := s.DB.CreateDevice(r.Context(), schema.Actor{Name: req.Name, Role: jc.role}, req.Name, jc.role)
	if err != nil {
		if jc.role == schema.RoleLead {
			s.pairing.restore(code, jc)
		}
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
	code, expires, err := s.NewJoinCode(req.Role)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	// The lead's screen shows the code and a QR code of the address this request
	// came in on, which is one the crew's phones can reach too.
	joinURL := "http://" + r.Host + "/#join=" + strings.ReplaceAll(code, "-", "")
	png, err := qrcode.Encode(joinURL, qrcode.Medium, 256)
	if err != nil {
		s.writeError(w, r, fmt.Errorf("join code QR: %w", err))
		return
	}
	writeJSON(w, http.StatusCreated, map[string]any{"code": code, "role": req.Role, "expires_at": expires,
		"join_url": joinURL, "qr_png": png})
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
