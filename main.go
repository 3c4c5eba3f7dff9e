// Command fieldtab is a field tool for HVAC test-and-balance and commissioning
// technicians. This file holds the command-line entry point; each subcommand
// lives in a cmd_*.go file of its own.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	m := NewMain(os.Stdin, os.Stdout, os.Stderr)
	err := m.Run(ctx, os.Args[1:])
	stop()
	if cerr := m.Close(); err == nil {
		err = cerr
	}
	os.Exit(exitCode(err, m.Stderr))
}

// Main is the program with its standard streams, so tests can run it in-process
// and in parallel: nothing here reads globals.
type Main struct {
	Stdin  io.Reader
	Stdout io.Writer
	Stderr io.Writer
}

// NewMain returns a Main reading and writing the given streams.
func NewMain(stdin io.Reader, stdout, stderr io.Writer) *Main {
	return &Main{Stdin: stdin, Stdout: stdout, Stderr: stderr}
}

// errUsage marks an error whose message has already been printed with usage.
var errUsage = errors.New("usage")

// exitError carries a non-zero exit status whose message was already written.
type exitError struct{ code int }

func (e exitError) Error() string { return fmt.Sprintf("exit status %d", e.code) }

// Run executes one command line (without the program name).
func (m *Main) Run(ctx context.Context, args []string) error {
	err := m.run(ctx, args)
	if errors.Is(err, errHelp) {
		return nil
	}
	return err
}

func (m *Main) run(ctx context.Context, args []string) error {
	if len(args) == 0 {
		m.usage(m.Stderr)
		return errUsage
	}
	switch args[0] {
	case "calc":
		return m.runCalc(ctx, args[1:])
	case "serve":
		return m.runServe(ctx, args[1:], false)
	case "demo":
		return m.runServe(ctx, args[1:], true)
	case "device":
		return m.runDevice(ctx, args[1:])
	case "backup":
		return m.runBackup(ctx, args[1:])
	case "report":
		return m.runReport(ctx, args[1:])
	case "verify":
		return m.runVerify(ctx, args[1:])
	case "signer":
		return m.runSigner(ctx, args[1:])
	case "job":
		return m.runJob(ctx, args[1:])
	case "join-code":
		return m.runJoinCode(ctx, args[1:])
	case "help", "-h", "-help", "--help":
		m.usage(m.Stdout)
		return nil
	}
	fmt.Fprintf(m.Stderr, "fieldtab: unknown command %q\n", args[0])
	m.usage(m.Stderr)
	return errUsage
}

// Close releases what Run opened. Nothing yet; later commands hold a database.
func (m *Main) Close() error { return nil }

func (m *Main) usage(w io.Writer) {
	fmt.Fprint(w, `usage: fieldtab <command> [flags]   (fieldtab <command> --help for its flags)

commands:
  job        start a job or list the store's jobs (job new|list)
  serve      run the field server (--db PATH, --addr HOST:PORT, --demo)
  join-code  a new join code for phones, while serve runs (--role lead|technician)
  demo       serve with the demo job loaded (same as serve --demo)
  device     add a device and print its token for scripts (device add --name N --role R)
  backup     copy the store safely while it is in use (--db PATH --out FILE)
  calc       field arithmetic with JSON output (fieldtab calc help)
  report     the closeout report PDF (--job ID --out FILE.pdf [--sign])
  verify     check a signed report (FILE.pdf [--db PATH])
  signer     the key reports are signed with (signer init|import|show)
`)
}

// exitCode turns Run's error into a process exit status, printing it if needed.
func exitCode(err error, stderr io.Writer) int {
	var ee exitError
	switch {
	case err == nil:
		return 0
	case errors.Is(err, errUsage):
		return 2
	case errors.As(err, &ee):
		return ee.code
	}
	fmt.Fprintln(stderr, "fieldtab:", err)
	return 1
}
