package report

import (
	"regexp"
	"strings"
	"testing"
)

// The sign-off page prints the certification wording, the signer's
// certification number and organisation and the drawn signature whenever
// they are given, as the command line and the app both pass them; the
// default wording when none is given.
func TestRenderCertification(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	needTool(t, "pdfimages", "poppler-utils")
	base := demoInput(t)
	signOff := func(path string) string {
		raw := norm(pdfText(t, path, "raw"))
		i := strings.LastIndex(raw, "Sign-off Certification")
		if i < 0 {
			t.Fatalf("no sign-off page with its certification")
		}
		return raw[i:]
	}

	in := base
	in.Issued = true
	in.Signoff = &Signoff{Name: "Ada Quill", Certification: "TAB-0042 (fictional)", Organisation: "Fixture balancing crew",
		SignedAt: fixtureNow, SignaturePNG: signaturePNG(t)}
	path, _ := render(t, in)
	page := signOff(path)
	for _, w := range []string{norm(DefaultStatement), "Signed by Ada Quill, certification or license no. TAB-0042 (fictional), Fixture balancing crew.",
		"Certification or license no. TAB-0042 (fictional)", "Firm Fixture balancing crew"} {
		if !strings.Contains(page, w) {
			t.Errorf("the signed sign-off page lacks %q:\n%s", w, page)
		}
	}
	if imgs := run(t, "pdfimages", "-list", path); !regexp.MustCompile(`(?m)^\s*\d+\s+\d+\s+image\s+300\s+100\b`).MatchString(imgs) {
		t.Errorf("no drawn signature in the file:\n%s", imgs)
	}

	in.Signoff.Statement = "I certify these readings for the fixture."
	path, _ = render(t, in)
	if page := signOff(path); !strings.Contains(page, "I certify these readings for the fixture.") || strings.Contains(page, norm(DefaultStatement)) {
		t.Errorf("the sign-off page does not print the given wording alone:\n%s", page)
	}

	path, _ = render(t, base)
	page = signOff(path)
	if !strings.Contains(page, norm(DefaultStatement)) || strings.Contains(page, "Signed by") {
		t.Errorf("the preview's sign-off page:\n%s", page)
	}
}
