package schema

import (
	"bytes"
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"regexp"
	"slices"
	"strings"
	"time"

	"github.com/mattn/go-sqlite3"
)

// Report is an issued (signed, frozen) revision of a job's closeout report,
// without its PDF bytes (ReportPDF has them).
type Report struct {
	ID             string    `json:"id"`
	JobID          string    `json:"job_id"`
	Revision       int       `json:"revision"` // from 1
	IssuedAt       time.Time `json:"issued_at"`
	Signer         string    `json:"signer"`
	PDFSHA256      string    `json:"pdf_sha256"`      // hex SHA-256 of the signed PDF as stored
	SnapshotSHA256 string    `json:"snapshot_sha256"` // SnapshotDigest of the data it was made from
	Size           int64     `json:"size"`            // PDF bytes
}

var hex64 = regexp.MustCompile(`^[0-9a-f]{64}$`)

// IssueReport freezes a revision of the job's report: it stores pdf (the
// signed file, as handed to the owner) as the job's next revision (the last
// issued + 1, from 1), with the SHA-256 of pdf, snapshotSHA256 (the
// SnapshotDigest of the snapshot the report was rendered from) and the
// signer's name, and writes an audit entry ("issue", entity "report").
// Issuing does not change the job's change number: reports are not design
// data and do not travel through ChangesSince.
//
// Only a lead issues: a.Role must be RoleLead. revision is the number the PDF
// prints (render with NextRevision's); when another revision was issued
// meanwhile nothing is stored and the answer is Conflict, so a stored PDF
// never prints a number other than its own.
//
// Errors: Forbidden (not a lead), NotFound (job), Invalid naming "pdf"
// (empty or not a PDF), "snapshot_sha256" (not 64 lower-case hex digits) or
// "signer" (empty), Conflict naming "pdf" (this very PDF is already stored)
// or "revision" (not the next one).
func (db *DB) IssueReport(ctx context.Context, a Actor, jobID string, revision int, pdf []byte, snapshotSHA256, signer string) (Report, error) {
	if a.Role != RoleLead {
		return Report{}, Errorf(Forbidden, "", "only a lead issues a signed report")
	}
	if !validUUID(jobID) {
		return Report{}, Errorf(NotFound, "job_id", "job %q not found", jobID)
	}
	switch {
	case !bytes.HasPrefix(pdf, []byte("%PDF-")):
		return Report{}, Errorf(Invalid, "pdf", "is not a PDF file")
	case !hex64.MatchString(snapshotSHA256):
		return Report{}, Errorf(Invalid, "snapshot_sha256", "is not a SHA-256 in 64 lower-case hex digits")
	case strings.TrimSpace(signer) == "":
		return Report{}, Errorf(Invalid, "signer", "is required")
	}
	sum := sha256.Sum256(pdf)
	r := Report{ID: NewID(), JobID: jobID, Signer: strings.TrimSpace(signer),
		PDFSHA256: hex.EncodeToString(sum[:]), SnapshotSHA256: snapshotSHA256, Size: int64(len(pdf))}
	at, now := db.stamp()
	r.IssuedAt = at
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		if _, err := loadJob(tx, jobID, nil); err != nil {
			return err
		}
		if err := tx.QueryRowContext(ctx, "SELECT COALESCE(MAX(revision), 0) + 1 FROM reports WHERE job_id = ?", jobID).Scan(&r.Revision); err != nil {
			return err
		}
		if revision != r.Revision {
			return Errorf(Conflict, "revision", "the PDF prints revision %d but the next is %d (another was issued meanwhile): render it again", revision, r.Revision)
		}
		_, err := tx.ExecContext(ctx, "INSERT INTO reports (id, job_id, revision, created_at, signer, pdf, pdf_sha256, snapshot_sha256) VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
			r.ID, jobID, r.Revision, now, r.Signer, pdf, r.PDFSHA256, r.SnapshotSHA256)
		if isConstraint(err, sqlite3.ErrConstraintUnique) || isConstraint(err, sqlite3.ErrConstraintPrimaryKey) {
			return Errorf(Conflict, "pdf", "this PDF is already stored as an issued revision")
		}
		if err != nil {
			return err
		}
		return addAudit(tx, at, a, jobID, "issue", "report", r.ID, map[string]any{
			"revision": r.Revision, "signer": r.Signer, "pdf_sha256": r.PDFSHA256, "snapshot_sha256": r.SnapshotSHA256, "size": r.Size})
	})
	if err != nil {
		return Report{}, wrapStore("issue report", err)
	}
	return r, nil
}

