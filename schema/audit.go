package schema

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"time"
)

// AuditEntry is one row of the audit log: who changed what, when. Detail is a
// JSON object whose keys depend on the action (for design records: the new
// seq, the tag, and for an update the changed fields).
type AuditEntry struct {
	At       time.Time       `json:"at"`
	JobID    string          `json:"job_id,omitempty"` // "" for device events
	DeviceID string          `json:"device_id,omitempty"`
	Actor    string          `json:"actor"`
	Action   string          `json:"action"` // create, update, delete, revoke, ...
	Entity   string          `json:"entity"` // job, instrument, system, outlet, ..., device
	EntityID string          `json:"entity_id"`
	Detail   json.RawMessage `json:"detail"`
}

// actorName is the name recorded for a: its name, else its device, else the
// local command line.
func actorName(a Actor) string {
	switch {
	case a.Name != "":
		return a.Name
	case a.DeviceID != "":
		return "device " + a.DeviceID
	}
	return "local"
}

// addAudit writes one audit row in tx, the transaction that makes the change.
// jobID "" is stored as NULL (device events); detail is encoded as JSON (nil
// gives {}).
func addAudit(tx *sql.Tx, at time.Time, a Actor, jobID, action, entity, entityID string, detail any) error {
	d := []byte("{}")
	if detail != nil {
		var err error
		if d, err = json.Marshal(detail); err != nil {
			return fmt.Errorf("audit detail: %w", err)
		}
	}
	_, err := tx.Exec("INSERT INTO audit (at, job_id, device_id, actor, action, entity, entity_id, detail) VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
		at.UTC().Format(timeLayout), nullString(jobID), nullString(a.DeviceID), actorName(a), action, entity, entityID, string(d))
	if err != nil {
		return fmt.Errorf("audit: %w", err)
	}
	return nil
}

func nullString(s string) sql.NullString { return sql.NullString{String: s, Valid: s != ""} }

// Audit returns the audit log of a job, oldest first; jobID "" returns the
// entries that belong to no job (device pairing and revocation). Errors:
// NotFound for an unknown job.
func (db *DB) Audit(ctx context.Context, jobID string) ([]AuditEntry, error) {
	entries := []AuditEntry{}
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		q, args := "SELECT at, job_id, device_id, actor, action, entity, entity_id, detail FROM audit WHERE job_id IS NULL ORDER BY id", []any(nil)
		if jobID != "" {
			if !validUUID(jobID) {
				return Errorf(NotFound, "job_id", "job %q not found", jobID)
			}
			if _, err := loadJob(tx, jobID, nil); err != nil {
				return err
			}
			q, args = "SELECT at, job_id, device_id, actor, action, entity, entity_id, detail FROM audit WHERE job_id = ? ORDER BY id", []any{jobID}
		}
		rows, err := tx.QueryContext(ctx, q, args...)
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var (
				e             AuditEntry
				at, detail    string
				job, deviceID sql.NullString
			)
			if err := rows.Scan(&at, &job, &deviceID, &e.Actor, &e.Action, &e.Entity, &e.EntityID, &detail); err != nil {
				return err
			}
			if e.At, err = parseStamp(at); err != nil {
				return err
			}
			e.JobID, e.DeviceID, e.Detail = job.String, deviceID.String, json.RawMessage(detail)
			entries = append(entries, e)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, wrapStore("audit", err)
	}
	return entries, nil
}
