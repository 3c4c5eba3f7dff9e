package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"fieldtab/report"
)

// defaultSignerDir is where the signer's key and certificate live unless
// --dir or --signer-dir says otherwise: fieldtab in the user's config
// directory.
func defaultSignerDir() (string, error) {
	dir, err := os.UserConfigDir()
	if err != nil {
		return "", fmt.Errorf("no user config directory (%v); give --dir", err)
	}
	return filepath.Join(dir, "fieldtab"), nil
}

func signerDirOr(dir string) (string, error) {
	if dir != "" {
		return dir, nil
	}
	return defaultSignerDir()
}

const signerUsage = `usage:
  fieldtab signer init --name NAME --org ORG --email EMAIL [--dir D] [--force]
  fieldtab signer import FILE.p12 [--password-file F] [--dir D] [--force]
  fieldtab signer show [--dir D]
The key and certificate are kept as signer-key.pem and signer-cert.pem (0600)
in D, by default fieldtab in the user's config directory.
`

// runSigner handles `fieldtab signer init|import|show`: the key and
// certificate reports are digitally signed with.
func (m *Main) runSigner(_ context.Context, args []string) error {
	if wantsHelp(args) {
		fmt.Fprint(m.Stdout, signerUsage)
		return errHelp
	}
	if len(args) == 0 {
		fmt.Fprint(m.Stderr, signerUsage)
		return errUsage
	}
	switch args[0] {
	case "init":
		return m.signerInit(args[1:])
	case "import":
		return m.signerImport(args[1:])
	case "show":
		return m.signerShow(args[1:])
	}
	fmt.Fprintf(m.Stderr, "fieldtab signer: unknown subcommand %q\n%s", args[0], signerUsage)
	return errUsage
}

func (m *Main) signerInit(args []string) error {
	fs := newFlagSet("signer init", m.Stderr)
	name := fs.String("name", "", "the signer's name, as it goes on the certificate and the report (required)")
	org := fs.String("org", "", "the signer's firm (required)")
	email := fs.String("email", "", "the signer's e-mail address (required)")
	dir := fs.String("dir", "", "directory for the key and certificate (default: fieldtab in the user's config directory)")
	force := fs.Bool("force", false, "replace an existing signer key and certificate")
	if err := m.parseFlags(fs, "signer init --name NAME --org ORG --email EMAIL [--dir D] [--force]",
		"Make a signing key and a self-issued certificate for signing reports.", args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(m.Stderr, "fieldtab signer init: unexpected argument %q\n", fs.Arg(0))
		return errUsage
	}
	for _, f := range []struct{ flag, v string }{{"--name", *name}, {"--org", *org}, {"--email", *email}} {
		if strings.TrimSpace(f.v) == "" {
			fmt.Fprintf(m.Stderr, "fieldtab signer init: %s is required\n", f.flag)
			return errUsage
		}
	}
	d, err := signerDirOr(*dir)
	if err != nil {
		return err
	}
	s, err := report.NewSelfIssued(*name, *org, *email, time.Now())
	if err != nil {
		if strings.HasPrefix(err.Error(), "email ") {
			return fmt.Errorf("--email: %w", err)
		}
		return err
	}
	if err := report.WriteSignerDir(d, s, *force); err != nil {
		return err
	}
	fmt.Fprintf(m.Stdout, "Made a signing key and a self-issued certificate in %s\n", d)
	m.printCert(s)
	fmt.Fprintln(m.Stdout, "A self-issued certificate proves the report was not changed after signing; PDF readers warn that no CA vouches for the signer. For that, import one a CA issued: fieldtab signer import FILE.p12")
	return nil
}

func (m *Main) signerImport(args []string) error {
	fs := newFlagSet("signer import", m.Stderr)
	pwFile := fs.String("password-file", "", "file holding the .p12 file's password (default: no password)")
	dir := fs.String("dir", "", "directory for the key and certificate (default: fieldtab in the user's config directory)")
	force := fs.Bool("force", false, "replace an existing signer key and certificate")
	pos, err := m.parseFlagsInterleaved(fs, "signer import FILE.p12 [--password-file F] [--dir D] [--force]",
		"Import a signing key and certificate (a CA's, or your firm's) from a PKCS#12 file.", args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		fmt.Fprint(m.Stderr, "fieldtab signer import: give one FILE.p12\n"+signerUsage)
		return errUsage
	}
	data, err := os.ReadFile(pos[0])
	if err != nil {
		return err
	}
	password := ""
	if *pwFile != "" {
		b, err := os.ReadFile(*pwFile)
		if err != nil {
			return fmt.Errorf("--password-file: %w", err)
		}
		password = strings.TrimRight(string(b), "\r\n")
	}
	s, err := report.SignerFromPKCS12(data, password)
	if err != nil {
		if *pwFile == "" {
			return fmt.Errorf("%s: %w (if it has a password, give --password-file)", pos[0], err)
		}
		return fmt.Errorf("%s: %w", pos[0], err)
	}
	d, err := signerDirOr(*dir)
	if err != nil {
		return err
	}
	if err := report.WriteSignerDir(d, s, *force); err != nil {
		return err
	}
	fmt.Fprintf(m.Stdout, "Imported the signing key and certificate into %s\n", d)
	m.printCert(s)
	return nil
}

func (m *Main) signerShow(args []string) error {
	fs := newFlagSet("signer show", m.Stderr)
	dir := fs.String("dir", "", "directory of the key and certificate (default: fieldtab in the user's config directory)")
	if err := m.parseFlags(fs, "signer show [--dir D]", "Show the signer's certificate and its fingerprint.", args); err != nil {
		return err
	}
	d, err := signerDirOr(*dir)
	if err != nil {
		return err
	}
	s, err := report.LoadSignerDir(d)
	if err != nil {
		return err
	}
	fmt.Fprintf(m.Stdout, "Signer in %s\n", d)
	m.printCert(s)
	return nil
}

func (m *Main) printCert(s report.Signer) {
	c := s.Certificate
	fmt.Fprintf(m.Stdout, "  subject:     %s\n", c.Subject)
	fmt.Fprintf(m.Stdout, "  issuer:      %s\n", c.Issuer)
	fmt.Fprintf(m.Stdout, "  valid:       %s to %s\n", c.NotBefore.UTC().Format(time.RFC3339), c.NotAfter.UTC().Format(time.RFC3339))
	if len(c.EmailAddresses) > 0 {
		fmt.Fprintf(m.Stdout, "  e-mail:      %s\n", strings.Join(c.EmailAddresses, ", "))
	}
	fmt.Fprintf(m.Stdout, "  SHA-256:     %s\n", report.Fingerprint(c))
	if len(s.Chain) > 0 {
		fmt.Fprintf(m.Stdout, "  chain:       %d CA certificate(s)\n", len(s.Chain))
	}
}