const reportColumns = "id, job_id, revision, created_at, signer, pdf_sha256, snapshot_sha256, length(pdf)"

func scanReport(row interface{ Scan(...any) error }) (Report, error) {
	var (
		r  Report
		at string
	)
	if err := row.Scan(&r.ID, &r.JobID, &r.Revision, &at, &r.Signer, &r.PDFSHA256, &r.SnapshotSHA256, &r.Size); err != nil {
		return Report{}, err
	}
	var err error
	r.IssuedAt, err = parseStamp(at)
	return r, err
}

// Reports lists the job's issued revisions, oldest first, without their
// PDFs. Errors: NotFound for an unknown job.
func (db *DB) Reports(ctx context.Context, jobID string) ([]Report, error) {
	if !validUUID(jobID) {
		return nil, Errorf(NotFound, "job_id", "job %q not found", jobID)
	}
	out := []Report{}
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		if _, err := loadJob(tx, jobID, nil); err != nil {
			return err
		}
		rows, err := tx.QueryContext(ctx, "SELECT "+reportColumns+" FROM reports WHERE job_id = ? ORDER BY revision", jobID)
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			r, err := scanReport(rows)
			if err != nil {
				return err
			}
			out = append(out, r)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, wrapStore("reports", err)
	}
	return out, nil
}

// NextRevision is the revision number the job's next report carries: the
// last issued + 1, so readings taken after a signed revision go into the
// next one. Errors: NotFound for an unknown job.
func (db *DB) NextRevision(ctx context.Context, jobID string) (int, error) {
	rs, err := db.Reports(ctx, jobID)
	if err != nil {
		return 0, err
	}
	if len(rs) == 0 {
		return 1, nil
	}
	return rs[len(rs)-1].Revision + 1, nil
}

// ReportPDF returns an issued revision with its PDF bytes. Errors: NotFound
// (job, or no such revision: field "revision").
func (db *DB) ReportPDF(ctx context.Context, jobID string, revision int) (Report, []byte, error) {
	if !validUUID(jobID) {
		return Report{}, nil, Errorf(NotFound, "job_id", "job %q not found", jobID)
	}
	var (
		r   Report
		pdf []byte
	)
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		if _, err := loadJob(tx, jobID, nil); err != nil {
			return err
		}
		var err error
		r, err = scanReport(tx.QueryRowContext(ctx, "SELECT "+reportColumns+" FROM reports WHERE job_id = ? AND revision = ?", jobID, revision))
		if errors.Is(err, sql.ErrNoRows) {
			return Errorf(NotFound, "revision", "revision %d of this job has not been issued", revision)
		}
		if err != nil {
			return err
		}
		return tx.QueryRowContext(ctx, "SELECT pdf FROM reports WHERE id = ?", r.ID).Scan(&pdf)
	})
	if err != nil {
		return Report{}, nil, wrapStore("report pdf", err)
	}
	return r, pdf, nil
}

// ReportBySHA finds the issued revision whose PDF has the hex SHA-256
// pdfSHA256 (upper or lower case), in any job. Errors: Invalid (field
// "pdf_sha256": not a SHA-256), NotFound (no revision has that PDF).
func (db *DB) ReportBySHA(ctx context.Context, pdfSHA256 string) (Report, error) {
	pdfSHA256 = strings.ToLower(pdfSHA256)
	if !hex64.MatchString(pdfSHA256) {
		return Report{}, Errorf(Invalid, "pdf_sha256", "is not a SHA-256 in 64 hex digits")
	}
	var r Report
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		var err error
		r, err = scanReport(tx.QueryRowContext(ctx, "SELECT "+reportColumns+" FROM reports WHERE pdf_sha256 = ?", pdfSHA256))
		if errors.Is(err, sql.ErrNoRows) {
			return Errorf(NotFound, "pdf_sha256", "no issued revision in this store has this PDF")
		}
		return err
	})
	if err != nil {
		return Report{}, wrapStore("report by digest", err)
	}
	return r, nil
}

