package report

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"fieldtab/schema"
)

// The PDF is read back with poppler's pdftotext, pdfinfo and pdfimages and
// checked with qpdf (DESIGN.md §7): the text a reader's tools extract is the
// test, not the library's own account of what it drew.

// needTool skips without a tool, except under CI, where it fails.
func needTool(t testing.TB, name, pkg string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s is not installed and CI is set, so the report tests may not be skipped: install %s (./test.sh does, as root)", name, pkg)
		}
		t.Skipf("%s is not installed: install %s (./test.sh does, as root) to run the report tests", name, pkg)
	}
	return p
}

func run(t testing.TB, name string, args ...string) string {
	t.Helper()
	out, err := exec.Command(name, args...).CombinedOutput()
	if err != nil {
		t.Fatalf("%s %s: %v\n%s", name, strings.Join(args, " "), err, out)
	}
	return string(out)
}

// render writes in's report to a file in a temp dir and returns its path and bytes.
func render(t testing.TB, in Input) (string, []byte) {
	t.Helper()
	var b bytes.Buffer
	if err := Render(&b, in); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "report.pdf")
	if err := os.WriteFile(path, b.Bytes(), 0o600); err != nil {
		t.Fatal(err)
	}
	return path, b.Bytes()
}

// norm folds the no-break spaces the report puts between a number and its
// unit, and runs of white space, into single spaces.
func norm(s string) string {
	return strings.Join(strings.Fields(strings.ReplaceAll(s, "\u00a0", " ")), " ")
}

// pdfText is the file's text: "layout" keeps each table row on its line,
// "raw" keeps the order of drawing, so a wrapped cell reads as one run.
func pdfText(t testing.TB, path, mode string, pages ...int) string {
	t.Helper()
	args := []string{"-" + mode, "-enc", "UTF-8"}
	if len(pages) == 2 {
		args = append(args, "-f", strconv.Itoa(pages[0]), "-l", strconv.Itoa(pages[1]))
	}
	return run(t, "pdftotext", append(args, path, "-")...)
}

func pageCount(t testing.TB, path string) int {
	t.Helper()
	m := regexp.MustCompile(`(?m)^Pages:\s+(\d+)`).FindStringSubmatch(run(t, "pdfinfo", path))
	if m == nil {
		t.Fatal("pdfinfo gave no page count")
	}
	n, _ := strconv.Atoi(m[1])
	return n
}

// rowWith returns the layout lines holding tag as a whole field.
func rowsWith(layout, tag string) []string {
	re := regexp.MustCompile(`(^|\s)` + regexp.QuoteMeta(tag) + `(\s|$)`)
	var out []string
	for _, l := range strings.Split(layout, "\n") {
		if re.MatchString(l) {
			out = append(out, norm(l))
		}
	}
	return out
}

