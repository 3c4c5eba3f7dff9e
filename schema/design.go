package schema

import (
	"bytes"
	"context"
	"crypto/rand"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"sort"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"github.com/mattn/go-sqlite3"

	"fieldtab/measure"
)

// The job and design-record store. A record's identity and relations live in
// columns (id, job_id, system_id, tag) and its attributes in the data column as
// JSON; seq, created_at, updated_at and deleted are columns only, so the JSON
// never holds a second, stale copy of them. Every change takes the job's next
// change sequence number in the same transaction, so a device that asks for
// "everything since N" misses nothing.

// NewID returns a random (version 4) UUID in canonical lower-case form.
func NewID() string {
	var b [16]byte
	rand.Read(b[:])         // never fails since Go 1.24: it crashes the program instead
	b[6] = b[6]&0x0f | 0x40 // version 4
	b[8] = b[8]&0x3f | 0x80 // RFC 9562 variant
	var s [36]byte
	hex.Encode(s[0:8], b[0:4])
	s[8] = '-'
	hex.Encode(s[9:13], b[4:6])
	s[13] = '-'
	hex.Encode(s[14:18], b[6:8])
	s[18] = '-'
	hex.Encode(s[19:23], b[8:10])
	s[23] = '-'
	hex.Encode(s[24:36], b[10:16])
	return string(s[:])
}

// stamp returns the store's clock at millisecond precision and its stored text.
func (db *DB) stamp() (time.Time, string) {
	t := db.Now().UTC().Truncate(time.Millisecond)
	return t, t.Format(timeLayout)
}

func parseStamp(s string) (time.Time, error) {
	t, err := time.Parse(time.RFC3339Nano, s)
	if err != nil {
		return time.Time{}, fmt.Errorf("stored time %q: %w", s, err)
	}
	return t.UTC(), nil
}

// nextSeq hands out the job's next change sequence number. It must run in the
// transaction that makes the change, so numbers are never skipped or reused.
func nextSeq(tx *sql.Tx, jobID string) (int64, error) {
	var seq int64
	err := tx.QueryRow("UPDATE jobs SET seq = seq + 1 WHERE id = ? RETURNING seq", jobID).Scan(&seq)
	if errors.Is(err, sql.ErrNoRows) {
		return 0, Errorf(NotFound, "job_id", "job %s not found", jobID)
	}
	if err != nil {
		return 0, fmt.Errorf("next change number: %w", err)
	}
	return seq, nil
}

// Meta keys that live in columns, not in the data JSON.
var (
	jobColumnKeys    = []string{"seq", "created_at", "updated_at"}
	recordColumnKeys = []string{"seq", "created_at", "updated_at", "deleted"}
)

// encodeData is v's JSON without the keys that the store keeps in columns.
func encodeData(v any, drop []string) (map[string]json.RawMessage, []byte, error) {
	b, err := json.Marshal(v)
	if err != nil {
		return nil, nil, fmt.Errorf("encode: %w", err)
	}
	var m map[string]json.RawMessage
	if err := json.Unmarshal(b, &m); err != nil {
		return nil, nil, fmt.Errorf("encode: %w", err)
	}
	for _, k := range drop {
		delete(m, k)
	}
	b, err = json.Marshal(m)
	if err != nil {
		return nil, nil, fmt.Errorf("encode: %w", err)
	}
	return m, b, nil
}

// changedKeys lists the top-level keys whose values differ, sorted.
func changedKeys(old string, now map[string]json.RawMessage) []string {
	var was map[string]json.RawMessage
	if err := json.Unmarshal([]byte(old), &was); err != nil {
		was = nil
	}
	var keys []string
	for k, v := range now {
		if w, ok := was[k]; !ok || !bytes.Equal(w, v) {
			keys = append(keys, k)
		}
	}
	for k := range was {
		if _, ok := now[k]; !ok {
			keys = append(keys, k)
		}
	}
	sort.Strings(keys)
	return keys
}

// ---- jobs ----

