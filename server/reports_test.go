package server

import (
	"bytes"
	"context"
	"encoding/base64"
	"image"
	"image/color"
	"image/png"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"fieldtab/report"
	"fieldtab/schema"
)

// testSignaturePNG is a scrawl as the sign-off canvas gives, base64.
func testSignaturePNG(tb testing.TB) string {
	tb.Helper()
	img := image.NewNRGBA(image.Rect(0, 0, 300, 100))
	for x := 10; x < 290; x++ {
		img.Set(x, 50+(x%40)-20, color.NRGBA{10, 20, 90, 255})
	}
	var b bytes.Buffer
	if err := png.Encode(&b, img); err != nil {
		tb.Fatal(err)
	}
	return base64.StdEncoding.EncodeToString(b.Bytes())
}

// withSigner gives the server signer files made in a temp dir.
func (t *testServer) withSigner(tb testing.TB) {
	tb.Helper()
	sg, err := report.NewSelfIssued("Alex Lead", "Harbour TAB Ltd", "alex@example.com", testNow)
	if err != nil {
		tb.Fatal(err)
	}
	dir := filepath.Join(tb.TempDir(), "signer")
	if err := report.WriteSignerDir(dir, sg, false); err != nil {
		tb.Fatal(err)
	}
	t.SignerDir = dir
}

func checkPDFTools(tb testing.TB, pdf []byte, signed bool) {
	tb.Helper()
	path := filepath.Join(tb.TempDir(), "r.pdf")
	if err := os.WriteFile(path, pdf, 0o644); err != nil {
		tb.Fatal(err)
	}
	if q, err := exec.LookPath("qpdf"); err == nil {
		if out, err := exec.Command(q, "--check", path).CombinedOutput(); err != nil {
			tb.Fatalf("qpdf --check: %v\n%s", err, out)
		}
	} else if os.Getenv("CI") != "" {
		tb.Fatal("qpdf is missing")
	}
	if !signed {
		return
	}
	ps, err := exec.LookPath("pdfsig")
	if err != nil {
		if os.Getenv("CI") != "" {
			tb.Fatal("pdfsig is missing")
		}
		tb.Log("pdfsig absent; skipped")
		return
	}
	out, _ := exec.Command(ps, path).CombinedOutput()
	if !strings.Contains(string(out), "Signature is Valid.") {
		tb.Fatalf("pdfsig does not say the signature is valid:\n%s", out)
	}
}

