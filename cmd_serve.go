package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"log/slog"
	"net"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"time"

	"github.com/skip2/go-qrcode"

	"fieldtab/schema"
	"fieldtab/server"
)

// defaultPort is where fieldtab listens unless told otherwise: fixed, so a
// crew's bookmarks keep working from one day to the next.
const defaultPort = 8470

// defaultDBPath is the store in the user's data directory.
func defaultDBPath() (string, error) {
	var dir string
	switch runtime.GOOS {
	case "windows":
		dir = os.Getenv("LocalAppData")
	case "darwin":
		home, err := os.UserHomeDir()
		if err != nil {
			return "", err
		}
		dir = filepath.Join(home, "Library", "Application Support")
	default:
		dir = os.Getenv("XDG_DATA_HOME")
		if dir == "" {
			home, err := os.UserHomeDir()
			if err != nil {
				return "", err
			}
			dir = filepath.Join(home, ".local", "share")
		}
	}
	if dir == "" {
		return "", errors.New("no user data directory; give --db")
	}
	return filepath.Join(dir, "fieldtab", "fieldtab.db"), nil
}

// openDB opens --db, or the default store when path is "".
func openDB(ctx context.Context, path string) (*schema.DB, error) {
	if path == "" {
		var err error
		if path, err = defaultDBPath(); err != nil {
			return nil, err
		}
	}
	return schema.Open(ctx, path)
}

func newFlagSet(name string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	return fs
}

// runServe starts the field server and blocks until ctx ends (SIGINT/SIGTERM),
// then shuts down gracefully, letting in-flight writes finish.
func (m *Main) runServe(ctx context.Context, args []string, demo bool) error {
	name, about := "serve", "Run the field server: phones and tablets on the same network open the app at its address and join with a code."
	if demo {
		name, about = "demo", "Run the field server with the demo job loaded (same as serve --demo)."
	}
	fs := newFlagSet(name, m.Stderr)
	dbPath := fs.String("db", "", "SQLite store (default: fieldtab/fieldtab.db in the user's data directory)")
	addr := fs.String("addr", ":"+strconv.Itoa(defaultPort), "listen address host:port (default: every interface, so phones on the site Wi-Fi can join)")
	demoFlag := fs.Bool("demo", demo, "load the demo job if the store has none")
	signerDir := fs.String("signer-dir", "", "directory of the signer's key and certificate, for reports signed from the app (default: fieldtab in the user's config directory)")
	if err := m.parseFlags(fs, name+" [--db PATH] [--addr HOST:PORT] [--signer-dir DIR]", about, args); err != nil {
		return err
	}
	db, err := openDB(ctx, *dbPath)
	if err != nil {
		return err
	}
	defer db.Close()
	if *demoFlag {
		id, created, err := ensureDemo(ctx, db)
		if err != nil {
			return fmt.Errorf("demo job: %w", err)
		}
		if created {
			fmt.Fprintf(m.Stdout, "Loaded the demo job (%s).\n", id)
		}
	}
	logger := slog.New(slog.NewTextHandler(m.Stderr, &slog.HandlerOptions{Level: slog.LevelInfo}))
	srv := server.New(db, *addr, logger)
	// Without a config directory the server still runs; signing then says
	// how to make the signer files.
	if d, err := signerDirOr(*signerDir); err == nil {
		srv.SignerDir = d
	}
	if err := srv.Open(); err != nil {
		return err
	}
	srv.SetLANAddrs(joinAddrs(*addr, srv.Port()))
	if loopbackOnly(*addr) {
		srv.SetJoinNote(fmt.Sprintf("fieldtab listens only on this computer (--addr %s), so no phone can reach it: "+
			"restart serve without --addr, or with this computer's network address", *addr))
	}
	m.printJoinInfo(srv, db.Path)
	<-ctx.Done()
	fmt.Fprintln(m.Stdout, "Shutting down: finishing requests in flight…")
	shutdownCtx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
	defer cancel()
	return srv.Close(shutdownCtx)
}

// printJoinInfo shows where phones can reach the server and the codes to join.
func (m *Main) printJoinInfo(srv *server.Server, dbPath string) {
	port := srv.Port()
	fmt.Fprintf(m.Stdout, "fieldtab is serving the store %s\n", dbPath)
	if lan := srv.LANAddrs(); len(lan) > 0 {
		fmt.Fprintln(m.Stdout, "Open the field app on a phone or tablet on the same network at:")
		for _, hp := range lan {
			fmt.Fprintf(m.Stdout, "  http://%s/\n", hp)
		}
		fmt.Fprintf(m.Stdout, "and on this computer at http://localhost:%d/\n", port)
	} else {
		fmt.Fprintf(m.Stdout, "Open the field app on this computer at http://localhost:%d/ (no phone can reach this address)\n", port)
	}
	lead, leadExp, err1 := srv.NewJoinCode(schema.RoleLead)
	crew, crewExp, err2 := srv.NewJoinCode(schema.RoleTechnician)
	if err := errors.Join(err1, err2); err != nil {
		fmt.Fprintln(m.Stderr, "fieldtab: join codes:", err)
		return
	}
	fmt.Fprintf(m.Stdout, "Lead join code:  %s  (one device, until %s)\n", lead, leadExp.Local().Format("15:04"))
	fmt.Fprintf(m.Stdout, "Crew join code:  %s  (any number of devices, until %s)\n", crew, crewExp.Local().Format("15:04"))
	if urls, note := server.JoinURLs("", srv.LANAddrs()); len(urls) == 0 {
		if loopbackOnly(srv.Addr) {
			note = "fieldtab listens only on this computer, so no phone can reach it: restart serve without --addr, or with this computer's network address"
		}
		fmt.Fprintln(m.Stdout, "No join link: "+note+".")
	} else {
		m.printQR("Scan to join the crew", server.JoinLink(urls[0], crew))
	}
	fmt.Fprintln(m.Stdout, "New codes: fieldtab join-code --role lead|technician, or the app's lead screen.")
	fmt.Fprintln(m.Stdout, serveSafety)
}