// CreateJob stores a new job. An empty ID gets a new UUID; an empty status
// becomes "open" and all-zero tolerances become DefaultTolerances(). On success
// j holds the stored job (ID, Seq 1, times). Errors: Invalid (see Job.Validate),
// Conflict (field "id") when the ID is taken.
func (db *DB) CreateJob(ctx context.Context, a Actor, j *Job) error {
	assigned := j.ID == ""
	if assigned {
		j.ID = NewID()
	}
	if j.Status == "" {
		j.Status = JobOpen
	}
	if j.Tolerances == (Tolerances{}) {
		j.Tolerances = DefaultTolerances()
	}
	if err := j.Validate(); err != nil {
		if assigned {
			j.ID = ""
		}
		return err
	}
	at, now := db.stamp()
	_, data, err := encodeData(j, jobColumnKeys)
	if err != nil {
		return fmt.Errorf("create job: %w", err)
	}
	err = db.writeTx(ctx, func(tx *sql.Tx) error {
		_, err := tx.Exec("INSERT INTO jobs (id, data, seq, created_at, updated_at) VALUES (?, ?, 1, ?, ?)",
			j.ID, data, now, now)
		if isConstraint(err, sqlite3.ErrConstraintPrimaryKey) || isConstraint(err, sqlite3.ErrConstraintUnique) {
			return Errorf(Conflict, "id", "a job with id %s already exists", j.ID)
		}
		if err != nil {
			return err
		}
		return addAudit(tx, at, a, j.ID, "create", "job", j.ID, map[string]any{"seq": 1, "name": j.Name})
	})
	if err != nil {
		if assigned {
			j.ID = ""
		}
		return wrapStore("create job", err)
	}
	j.Seq, j.CreatedAt, j.UpdatedAt = 1, at, at
	return nil
}

// UpdateJob replaces a job's fields with j's. An empty status or all-zero
// tolerances keep the stored ones. On success j holds the stored job with its
// new Seq. Errors: NotFound, Invalid (see Job.Validate), Conflict (field
// "units") when the unit system would change while the job holds design
// records.
func (db *DB) UpdateJob(ctx context.Context, a Actor, j *Job) error {
	if !validUUID(j.ID) {
		return Errorf(NotFound, "id", "job %q not found", j.ID)
	}
	at, now := db.stamp()
	var out Job
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		var oldData string
		old, err := loadJob(tx, j.ID, &oldData)
		if err != nil {
			return err
		}
		next := *j
		if next.Status == "" {
			next.Status = old.Status
		}
		if next.Tolerances == (Tolerances{}) {
			next.Tolerances = old.Tolerances
		}
		if err := next.Validate(); err != nil {
			return err
		}
		if next.Units != old.Units {
			has, err := jobHasDesign(tx, j.ID)
			if err != nil {
				return err
			}
			if has {
				return Errorf(Conflict, "units", "cannot change from %s to %s: the job already holds design data in %s units",
					old.Units, next.Units, old.Units)
			}
		}
		m, data, err := encodeData(&next, jobColumnKeys)
		if err != nil {
			return err
		}
		changed := changedKeys(oldData, m)
		next.CreatedAt = old.CreatedAt
		if len(changed) == 0 {
			next.Seq, next.UpdatedAt = old.Seq, old.UpdatedAt
			out = next
			return nil
		}
		seq, err := nextSeq(tx, j.ID)
		if err != nil {
			return err
		}
		if _, err := tx.Exec("UPDATE jobs SET data = ?, updated_at = ? WHERE id = ?", data, now, j.ID); err != nil {
			return err
		}
		next.Seq, next.UpdatedAt = seq, at
		out = next
		return addAudit(tx, at, a, j.ID, "update", "job", j.ID, map[string]any{"seq": seq, "changed": changed})
	})
	if err != nil {
		return wrapStore("update job", err)
	}
	*j = out
	return nil
}

// Job returns the job with the given id. Errors: NotFound.
func (db *DB) Job(ctx context.Context, id string) (Job, error) {
	if !validUUID(id) {
		return Job{}, Errorf(NotFound, "id", "job %q not found", id)
	}
	var j Job
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		var err error
		j, err = loadJob(tx, id, nil)
		return err
	})
	if err != nil {
		return Job{}, wrapStore("job", err)
	}
	return j, nil
}

