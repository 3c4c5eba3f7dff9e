package server

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"fieldtab/report"
)

// buildFieldtab builds the real fieldtab binary from the module root, for a
// test that uses the command line the way the lead does on the laptop.
func buildFieldtab(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "fieldtab")
	cmd := exec.Command("go", "build", "-o", bin, ".")
	cmd.Dir = ".."
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// runFieldtab runs the binary and returns its standard output; a non-zero
// exit fails the test with what it printed.
func runFieldtab(t *testing.T, bin string, args ...string) string {
	t.Helper()
	cmd := exec.Command(bin, args...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("fieldtab %s: %v\nstdout: %s\nstderr: %s", strings.Join(args, " "), err, out, stderr.String())
	}
	return string(out)
}

var printedJoinCode = regexp.MustCompile(`\b([2-9A-Z]{4})-([2-9A-Z]{4})\b`)

// joinWithCode pairs a new page with a code fieldtab join-code printed.
func joinWithCode(t *testing.T, app *appServer, printed, name string) *page {
	t.Helper()
	m := printedJoinCode.FindStringSubmatch(printed)
	if m == nil {
		t.Fatalf("no join code in what join-code printed:\n%s", printed)
	}
	p := newPage(t, app)
	p.navigate("/#join=" + m[1] + m[2])
	p.wait("the join link's code in the code field", joinCodeIs(m[1]+m[2]))
	p.typeInto("[data-test=device-name]", name)
	p.click("[data-test=join-submit]")
	return p
}

// TestBrowserJobNewToSignedReport is a real job from nothing, as the README
// tells a new user to run it: `fieldtab job new` and `signer init` on the
// laptop, join codes from `fieldtab join-code` while the server runs, the
// lead's tablet sets up a system, an instrument and an outlet in the app, a
// technician's phone reads the outlet with a slipped digit, confirms it,
// corrects it, reads it final, and the lead signs revision 1. The stored PDF
// carries the job's figures with no preliminary stamp, and `fieldtab verify`
// finds it in the store.
func TestBrowserJobNewToSignedReport(t *testing.T) {
	browser(t) // skips (or fails under CI) before the build when Chromium is missing
	ctx := context.Background()
	bin := buildFieldtab(t)
	dir := t.TempDir()
	store := filepath.Join(dir, "site.db")

	jobID := strings.TrimSpace(runFieldtab(t, bin, "job", "new", "--db", store, "--name", "Quayside Clinic", "--units", "ip",
		"--elevation", "120", "--project-number", "QC-0417", "--firm", "Level Air Balancing"))
	if list := runFieldtab(t, bin, "job", "list", "--db", store); !strings.Contains(list, jobID) || !strings.Contains(list, "Quayside Clinic") {
		t.Fatalf("job list does not show the new job %s:\n%s", jobID, list)
	}
	signerDir := filepath.Join(dir, "signer")
	runFieldtab(t, bin, "signer", "init", "--dir", signerDir, "--name", "Robin Vale", "--org", "Level Air Balancing",
		"--email", "robin@example.invalid")

	app := &appServer{t: t, path: store, addr: "127.0.0.1:0", sent: map[string]int{}}
	app.start()
	t.Cleanup(app.stop)
	app.srv.SignerDir = signerDir

	// The lead's tablet: one job in the store, so it opens on the job's home.
	lead := joinWithCode(t, app, runFieldtab(t, bin, "join-code", "--db", store, "--role", "lead"), "Lead tablet")
	lead.waitSel("[data-test=job-home]")
	// An empty job says where its systems come from, and claims no finding.
	lead.waitSel("[data-test=no-systems]")
	if home := lead.text("[data-test=job-home]"); !strings.Contains(home, "Set up the job") || !strings.Contains(home, "nothing has been read") {
		t.Errorf("the empty job's home reads %q; want a pointer to Set up the job and no claim that all is within tolerance", home)
	}
	lead.click("[data-test=open-setup]")
	lead.waitSel("[data-test=setup-screen]")
	lead.click("[data-test=add-system]")
	lead.fillForm("tag", "RTU-3", "kind=", "rooftop_unit", "design.airflow", "1200", "design.make", "Northwind Air Works")
	lead.saveSetupForm()
	lead.click("[data-test=add-instrument]")
	lead.fillForm("tag", "Hood 1", "kind=", "flow_hood", "calibrated_on=", "2026-06-01", "calibration_due=", "2027-06-01",
		"accuracy_pct", "3", "accuracy_abs", "7", "accuracy_unit", "cfm")
	lead.saveSetupForm()
	lead.click(tagSel("setup-system", "RTU-3") + " [data-test=add-outlet]")
	lead.fillForm("tag", "S-7", "room", "Waiting room", "size", "24x24", "design_flow", "240")
	lead.saveSetupForm()
	snap := setupSnapshot(t, app, jobID)
	if len(snap.Systems) != 1 || len(snap.Outlets) != 1 || len(snap.Instruments) != 1 {
		t.Fatalf("after the lead's setup: %d systems, %d outlets, %d instruments; want one each",
			len(snap.Systems), len(snap.Outlets), len(snap.Instruments))
	}
	outlet := snap.Outlets[0]

	// A technician's phone: 10,000 typed for 243 cfm, confirmed, then corrected.
	tech := joinWithCode(t, app, runFieldtab(t, bin, "join-code", "--db", store, "--role", "technician"), "Phone Kit")
	tech.waitSel("[data-test=job-home]")
	tech.click(tagSel("open-outlets", "RTU-3"))
	tech.click(tagSel("outlet-item", "S-7"))
	tech.waitSel(tagSel("outlet-screen", "S-7"))
	tech.choose("[data-test=stage]", "as_found")
	tech.typeInto("[data-test=reading-value]", "10000")
	tech.click("[data-test=reading-save]")
	tech.waitSel("[data-test=confirm-far]")
	tech.click("[data-test=confirm-yes]")
	app.waitAtLeast(jobID, 1)
	tech.click("[data-test=outlet-stage][data-stage=as_found] [data-test=correct]")
	tech.typeInto("[data-test=fix-value]", "243")
	tech.click("[data-test=fix-save]")
	app.waitAtLeast(jobID, 2)
	tech.choose("[data-test=stage]", "final")
	tech.typeInto("[data-test=reading-value]", "236")
	tech.click("[data-test=reading-save]")
	app.waitAtLeast(jobID, 3)
	tech.waitSync("data-waiting", "0", syncTimeout)
	if first, ok := readingByValue(app.readings(jobID), outlet.ID, "flow", 10000); !ok || !first.Confirmed {
		t.Errorf("the slipped digit in the store: %+v (found %v); want it kept, confirmed", first, ok)
	}
	if fixed, ok := readingByValue(app.readings(jobID), outlet.ID, "flow", 243); !ok || fixed.Supersedes == "" {
		t.Errorf("the correction in the store: %+v (found %v); want 243 superseding the slip", fixed, ok)
	}

	// The lead signs revision 1 on the tablet.
	lead.goHash("#/job/" + jobID + "/signoff")
	lead.waitSel("[data-test=signoff-screen]")
	lead.typeInto("[data-test=signoff-name]", "Robin Vale")
	lead.typeInto("[data-test=signoff-cert]", "TAB-5521")
	lead.run("draw", chromedp.Evaluate[chromedp.Void](`(() => {
		const c = `+q("[data-test=signature-pad]")+`; const r = c.getBoundingClientRect();
		const ev = (type, i) => c.dispatchEvent(new PointerEvent(type, {pointerId: 3, bubbles: true, clientX: r.left + 12 + i * 7, clientY: r.top + r.height / 2 + (i % 4) * 5}));
		ev('pointerdown', 0); for (let i = 1; i < 25; i++) ev('pointermove', i); ev('pointerup', 25);
	})()`))
	lead.click("[data-test=report-sign]")
	lead.click("[data-test=report-sign-confirm]")
	lead.waitFor("the signed revision", q("[data-test=report-revision][data-revision='1']")+` && `+q("[data-test=report-signed]"), 90*time.Second)

	_, pdf, err := app.db.ReportPDF(ctx, jobID, 1)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := report.Verify(pdf); err != nil {
		t.Fatalf("the signed revision does not verify: %v", err)
	}
	rev := filepath.Join(dir, "rev1.pdf")
	if err := os.WriteFile(rev, pdf, 0o600); err != nil {
		t.Fatal(err)
	}
	if _, err := exec.LookPath("pdftotext"); err == nil {
		out, err := exec.Command("pdftotext", "-layout", rev, "-").Output()
		if err != nil {
			t.Fatal(err)
		}
		text := string(out)
		for _, want := range []string{"Quayside Clinic", "QC-0417", "RTU-3", "S-7", "243", "236", "10,000", "Robin Vale", "TAB-5521"} {
			if !strings.Contains(text, want) {
				t.Errorf("the signed report lacks %q", want)
			}
		}
		if strings.Contains(strings.ToUpper(text), "PRELIMINARY") {
			t.Error("the signed revision still carries the preliminary stamp")
		}
	}
	// The command line finds the revision in the store the server still holds open.
	if out := runFieldtab(t, bin, "verify", rev, "--db", store); !strings.Contains(strings.ToLower(out), "revision 1") {
		t.Errorf("fieldtab verify --db: %s", out)
	}
	lead.checkConsole(false)
}