func TestReportEndpoints(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	if _, err := ts.db.AddReadings(context.Background(), schema.Actor{Name: "Sam", Role: schema.RoleTechnician}, f.job, []schema.Reading{flowReading(f.outlet, 390)}); err != nil {
		t.Fatal(err)
	}
	base := "/jobs/" + f.job
	body := map[string]any{"name": "Alex Lead", "certification": "TAB-1234", "organisation": "Harbour TAB Ltd", "signature_png": testSignaturePNG(t)}

	// Tokens and roles.
	want(t, ts.do(t, "GET", base+"/reports", "", nil), http.StatusUnauthorized, "")
	want(t, ts.do(t, "GET", base+"/report/preview.pdf", "", nil), http.StatusUnauthorized, "")
	want(t, ts.do(t, "GET", base+"/report/preview.pdf", ts.tech, nil), http.StatusForbidden, "")
	want(t, ts.do(t, "POST", base+"/report/sign", ts.tech, body), http.StatusForbidden, "")
	want(t, ts.do(t, "GET", base+"/reports/1.pdf", "", nil), http.StatusUnauthorized, "")
	want(t, ts.do(t, "GET", "/jobs/"+schema.NewID()+"/reports", ts.tech, nil), http.StatusNotFound, "job_id")

	// Nothing issued yet.
	var list struct {
		Reports      []schema.Report `json:"reports"`
		NextRevision int             `json:"next_revision"`
	}
	r := ts.do(t, "GET", base+"/reports", ts.tech, nil)
	want(t, r, http.StatusOK, "")
	r.decode(t, &list)
	if len(list.Reports) != 0 || list.NextRevision != 1 {
		t.Fatalf("list before signing: %s", r.body)
	}
	want(t, ts.do(t, "GET", base+"/reports/1.pdf", ts.tech, nil), http.StatusNotFound, "revision")

	// The preview is an unsigned PDF.
	r = ts.do(t, "GET", base+"/report/preview.pdf", ts.lead, nil)
	want(t, r, http.StatusOK, "")
	if !bytes.HasPrefix(r.body, []byte("%PDF-")) || r.header.Get("Content-Type") != "application/pdf" ||
		!strings.HasPrefix(r.header.Get("Content-Disposition"), "inline") {
		t.Fatalf("preview: %v %q", r.header, r.body[:min(20, len(r.body))])
	}
	if _, err := report.Verify(r.body); err == nil {
		t.Fatal("the preview verifies as signed")
	}
	checkPDFTools(t, r.body, false)

	// Without signer files: 503 saying what to run.
	r = ts.do(t, "POST", base+"/report/sign", ts.lead, body)
	want(t, r, http.StatusServiceUnavailable, "")
	if !strings.Contains(r.errText(), "fieldtab signer init") {
		t.Fatalf("no-signer error: %s", r.body)
	}
	ts.SignerDir = filepath.Join(t.TempDir(), "none")
	r = ts.do(t, "POST", base+"/report/sign", ts.lead, body)
	want(t, r, http.StatusServiceUnavailable, "")
	if !strings.Contains(r.errText(), "fieldtab signer init") {
		t.Fatalf("no-signer error: %s", r.body)
	}

	ts.withSigner(t)
	// Bad signatures.
	bad := func(sig string) map[string]any {
		return map[string]any{"name": "Alex Lead", "signature_png": sig}
	}
	want(t, ts.do(t, "POST", base+"/report/sign", ts.lead, bad("")), http.StatusBadRequest, "signature_png")
	want(t, ts.do(t, "POST", base+"/report/sign", ts.lead, bad("%%%")), http.StatusBadRequest, "signature_png")
	want(t, ts.do(t, "POST", base+"/report/sign", ts.lead, bad(base64.StdEncoding.EncodeToString([]byte("GIF89a")))), http.StatusBadRequest, "signature_png")
	want(t, ts.do(t, "POST", base+"/report/sign", ts.lead, bad(base64.StdEncoding.EncodeToString(append([]byte("\x89PNG\r\n\x1a\n"), make([]byte, 600<<10)...)))), http.StatusBadRequest, "signature_png")
	want(t, ts.do(t, "POST", base+"/report/sign", ts.lead, bad(base64.StdEncoding.EncodeToString([]byte("\x89PNG\r\n\x1a\nbroken")))), http.StatusBadRequest, "signature_png")
	want(t, ts.do(t, "POST", base+"/report/sign", ts.lead, map[string]any{"nme": "x"}), http.StatusBadRequest, "nme")

	// Signing: 201 with the stored revision.
	r = ts.do(t, "POST", base+"/report/sign", ts.lead, body)
	want(t, r, http.StatusCreated, "")
	var rec schema.Report
	r.decode(t, &rec)
	if rec.Revision != 1 || rec.JobID != f.job || rec.Signer != "Alex Lead" || len(rec.PDFSHA256) != 64 {
		t.Fatalf("signed: %s", r.body)
	}

	// Any device downloads it; it verifies.
	r = ts.do(t, "GET", base+"/reports/1.pdf", ts.tech, nil)
	want(t, r, http.StatusOK, "")
	if r.header.Get("Content-Type") != "application/pdf" || !strings.HasPrefix(r.header.Get("Content-Disposition"), "attachment") {
		t.Fatalf("download headers: %v", r.header)
	}
	res, err := report.Verify(r.body)
	if err != nil {
		t.Fatalf("verify the download: %v", err)
	}
	if res.FileSHA256 != rec.PDFSHA256 {
		t.Fatalf("download SHA-256 %s, stored %s", res.FileSHA256, rec.PDFSHA256)
	}
	checkPDFTools(t, r.body, true)

	r = ts.do(t, "GET", base+"/reports", ts.tech, nil)
	want(t, r, http.StatusOK, "")
	r.decode(t, &list)
	if len(list.Reports) != 1 || list.Reports[0].Revision != 1 || list.NextRevision != 2 {
		t.Fatalf("list after signing: %s", r.body)
	}

	// A second sign is revision 2, with a data: URL prefix accepted.
	body["signature_png"] = "data:image/png;base64," + testSignaturePNG(t)
	r = ts.do(t, "POST", base+"/report/sign", ts.lead, body)
	want(t, r, http.StatusCreated, "")
	r.decode(t, &rec)
	if rec.Revision != 2 {
		t.Fatalf("second sign: %s", r.body)
	}
	want(t, ts.do(t, "GET", base+"/reports/2.pdf", ts.lead, nil), http.StatusOK, "")
	want(t, ts.do(t, "GET", base+"/reports/3.pdf", ts.lead, nil), http.StatusNotFound, "revision")
}