// Jobs returns every job, the most recently created first.
func (db *DB) Jobs(ctx context.Context) ([]Job, error) {
	var jobs []Job
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		var err error
		jobs, err = listJobs(ctx, tx)
		return err
	})
	if err != nil {
		return nil, wrapStore("jobs", err)
	}
	return jobs, nil
}

// listJobs reads every job in tx, the most recently created first.
func listJobs(ctx context.Context, tx *sql.Tx) ([]Job, error) {
	jobs := []Job{}
	rows, err := tx.QueryContext(ctx, "SELECT id, data, seq, created_at, updated_at FROM jobs ORDER BY created_at DESC, id")
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	for rows.Next() {
		j, err := scanJob(rows, nil)
		if err != nil {
			return nil, err
		}
		jobs = append(jobs, j)
	}
	return jobs, rows.Err()
}

// loadJob reads one job in tx; raw, when not nil, receives its data JSON.
func loadJob(tx *sql.Tx, id string, raw *string) (Job, error) {
	row := tx.QueryRow("SELECT id, data, seq, created_at, updated_at FROM jobs WHERE id = ?", id)
	j, err := scanJob(row, raw)
	if errors.Is(err, sql.ErrNoRows) {
		return Job{}, Errorf(NotFound, "job_id", "job %s not found", id)
	}
	return j, err
}

func scanJob(row interface{ Scan(...any) error }, raw *string) (Job, error) {
	var (
		id, data, created, updated string
		seq                        int64
	)
	if err := row.Scan(&id, &data, &seq, &created, &updated); err != nil {
		return Job{}, err
	}
	var job Job
	if err := json.Unmarshal([]byte(data), &job); err != nil {
		return Job{}, fmt.Errorf("job %s: stored data: %w", id, err)
	}
	var err error
	job.ID, job.Seq = id, seq
	if job.CreatedAt, err = parseStamp(created); err != nil {
		return Job{}, err
	}
	if job.UpdatedAt, err = parseStamp(updated); err != nil {
		return Job{}, err
	}
	if raw != nil {
		*raw = data
	}
	return job, nil
}

// jobUnits returns the unit system of a job, read in tx.
func jobUnits(tx *sql.Tx, jobID string) (measure.UnitSystem, error) {
	var units sql.NullString
	err := tx.QueryRow("SELECT json_extract(data, '$.units') FROM jobs WHERE id = ?", jobID).Scan(&units)
	if errors.Is(err, sql.ErrNoRows) {
		return 0, Errorf(NotFound, "job_id", "job %s not found", jobID)
	}
	if err != nil {
		return 0, err
	}
	j := Job{Units: units.String}
	return j.UnitSystem()
}

// jobHasDesign reports whether the job holds any live design record.
func jobHasDesign(tx *sql.Tx, jobID string) (bool, error) {
	var parts []string
	for _, k := range recordKinds {
		parts = append(parts, "EXISTS (SELECT 1 FROM "+k.table+" WHERE job_id = ?1 AND deleted = 0)")
	}
	var has bool
	err := tx.QueryRow("SELECT "+strings.Join(parts, " OR "), jobID).Scan(&has)
	return has, err
}

// ---- design records ----

// recordKind describes one kind of design record's table.
type recordKind struct {
	table  string // SQL table
	entity string // name in audit rows and messages, as in SubjectKinds
	// dependents are the live records that keep a record of this kind from
	// being deleted.
	dependents []dependent
}

// dependent is a table whose rows refer to another record through column (an
// SQL expression on the dependent's row). Readings have no deleted flag: every
// one of them counts, for ever.
type dependent struct {
	table, entity, column string
}

func (d dependent) live() string {
	if d.table == "readings" {
		return ""
	}
	return " AND deleted = 0"
}