func TestRenderDemoJob(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	needTool(t, "qpdf", "qpdf")
	in := demoInput(t)
	path, _ := render(t, in)
	layout := pdfText(t, path, "layout")
	raw := norm(pdfText(t, path, "raw"))
	u := newUnits(in.Results.Units)

	// Structure: qpdf finds no damage.
	if out := run(t, "qpdf", "--check", path); !strings.Contains(out, "No syntax or stream encoding errors") {
		t.Errorf("qpdf --check:\n%s", out)
	}

	for _, part := range []string{"Basis of the figures, and cautions", "Findings", "Outlets", "Water tests", "Instruments",
		"Revision history", "Sign-off", "Methods and their sources", "Safety",
		// The deferral and the safety cautions DESIGN.md §6 asks for.
		"defers to the project specification, local codes and the engineer of record",
		"lock out and tag out", "qualified people with suitable PPE", "Hot water and steam", "Roofs and ladders",
		// Symbols the embedded font must carry.
		"ΔP (psi)", "°F", "±", "ft²", "lb/ft³", "−", "—", "×"} {
		if !strings.Contains(raw, part) {
			t.Errorf("the report lacks %q", part)
		}
	}

	// Every outlet, with the % of design and status results give it, on its row.
	for _, o := range in.Results.Outlets {
		rows := rowsWith(layout, o.Tag)
		want := []string{status(o.Status)}
		if g := governing(&o); g != nil && g.Tolerance != nil {
			want = append(want, norm(u.pct(g.Tolerance.PercentOfDesign)))
		}
		found := false
		for _, r := range rows {
			ok := true
			for _, w := range want {
				ok = ok && strings.Contains(r, w)
			}
			found = found || ok
		}
		if !found {
			t.Errorf("outlet %s: no row with %q; rows with the tag: %q", o.Tag, want, rows)
		}
	}

	// Each capacity test's delivered total and its ±, expected total and %
	// of expected, as the report formats results' figures.
	for _, ct := range in.Results.CapacityTests {
		if ct.Capacity == nil || ct.Uncertainty == nil || ct.Expected == nil || ct.PercentOfExpected == nil {
			t.Fatalf("fixture capacity test %s has no capacity to check: status %s, errors %q", ct.Tag, ct.Status, ct.Errors)
		}
		for _, w := range []string{
			"Delivered total " + norm(u.capPM(ct.Capacity.Total, ct.Uncertainty.Total, ct.Mode == "cooling")),
			"Delivered sensible " + norm(u.capPM(ct.Capacity.Sensible, ct.Uncertainty.Sensible, ct.Mode == "cooling")),
			norm(u.capU(ct.Expected.Total, ct.Mode == "cooling")) + " total",
			norm(pm(u.pct(*ct.PercentOfExpected), u.pct(*ct.PercentOfExpectedUncertainty))) + " of expected: " + status(ct.Status),
			"Psychrometric chart of " + ct.Tag,
		} {
			if !strings.Contains(raw, w) {
				t.Errorf("capacity test %s: the report lacks %q", ct.Tag, w)
			}
		}
	}
	// Each system's measured airflow and fan-law speed.
	for _, s := range in.Results.Systems {
		if s.Airflow == nil || s.FanLaw == nil {
			t.Fatalf("fixture system %s has no airflow or fan law", s.Tag)
		}
		for _, w := range []string{norm(u.air(*s.Airflow)), "Fan speed " + norm(u.rpmP(s.FanRPM)) + " " + norm(u.rpm(s.FanLaw.FanRPM))} {
			if !strings.Contains(raw, w) {
				t.Errorf("system %s: the report lacks %q", s.Tag, w)
			}
		}
	}
	// Each traverse's flow and every point's velocity.
	for _, tr := range in.Results.Traverses {
		if tr.Flow == nil {
			t.Fatalf("fixture traverse %s has no flow", tr.Tag)
		}
		if w := norm(u.air(*tr.Flow)); !strings.Contains(raw, w) {
			t.Errorf("traverse %s: the report lacks its flow %q", tr.Tag, w)
		}
		for _, p := range tr.Points {
			rows := rowsWith(layout, p.Label)
			if len(rows) == 0 || !strings.Contains(rows[0], norm(u.velocity(*p.Velocity))) {
				t.Errorf("traverse %s %s: no row with its velocity %s: %q", tr.Tag, p.Label, u.velocity(*p.Velocity), rows)
			}
		}
	}
	// Each water test's flow and, where linked, the air/water difference.
	for _, w := range in.Results.WaterTests {
		if w.Flow == nil {
			t.Fatalf("fixture water test %s has no flow", w.Tag)
		}
		if s := norm(u.water(*w.Flow)); !strings.Contains(raw, s) {
			t.Errorf("water test %s: the report lacks its flow %q", w.Tag, s)
		}
		if w.AirSide != nil {
			if s := norm(signedPct(u, w.AirSide.DifferencePct)); !strings.Contains(raw, s) {
				t.Errorf("water test %s: the report lacks the air/water difference %q", w.Tag, s)
			}
		}
	}
	// Every finding, in full.
	for _, f := range in.Results.Findings {
		if !strings.Contains(raw, norm(f.Text)) {
			t.Errorf("the report lacks the finding %q", f.Text)
		}
	}
	// Every instrument with its serial and due date.
	for _, in := range in.Snapshot.Instruments {
		if rows := rowsWith(layout, in.Serial); len(rows) == 0 || !strings.Contains(rows[0], in.CalibrationDue) {
			t.Errorf("instrument %s: no row with its serial and due date %s: %q", in.Tag, in.CalibrationDue, rows)
		}
	}
	// The site pressure the psychrometrics used, from results.
	if w := norm(u.barometricU(in.Results.SitePressure)); !strings.Contains(raw, w) {
		t.Errorf("the report lacks the site pressure %q", w)
	}
}

