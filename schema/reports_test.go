package schema

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"testing"
	"time"
)

func fakePDF(n int) []byte {
	return []byte("%PDF-1.4\n% revision " + string(rune('0'+n)) + "\n%%EOF\n")
}

func TestIssueReportRevisions(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	s, err := db.Snapshot(ctx, f.job)
	if err != nil {
		t.Fatal(err)
	}
	digest, err := SnapshotDigest(s)
	if err != nil {
		t.Fatal(err)
	}
	if n, err := db.NextRevision(ctx, f.job); err != nil || n != 1 {
		t.Fatalf("next revision of a new job: %d, %v", n, err)
	}
	for want := 1; want <= 3; want++ {
		pdf := fakePDF(want)
		r, err := db.IssueReport(ctx, rdgLead, f.job, want, pdf, digest, "Dana Ortiz")
		if err != nil {
			t.Fatal(err)
		}
		sum := sha256.Sum256(pdf)
		if r.Revision != want || r.PDFSHA256 != hex.EncodeToString(sum[:]) || r.Size != int64(len(pdf)) || r.IssuedAt.IsZero() {
			t.Errorf("issued %+v, want revision %d", r, want)
		}
		if n, _ := db.NextRevision(ctx, f.job); n != want+1 {
			t.Errorf("next revision %d after issuing %d", n, want)
		}
	}
	// Another job counts its own revisions.
	if r, err := db.IssueReport(ctx, rdgLead, f.other, 1, fakePDF(9), digest, "Dana Ortiz"); err != nil || r.Revision != 1 {
		t.Errorf("other job: %+v %v", r, err)
	}
	rs, err := db.Reports(ctx, f.job)
	if err != nil || len(rs) != 3 || rs[0].Revision != 1 || rs[2].Revision != 3 || rs[1].SnapshotSHA256 != digest {
		t.Fatalf("reports %+v %v", rs, err)
	}
	r, pdf, err := db.ReportPDF(ctx, f.job, 2)
	if err != nil || string(pdf) != string(fakePDF(2)) || r.ID != rs[1].ID {
		t.Errorf("revision 2: %+v %q %v", r, pdf, err)
	}
	byDigest, err := db.ReportBySHA(ctx, rs[2].PDFSHA256)
	if err != nil || byDigest.ID != rs[2].ID || byDigest.JobID != f.job {
		t.Errorf("by digest: %+v %v", byDigest, err)
	}
	audit, err := db.Audit(ctx, f.job)
	if err != nil {
		t.Fatal(err)
	}
	issued := 0
	for _, e := range audit {
		if e.Action == "issue" && e.Entity == "report" {
			issued++
		}
	}
	if issued != 3 {
		t.Errorf("%d issue entries in the audit log, want 3", issued)
	}

	code := func(err error) Code {
		var e *Error
		if errors.As(err, &e) {
			return e.Code + Code(":"+e.Field)
		}
		return Code("other: " + err.Error())
	}
	for name, tc := range map[string]struct {
		err  error
		want Code
	}{
		"same pdf again":   {second(db.IssueReport(ctx, rdgLead, f.job, 4, fakePDF(1), digest, "D")), "conflict:pdf"},
		"stale revision":   {second(db.IssueReport(ctx, rdgLead, f.job, 3, fakePDF(6), digest, "D")), "conflict:revision"},
		"technician":       {second(db.IssueReport(ctx, Actor{Name: "T", Role: RoleTechnician}, f.job, 4, fakePDF(5), digest, "D")), "forbidden:"},
		"not a pdf":        {second(db.IssueReport(ctx, rdgLead, f.job, 4, []byte("hello"), digest, "D")), "invalid:pdf"},
		"bad digest":       {second(db.IssueReport(ctx, rdgLead, f.job, 4, fakePDF(5), "abc", "D")), "invalid:snapshot_sha256"},
		"no signer":        {second(db.IssueReport(ctx, rdgLead, f.job, 4, fakePDF(5), digest, " ")), "invalid:signer"},
		"unknown job":      {second(db.IssueReport(ctx, rdgLead, NewID(), 1, fakePDF(5), digest, "D")), "not_found:job_id"},
		"no revision":      {third(db.ReportPDF(ctx, f.job, 7)), "not_found:revision"},
		"unknown digest":   {second(db.ReportBySHA(ctx, digest)), "not_found:pdf_sha256"},
		"malformed digest": {second(db.ReportBySHA(ctx, "xyz")), "invalid:pdf_sha256"},
	} {
		if got := code(tc.err); got != tc.want {
			t.Errorf("%s: %s, want %s", name, got, tc.want)
		}
	}
}

func second[A any](_ A, err error) error        { return err }
func third[A, B any](_ A, _ B, err error) error { return err }

func TestSnapshotDigest(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	if _, err := db.AddReadings(ctx, rdgLead, f.job, f.batch()); err != nil {
		t.Fatal(err)
	}
	digest := func() string {
		t.Helper()
		s, err := db.Snapshot(ctx, f.job)
		if err != nil {
			t.Fatal(err)
		}
		d, err := SnapshotDigest(s)
		if err != nil {
			t.Fatal(err)
		}
		return d
	}
	d1 := digest()
	if d2 := digest(); d2 != d1 {
		t.Fatal("the digest of unchanged data changed")
	}
	// Order of records and readings in the snapshot does not matter, nor
	// do the store's change numbers and receipt times.
	s, _ := db.Snapshot(ctx, f.job)
	s.Readings[0], s.Readings[len(s.Readings)-1] = s.Readings[len(s.Readings)-1], s.Readings[0]
	for i := range s.Readings {
		s.Readings[i].Seq += 100
		s.Readings[i].ReceivedAt = s.Readings[i].ReceivedAt.Add(time.Hour)
	}
	s.Job.Seq, s.Job.UpdatedAt = 999, time.Now()
	if d, _ := SnapshotDigest(s); d != d1 {
		t.Error("reordering, seq or received_at changed the digest")
	}

	// A new reading changes it.
	if _, err := db.AddReadings(ctx, rdgLead, f.job, []Reading{f.reading(SubjectOutlet, "flow", UnitCFM, 390)}); err != nil {
		t.Fatal(err)
	}
	d3 := digest()
	if d3 == d1 {
		t.Error("a new reading left the digest unchanged")
	}
	// So does a design figure.
	s, _ = db.Snapshot(ctx, f.job)
	s.Outlets[0].DesignFlow++
	if d, _ := SnapshotDigest(s); d == d3 {
		t.Error("a changed design flow left the digest unchanged")
	}
	s, _ = db.Snapshot(ctx, f.job)
	v := *s.Readings[0].Value + 0.1
	s.Readings[0].Value = &v
	if d, _ := SnapshotDigest(s); d == d3 {
		t.Error("a changed reading value left the digest unchanged")
	}
	if _, err := SnapshotDigest(nil); err == nil {
		t.Error("nil snapshot accepted")
	}
}