var (
	// An instrument that took readings stays: its accuracy and calibration are
	// part of those readings' results and of the report's instrument list.
	instrumentKind = recordKind{table: "instruments", entity: "instrument", dependents: []dependent{
		{"readings", "reading", "instrument_id"},
	}}
	systemKind = recordKind{table: "systems", entity: "system", dependents: []dependent{
		{"outlets", "outlet", "system_id"},
		{"traverses", "traverse", "system_id"},
		{"capacity_tests", "capacity test", "system_id"},
		{"water_tests", "water test", "system_id"},
	}}
	outletKind   = recordKind{table: "outlets", entity: "outlet"}
	traverseKind = recordKind{table: "traverses", entity: "traverse", dependents: []dependent{
		{"capacity_tests", "capacity test", "json_extract(data, '$.traverse_id')"},
	}}
	capacityTestKind = recordKind{table: "capacity_tests", entity: "capacity_test", dependents: []dependent{
		{"water_tests", "water test", "json_extract(data, '$.capacity_test_id')"},
	}}
	waterTestKind = recordKind{table: "water_tests", entity: "water_test"}

	recordKinds = []*recordKind{&instrumentKind, &systemKind, &outletKind, &traverseKind, &capacityTestKind, &waterTestKind}
)

// recordKeys points at a record's identity fields; systemID is nil for kinds
// not owned by a system.
type recordKeys struct {
	id, jobID, systemID *string
	tag                 string
}

// recordRef is a reference from a record to another live record of the same
// job, checked on create and update.
type recordRef struct {
	field, table, entity, id string
}

// designRecord is implemented by *Instrument, *System, *Outlet, *Traverse,
// *CapacityTest and *WaterTest, so that one store implementation serves all
// six.
type designRecord interface {
	kind() *recordKind
	keys() recordKeys
	meta() *recordMeta
	validate(u measure.UnitSystem) error
	refs() []recordRef
	blank() designRecord
}

// recordPtr lets generic code hold a record by value (T) and call its methods
// through its pointer (P).
type recordPtr[T any] interface {
	*T
	designRecord
}

func (m *recordMeta) meta() *recordMeta { return m }

func systemRef(id string) recordRef { return recordRef{"system_id", "systems", "system", id} }

func (*Instrument) kind() *recordKind                     { return &instrumentKind }
func (r *Instrument) keys() recordKeys                    { return recordKeys{&r.ID, &r.JobID, nil, r.Tag} }
func (r *Instrument) validate(measure.UnitSystem) error   { return r.Validate() }
func (*Instrument) refs() []recordRef                     { return nil }
func (*Instrument) blank() designRecord                   { return new(Instrument) }
func (*System) kind() *recordKind                         { return &systemKind }
func (r *System) keys() recordKeys                        { return recordKeys{&r.ID, &r.JobID, nil, r.Tag} }
func (r *System) validate(u measure.UnitSystem) error     { return r.Validate(u) }
func (*System) refs() []recordRef                         { return nil }
func (*System) blank() designRecord                       { return new(System) }
func (*Outlet) kind() *recordKind                         { return &outletKind }
func (r *Outlet) keys() recordKeys                        { return recordKeys{&r.ID, &r.JobID, &r.SystemID, r.Tag} }
func (r *Outlet) validate(u measure.UnitSystem) error     { return r.Validate(u) }
func (r *Outlet) refs() []recordRef                       { return []recordRef{systemRef(r.SystemID)} }
func (*Outlet) blank() designRecord                       { return new(Outlet) }
func (*Traverse) kind() *recordKind                       { return &traverseKind }
func (r *Traverse) keys() recordKeys                      { return recordKeys{&r.ID, &r.JobID, &r.SystemID, r.Tag} }
func (r *Traverse) validate(u measure.UnitSystem) error   { return r.Validate(u) }
func (r *Traverse) refs() []recordRef                     { return []recordRef{systemRef(r.SystemID)} }
func (*Traverse) blank() designRecord                     { return new(Traverse) }
func (*CapacityTest) kind() *recordKind                   { return &capacityTestKind }
func (r *CapacityTest) keys() recordKeys                  { return recordKeys{&r.ID, &r.JobID, &r.SystemID, r.Tag} }
func (r *CapacityTest) validate(measure.UnitSystem) error { return r.Validate() }
func (*CapacityTest) blank() designRecord                 { return new(CapacityTest) }
func (*WaterTest) kind() *recordKind                      { return &waterTestKind }
func (r *WaterTest) keys() recordKeys                     { return recordKeys{&r.ID, &r.JobID, &r.SystemID, r.Tag} }
func (r *WaterTest) validate(u measure.UnitSystem) error  { return r.Validate(u) }
func (*WaterTest) blank() designRecord                    { return new(WaterTest) }