// The footer numbers every page "Page n of N", N being the page count.
func TestRenderPageNumbers(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	path, _ := render(t, demoInput(t))
	n := pageCount(t, path)
	if n < 10 {
		t.Fatalf("the demo report has %d pages; expected at least 10", n)
	}
	for _, p := range []int{1, n / 2, n} {
		want := "Page " + strconv.Itoa(p) + " of " + strconv.Itoa(n)
		if text := norm(pdfText(t, path, "raw", p, p)); !strings.Contains(text, want) {
			t.Errorf("page %d lacks %q", p, want)
		}
	}
}

// Same input, same bytes; and the same data stored twice (other IDs, other
// store) gives the same bytes too, since no ID or map order reaches the page.
func TestRenderDeterministic(t *testing.T) {
	in := demoInput(t)
	var a, b bytes.Buffer
	if err := Render(&a, in); err != nil {
		t.Fatal(err)
	}
	if err := Render(&b, in); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("two renders of one input differ")
	}
	var c bytes.Buffer
	if err := Render(&c, demoInput(t)); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), c.Bytes()) {
		t.Fatal("the same job stored twice renders differently")
	}
	in.Generated = in.Generated.Add(time.Minute)
	var d bytes.Buffer
	if err := Render(&d, in); err != nil {
		t.Fatal(err)
	}
	if bytes.Equal(a.Bytes(), d.Bytes()) {
		t.Fatal("a later clock gives the same bytes: the date is not in the file")
	}
}

// Names with PDF string delimiters, accents and non-Latin scripts print as
// they are; runes the font lacks do not break the file.
func TestRenderUnicodeNames(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	needTool(t, "qpdf", "qpdf")
	p := newPlan(schema.Job{Name: `Ωμέγα Hall (east) \ Дом культуры "Zürich"`, SiteAddress: `Rue de l'Église 3 (côté cour) \ Łódź`,
		Client: "Ñandú Åström Ltd (owner)", Engineer: "Ζωή Παπαδοπούλου", Contractor: "ООО «Климат» \\ Kraków",
		TABFirm: "Þór & Ødegård (TAB)", Units: "si"})
	p.instrumentsFor(fixtureNow)
	sys := p.system(schema.System{Tag: "ΚΚΜ-1", Kind: "air_handler", Name: "Зал (main) \\ hall", Location: "Dachgeschoß",
		Design: schema.SystemDesign{Airflow: 1200}})
	rooms := map[string]string{
		"Σ-1":  "Κουζίνα (kitchen)",
		"П-2":  `Спальня \ 2`,
		"É-3":  "Salle à manger (étage)",
		"CJK":  "会議室 room",
		"Emoj": "Lobby 😀 east",
	}
	for _, tag := range []string{"Σ-1", "П-2", "É-3", "CJK", "Emoj"} {
		id := p.outlet(sys.ID, tag, rooms[tag], "supply", "600×600", 240)
		p.read(schema.SubjectOutlet, id, "flow", 0, 236, schema.UnitLps, schema.StageFinal, "Hood 1", fixtureNow.Add(-time.Hour))
	}
	s := p.store(t, t.TempDir(), fixtureNow)
	path, _ := render(t, inputFor(t, s, fixtureNow))
	if out := run(t, "qpdf", "--check", path); !strings.Contains(out, "No syntax or stream encoding errors") {
		t.Errorf("qpdf --check:\n%s", out)
	}
	raw := norm(pdfText(t, path, "raw"))
	for _, w := range []string{s.Job.Name, s.Job.SiteAddress, s.Job.Client, s.Job.Engineer, s.Job.Contractor, s.Job.TABFirm,
		"ΚΚΜ-1", `Зал (main) \ hall`, "Σ-1", "Κουζίνα (kitchen)", "П-2", `Спальня \ 2`, "É-3", "Salle à manger (étage)",
		"600×600", "L/s", "m³",
		// CJK is beyond the Go fonts: it prints as empty boxes, but the
		// text layer keeps it.
		"会議室 room",
		// Beyond U+FFFF gofpdf cannot go: the emoji becomes U+FFFD.
		"Lobby \ufffd east",
	} {
		if !strings.Contains(raw, norm(w)) {
			t.Errorf("the report lacks %q", w)
		}
	}
	info := run(t, "pdfinfo", "-enc", "UTF-8", path)
	if !strings.Contains(info, s.Job.Name) || !strings.Contains(info, s.Job.TABFirm) {
		t.Errorf("the document's title and author lack the names:\n%s", info)
	}
	// A4 for an SI job.
	if !strings.Contains(info, "(A4)") {
		t.Errorf("an SI job's report is not on A4:\n%s", info)
	}
}

