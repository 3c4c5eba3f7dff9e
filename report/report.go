package report

import (
	"bytes"
	"errors"
	"fmt"
	"image/png"
	"io"
	"regexp"
	"strings"
	"time"

	"github.com/jung-kurt/gofpdf"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goitalic"
	"golang.org/x/image/font/gofont/gomono"
	"golang.org/x/image/font/gofont/goregular"

	"fieldtab/schema"
)

// Input is everything one closeout report shows. Every figure comes from
// Results (schema.ComputeResults on Snapshot); Snapshot supplies the design
// data and the names.
type Input struct {
	Snapshot *schema.Snapshot
	Results  *schema.Results
	// Revision is this report's revision number, from 1.
	Revision int
	// History lists the revisions issued before this one, oldest first.
	History []Revision
	// Signoff is the signer's page; nil renders an unsigned report with lines
	// to sign on.
	Signoff *Signoff
	// Issued says this rendering is the revision being signed and stored
	// (Issue sets it). While it is false every page carries the stamp
	// "PRELIMINARY — not signed", whoever is named in Signoff.
	Issued bool
	// Generated is the report's clock: its date on every page, the PDF's
	// creation and modification dates, and the time zone all times print in.
	// The same Input with the same Generated gives the same bytes.
	Generated time.Time
	// Progress, when set, is called with the parts done so far out of the
	// total (sections, then one per system, traverse and so on, then the
	// file's output) as each is laid out, for a progress bar on a large job.
	// It is called on Render's goroutine.
	Progress func(done, total int)
}

// Revision is an issued revision of the report, for its history page.
type Revision struct {
	Number         int
	IssuedAt       time.Time
	Signer         string
	SnapshotSHA256 string // hex SHA-256 of the canonical job snapshot it was made from
	Note           string
}

// Signoff is who signs the report, and their drawn signature.
type Signoff struct {
	Name          string
	Certification string // certification or license number
	Organisation  string
	// Statement is the wording the signer certifies; empty prints
	// DefaultStatement.
	Statement    string
	SignedAt     time.Time
	SignaturePNG []byte // the drawn signature; nil leaves a line to sign on
}

// Limits on a drawn signature, so that a huge image cannot blow up a report.
const (
	maxSignatureBytes = 4 << 20
	maxSignaturePx    = 4000
)

var sha256Hex = regexp.MustCompile(`^[0-9a-f]{64}$`)

// Render lays out the closeout report of in and writes the PDF to w. Its
// figures are Results' own, in the job's unit system (Results.Units names
// them), rounded for print; the page is US Letter for an IP job, A4 for SI.
//
// It writes to an io.Writer so that the command line can stream to a file
// and the server to a response or to a buffer it signs; gofpdf holds the
// whole document in memory until its output, so nothing reaches w when
// Render fails before writing.
//
// Errors: *schema.Error with Code Invalid naming the input: "snapshot",
// "results" (absent, or computed for another job), "revision" (below 1),
// "generated" (zero), "history[i].number", "history[i].snapshot_sha256"
// (not 64 lower-case hex digits), "signoff.name", "signoff.signed_at",
// "signoff.signature_png" (not a PNG, over 4 MiB or 4000 px a side). Other
// errors are the PDF library's or w's.
func Render(w io.Writer, in Input) error {
	if err := check(in); err != nil {
		return err
	}
	d := newDoc(in)
	parts := d.parts()
	total := len(parts) + 1
	for i, p := range parts {
		p()
		if err := d.pdf.Error(); err != nil {
			var se *schema.Error
			if errors.As(err, &se) {
				return se
			}
			return fmt.Errorf("report: %w", err)
		}
		if in.Progress != nil {
			in.Progress(i+1, total)
		}
	}
	if err := d.pdf.Output(w); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	if in.Progress != nil {
		in.Progress(total, total)
	}
	return nil
}

func check(in Input) error {
	inv := func(field, format string, args ...any) error {
		return schema.Errorf(schema.Invalid, field, format, args...)
	}
	switch {
	case in.Snapshot == nil:
		return inv("snapshot", "no job snapshot given")
	case in.Results == nil:
		return inv("results", "no results given: compute them with schema.ComputeResults")
	case in.Results.JobID != in.Snapshot.Job.ID:
		return inv("results", "are for job %q, not the snapshot's job %q", in.Results.JobID, in.Snapshot.Job.ID)
	case in.Revision < 1:
		return inv("revision", "is %d; revisions count from 1", in.Revision)
	case in.Generated.IsZero():
		return inv("generated", "is not set: the report's date and the PDF's dates come from it")
	}
	for i, h := range in.History {
		if h.Number < 1 {
			return inv(fmt.Sprintf("history[%d].number", i), "is %d; revisions count from 1", h.Number)
		}
		if h.SnapshotSHA256 != "" && !sha256Hex.MatchString(h.SnapshotSHA256) {
			return inv(fmt.Sprintf("history[%d].snapshot_sha256", i), "is not a SHA-256 in 64 lower-case hex digits")
		}
	}
	if s := in.Signoff; s != nil {
		if strings.TrimSpace(s.Name) == "" {
			return inv("signoff.name", "is required")
		}
		if s.SignedAt.IsZero() {
			return inv("signoff.signed_at", "is required")
		}
		if s.SignaturePNG != nil {
			if len(s.SignaturePNG) > maxSignatureBytes {
				return inv("signoff.signature_png", "is %d bytes; at most %d are accepted", len(s.SignaturePNG), maxSignatureBytes)
			}
			cfg, err := png.DecodeConfig(bytes.NewReader(s.SignaturePNG))
			if err != nil {
				return inv("signoff.signature_png", "is not a PNG image: %v", err)
			}
			if cfg.Width < 1 || cfg.Height < 1 || cfg.Width > maxSignaturePx || cfg.Height > maxSignaturePx {
				return inv("signoff.signature_png", "is %d × %d px; 1 to %d px a side are accepted", cfg.Width, cfg.Height, maxSignaturePx)
			}
		}
	}
	return nil
}

