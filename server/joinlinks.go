package server

import (
	"net"
	"strings"
)

// NoLANNote is said instead of a join link when this computer has no address
// a phone can reach.
const NoLANNote = "this computer has no network address a phone can reach: connect it to the site Wi-Fi (or start its hotspot) and make a new code; the code can still be typed in the app at the server's address"

// SetLANAddrs tells the server the host:port addresses where phones on the
// site network reach it (the port is known once Open listens, so this may
// come while requests are served).
func (s *Server) SetLANAddrs(addrs []string) {
	c := append([]string(nil), addrs...)
	s.lanAddrs.Store(&c)
}

// SetJoinNote sets what a join code's answer says instead of a link when no
// address is reachable, for a server that knows why (it listens on loopback
// only); the default is NoLANNote.
func (s *Server) SetJoinNote(note string) { s.joinNote.Store(&note) }

// joinNoteOr returns the note SetJoinNote set, or def.
func (s *Server) joinNoteOr(def string) string {
	if p := s.joinNote.Load(); p != nil && *p != "" {
		return *p
	}
	return def
}

// LANAddrs returns what SetLANAddrs set.
func (s *Server) LANAddrs() []string {
	if p := s.lanAddrs.Load(); p != nil {
		return *p
	}
	return nil
}

// JoinURLs are the base addresses ("http://host:port") that a join link may
// use, best first: the request's host (host[:port] as the browser sent it)
// when phones can reach it too, then the LAN addresses (host:port each). A
// loopback or "localhost" host is never used: a phone would reach itself.
// With no usable address the list is empty and note says why.
func JoinURLs(requestHost string, lan []string) (urls []string, note string) {
	seen := map[string]bool{}
	add := func(hp string) {
		if hp == "" || !reachable(hp) || seen[hp] {
			return
		}
		seen[hp] = true
		urls = append(urls, "http://"+hp)
	}
	add(requestHost)
	for _, hp := range lan {
		add(hp)
	}
	if len(urls) == 0 {
		return nil, NoLANNote
	}
	return urls, ""
}

// JoinLink is the address a phone opens (or scans) to join with code.
func JoinLink(base, code string) string {
	return strings.TrimSuffix(base, "/") + "/#join=" + strings.ReplaceAll(code, "-", "")
}

// reachable reports whether another device could reach host[:port]: not
// loopback, not "localhost" or a name under it, not the unspecified address.
func reachable(hostport string) bool {
	host := hostport
	if h, _, err := net.SplitHostPort(hostport); err == nil {
		host = h
	}
	host = strings.TrimSuffix(strings.Trim(host, "[]"), ".")
	if l := strings.ToLower(host); l == "localhost" || strings.HasSuffix(l, ".localhost") || l == "" {
		return false
	}
	if ip := net.ParseIP(host); ip != nil && (ip.IsLoopback() || ip.IsUnspecified()) {
		return false
	}
	return true
}
