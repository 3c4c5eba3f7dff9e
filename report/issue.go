package report

import (
	"bytes"
	"context"
	"fmt"
	"time"

	"fieldtab/schema"
)

// Next loads job jobID from db and returns the Input of its next revision:
// the snapshot, its results as of now, and the issued revisions' history.
// The command line and the server both start here, so their reports agree.
func Next(ctx context.Context, db *schema.DB, jobID string, now time.Time) (Input, error) {
	snap, err := db.Snapshot(ctx, jobID)
	if err != nil {
		return Input{}, err
	}
	issued, err := db.Reports(ctx, jobID)
	if err != nil {
		return Input{}, err
	}
	revision := 1
	if len(issued) > 0 {
		revision = issued[len(issued)-1].Revision + 1
	}
	results, err := schema.ComputeResults(snap, now)
	if err != nil {
		return Input{}, err
	}
	return Input{Snapshot: snap, Results: results, Revision: revision, History: History(issued), Generated: now}, nil
}

// Issue renders in (with its Signoff), signs it with s at in.Generated and
// stores it in db as revision in.Revision on behalf of a, with the digest of
// the data it was made from. It returns the stored record and the signed PDF.
// A revision issued meanwhile makes it fail with schema's Conflict ("revision").
func Issue(ctx context.Context, db *schema.DB, a schema.Actor, in Input, s Signer) (schema.Report, []byte, error) {
	if s.Reason == "" {
		s.Reason = fmt.Sprintf("Test and balance report, revision %d, of %s", in.Revision, in.Snapshot.Job.Name)
	}
	// The stored copy is the signed one: no preliminary stamp.
	in.Issued = true
	var buf bytes.Buffer
	if err := Render(&buf, in); err != nil {
		return schema.Report{}, nil, err
	}
	digest, err := schema.SnapshotDigest(in.Snapshot)
	if err != nil {
		return schema.Report{}, nil, err
	}
	signed, err := Sign(buf.Bytes(), s, in.Generated)
	if err != nil {
		return schema.Report{}, nil, err
	}
	rec, err := db.IssueReport(ctx, a, in.Snapshot.Job.ID, in.Revision, signed, digest, s.Name)
	if err != nil {
		return schema.Report{}, nil, err
	}
	return rec, signed, nil
}