// signaturePNG draws a scrawl on a transparent background, as the sign-off
// canvas gives.
func signaturePNG(t testing.TB) []byte {
	t.Helper()
	img := image.NewNRGBA(image.Rect(0, 0, 300, 100))
	for x := 10; x < 290; x++ {
		y := 50 + int(30*math.Sin(float64(x)/25))
		for dy := -1; dy <= 1; dy++ {
			img.Set(x, y+dy, color.NRGBA{10, 20, 90, 255})
		}
	}
	var b bytes.Buffer
	if err := png.Encode(&b, img); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func TestRenderSignoffAndHistory(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	needTool(t, "pdfimages", "poppler-utils")
	in := demoInput(t)
	in.Revision = 2
	in.History = []Revision{{Number: 1, IssuedAt: fixtureNow.Add(-72 * time.Hour), Signer: "Ada Quill",
		SnapshotSHA256: strings.Repeat("ab12", 16), Note: "first issue"}}
	in.Issued = true
	in.Signoff = &Signoff{Name: "Ada Quill", Certification: "TAB-0042 (fictional)", Organisation: "Fixture balancing crew",
		SignedAt: fixtureNow, SignaturePNG: signaturePNG(t)}
	path, _ := render(t, in)
	raw := norm(pdfText(t, path, "raw"))
	// The digest prints in groups of 16 hex digits, so that it wraps between them.
	for _, w := range []string{"Signed by Ada Quill", "TAB-0042 (fictional)", strings.Repeat("ab12", 4) + " " + strings.Repeat("ab12", 4), "first issue",
		"Revision 2", "this report"} {
		if !strings.Contains(raw, w) {
			t.Errorf("the report lacks %q", w)
		}
	}
	if strings.Contains(raw, "not signed") {
		t.Error("a signed report still says it is not signed")
	}
	// The drawn signature is an image with its transparency as a soft mask.
	imgs := run(t, "pdfimages", "-list", path)
	if !regexp.MustCompile(`(?m)^\s*\d+\s+\d+\s+image\s+300\s+100\b`).MatchString(imgs) ||
		!regexp.MustCompile(`(?m)^\s*\d+\s+\d+\s+smask\s+300\s+100\b`).MatchString(imgs) {
		t.Errorf("the signature image is not in the file:\n%s", imgs)
	}
}

func TestRenderProgress(t *testing.T) {
	in := demoInput(t)
	var calls [][2]int
	in.Progress = func(done, total int) { calls = append(calls, [2]int{done, total}) }
	var b bytes.Buffer
	if err := Render(&b, in); err != nil {
		t.Fatal(err)
	}
	// Cover, contents, basis, findings, 3 systems, outlets, 2 traverses, water,
	// instruments, reading log, history, sign-off, the contents' page
	// numbers, and the output.
	const want = 17
	if len(calls) != want {
		t.Fatalf("progress called %d times, want %d: %v", len(calls), want, calls)
	}
	for i, c := range calls {
		if c != [2]int{i + 1, want} {
			t.Fatalf("call %d is %v, want [%d %d]", i, c, i+1, want)
		}
	}
}

func TestRenderInvalidInput(t *testing.T) {
	good := demoInput(t)
	bad := func(f func(*Input)) Input {
		in := good
		f(&in)
		return in
	}
	for _, tc := range []struct {
		name, field string
		in          Input
	}{
		{"ErrNoSnapshot", "snapshot", bad(func(in *Input) { in.Snapshot = nil })},
		{"ErrNoResults", "results", bad(func(in *Input) { in.Results = nil })},
		{"ErrOtherJobsResults", "results", bad(func(in *Input) { r := *in.Results; r.JobID = schema.NewID(); in.Results = &r })},
		{"ErrRevisionZero", "revision", bad(func(in *Input) { in.Revision = 0 })},
		{"ErrNoClock", "generated", bad(func(in *Input) { in.Generated = time.Time{} })},
		{"ErrHistoryNumber", "history[0].number", bad(func(in *Input) { in.History = []Revision{{}} })},
		{"ErrHistoryDigest", "history[0].snapshot_sha256", bad(func(in *Input) { in.History = []Revision{{Number: 1, SnapshotSHA256: "ABC"}} })},
		{"ErrSignerName", "signoff.name", bad(func(in *Input) { in.Signoff = &Signoff{SignedAt: fixtureNow} })},
		{"ErrSignedAt", "signoff.signed_at", bad(func(in *Input) { in.Signoff = &Signoff{Name: "A"} })},
		{"ErrSignatureNotPNG", "signoff.signature_png", bad(func(in *Input) {
			in.Signoff = &Signoff{Name: "A", SignedAt: fixtureNow, SignaturePNG: []byte("GIF89a")}
		})},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var b bytes.Buffer
			err := Render(&b, tc.in)
			if schema.ErrorCode(err) != schema.Invalid || schema.ErrorField(err) != tc.field {
				t.Fatalf("err = %v (code %q, field %q); want invalid %q", err, schema.ErrorCode(err), schema.ErrorField(err), tc.field)
			}
			if b.Len() != 0 {
				t.Errorf("%d bytes written for a refused input", b.Len())
			}
		})
	}
}