// snapshotDigestVersion names the canonical form below; change it (and the
// form) together, never one without the other.
const snapshotDigestVersion = "fieldtab-snapshot-digest/1"

// SnapshotDigest is the hex SHA-256 of a canonical JSON form of s: what a
// report is made from, so that a signed revision can say whether the store
// still holds the same data.
//
// In it: the job's descriptive fields, units, elevation or barometric
// pressure and tolerances (every figure the report prints depends on them);
// every live design record of each kind with all its fields, sorted by ID;
// and every reading, superseded and void ones included (a correction or a
// void changes the figures, and the history is part of the report), sorted
// by ID, with what the technician entered: subject, quantity, point, value,
// unit, stage, instrument, technician, device, taken-at time, supersedes,
// void and note.
//
// Left out, because they are the store's bookkeeping and not the data: the
// change numbers (seq), created_at and updated_at of the job and of records,
// a reading's received_at (when the server got it, which a resend or a
// restore from backup changes), the deleted flag (deleted records are not in
// a Snapshot at all), and the job's status (closing a job changes no
// figure). So re-reading the same store, or the same data restored elsewhere,
// gives the same digest, and any new reading or changed design figure a
// different one.
//
// Errors: Invalid (field "snapshot") for nil.
func SnapshotDigest(s *Snapshot) (string, error) {
	if s == nil {
		return "", Errorf(Invalid, "snapshot", "no snapshot given")
	}
	// The snapshot's own fields, flattened after the version.
	type canonical struct {
		Version string `json:"version"`
		Snapshot
	}
	c := canonical{Version: snapshotDigestVersion, Snapshot: Snapshot{Job: s.Job}}
	c.Job.Seq, c.Job.CreatedAt, c.Job.UpdatedAt, c.Job.Status = 0, time.Time{}, time.Time{}, ""
	c.Instruments = canonRecords(s.Instruments, func(x *Instrument) (string, *recordMeta) { return x.ID, &x.recordMeta })
	c.Systems = canonRecords(s.Systems, func(x *System) (string, *recordMeta) { return x.ID, &x.recordMeta })
	c.Outlets = canonRecords(s.Outlets, func(x *Outlet) (string, *recordMeta) { return x.ID, &x.recordMeta })
	c.Traverses = canonRecords(s.Traverses, func(x *Traverse) (string, *recordMeta) { return x.ID, &x.recordMeta })
	c.CapacityTests = canonRecords(s.CapacityTests, func(x *CapacityTest) (string, *recordMeta) { return x.ID, &x.recordMeta })
	c.WaterTests = canonRecords(s.WaterTests, func(x *WaterTest) (string, *recordMeta) { return x.ID, &x.recordMeta })
	c.Readings = slices.Clone(s.Readings)
	for i := range c.Readings {
		r := &c.Readings[i]
		r.Seq, r.ReceivedAt = 0, time.Time{}
		r.TakenAt = r.TakenAt.UTC().Truncate(time.Millisecond) // as stored
	}
	slices.SortFunc(c.Readings, func(a, b Reading) int { return strings.Compare(a.ID, b.ID) })
	b, err := json.Marshal(c)
	if err != nil {
		return "", fmt.Errorf("snapshot digest: %w", err)
	}
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:]), nil
}

// canonRecords copies items sorted by ID with the store's bookkeeping
// (seq, created_at, updated_at, deleted) cleared.
func canonRecords[T any](items []T, key func(*T) (string, *recordMeta)) []T {
	out := slices.Clone(items)
	for i := range out {
		_, m := key(&out[i])
		*m = recordMeta{}
	}
	slices.SortFunc(out, func(a, b T) int {
		ia, _ := key(&a)
		ib, _ := key(&b)
		return strings.Compare(ia, ib)
	})
	if out == nil {
		out = []T{}
	}
	return out
}