func (r *CapacityTest) refs() []recordRef {
	refs := []recordRef{systemRef(r.SystemID)}
	if r.TraverseID != "" {
		refs = append(refs, recordRef{"traverse_id", "traverses", "traverse", r.TraverseID})
	}
	return refs
}

func (r *WaterTest) refs() []recordRef {
	refs := []recordRef{systemRef(r.SystemID)}
	if r.CapacityTest != "" {
		refs = append(refs, recordRef{"capacity_test_id", "capacity_tests", "capacity test", r.CapacityTest})
	}
	return refs
}

// checkRefs requires every reference to name a live record of the job.
func checkRefs(tx *sql.Tx, jobID string, refs []recordRef) error {
	for _, r := range refs {
		var deleted bool
		err := tx.QueryRow("SELECT deleted FROM "+r.table+" WHERE id = ? AND job_id = ?", r.id, jobID).Scan(&deleted)
		if errors.Is(err, sql.ErrNoRows) {
			return Errorf(Invalid, r.field, "no %s %s in this job", r.entity, r.id)
		}
		if err != nil {
			return err
		}
		if deleted {
			return Errorf(Invalid, r.field, "%s %s was deleted", r.entity, r.id)
		}
	}
	return nil
}

// Create stores a new design record of any kind (*Instrument, *System,
// *Outlet, *Traverse, *CapacityTest or *WaterTest) in its job. An empty ID gets
// a new UUID. On success rec holds its ID, Seq and times. Errors: Invalid (the
// record's Validate, or a system_id, traverse_id or capacity_test_id that names
// no live record of the job), NotFound (field "job_id") for an unknown job,
// Conflict (field "tag") when a live record of the kind has the tag, or (field
// "id") when the ID is taken.
func Create[T designRecord](ctx context.Context, db *DB, a Actor, rec T) error {
	k, keys := rec.kind(), rec.keys()
	if err := checkRequiredID("job_id", *keys.jobID); err != nil {
		return err
	}
	assigned := *keys.id == ""
	at, now := db.stamp()
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		u, err := jobUnits(tx, *keys.jobID)
		if err != nil {
			return err
		}
		return createRecordTx(tx, at, now, a, rec, u, nil)
	})
	if err != nil {
		if assigned {
			*keys.id = ""
		}
		*rec.meta() = recordMeta{}
		return wrapStore("create "+k.entity, err)
	}
	return nil
}

// Update replaces a live design record's fields with rec's; its ID and JobID
// say which record and cannot change. An update that changes nothing keeps the
// stored Seq. On success rec holds its Seq and times. Errors: NotFound when no
// live record of the kind has that ID in that job, Invalid and Conflict as for
// Create.
func Update[T designRecord](ctx context.Context, db *DB, a Actor, rec T) error {
	k, keys := rec.kind(), rec.keys()
	if !validUUID(*keys.id) || !validUUID(*keys.jobID) {
		return Errorf(NotFound, "id", "%s %q not found", words(k.entity), *keys.id)
	}
	at, now := db.stamp()
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		// The record first, so an unknown one is "not found" whatever its job.
		if _, err := recordChanged(tx, rec); err != nil {
			return err
		}
		u, err := jobUnits(tx, *keys.jobID)
		if err != nil {
			return err
		}
		_, err = updateRecordTx(tx, at, now, a, rec, u, nil)
		return err
	})
	if err != nil {
		return wrapStore("update "+k.entity, err)
	}
	return nil
}