// wordBoxes are pdftotext's word boxes, pt, by page.
type wordBox struct {
	page                   int
	xMin, yMin, xMax, yMax float64
	text                   string
}

var (
	bboxPage = regexp.MustCompile(`<page width="([\d.]+)" height="([\d.]+)">`)
	bboxWord = regexp.MustCompile(`<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</word>`)
)

// checkMargins fails for any word that reaches into a side margin or off
// the page: text that ran out of its cell at a table's edge would.
func checkMargins(t *testing.T, path string) {
	t.Helper()
	out := run(t, "pdftotext", "-bbox", "-enc", "UTF-8", path, "-")
	margin := marginSide * 72 / 25.4 // pt
	bad := 0
	for i, pg := range strings.Split(out, "</page>") {
		m := bboxPage.FindStringSubmatch(pg)
		if m == nil {
			continue
		}
		w, _ := strconv.ParseFloat(m[1], 64)
		h, _ := strconv.ParseFloat(m[2], 64)
		for _, wm := range bboxWord.FindAllStringSubmatch(pg, -1) {
			var b [4]float64
			for k := range b {
				b[k], _ = strconv.ParseFloat(wm[k+1], 64)
			}
			if b[0] < margin-0.5 || b[2] > w-margin+0.5 || b[1] < 0 || b[3] > h {
				if bad++; bad <= 10 {
					t.Errorf("page %d: %q at x %.1f–%.1f, y %.1f–%.1f runs outside the text area (x %.1f–%.1f)",
						i+1, wm[5], b[0], b[2], b[1], b[3], margin, w-margin)
				}
			}
		}
	}
}

