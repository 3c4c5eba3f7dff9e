package main

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"fieldtab/schema"
)

// A report signed from the command line carries the drawn signature and the
// certification wording on its sign-off page, as one signed in the app does.
func TestReportSignWithSignature(t *testing.T) {
	for _, tool := range []string{"pdftotext", "pdfimages"} {
		if _, err := exec.LookPath(tool); err != nil {
			if os.Getenv("CI") != "" {
				t.Fatalf("%s is not installed and CI is set", tool)
			}
			t.Skipf("%s is not installed (./test.sh installs poppler-utils)", tool)
		}
	}
	dir := t.TempDir()
	dbPath := filepath.Join(dir, "job.db")
	code, jobOut, errOut := runCmd(t, "job", "new", "--db", dbPath, "--name", "Pier 9 fit-out", "--units", "ip")
	if code != 0 {
		t.Fatalf("job new: exit %d: %s", code, errOut)
	}
	jobID := strings.TrimSpace(jobOut)
	signerDir := filepath.Join(dir, "signer")
	if code, _, errOut := runCmd(t, "signer", "init", "--name", "Dana Ortiz", "--org", "Balance Works", "--email", "dana@example.com", "--dir", signerDir); code != 0 {
		t.Fatal(errOut)
	}
	// A drawn stroke, 240 × 80 px, transparent around it.
	img := image.NewNRGBA(image.Rect(0, 0, 240, 80))
	for x := 10; x < 230; x++ {
		img.Set(x, 40+(x%20)-10, color.NRGBA{10, 20, 90, 255})
	}
	var b bytes.Buffer
	if err := png.Encode(&b, img); err != nil {
		t.Fatal(err)
	}
	sigPath := filepath.Join(dir, "signature.png")
	if err := os.WriteFile(sigPath, b.Bytes(), 0o600); err != nil {
		t.Fatal(err)
	}

	// Refused: not a PNG, or a signature without --sign; neither stores anything.
	notPNG := filepath.Join(dir, "signature.txt")
	os.WriteFile(notPNG, []byte("Dana Ortiz"), 0o600)
	out := filepath.Join(dir, "rev1.pdf")
	if code, _, errOut := runCmd(t, "report", "--job", jobID, "--db", dbPath, "--out", out, "--sign", "--signer-dir", signerDir, "--signature", notPNG); code != 1 || !strings.Contains(errOut, "--signature") || !strings.Contains(errOut, "not a PNG") {
		t.Errorf("text as --signature: exit %d, %s", code, errOut)
	}
	if code, _, errOut := runCmd(t, "report", "--job", jobID, "--db", dbPath, "--out", out, "--signature", sigPath); code != 2 || !strings.Contains(errOut, "go with --sign") {
		t.Errorf("--signature without --sign: exit %d, %s", code, errOut)
	}

	code, stdout, errOut := runCmd(t, "report", "--job", jobID, "--db", dbPath, "--out", out, "--sign", "--signer-dir", signerDir,
		"--signature", sigPath, "--certification", "TABB cert. 0042 (fictional)", "--organisation", "Harbour Air Balance (fictional)")
	if code != 0 || !strings.Contains(stdout, "Signed revision 1") {
		t.Fatalf("sign: exit %d\n%s%s", code, stdout, errOut)
	}
	// The stored revision, not only the file written, carries them.
	stored := filepath.Join(dir, "stored.pdf")
	db, err := schema.Open(t.Context(), dbPath)
	if err != nil {
		t.Fatal(err)
	}
	_, pdf, err := db.ReportPDF(t.Context(), jobID, 1)
	if err != nil {
		t.Fatal(err)
	}
	db.Close()
	os.WriteFile(stored, pdf, 0o600)
	text, err := exec.Command("pdftotext", "-raw", stored, "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	flat := strings.Join(strings.Fields(string(text)), " ")
	for _, w := range []string{"Signed by Dana Ortiz", "TABB cert. 0042 (fictional)", "Harbour Air Balance (fictional)"} {
		if !strings.Contains(flat, w) {
			t.Errorf("the stored revision lacks %q", w)
		}
	}
	imgs, err := exec.Command("pdfimages", "-list", stored).Output()
	if err != nil {
		t.Fatal(err)
	}
	if !regexp.MustCompile(`(?m)^\s*\d+\s+\d+\s+image\s+240\s+80\b`).Match(imgs) {
		t.Errorf("the drawn signature is not an image in the stored revision:\n%s", imgs)
	}
}