// Delete soft-deletes a live design record of kind T (e.g. Delete[*Outlet]):
// it leaves Snapshot, keeps its history, and travels to devices through
// ChangesSince with Deleted set. Its tag becomes free. Errors: NotFound,
// Conflict when live records still refer to it (a system's outlets, traverses
// and tests; a traverse's capacity tests; a capacity test's water tests).
func Delete[T designRecord](ctx context.Context, db *DB, a Actor, jobID, id string) error {
	var zero T
	k := zero.kind()
	if !validUUID(id) || !validUUID(jobID) {
		return Errorf(NotFound, "id", "%s %q not found", words(k.entity), id)
	}
	at, now := db.stamp()
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		var tag string
		err := tx.QueryRow("SELECT tag FROM "+k.table+" WHERE id = ? AND job_id = ? AND deleted = 0", id, jobID).Scan(&tag)
		if errors.Is(err, sql.ErrNoRows) {
			return Errorf(NotFound, "id", "%s %s not found in this job", words(k.entity), id)
		}
		if err != nil {
			return err
		}
		var still []string
		for _, d := range k.dependents {
			var n int
			err := tx.QueryRow("SELECT COUNT(*) FROM "+d.table+" WHERE job_id = ?"+d.live()+" AND "+d.column+" = ?",
				jobID, id).Scan(&n)
			if err != nil {
				return err
			}
			if n > 0 {
				still = append(still, plural(n, d.entity))
			}
		}
		if len(still) > 0 {
			return Errorf(Conflict, "id", "%s %s still has %s; delete or move them first",
				words(k.entity), tag, strings.Join(still, ", "))
		}
		seq, err := nextSeq(tx, jobID)
		if err != nil {
			return err
		}
		if _, err := tx.Exec("UPDATE "+k.table+" SET deleted = 1, seq = ?, updated_at = ? WHERE id = ?", seq, now, id); err != nil {
			return err
		}
		return addAudit(tx, at, a, jobID, "delete", k.entity, id, map[string]any{"seq": seq, "tag": tag})
	})
	return wrapStore("delete "+k.entity, err)
}

// Get returns the live design record of kind T (e.g. Get[*Outlet]) with the
// given ID in the job. Errors: NotFound.
func Get[T designRecord](ctx context.Context, db *DB, jobID, id string) (T, error) {
	var zero T
	k := zero.kind()
	if !validUUID(id) || !validUUID(jobID) {
		return zero, Errorf(NotFound, "id", "%s %q not found", words(k.entity), id)
	}
	rec, ok := zero.blank().(T)
	if !ok {
		return zero, fmt.Errorf("get %s: record type mismatch", k.entity)
	}
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		row := tx.QueryRow("SELECT data, seq, created_at, updated_at, deleted FROM "+k.table+
			" WHERE id = ? AND job_id = ? AND deleted = 0", id, jobID)
		err := scanRecord(row, rec)
		if errors.Is(err, sql.ErrNoRows) {
			return Errorf(NotFound, "id", "%s %s not found in this job", words(k.entity), id)
		}
		return err
	})
	if err != nil {
		return zero, wrapStore("get "+k.entity, err)
	}
	return rec, nil
}

// scanRecord reads a row of (data, seq, created_at, updated_at, deleted).
func scanRecord(row interface{ Scan(...any) error }, rec designRecord) error {
	var (
		data, created, updated string
		m                      recordMeta
		err                    error
	)
	if err := row.Scan(&data, &m.Seq, &created, &updated, &m.Deleted); err != nil {
		return err
	}
	if err := json.Unmarshal([]byte(data), rec); err != nil {
		return fmt.Errorf("%s: stored data: %w", rec.kind().entity, err)
	}
	if m.CreatedAt, err = parseStamp(created); err != nil {
		return err
	}
	if m.UpdatedAt, err = parseStamp(updated); err != nil {
		return err
	}
	*rec.meta() = m
	return nil
}

