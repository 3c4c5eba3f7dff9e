package report

import "fieldtab/schema"

// History turns the store's issued revisions (db.Reports, oldest first)
// into the report's revision history.
func History(issued []schema.Report) []Revision {
	h := make([]Revision, 0, len(issued))
	for _, r := range issued {
		h = append(h, Revision{Number: r.Revision, IssuedAt: r.IssuedAt, Signer: r.Signer, SnapshotSHA256: r.SnapshotSHA256})
	}
	return h
}