// TestBrowserLeadJoinCode: the lead's new join code shows a link a phone can
// reach with its QR code, or, with none, says why in words (and never prints
// "null" where the QR code would be).
func TestBrowserLeadJoinCode(t *testing.T) {
	app := startApp(t)
	job := makeBrowserJob(t, app.db, 1)
	code, _, err := app.srv.NewJoinCode("lead")
	if err != nil {
		t.Fatal(err)
	}
	p := newPage(t, app)
	p.navigate("/#join=" + strings.ReplaceAll(code, "-", ""))
	p.wait("the join code", joinCodeIs(strings.ReplaceAll(code, "-", "")))
	p.typeInto("[data-test=device-name]", "Lead tablet")
	p.click("[data-test=join-submit]")
	p.waitSel("[data-test=job-home]")
	p.goHash("#/job/" + job.job + "/lead")

	// The test server listens on 127.0.0.1 only: no link, and the reason.
	app.srv.SetJoinNote("fieldtab listens only on this computer")
	p.click("[data-test=new-join-code]")
	p.wait("the code and the reason for no link", q("[data-test=join-url]")+" && "+q("[data-test=join-url]")+
		".textContent.includes('listens only on this computer')")
	if box := p.text("[data-test=join-code-box]"); strings.Contains(box, "null") || p.count("[data-test=join-qr]") != 0 {
		t.Errorf("with no link the code box shows %q and %d QR codes", box, p.count("[data-test=join-qr]"))
	}

	// With a LAN address, the link uses it and its QR code is drawn.
	app.srv.SetLANAddrs([]string{"192.0.2.10:8470"})
	p.click("[data-test=new-join-code]")
	p.wait("the LAN link", q("[data-test=join-url]")+".textContent.startsWith('http://192.0.2.10:8470/#join=')")
	p.waitSel("[data-test=join-qr]")
	p.screenshots("lead-join-code", "[data-test=join-code-box]")
}