// doc is one report being laid out.
type doc struct {
	pdf          *gofpdf.Fpdf
	in           Input
	s            *schema.Snapshot
	r            *schema.Results
	u            units
	loc          *time.Location
	pageW, pageH float64
	section      string     // the running header's right side
	tocPages     []int      // the contents pages, reserved after the cover
	toc          []tocEntry // the sections laid out so far

	// Design records by ID, for what results do not repeat (sizes, design
	// and nameplate data).
	systems   map[string]*schema.System
	outlets   map[string]*schema.Outlet
	traverses map[string]*schema.Traverse
	captests  map[string]*schema.CapacityTest
	waters    map[string]*schema.WaterTest
	insts     map[string]*schema.Instrument
	readings  map[string]*schema.Reading
	notesBy   map[string][]string // reading notes by subject, built on first use
	// Results by ID.
	rOutlets   map[string]*schema.OutletResult
	rTraverses map[string]*schema.TraverseResult
	rCaps      map[string]*schema.CapacityTestResult
}

// Paper follows the job's unit system: US Letter for IP, A4 for SI.
func newDoc(in Input) *doc {
	d := &doc{in: in, s: in.Snapshot, r: in.Results, u: newUnits(in.Results.Units), loc: in.Generated.Location()}
	size := "Letter"
	if d.u.si {
		size = "A4"
	}
	pdf := gofpdf.New("P", "mm", size, "")
	d.pdf = pdf
	d.pageW, d.pageH = pdf.GetPageSize()
	// Each document gets its own copy of the font bytes: gofpdf keeps and
	// appends to the slice it is given, a data race between concurrent reports.
	pdf.AddUTF8FontFromBytes(famSans, "", bytes.Clone(goregular.TTF))
	pdf.AddUTF8FontFromBytes(famSans, "B", bytes.Clone(gobold.TTF))
	pdf.AddUTF8FontFromBytes(famSans, "I", bytes.Clone(goitalic.TTF))
	pdf.AddUTF8FontFromBytes(famMono, "", bytes.Clone(gomono.TTF))
	pdf.AliasNbPages(nbAlias)
	pdf.SetMargins(marginSide, marginTop, marginSide)
	pdf.SetAutoPageBreak(false, marginBottom)
	pdf.SetCellMargin(0)
	pdf.SetHeaderFuncMode(d.header, true)
	pdf.SetFooterFuncLpi(d.footer)
	// Fixed dates and sorted catalogs: the same input gives the same bytes.
	gen := in.Generated.UTC()
	pdf.SetCreationDate(gen)
	pdf.SetModificationDate(gen)
	pdf.SetCatalogSort(true)
	pdf.SetTitle(clean("Test and balance report: "+in.Snapshot.Job.Name), true)
	pdf.SetSubject(d.revisionLabel(), true)
	pdf.SetAuthor(clean(in.Snapshot.Job.TABFirm), true)
	pdf.SetCreator("fieldtab", true)
	pdf.SetProducer("fieldtab", true)
	d.index()
	return d
}

func (d *doc) index() {
	s, r := d.s, d.r
	d.systems = byID(s.Systems, func(x *schema.System) string { return x.ID })
	d.outlets = byID(s.Outlets, func(x *schema.Outlet) string { return x.ID })
	d.traverses = byID(s.Traverses, func(x *schema.Traverse) string { return x.ID })
	d.captests = byID(s.CapacityTests, func(x *schema.CapacityTest) string { return x.ID })
	d.waters = byID(s.WaterTests, func(x *schema.WaterTest) string { return x.ID })
	d.insts = byID(s.Instruments, func(x *schema.Instrument) string { return x.ID })
	d.readings = byID(s.Readings, func(x *schema.Reading) string { return x.ID })
	d.rOutlets = byID(r.Outlets, func(x *schema.OutletResult) string { return x.ID })
	d.rTraverses = byID(r.Traverses, func(x *schema.TraverseResult) string { return x.ID })
	d.rCaps = byID(r.CapacityTests, func(x *schema.CapacityTestResult) string { return x.ID })
}

// parts lists the report's parts in reading order, one per progress step.
func (d *doc) parts() []func() {
	p := []func(){d.cover, d.contentsReserve, d.basis, d.findings}
	for i := range d.r.Systems {
		sr := &d.r.Systems[i]
		p = append(p, func() { d.system(sr) })
	}
	p = append(p, d.outletTables)
	for i := range d.r.Traverses {
		tr := &d.r.Traverses[i]
		p = append(p, func() { d.traverse(tr) })
	}
	p = append(p, d.waterTests, d.instruments, d.readingLog, d.history, d.signoff, d.contentsFill)
	return p
}

func (d *doc) revisionLabel() string {
	return "Revision " + itoa(d.in.Revision)
}

// byID indexes items by their ID, pointing into the slice.
func byID[T any](items []T, id func(*T) string) map[string]*T {
	m := make(map[string]*T, len(items))
	for i := range items {
		m[id(&items[i])] = &items[i]
	}
	return m
}
