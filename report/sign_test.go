package report

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"software.sslmate.com/src/go-pkcs12"
)

// The signature is checked by poppler's pdfsig, a verifier outside the
// project (DESIGN.md §7), as well as by Verify.

var signedAt = time.Date(2025, 3, 14, 16, 30, 0, 0, time.FixedZone("EST", -5*3600))

func testSigner(t testing.TB) Signer {
	t.Helper()
	s, err := NewSelfIssued("Dana Ortiz", "Balance Works (North) \\ Ltd.", "dana@example.com", signedAt)
	if err != nil {
		t.Fatal(err)
	}
	s.Reason = "Test and balance report, revision 1"
	s.Location = "Springfield"
	return s
}

func writeTemp(t testing.TB, name string, b []byte) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, b, 0o600); err != nil {
		t.Fatal(err)
	}
	return p
}

// pdfsig runs poppler's pdfsig and returns its output, which is printed
// whatever the exit status (non-zero when a signature fails).
func pdfsig(t testing.TB, path string) string {
	t.Helper()
	out, _ := exec.Command("pdfsig", path).CombinedOutput()
	return string(out)
}

func signedReport(t testing.TB) (unsigned, signed []byte) {
	t.Helper()
	_, unsigned = render(t, demoInput(t))
	signed, err := Sign(unsigned, testSigner(t), signedAt)
	if err != nil {
		t.Fatal(err)
	}
	return unsigned, signed
}

func TestSignAndVerify(t *testing.T) {
	needTool(t, "pdfsig", "poppler-utils")
	needTool(t, "qpdf", "qpdf")
	unsigned, signed := signedReport(t)
	if !bytes.HasPrefix(signed, unsigned) {
		t.Error("signing changed the report's bytes instead of appending an update")
	}
	path := writeTemp(t, "signed.pdf", signed)
	run(t, "qpdf", "--check", path)

	out := pdfsig(t, path)
	// A self-issued certificate is not from a CA poppler trusts, so pdfsig
	// warns "Certificate Validation: Certificate issuer isn't Trusted." (or
	// similar): expected. The signature itself must be valid and cover the
	// whole document.
	if !strings.Contains(out, "Signature Validation: Signature is Valid.") {
		t.Fatalf("pdfsig does not find the signature valid:\n%s", out)
	}
	if !strings.Contains(out, "Total document signed") || strings.Contains(out, "Not total document signed") {
		t.Errorf("pdfsig does not find the whole document signed:\n%s", out)
	}
	if !strings.Contains(out, "Signer Certificate Common Name: Dana Ortiz") {
		t.Errorf("pdfsig names another signer:\n%s", out)
	}
	if !strings.Contains(out, "Hash Algorithm: SHA-256") {
		t.Errorf("pdfsig gives another hash algorithm:\n%s", out)
	}

	t.Logf("pdfsig:\n%s", out)
	res, err := Verify(signed)
	if err != nil {
		t.Fatal(err)
	}
	if res.Signer != "Dana Ortiz" || res.CommonName != "Dana Ortiz" || !res.SelfIssued || res.TrustedIssuer {
		t.Errorf("signer %q CN %q self-issued %v trusted %v", res.Signer, res.CommonName, res.SelfIssued, res.TrustedIssuer)
	}
	if !res.SignedAt.Equal(signedAt) {
		t.Errorf("signed at %v, want %v", res.SignedAt, signedAt)
	}
	sum := sha256.Sum256(signed)
	if res.FileSHA256 != hex.EncodeToString(sum[:]) {
		t.Error("file digest is not the SHA-256 of the file")
	}
	if res.ByteRange[0] != 0 || res.ByteRange[2]+res.ByteRange[3] != int64(len(signed)) {
		t.Errorf("byte range %v for %d bytes", res.ByteRange, len(signed))
	}
	signedData := append(bytes.Clone(signed[:res.ByteRange[1]]), signed[res.ByteRange[2]:]...)
	if ds := sha256.Sum256(signedData); res.SignedDataSHA256 != hex.EncodeToString(ds[:]) {
		t.Error("signed-data digest is not the SHA-256 of the byte range")
	}
	t.Logf("report %d bytes, signed %d bytes", len(unsigned), len(signed))
}

