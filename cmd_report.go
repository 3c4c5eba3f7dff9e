package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
	"time"

	"fieldtab/report"
	"fieldtab/schema"
)

// runReport handles `fieldtab report --job ID --out FILE.pdf [--sign]`: the
// closeout report of a job, as an unsigned preview or, with --sign, signed
// with the signer's key and stored as the job's next revision.
func (m *Main) runReport(ctx context.Context, args []string) error {
	fs := newFlagSet("report", m.Stderr)
	jobID := fs.String("job", "", "the job's ID (required)")
	dbPath := fs.String("db", "", "SQLite store (default: the user's data directory)")
	out := fs.String("out", "", "PDF file to write (required)")
	signIt := fs.Bool("sign", false, "sign the report and store it as the job's next revision (default: an unsigned preview)")
	signerDir := fs.String("signer-dir", "", "directory of the signer's key and certificate (default: fieldtab in the user's config directory)")
	name := fs.String("name", "", "the signer's name on the sign-off page (default: the certificate's name)")
	cert := fs.String("certification", "", "the signer's certification or licence number, for the sign-off page")
	location := fs.String("location", "", "where the report is signed, for the digital signature")
	sigFile := fs.String("signature", "", "PNG image of the signer's drawn signature, for the sign-off page (default: a line to sign on)")
	org := fs.String("organisation", "", "the signer's firm on the sign-off page (default: the certificate's organisation)")
	if err := m.parseFlags(fs, "report --job ID --out FILE.pdf [--db PATH] [--sign [--signature FILE.png] [--name NAME] [--certification TEXT] [--organisation TEXT]]",
		"Write the job's closeout report: an unsigned preview, or with --sign the next revision, signed and stored. `fieldtab job list` shows each job's ID.", args); err != nil {
		return err
	}
	switch {
	case fs.NArg() > 0:
		fmt.Fprintf(m.Stderr, "fieldtab report: unexpected argument %q\n", fs.Arg(0))
		return errUsage
	case *jobID == "":
		fmt.Fprintln(m.Stderr, "fieldtab report: --job is required")
		return errUsage
	case *out == "":
		fmt.Fprintln(m.Stderr, "fieldtab report: --out is required")
		return errUsage
	case !*signIt && (*name != "" || *cert != "" || *signerDir != "" || *location != "" || *sigFile != "" || *org != ""):
		fmt.Fprintln(m.Stderr, "fieldtab report: --name, --certification, --organisation, --signature, --location and --signer-dir go with --sign")
		return errUsage
	}
	var sigPNG []byte
	if *sigFile != "" {
		var err error
		if sigPNG, err = readSignaturePNG(*sigFile); err != nil {
			return err
		}
	}
	// The signer first, so that a missing key fails before a long render.
	var signer report.Signer
	if *signIt {
		d, err := signerDirOr(*signerDir)
		if err != nil {
			return err
		}
		if signer, err = report.LoadSignerDir(d); err != nil {
			return fmt.Errorf("--signer-dir: %w", err)
		}
		if *name != "" {
			signer.Name = strings.TrimSpace(*name)
		}
		signer.Location = *location
	}
	db, err := openDB(ctx, *dbPath)
	if err != nil {
		return err
	}
	defer db.Close()
	now := time.Now()
	in, err := report.Next(ctx, db, *jobID, now)
	if err != nil {
		return jobErr(err)
	}
	snap, revision := in.Snapshot, in.Revision
	if *signIt {
		// As the app's sign-off (server handleReportSign) does.
		in.Signoff = &report.Signoff{Name: signer.Name, Certification: strings.TrimSpace(*cert),
			Organisation: strings.TrimSpace(*org), SignedAt: now, SignaturePNG: sigPNG}
		if o := signer.Certificate.Subject.Organization; in.Signoff.Organisation == "" && len(o) > 0 {
			in.Signoff.Organisation = o[0]
		}
	}
	// Progress on a large job: a line at each tenth, on stderr.
	big := len(snap.Outlets)+len(snap.Readings)/20 > 300
	last := -1
	in.Progress = func(done, total int) {
		if !big {
			return
		}
		if tenth := done * 10 / total; tenth != last {
			last = tenth
			fmt.Fprintf(m.Stderr, "report: %3d%% (%d of %d parts)\n", done*100/total, done, total)
		}
	}
	if !*signIt {
		var buf bytes.Buffer
		if err := report.Render(&buf, in); err != nil {
			return err
		}
		if err := os.WriteFile(*out, buf.Bytes(), 0o644); err != nil {
			return fmt.Errorf("--out: %w", err)
		}
		fmt.Fprintf(m.Stdout, "Wrote an unsigned preview of revision %d of %s to %s (%d bytes); sign it with --sign.\n",
			revision, snap.Job.Name, *out, buf.Len())
		return nil
	}
	t0 := time.Now()
	rec, signed, err := report.Issue(ctx, db, schema.Actor{Name: signer.Name + " (command line)", Role: schema.RoleLead}, in, signer)
	if err != nil {
		if schema.ErrorField(err) == "signoff.signature_png" {
			return fmt.Errorf("--signature: %s", schema.ErrorMessage(err))
		}
		return err
	}
	took := time.Since(t0)
	if err := os.WriteFile(*out, signed, 0o644); err != nil {
		return fmt.Errorf("--out: %w (revision %d is stored; fieldtab can write it again)", err, rec.Revision)
	}
	fmt.Fprintf(m.Stdout, "Signed revision %d of %s as %s and stored it; wrote %s (%d bytes, made and signed in %s).\n",
		rec.Revision, snap.Job.Name, signer.Name, *out, len(signed), took.Round(time.Millisecond))
	fmt.Fprintf(m.Stdout, "  PDF SHA-256:      %s\n  data SHA-256:     %s\n", rec.PDFSHA256, rec.SnapshotSHA256)
	return nil
}