// listRecords reads the records of kind P that match where (an SQL clause).
func listRecords[T any, P recordPtr[T]](ctx context.Context, tx *sql.Tx, where string, args ...any) ([]T, error) {
	k := P(nil).kind()
	rows, err := tx.QueryContext(ctx, "SELECT data, seq, created_at, updated_at, deleted FROM "+k.table+" "+where, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	out := []T{}
	for rows.Next() {
		var v T
		if err := scanRecord(rows, P(&v)); err != nil {
			return nil, err
		}
		out = append(out, v)
	}
	return out, rows.Err()
}

// constraintError maps a unique-constraint failure to Conflict.
func constraintError(err error, k *recordKind, keys recordKeys) error {
	switch {
	case err == nil:
		return nil
	case isConstraint(err, sqlite3.ErrConstraintPrimaryKey):
		return Errorf(Conflict, "id", "a record with id %s already exists", *keys.id)
	case isConstraint(err, sqlite3.ErrConstraintUnique):
		return Errorf(Conflict, "tag", "another %s in this job is tagged %q", words(k.entity), keys.tag)
	case isConstraint(err, sqlite3.ErrConstraintForeignKey):
		return Errorf(Invalid, "job_id", "refers to a record that does not exist")
	}
	return err
}

// wrapStore passes *Error through and prefixes anything else.
func wrapStore(op string, err error) error {
	var e *Error
	if err == nil || errors.As(err, &e) {
		return err
	}
	return fmt.Errorf("%s: %w", op, err)
}

func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// ---- snapshots and changes ----

// Snapshot returns the job with its live design records, each list in tag
// order (natural: "S-2" before "S-10"; outlets by their system's tag, then
// their own), and every reading in the order stored, all read in one
// transaction. Errors: NotFound.
func (db *DB) Snapshot(ctx context.Context, jobID string) (*Snapshot, error) {
	return db.snapshot(ctx, jobID, -1)
}

// ChangesSince returns what changed in the job after change number since: the
// design records (deleted ones included, with Deleted set) and readings with
// Seq > since, in Seq order, and always the job itself with its current Seq, so
// a device can ask again from Job.Seq. Errors: NotFound, Invalid (field
// "since") for a negative since.
func (db *DB) ChangesSince(ctx context.Context, jobID string, since int64) (*Snapshot, error) {
	if since < 0 {
		return nil, Errorf(Invalid, "since", "%d is below 0; give the last seq you have, or 0 for everything", since)
	}
	return db.snapshot(ctx, jobID, since)
}

// snapshot reads the live job when since < 0, else its changes after since.
func (db *DB) snapshot(ctx context.Context, jobID string, since int64) (*Snapshot, error) {
	if !validUUID(jobID) {
		return nil, Errorf(NotFound, "job_id", "job %q not found", jobID)
	}
	where, args := "WHERE job_id = ? AND deleted = 0", []any{jobID}
	readings, rargs := "WHERE job_id = ? ORDER BY seq, rowid", []any{jobID}
	if since >= 0 {
		where, args = "WHERE job_id = ? AND seq > ? ORDER BY seq, id", []any{jobID, since}
		readings, rargs = "WHERE job_id = ? AND seq > ? ORDER BY seq, rowid", []any{jobID, since}
	}
	s := &Snapshot{}
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		var err error
		if s.Job, err = loadJob(tx, jobID, nil); err != nil {
			return err
		}
		if since > s.Job.Seq {
			// A device ahead of the store means the store went back (restored
			// from a backup) or is another server: an empty answer would hide it.
			return Errorf(Conflict, "since", "is %d but this job is at change %d here: the store was restored or this is another server; "+
				"fetch the whole job (since=0) and send every reading you hold again", since, s.Job.Seq)
		}
		if s.Instruments, err = listRecords[Instrument](ctx, tx, where, args...); err != nil {
			return err
		}
		if s.Systems, err = listRecords[System](ctx, tx, where, args...); err != nil {
			return err
		}
		if s.Outlets, err = listRecords[Outlet](ctx, tx, where, args...); err != nil {
			return err
		}
		if s.Traverses, err = listRecords[Traverse](ctx, tx, where, args...); err != nil {
			return err
		}
		if s.CapacityTests, err = listRecords[CapacityTest](ctx, tx, where, args...); err != nil {
			return err
		}
		if s.WaterTests, err = listRecords[WaterTest](ctx, tx, where, args...); err != nil {
			return err
		}
		s.Readings, err = listReadings(ctx, tx, readings, rargs...)
		return err
	})
	if err != nil {
		return nil, wrapStore("snapshot", err)
	}
	if since < 0 {
		sortByTag(s.Instruments, func(r *Instrument) (string, string) { return r.Tag, r.ID })
		sortByTag(s.Systems, func(r *System) (string, string) { return r.Tag, r.ID })
		sortByTag(s.Traverses, func(r *Traverse) (string, string) { return r.Tag, r.ID })
		sortByTag(s.CapacityTests, func(r *CapacityTest) (string, string) { return r.Tag, r.ID })
		sortByTag(s.WaterTests, func(r *WaterTest) (string, string) { return r.Tag, r.ID })
		systemTag := make(map[string]string, len(s.Systems))
		for _, sys := range s.Systems {
			systemTag[sys.ID] = sys.Tag
		}
		sort.SliceStable(s.Outlets, func(i, j int) bool {
			a, b := &s.Outlets[i], &s.Outlets[j]
			if sa, sb := systemTag[a.SystemID], systemTag[b.SystemID]; sa != sb {
				return tagLess(sa, sb)
			}
			if a.Tag != b.Tag {
				return tagLess(a.Tag, b.Tag)
			}
			return a.ID < b.ID
		})
	}
	return s, nil
}