// Two leads signing at once get consecutive revisions, not a conflict.
func TestReportSignConcurrent(t *testing.T) {
	ts := MustOpenServer(t)
	f := ts.mustFixture(t)
	ts.withSigner(t)
	body := map[string]any{"name": "Alex Lead", "signature_png": testSignaturePNG(t)}
	var wg sync.WaitGroup
	status := make([]int, 3)
	for i := range status {
		wg.Add(1)
		go func() {
			defer wg.Done()
			status[i] = ts.do(t, "POST", "/jobs/"+f.job+"/report/sign", ts.lead, body).status
		}()
	}
	wg.Wait()
	for i, s := range status {
		if s != http.StatusCreated {
			t.Fatalf("sign %d: status %d", i, s)
		}
	}
	rs, err := ts.db.Reports(context.Background(), f.job)
	if err != nil || len(rs) != 3 || rs[2].Revision != 3 {
		t.Fatalf("reports %v, %v", rs, err)
	}
}

// TestBrowserSignoff: a lead opens the report screen from the job home,
// previews, draws a signature, signs, and sees the revision in the list.
func TestBrowserSignoff(t *testing.T) {
	app := startApp(t)
	bj := makeBrowserJob(t, app.db, 2)
	sg, err := report.NewSelfIssued("Alex Lead", "Harbour TAB Ltd", "alex@example.com", time.Now())
	if err != nil {
		t.Fatal(err)
	}
	app.srv.SignerDir = filepath.Join(t.TempDir(), "signer")
	if err := report.WriteSignerDir(app.srv.SignerDir, sg, false); err != nil {
		t.Fatal(err)
	}
	p := newPage(t, app)
	code, _, err := app.srv.NewJoinCode(schema.RoleLead)
	if err != nil {
		t.Fatal(err)
	}
	p.navigate("/#join=" + strings.ReplaceAll(code, "-", ""))
	p.wait("the join code", joinCodeIs(strings.ReplaceAll(code, "-", "")))
	p.typeInto("[data-test=device-name]", "Lead tablet")
	p.click("[data-test=join-submit]")
	p.waitSel("[data-test=job-home]")
	p.click("[data-test=open-signoff]")
	p.waitSel("[data-test=signoff-screen]")
	p.wait("the pad takes the finger", `getComputedStyle(`+q("[data-test=signature-pad]")+`).touchAction === 'none'`)
	p.wait("touch targets", `[...document.querySelectorAll('[data-test=signoff-screen] button')].every((b) => b.getBoundingClientRect().height >= 44)`)

	p.click("[data-test=report-preview]")
	p.wait("a preview link to a blob", q("[data-test=report-preview-link]")+` && `+q("[data-test=report-preview-link]")+`.href.startsWith('blob:')`)

	// Signing without a name is refused; typing the name clears the message.
	p.click("[data-test=report-sign]")
	p.wait("the no-name message", `document.body.textContent.includes('Enter your name')`)
	p.typeInto("[data-test=signoff-name]", "Alex Lead")
	p.wait("the no-name message gone once the name is typed", `!document.body.textContent.includes('Enter your name')`)
	// Signing without a signature is refused in the app.
	p.typeInto("[data-test=signoff-cert]", "TAB-1234")
	p.click("[data-test=report-sign]")
	p.wait("the no-signature message", `document.body.textContent.includes('Draw your signature')`)

	// Draw a stroke with pointer events.
	p.run("draw", chromedp.Evaluate[chromedp.Void](`(() => {
		const c = `+q("[data-test=signature-pad]")+`; const r = c.getBoundingClientRect();
		const ev = (type, i) => c.dispatchEvent(new PointerEvent(type, {pointerId: 7, bubbles: true, clientX: r.left + 10 + i * 8, clientY: r.top + r.height / 2 + (i % 5) * 4}));
		ev('pointerdown', 0); for (let i = 1; i < 30; i++) ev('pointermove', i); ev('pointerup', 30);
	})()`))
	p.click("[data-test=report-sign]")
	p.click("[data-test=report-sign-confirm]")
	p.waitFor("the signed revision", q("[data-test=report-revision][data-revision='1']")+` && `+q("[data-test=report-signed]"), 60*time.Second)
	if s := p.text("[data-test=report-signed]"); !strings.Contains(s, "Revision 1") {
		t.Fatalf("signed message: %q", s)
	}
	// No stale error, and no preview of the revision now signed.
	if n := p.count("[data-test=report-signoff] .msg-error, [data-test=report-preview-link]"); n != 0 {
		t.Errorf("after signing, %d stale errors or previews on the sign-off card: %q", n, p.text("[data-test=report-signoff]"))
	}
	rs, err := app.db.Reports(context.Background(), bj.job)
	if err != nil || len(rs) != 1 || rs[0].Signer != "Alex Lead" {
		t.Fatalf("stored reports %v, %v", rs, err)
	}
	_, pdf, err := app.db.ReportPDF(context.Background(), bj.job, 1)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := report.Verify(pdf); err != nil {
		t.Fatalf("verify: %v", err)
	}
	p.wait("a download button", q("[data-test=report-download][data-revision='1']"))
}