// serveSafety is the banner's caution: the work that can hurt someone, and
// who governs it.
const serveSafety = "Safety: roof, ladder, rotating-equipment, live-electrical and hot-water work, and never running a pump against a closed discharge valve " +
	"for more than a moment, follow the project specification, local codes, the site's safety plan and licensed practice; " +
	"fieldtab records readings, it does not make the work safe."

// printQR prints a join link and its QR code in the terminal.
func (m *Main) printQR(what, link string) {
	if qr, err := qrcode.New(link, qrcode.Medium); err == nil {
		fmt.Fprintf(m.Stdout, "%s (%s):\n%s", what, link, qr.ToSmallString(false))
	}
}

// loopbackOnly reports whether a server listening at addr (host:port) answers
// on this computer only.
func loopbackOnly(addr string) bool {
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return false
	}
	ip := net.ParseIP(host)
	return (ip != nil && ip.IsLoopback()) || strings.EqualFold(host, "localhost")
}

// joinAddrs are the host:port addresses phones can reach a server on that
// listens at addr (host:port) on port: the one address it is bound to, or
// every LAN address when it listens on all of them. A loopback bind has none.
func joinAddrs(addr string, port int) []string {
	hosts := lanAddresses()
	if host, _, err := net.SplitHostPort(addr); err == nil && host != "" && host != "0.0.0.0" && host != "::" {
		hosts = []string{host} // bound to one address: only that one answers
		if loopbackOnly(addr) {
			hosts = nil
		}
	}
	out := make([]string, 0, len(hosts))
	for _, h := range hosts {
		out = append(out, net.JoinHostPort(h, strconv.Itoa(port)))
	}
	return out
}

// lanAddresses lists this machine's non-loopback IPv4 addresses, the ones a
// phone on the site Wi-Fi can reach.
func lanAddresses() []string {
	addrs, err := net.InterfaceAddrs()
	if err != nil {
		return nil
	}
	var out []string
	for _, a := range addrs {
		ipn, ok := a.(*net.IPNet)
		if !ok || ipn.IP.IsLoopback() || ipn.IP.To4() == nil || ipn.IP.IsLinkLocalUnicast() {
			continue
		}
		out = append(out, ipn.IP.String())
	}
	return out
}

// runDevice handles `fieldtab device add --db X --name N --role R`, printing a
// token for scripts.
func (m *Main) runDevice(ctx context.Context, args []string) error {
	const synopsis = "device add [--db PATH] --name NAME --role lead|technician"
	const about = "Add a device and print its bearer token on stdout, for scripts; the token is shown once."
	if wantsHelp(args) {
		fmt.Fprintf(m.Stdout, "usage: fieldtab %s\n\n%s\n", synopsis, about)
		return errHelp
	}
	if len(args) == 0 || args[0] != "add" {
		fmt.Fprintf(m.Stderr, "usage: fieldtab %s\n", synopsis)
		return errUsage
	}
	fs := newFlagSet("device add", m.Stderr)
	dbPath := fs.String("db", "", "SQLite store (default: the user's data directory)")
	name := fs.String("name", "", "device name, e.g. \"script on the lead's laptop\"")
	role := fs.String("role", schema.RoleTechnician, "lead or technician")
	if err := m.parseFlags(fs, synopsis, about, args[1:]); err != nil {
		return err
	}
	db, err := openDB(ctx, *dbPath)
	if err != nil {
		return err
	}
	defer db.Close()
	d, token, err := db.CreateDevice(ctx, schema.Actor{Name: "command line", Role: schema.RoleLead}, *name, *role)
	if err != nil {
		return err
	}
	fmt.Fprintln(m.Stdout, token)
	fmt.Fprintf(m.Stderr, "device %s (%s, %s) added; the token above is shown once\n", d.ID, d.Name, d.Role)
	return nil
}

// runBackup handles `fieldtab backup --db X --out Y`, safe while serving.
func (m *Main) runBackup(ctx context.Context, args []string) error {
	fs := newFlagSet("backup", m.Stderr)
	dbPath := fs.String("db", "", "SQLite store (default: the user's data directory)")
	out := fs.String("out", "", "backup file to write (must not exist)")
	if err := m.parseFlags(fs, "backup [--db PATH] --out FILE", "Copy the store safely while serve is using it.", args); err != nil {
		return err
	}
	if *out == "" {
		fmt.Fprintln(m.Stderr, "fieldtab backup: --out is required")
		return errUsage
	}
	db, err := openDB(ctx, *dbPath)
	if err != nil {
		return err
	}
	defer db.Close()
	if err := db.Backup(ctx, *out); err != nil {
		return err
	}
	fmt.Fprintf(m.Stdout, "backed up %s to %s\n", db.Path, *out)
	return nil
}