func sortByTag[T any](list []T, key func(*T) (tag, id string)) {
	sort.SliceStable(list, func(i, j int) bool {
		ti, ii := key(&list[i])
		tj, ij := key(&list[j])
		if ti != tj {
			return tagLess(ti, tj)
		}
		return ii < ij
	})
}

// tagLess orders tags as people read them: runs of digits by number, the
// rest ignoring case, so "S-2" < "S-10" < "s-11".
func tagLess(a, b string) bool {
	for a != "" && b != "" {
		da, dn := digitRun(a), digitRun(b)
		if da > 0 && dn > 0 {
			na, nb := strings.TrimLeft(a[:da], "0"), strings.TrimLeft(b[:dn], "0")
			if len(na) != len(nb) {
				return len(na) < len(nb)
			}
			if na != nb {
				return na < nb
			}
			a, b = a[da:], b[dn:]
			continue
		}
		ra, na := utf8.DecodeRuneInString(a)
		rb, nb := utf8.DecodeRuneInString(b)
		if la, lb := unicode.ToLower(ra), unicode.ToLower(rb); la != lb {
			return la < lb
		}
		a, b = a[na:], b[nb:]
	}
	if a == "" && b == "" {
		return false
	}
	return a == ""
}

func digitRun(s string) int {
	n := 0
	for n < len(s) && s[n] >= '0' && s[n] <= '9' {
		n++
	}
	return n
}

// readingSelectColumns are the readings columns in the order scanReading reads.
const readingSelectColumns = "id, job_id, subject_kind, subject_id, quantity, point, value, unit, stage, instrument_id, " +
	"technician, device_id, taken_at, received_at, supersedes, void, note, seq, confirmed"

// scanReading reads one row of readingSelectColumns. NULL instrument_id,
// device_id and supersedes read as "".
func scanReading(row interface{ Scan(...any) error }) (Reading, error) {
	var (
		r                              Reading
		value                          sql.NullFloat64
		instrument, device, supersedes sql.NullString
		taken, received                string
		err                            error
	)
	if err := row.Scan(&r.ID, &r.JobID, &r.SubjectKind, &r.SubjectID, &r.Quantity, &r.Point, &value, &r.Unit, &r.Stage,
		&instrument, &r.Technician, &device, &taken, &received, &supersedes, &r.Void, &r.Note, &r.Seq, &r.Confirmed); err != nil {
		return Reading{}, err
	}
	if value.Valid {
		v := value.Float64
		r.Value = &v
	}
	r.InstrumentID, r.DeviceID, r.Supersedes = instrument.String, device.String, supersedes.String
	if r.TakenAt, err = parseStamp(taken); err != nil {
		return Reading{}, err
	}
	if r.ReceivedAt, err = parseStamp(received); err != nil {
		return Reading{}, err
	}
	return r, nil
}

// listReadings reads the readings matching where (an SQL clause).
func listReadings(ctx context.Context, tx *sql.Tx, where string, args ...any) ([]Reading, error) {
	rows, err := tx.QueryContext(ctx, "SELECT "+readingSelectColumns+" FROM readings "+where, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	out := []Reading{}
	for rows.Next() {
		r, err := scanReading(rows)
		if err != nil {
			return nil, err
		}
		out = append(out, r)
	}
	return out, rows.Err()
}
