package main

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"fieldtab/schema"
)

// runMain runs one command line in-process and returns its exit status and
// streams.
func runCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errOut bytes.Buffer
	m := NewMain(strings.NewReader(""), &out, &errOut)
	err := m.Run(context.Background(), args)
	return exitCode(err, &errOut), out.String(), errOut.String()
}

// demoStore is a store in a temp dir holding the demo job, closed again so
// the commands open it themselves.
func demoStore(t *testing.T) (path, jobID string) {
	t.Helper()
	ctx := context.Background()
	path = filepath.Join(t.TempDir(), "job.db")
	db, err := schema.Open(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	jobID, _, err = ensureDemo(ctx, db)
	if err != nil {
		t.Fatal(err)
	}
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	return path, jobID
}

func TestSignerInit(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "signer")
	code, out, errOut := runCmd(t, "signer", "init", "--name", "Dana Ortiz", "--org", "Balance Works", "--email", "dana@example.com", "--dir", dir)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "CN=Dana Ortiz") || !strings.Contains(out, "SHA-256:") {
		t.Errorf("output:\n%s", out)
	}
	for _, f := range []string{"signer-key.pem", "signer-cert.pem"} {
		fi, err := os.Stat(filepath.Join(dir, f))
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode().Perm() != 0o600 {
			t.Errorf("%s: mode %v, want 0600", f, fi.Mode().Perm())
		}
	}
	key, _ := os.ReadFile(filepath.Join(dir, "signer-key.pem"))
	code, _, errOut = runCmd(t, "signer", "init", "--name", "X", "--org", "Y", "--email", "x@example.com", "--dir", dir)
	if code == 0 || !strings.Contains(errOut, "--force") {
		t.Errorf("overwrite without --force: exit %d, %s", code, errOut)
	}
	if again, _ := os.ReadFile(filepath.Join(dir, "signer-key.pem")); !bytes.Equal(again, key) {
		t.Error("the refused init replaced the key")
	}
	code, out, _ = runCmd(t, "signer", "show", "--dir", dir)
	if code != 0 || !strings.Contains(out, "CN=Dana Ortiz") {
		t.Errorf("show: exit %d\n%s", code, out)
	}
	if code, _, errOut := runCmd(t, "signer", "init", "--name", "X", "--org", "Y", "--dir", dir); code != 2 || !strings.Contains(errOut, "--email is required") {
		t.Errorf("no --email: exit %d, %s", code, errOut)
	}
	if code, _, errOut := runCmd(t, "signer", "init", "--name", "X", "--org", "Y", "--email", "not mail", "--dir", t.TempDir()); code == 0 || !strings.Contains(errOut, "--email") {
		t.Errorf("bad --email: exit %d, %s", code, errOut)
	}
}

