package report

import (
	"context"
	"path/filepath"
	"strings"
	"testing"

	"fieldtab/schema"
)

// A preview carries the preliminary stamp on every page; the revision Issue
// signs and stores carries none, and neither says "not signed". Both go
// through the real store and are read back with pdftotext.
func TestIssueStampsOnlyThePreview(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	needTool(t, "pdfinfo", "poppler-utils")
	dir := t.TempDir()
	p := demoPlan(t, fixtureNow)
	p.store(t, dir, fixtureNow)
	ctx := context.Background()
	db, err := schema.Open(ctx, filepath.Join(dir, "job.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	in, err := Next(ctx, db, p.job.ID, fixtureNow)
	if err != nil {
		t.Fatal(err)
	}
	path, _ := render(t, in)
	n := pageCount(t, path)
	for pg := 1; pg <= n; pg++ {
		text := norm(pdfText(t, path, "raw", pg, pg))
		if !strings.Contains(text, stampText) {
			t.Fatalf("preview page %d of %d lacks the stamp %q", pg, n, stampText)
		}
		if !strings.Contains(text, "HL-2025-014") {
			t.Fatalf("preview page %d lacks the project number", pg)
		}
	}

	in.Signoff = &Signoff{Name: "Dana Ortiz", SignedAt: fixtureNow}
	rec, signed, err := Issue(ctx, db, schema.Actor{Name: "test", Role: schema.RoleLead}, in, testSigner(t))
	if err != nil {
		t.Fatal(err)
	}
	if rec.Revision != 1 {
		t.Fatalf("issued revision %d", rec.Revision)
	}
	spath := writeTemp(t, "signed.pdf", signed)
	text := norm(pdfText(t, spath, "raw"))
	for _, bad := range []string{stampText, "PRELIMINARY", "not signed"} {
		if strings.Contains(text, bad) {
			t.Errorf("the signed revision says %q", bad)
		}
	}
	if !strings.Contains(text, "Signed by Dana Ortiz") || !strings.Contains(text, "HL-2025-014") {
		t.Error("the signed revision lacks its signer or project number")
	}
}