// A figure changed after signing: one digit of the first page's media box,
// inside the signed bytes (the page content streams are compressed, so a
// digit in them is not at a findable offset; any signed byte will do).
func TestSignTamperedFails(t *testing.T) {
	needTool(t, "pdfsig", "poppler-utils")
	_, signed := signedReport(t)
	m := regexp.MustCompile(`/MediaBox \[0 0 (\d)`).FindSubmatchIndex(signed)
	if m == nil {
		t.Fatal("no media box in the report")
	}
	flipped := bytes.Clone(signed)
	if flipped[m[2]] == '5' {
		flipped[m[2]] = '6'
	} else {
		flipped[m[2]] = '5'
	}
	appended := append(bytes.Clone(signed), []byte("\n% a line added after signing\n")...)

	for name, b := range map[string][]byte{"digit changed": flipped, "bytes appended": appended} {
		t.Run(name, func(t *testing.T) {
			out := pdfsig(t, writeTemp(t, "tampered.pdf", b))
			t.Logf("pdfsig:\n%s", out)
			if strings.Contains(out, "Signature is Valid.") && !strings.Contains(out, "Not total document signed") {
				t.Errorf("pdfsig accepts the tampered copy:\n%s", out)
			}
			if _, err := Verify(b); err == nil {
				t.Error("Verify accepts the tampered copy")
			} else {
				t.Log(err)
			}
		})
	}
	if _, err := Verify(signed[:len(signed)-10]); err == nil {
		t.Error("Verify accepts a truncated copy")
	}
	_, unsigned := render(t, demoInput(t))
	if _, err := Verify(unsigned); err == nil || !strings.Contains(err.Error(), "no signature") {
		t.Errorf("an unsigned report: %v", err)
	}
}

func TestSignRejectsWrongKey(t *testing.T) {
	a, b := testSigner(t), testSigner(t)
	a.Key = b.Key
	if _, err := Sign([]byte("%PDF-1.4"), a, signedAt); err == nil || !strings.Contains(err.Error(), "does not belong") {
		t.Errorf("got %v", err)
	}
	if _, err := Sign([]byte("%PDF-1.4"), testSigner(t), time.Time{}); err == nil {
		t.Error("a zero signing time is accepted")
	}
}

func TestSignerDir(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "keys")
	s := testSigner(t)
	if err := WriteSignerDir(dir, s, false); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{SignerKeyFile, SignerCertFile} {
		fi, err := os.Stat(filepath.Join(dir, f))
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode().Perm() != 0o600 {
			t.Errorf("%s has mode %v, want 0600", f, fi.Mode().Perm())
		}
	}
	if err := WriteSignerDir(dir, testSigner(t), false); err == nil || !strings.Contains(err.Error(), "--force") {
		t.Errorf("overwrite without force: %v", err)
	}
	got, err := LoadSignerDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	if !got.Certificate.Equal(s.Certificate) || got.Name != "Dana Ortiz" || got.Contact != "dana@example.com" {
		t.Errorf("loaded %q %q", got.Name, got.Contact)
	}
	if err := WriteSignerDir(dir, testSigner(t), true); err != nil {
		t.Errorf("overwrite with force: %v", err)
	}
	c := got.Certificate
	if c.NotAfter.Sub(c.NotBefore) < SelfIssuedValidity {
		t.Errorf("valid %v to %v", c.NotBefore, c.NotAfter)
	}
	if len(c.EmailAddresses) != 1 || !strings.Contains(c.Subject.String(), "O=Balance Works") {
		t.Errorf("subject %s, e-mail %v", c.Subject, c.EmailAddresses)
	}
}

func TestSignerFromPKCS12(t *testing.T) {
	s := testSigner(t)
	p12, err := pkcs12.Modern.Encode(s.Key, s.Certificate, nil, "correct horse")
	if err != nil {
		t.Fatal(err)
	}
	got, err := SignerFromPKCS12(p12, "correct horse")
	if err != nil {
		t.Fatal(err)
	}
	if !got.Certificate.Equal(s.Certificate) || got.Name != "Dana Ortiz" {
		t.Errorf("got %q", got.Name)
	}
	if _, err := SignerFromPKCS12(p12, "wrong"); err == nil {
		t.Error("a wrong password is accepted")
	}
}

func BenchmarkSign(b *testing.B) {
	_, unsigned := render(b, demoInput(b))
	s := testSigner(b)
	b.ResetTimer()
	for b.Loop() {
		if _, err := Sign(unsigned, s, signedAt); err != nil {
			b.Fatal(err)
		}
	}
}