// fit and wrap keep every piece of text inside the width it is given, as
// gofpdf measures it in the embedded font.
func TestFitAndWrapStayInside(t *testing.T) {
	d := newDoc(demoInput(t))
	d.pdf.AddPage()
	texts := []string{"", "S-1", "Κουζίνα (kitchen) with a very long name that goes on and on past any column",
		strings.Repeat("W", 300), strings.Repeat("ЖЖЖ ", 50), "a\u00a0b\u00a0c\u00a0" + strings.Repeat("x", 80), "会議室 😀 \x07 bell"}
	for _, size := range []float64{sizeTiny, sizeTable, sizeTitle} {
		d.font(famSans, "B", size)
		for _, w := range []float64{0.5, 3, 12, 40, 186} {
			for _, s := range texts {
				if f := d.fit(s, w); d.width(f) > w+1e-9 {
					t.Errorf("fit(%.20q, %g) at %g pt is %.2f mm wide", s, w, size, d.width(f))
				}
				lines := d.wrap(s, w)
				joined := strings.Join(lines, "")
				for _, l := range lines {
					// A single glyph wider than the column is the one thing
					// that may not fit.
					if d.width(l) > w+1e-9 && len([]rune(l)) > 1 {
						t.Errorf("wrap(%.20q, %g) at %g pt has a line %.2f mm wide: %q", s, w, size, d.width(l), l)
					}
				}
				if strings.ReplaceAll(joined, " ", "") != strings.ReplaceAll(clean(s), " ", "") && strings.TrimSpace(s) != "" {
					t.Errorf("wrap(%.20q, %g) lost text: %q", s, w, lines)
				}
			}
		}
	}
	if d.pdf.Err() {
		t.Fatal(d.pdf.Error())
	}
}

// Names at schema's length limits stay inside their cells and the page.
func TestRenderLongNames(t *testing.T) {
	needTool(t, "pdftotext", "poppler-utils")
	needTool(t, "qpdf", "qpdf")
	long := func(word string, n int) string {
		s := ""
		for len([]rune(s)) < n {
			s += word + " "
		}
		return strings.TrimSpace(string([]rune(s)[:n]))
	}
	p := newPlan(schema.Job{Name: long("Extraordinarily-long-building-name", 200), SiteAddress: long("Address", 200),
		Client: long("ClientNameWithoutAnySpacesAtAllWhichMustBreak", 200), Engineer: long("Engineer", 200),
		Contractor: long("Contractor", 200), TABFirm: long("Firm", 200), Units: "ip"})
	p.instrumentsFor(fixtureNow)
	sys := p.system(schema.System{Tag: long("SYSTEM-TAG-", 40), Kind: "rooftop_unit", Name: long("Name", 200),
		Location: long("Location", 200), Design: schema.SystemDesign{Airflow: 450_000, FanRPM: 1200}})
	for i := range 4 {
		id := p.outlet(sys.ID, long(fmt.Sprint("OUTLETTAG", i), 40), long("Room", 200), "supply", long("Size", 40), 45_000)
		p.read(schema.SubjectOutlet, id, "flow", 0, 44_444, schema.UnitCFM, schema.StageFinal, "Hood 1", fixtureNow.Add(-time.Hour))
	}
	p.read(schema.SubjectSystem, sys.ID, "fan_rpm", 0, 1234, schema.UnitRPM, schema.StageFinal, "Tach 1", fixtureNow.Add(-time.Hour))
	s := p.store(t, t.TempDir(), fixtureNow)
	path, _ := render(t, inputFor(t, s, fixtureNow))
	if out := run(t, "qpdf", "--check", path); !strings.Contains(out, "No syntax or stream encoding errors") {
		t.Errorf("qpdf --check:\n%s", out)
	}
	checkMargins(t, path)
	// The job's name is printed in full on the cover, wrapped.
	if raw := norm(pdfText(t, path, "raw", 1, 1)); !strings.Contains(raw, s.Job.Name) {
		t.Error("the cover does not carry the job's whole name")
	}
}