// maxSignaturePNG bounds --signature as the server bounds the app's drawn
// signature.
const maxSignaturePNG = 512 << 10

// readSignaturePNG reads --signature and checks it as the server checks the
// app's: a PNG of at most maxSignaturePNG bytes (report.Issue then checks its
// pixels).
func readSignaturePNG(path string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("--signature: %w", err)
	}
	defer f.Close()
	b, err := io.ReadAll(io.LimitReader(f, maxSignaturePNG+1))
	switch {
	case err != nil:
		return nil, fmt.Errorf("--signature: %w", err)
	case len(b) > maxSignaturePNG:
		return nil, fmt.Errorf("--signature: %s is larger than %d KB", path, maxSignaturePNG>>10)
	case !bytes.HasPrefix(b, []byte("\x89PNG\r\n\x1a\n")):
		return nil, fmt.Errorf("--signature: %s is not a PNG image", path)
	}
	return b, nil
}

// jobErr names --job in a job-not-found error.
func jobErr(err error) error {
	var se *schema.Error
	if errors.As(err, &se) && se.Code == schema.NotFound && se.Field == "job_id" {
		return fmt.Errorf("--job: %s", se.Message)
	}
	return err
}

// runVerify handles `fieldtab verify FILE.pdf [--db PATH]`.
func (m *Main) runVerify(ctx context.Context, args []string) error {
	fs := newFlagSet("verify", m.Stderr)
	dbPath := fs.String("db", "", "also look the file up among the store's issued revisions")
	pos, err := m.parseFlagsInterleaved(fs, "verify FILE.pdf [--db PATH]",
		"Check a signed report's digital signature and, with --db, that it is a revision stored in the store.", args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		fmt.Fprintln(m.Stderr, "usage: fieldtab verify FILE.pdf [--db PATH]")
		return errUsage
	}
	pdf, err := os.ReadFile(pos[0])
	if err != nil {
		return err
	}
	res, err := report.Verify(pdf)
	if err != nil {
		fmt.Fprintf(m.Stdout, "%s: NOT VERIFIED: %v\n", pos[0], strings.TrimPrefix(err.Error(), "verify: "))
		return exitError{code: 1}
	}
	fmt.Fprintf(m.Stdout, "%s: signature valid (PKCS#7 detached, SHA-256) and covers the whole file but the signature itself\n", pos[0])
	fmt.Fprintf(m.Stdout, "  signer:           %s\n", res.Signer)
	fmt.Fprintf(m.Stdout, "  certificate:      %s, issued by %s\n", res.Certificate.Subject, res.Issuer)
	switch {
	case res.TrustedIssuer:
		fmt.Fprintln(m.Stdout, "                    (issued by a CA this machine trusts)")
	case res.SelfIssued:
		fmt.Fprintln(m.Stdout, "                    (self-issued: it proves the file is unchanged, not who the signer is; compare its fingerprint with the signer's)")
	default:
		fmt.Fprintln(m.Stdout, "                    (issued by a CA this machine does not trust)")
	}
	fmt.Fprintf(m.Stdout, "  fingerprint:      %s\n", report.Fingerprint(res.Certificate))
	fmt.Fprintf(m.Stdout, "  signed at:        %s\n", res.SignedAt.Format(time.RFC3339))
	fmt.Fprintf(m.Stdout, "  signed data:      SHA-256 %s\n", res.SignedDataSHA256)
	fmt.Fprintf(m.Stdout, "  PDF:              SHA-256 %s\n", res.FileSHA256)
	if *dbPath == "" {
		return nil
	}
	db, err := schema.Open(ctx, *dbPath)
	if err != nil {
		return fmt.Errorf("--db: %w", err)
	}
	defer db.Close()
	rec, err := db.ReportBySHA(ctx, res.FileSHA256)
	var se *schema.Error
	if errors.As(err, &se) && se.Code == schema.NotFound {
		fmt.Fprintf(m.Stdout, "NOT AN ISSUED REVISION: no revision stored in %s has this PDF's SHA-256\n", *dbPath)
		return exitError{code: 1}
	}
	if err != nil {
		return err
	}
	snap, err := db.Snapshot(ctx, rec.JobID)
	if err != nil {
		return err
	}
	current, err := schema.SnapshotDigest(snap)
	if err != nil {
		return err
	}
	fmt.Fprintf(m.Stdout, "stored: revision %d of job %s (%s), issued %s by %s\n", rec.Revision, snap.Job.Name, rec.JobID, rec.IssuedAt.Format(time.RFC3339), rec.Signer)
	if current == rec.SnapshotSHA256 {
		fmt.Fprintf(m.Stdout, "  data:             matches the store's current data (SHA-256 %s)\n", current)
	} else {
		fmt.Fprintf(m.Stdout, "  data:             readings or design data have changed since this revision (made from %s, now %s): a later revision is due\n", rec.SnapshotSHA256, current)
	}
	return nil
}