func TestReportSignVerify(t *testing.T) {
	for _, tool := range []string{"pdfsig", "qpdf"} {
		if _, err := exec.LookPath(tool); err != nil {
			if os.Getenv("CI") != "" {
				t.Fatalf("%s is not installed and CI is set", tool)
			}
			t.Skipf("%s is not installed (./test.sh installs it)", tool)
		}
	}
	dbPath, jobID := demoStore(t)
	dir := t.TempDir()
	signerDir := filepath.Join(dir, "signer")
	if code, _, errOut := runCmd(t, "signer", "init", "--name", "Dana Ortiz", "--org", "Balance Works", "--email", "dana@example.com", "--dir", signerDir); code != 0 {
		t.Fatal(errOut)
	}

	// An unsigned preview: no signature, nothing stored.
	preview := filepath.Join(dir, "preview.pdf")
	if code, out, errOut := runCmd(t, "report", "--job", jobID, "--db", dbPath, "--out", preview); code != 0 || !strings.Contains(out, "unsigned preview of revision 1") {
		t.Fatalf("preview: exit %d\n%s%s", code, out, errOut)
	}
	if code, out, _ := runCmd(t, "verify", preview); code != 1 || !strings.Contains(out, "no signature") {
		t.Errorf("verify of the preview: exit %d\n%s", code, out)
	}

	// Revision 1, signed and stored.
	rev1 := filepath.Join(dir, "rev1.pdf")
	t0 := time.Now()
	code, out, errOut := runCmd(t, "report", "--job", jobID, "--db", dbPath, "--out", rev1, "--sign", "--signer-dir", signerDir, "--certification", "TAB-1234")
	if code != 0 || !strings.Contains(out, "Signed revision 1") {
		t.Fatalf("sign: exit %d\n%s%s", code, out, errOut)
	}
	t.Logf("report --sign of the demo job: %v\n%s", time.Since(t0), out)
	if b, err := exec.Command("qpdf", "--check", rev1).CombinedOutput(); err != nil {
		t.Errorf("qpdf --check: %v\n%s", err, b)
	}
	// pdfsig: the signature is valid; the self-issued certificate gives
	// "Certificate Validation: Certificate issuer is unknown.", as expected.
	sig, _ := exec.Command("pdfsig", rev1).CombinedOutput()
	if !strings.Contains(string(sig), "Signature Validation: Signature is Valid.") || !strings.Contains(string(sig), "- Total document signed") {
		t.Errorf("pdfsig:\n%s", sig)
	}
	code, out, _ = runCmd(t, "verify", rev1, "--db", dbPath)
	if code != 0 || !strings.Contains(out, "signer:           Dana Ortiz") || !strings.Contains(out, "revision 1 of job") || !strings.Contains(out, "matches the store's current data") {
		t.Errorf("verify --db: exit %d\n%s", code, out)
	}

	// A figure changed in the PDF's bytes fails pdfsig and verify.
	b, _ := os.ReadFile(rev1)
	i := bytes.Index(b, []byte("/MediaBox [0 0 6"))
	if i < 0 {
		t.Fatal("no media box")
	}
	b[i+len("/MediaBox [0 0 ")] = '5'
	tampered := filepath.Join(dir, "tampered.pdf")
	os.WriteFile(tampered, b, 0o600)
	if sig, _ := exec.Command("pdfsig", tampered).CombinedOutput(); strings.Contains(string(sig), "Signature is Valid.") {
		t.Errorf("pdfsig accepts the tampered copy:\n%s", sig)
	}
	if code, out, _ := runCmd(t, "verify", tampered); code != 1 || !strings.Contains(out, "NOT VERIFIED") {
		t.Errorf("verify of the tampered copy: exit %d\n%s", code, out)
	}

	// A new reading: the signed revision no longer matches the store, which
	// is not an error (a later revision is due), and the next one is 2.
	ctx := context.Background()
	db, err := schema.Open(ctx, dbPath)
	if err != nil {
		t.Fatal(err)
	}
	s, err := db.Snapshot(ctx, jobID)
	if err != nil {
		t.Fatal(err)
	}
	r := s.Readings[0]
	v := *r.Value + 1
	nr := schema.Reading{ID: schema.NewID(), SubjectKind: r.SubjectKind, SubjectID: r.SubjectID, Quantity: r.Quantity, Point: r.Point,
		Value: &v, Unit: r.Unit, Stage: r.Stage, InstrumentID: r.InstrumentID, Technician: "test", TakenAt: time.Now().UTC(), Supersedes: r.ID}
	if res, err := db.AddReadings(ctx, schema.Actor{Name: "test", Role: schema.RoleLead}, jobID, []schema.Reading{nr}); err != nil || res[0].Status != schema.ReadingStored {
		t.Fatalf("add reading: %v %+v", err, res)
	}
	db.Close()
	code, out, _ = runCmd(t, "verify", rev1, "--db", dbPath)
	if code != 0 || !strings.Contains(out, "a later revision is due") {
		t.Errorf("verify --db after a new reading: exit %d\n%s", code, out)
	}
	rev2 := filepath.Join(dir, "rev2.pdf")
	if code, out, errOut := runCmd(t, "report", "--job", jobID, "--db", dbPath, "--out", rev2, "--sign", "--signer-dir", signerDir); code != 0 || !strings.Contains(out, "Signed revision 2") {
		t.Fatalf("sign revision 2: exit %d\n%s%s", code, out, errOut)
	}
	if code, out, _ := runCmd(t, "verify", rev2, "--db", dbPath); code != 0 || !strings.Contains(out, "revision 2 of job") || !strings.Contains(out, "matches") {
		t.Errorf("verify revision 2: exit %d\n%s", code, out)
	}

	// A validly signed file the store does not hold: the same key's
	// report of a job in another store.
	other := filepath.Join(dir, "other.pdf")
	dbOther, otherJob := demoStore(t)
	if code, _, errOut := runCmd(t, "report", "--job", otherJob, "--db", dbOther, "--out", other, "--sign", "--signer-dir", signerDir); code != 0 {
		t.Fatal(errOut)
	}
	if code, out, _ := runCmd(t, "verify", other, "--db", dbPath); code != 1 || !strings.Contains(out, "NOT AN ISSUED REVISION") {
		t.Errorf("verify --db of a file from another store: exit %d\n%s", code, out)
	}
	if code, _, _ := runCmd(t, "verify", other); code != 0 {
		t.Errorf("verify without --db of a validly signed file: exit %d", code)
	}

	// Flag errors name the flag.
	if code, _, errOut := runCmd(t, "report", "--db", dbPath, "--out", rev1); code != 2 || !strings.Contains(errOut, "--job is required") {
		t.Errorf("no --job: %d %s", code, errOut)
	}
	if code, _, errOut := runCmd(t, "report", "--job", schema.NewID(), "--db", dbPath, "--out", rev1); code != 1 || !strings.Contains(errOut, "--job") {
		t.Errorf("unknown --job: %d %s", code, errOut)
	}
	if code, _, errOut := runCmd(t, "report", "--job", jobID, "--db", dbPath, "--out", rev1, "--sign", "--signer-dir", t.TempDir()); code != 1 || !strings.Contains(errOut, "--signer-dir") {
		t.Errorf("empty --signer-dir: %d %s", code, errOut)
	}
}