// The large job: its tables break across pages with their heading repeated,
// every outlet is listed, no text leaves the text area, and the pages count.
func TestRenderLargeJob(t *testing.T) {
	if testing.Short() {
		t.Skip("the large job takes a few seconds under the race detector")
	}
	needTool(t, "pdftotext", "poppler-utils")
	needTool(t, "qpdf", "qpdf")
	in := inputFor(t, largePlan(t, fixtureNow).memory(), fixtureNow)
	path, _ := render(t, in)
	if out := run(t, "qpdf", "--check", path); !strings.Contains(out, "No syntax or stream encoding errors") {
		t.Errorf("qpdf --check:\n%s", out)
	}
	n := pageCount(t, path)
	pages := strings.Split(pdfText(t, path, "layout"), "\f")
	if !strings.Contains(norm(pages[n-1]), fmt.Sprintf("Page %d of %d", n, n)) {
		t.Errorf("the last page does not say it is page %d of %d", n, n)
	}
	row := regexp.MustCompile(`(?m)^\s*([SRE]-\d+) `)
	head := regexp.MustCompile(`(?m)^\s*Tag\s+Room\s+Kind\s+Size\s+Factor\s+Design\s+As found\s+Final`)
	listed := map[string]bool{}
	outletPages := 0
	for i, pg := range pages {
		tags := row.FindAllStringSubmatch(pg, -1)
		if len(tags) == 0 {
			continue
		}
		outletPages++
		if !head.MatchString(pg) {
			t.Errorf("page %d lists outlets under no heading row", i+1)
		}
		for _, m := range tags {
			listed[m[1]] = true
		}
	}
	if outletPages < 20 {
		t.Errorf("the outlets fill %d pages; 1,500 outlets should need more than 20", outletPages)
	}
	for _, o := range in.Results.Outlets {
		if !listed[o.Tag] {
			t.Errorf("outlet %s is not listed", o.Tag)
		}
	}
	checkMargins(t, path)
}

// Reports rendered at once share nothing: gofpdf appends to the font bytes
// it is given, so each document takes its own copy (the race detector
// watches this test).
func TestRenderConcurrent(t *testing.T) {
	in := demoInput(t)
	outs := make([][]byte, 3)
	errs := make([]error, 3)
	var wg sync.WaitGroup
	for i := range outs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var b bytes.Buffer
			errs[i] = Render(&b, in)
			outs[i] = b.Bytes()
		}()
	}
	wg.Wait()
	for i := range outs {
		if errs[i] != nil {
			t.Fatal(errs[i])
		}
		if !bytes.Equal(outs[i], outs[0]) {
			t.Errorf("concurrent render %d differs from the first", i)
		}
	}
}

func TestFormatNumber(t *testing.T) {
	for _, tc := range []struct {
		v    float64
		dec  int
		si   bool
		want string
	}{
		{0, 0, false, "0"},
		{-0.2, 0, false, "0"}, // rounds to zero: no minus sign
		{-0.04, 1, false, "0.0"},
		{999.6, 0, false, "1,000"},
		{125669.4, 0, false, "125,669"},
		{-1234.5, 1, false, "\u22121,234.5"},
		{1234.5, 1, true, "1234.5"}, // SI leaves four digits whole
		{1234567, 0, true, "1\u00a0234\u00a0567"},
		{0.0089, 4, false, "0.0089"},
	} {
		if got := formatNumber(tc.v, tc.dec, tc.si); got != tc.want {
			t.Errorf("formatNumber(%v, %d, si %v) = %q, want %q", tc.v, tc.dec, tc.si, got, tc.want)
		}
	}
}

// A 16-bit signature, which gofpdf cannot read as it is, still goes on the page.
func TestRenderSignature16Bit(t *testing.T) {
	needTool(t, "pdfimages", "poppler-utils")
	img := image.NewNRGBA64(image.Rect(0, 0, 120, 40))
	for x := range 120 {
		img.Set(x, 20+x%10, color.NRGBA64{0, 0, 0x9000, 0xffff})
	}
	var b bytes.Buffer
	if err := png.Encode(&b, img); err != nil {
		t.Fatal(err)
	}
	in := demoInput(t)
	in.Signoff = &Signoff{Name: "Ada Quill", SignedAt: fixtureNow, SignaturePNG: b.Bytes()}
	path, _ := render(t, in)
	if imgs := run(t, "pdfimages", "-list", path); !regexp.MustCompile(`(?m)^\s*\d+\s+\d+\s+image\s+120\s+40\b`).MatchString(imgs) {
		t.Errorf("the 16-bit signature is not in the file:\n%s", imgs)
	}
}
