package main

import (
	"context"
	"fmt"
	"strconv"
	"time"

	"fieldtab/schema"
	"fieldtab/server"
)

// runJoinCode handles `fieldtab join-code --role lead|technician`: a new join
// code made in the store, so that it works with the server running in another
// process, printed with its links and QR code.
func (m *Main) runJoinCode(ctx context.Context, args []string) error {
	fs := newFlagSet("join-code", m.Stderr)
	dbPath := fs.String("db", "", "SQLite store, the one serve uses (default: fieldtab/fieldtab.db in the user's data directory)")
	role := fs.String("role", schema.RoleTechnician, "lead (joins one device, which may edit the job) or technician (joins the crew's devices until it expires)")
	port := fs.Int("port", defaultPort, "the port serve listens on, for the join link")
	if err := m.parseFlags(fs, "join-code [--role lead|technician] [--db PATH] [--port N]",
		"Make a new join code while serve runs, valid for 15 minutes, and print it with its join link and QR code. The link uses this computer's network addresses and --port; it never points at localhost, which a phone cannot reach.", args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(m.Stderr, "fieldtab join-code: unexpected argument %q\n", fs.Arg(0))
		return errUsage
	}
	if *port < 1 || *port > 65535 {
		return fmt.Errorf("--port: %d is outside the accepted range 1 to 65535", *port)
	}
	db, err := openDB(ctx, *dbPath)
	if err != nil {
		return err
	}
	defer db.Close()
	code, expires, err := db.CreateJoinCode(ctx, schema.Actor{Name: "command line", Role: schema.RoleLead}, *role, time.Now())
	if err != nil {
		if schema.ErrorField(err) == "role" {
			return fmt.Errorf("--role: %s", schema.ErrorMessage(err))
		}
		return err
	}
	what := "any number of the crew's devices"
	if *role == schema.RoleLead {
		what = "one device, as a lead"
	}
	fmt.Fprintf(m.Stdout, "%s join code:  %s  (%s, until %s)\n", kindName(*role), code, what, expires.Local().Format("15:04"))
	urls, note := server.JoinURLs("", joinAddrs(":"+strconv.Itoa(*port), *port))
	if len(urls) == 0 {
		fmt.Fprintln(m.Stdout, "No join link: "+note+".")
	} else {
		fmt.Fprintln(m.Stdout, "Join links:")
		for _, u := range urls {
			fmt.Fprintln(m.Stdout, "  "+server.JoinLink(u, code))
		}
		m.printQR("Scan to join", server.JoinLink(urls[0], code))
	}
	fmt.Fprintln(m.Stdout, "A code expires after 15 minutes; run fieldtab join-code again (or use the app's lead screen) for a new one.")
	return nil
}

func kindName(role string) string {
	if role == schema.RoleLead {
		return "Lead"
	}
	return "Crew"
}
