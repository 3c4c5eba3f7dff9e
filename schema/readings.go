package schema

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"strings"
	"time"

	"fieldtab/measure"
)

// Reading stages.
const (
	StageAsFound = "as_found"
	StageFinal   = "final"
)

// Stages are the accepted values of Reading.Stage.
var Stages = []string{StageAsFound, StageFinal}

// Limits of a reading and of a batch.
const (
	MaxReadingsBatch   = 500              // readings in one AddReadings call
	maxTechnicianRunes = 80               // Reading.Technician
	maxNoteRunes       = 500              // Reading.Note
	maxDeviceIDRunes   = 64               // Reading.DeviceID
	maxClockAhead      = 10 * time.Minute // how far a device's clock may run ahead of the server's
)

// earliestTakenAt rejects the clock of a device that lost its time (1970 and
// the like); no reading fieldtab stores predates it.
var earliestTakenAt = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

// Validate checks what can be checked without the store, in field order, and
// returns the first problem as an *Error with Code Invalid and the JSON field:
//   - "id", "job_id", "subject_id": canonical UUIDs (AddReadings folds them to lower case);
//   - "subject_kind", "quantity", "unit": one of SubjectKinds, a quantity read
//     on that subject (see Quantities) and one of its units;
//   - "point": 0 unless the quantity has points: 1 or more for a traverse point
//     (the upper bound, the layout's point count, is checked by AddReadings),
//     0 to 3 for a motor leg;
//   - "stage": "as_found" or "final";
//   - "instrument_id", "supersedes": empty or a UUID; a reading cannot
//     supersede itself, and a void must supersede a reading;
//   - "technician": required, at most 80 characters; "device_id": at most 64;
//     "note": at most 500; single-line text without control characters;
//   - "value": required and finite unless the reading is a void, which carries
//     none; within the quantity's plausible range after conversion;
//   - "taken_at": set, not before 2000 and not more than 10 minutes after now
//     (the server's clock), so a phone's wrong clock is caught.
//
// ReceivedAt and Seq are the store's and are not checked.
func (r *Reading) Validate(now time.Time) error {
	if !validUUID(r.ID) {
		return Errorf(Invalid, "id", "must be a lower-case UUID (8-4-4-4-12 hex digits)")
	}
	if !validUUID(r.JobID) {
		return Errorf(Invalid, "job_id", "must be a lower-case UUID (8-4-4-4-12 hex digits)")
	}
	q, u, err := r.spec()
	if err != nil {
		return err
	}
	if !validUUID(r.SubjectID) {
		return Errorf(Invalid, "subject_id", "must be a lower-case UUID (8-4-4-4-12 hex digits)")
	}
	if err := checkPoint(q, r.Point); err != nil {
		return err
	}
	if err := checkOneOf("stage", r.Stage, Stages); err != nil {
		return err
	}
	if r.InstrumentID != "" && !validUUID(r.InstrumentID) {
		return Errorf(Invalid, "instrument_id", "must be empty or a lower-case UUID (8-4-4-4-12 hex digits)")
	}
	if err := checkText("technician", r.Technician, true, maxTechnicianRunes); err != nil {
		return err
	}
	if err := checkText("device_id", r.DeviceID, false, maxDeviceIDRunes); err != nil {
		return err
	}
	if err := checkText("note", r.Note, false, maxNoteRunes); err != nil {
		return err
	}
	switch {
	case r.Supersedes != "" && !validUUID(r.Supersedes):
		return Errorf(Invalid, "supersedes", "must be empty or a lower-case UUID (8-4-4-4-12 hex digits)")
	case r.Supersedes != "" && r.Supersedes == r.ID:
		return Errorf(Invalid, "supersedes", "a reading cannot supersede itself")
	case r.Void && r.Supersedes == "":
		return Errorf(Invalid, "supersedes", "a void must name the reading it removes")
	}
	switch {
	case r.Void && r.Value != nil:
		return Errorf(Invalid, "value", "a void carries no value; leave it out")
	case !r.Void && r.Value == nil:
		return Errorf(Invalid, "value", "is required")
	case !r.Void:
		if err := checkValue(q, r.Unit, u, *r.Value); err != nil {
			return err
		}
	}
	switch {
	case r.TakenAt.IsZero():
		return Errorf(Invalid, "taken_at", "is required")
	case r.TakenAt.Before(earliestTakenAt):
		return Errorf(Invalid, "taken_at", "%s is before 2000: check the device's clock", r.TakenAt.UTC().Format(time.RFC3339))
	case r.TakenAt.After(now.Add(maxClockAhead)):
		return Errorf(Invalid, "taken_at", "%s is more than 10 minutes after the server's time %s: check the device's clock",
			r.TakenAt.UTC().Format(time.RFC3339), now.UTC().Format(time.RFC3339))
	}
	return nil
}

// checkPoint checks the part of the point rule that needs no subject record.
func checkPoint(q *QuantitySpec, p int) error {
	switch q.Points {
	case PointTraverse:
		if p < 1 {
			return Errorf(Invalid, "point", "is required: the %s needs its point, 1 or more", q.Description)
		}
	case PointLeg:
		if p < 0 || p > maxLeg {
			return Errorf(Invalid, "point", "is %d; accepted are 0 (a single reading) or the leg 1 to %d", p, maxLeg)
		}
	default:
		if p != 0 {
			return Errorf(Invalid, "point", "is %d; the %s has no points, so it must be 0", p, q.Description)
		}
	}
	return nil
}

// CurrentReadings returns the readings that count, in their given order: every
// reading that is not a void and that no reading in rs supersedes. A
// correction therefore replaces the reading it names, and a void removes the
// reading it names and counts for nothing itself; a correction of a void (or
// of a correction) replaces it in turn. CurrentReadings does not choose among
// several current readings of one quantity (an outlet read again after its
// damper was set): that is the results' business.
func CurrentReadings(rs []Reading) []Reading {
	superseded := make(map[string]bool)
	for _, r := range rs {
		if r.Supersedes != "" {
			superseded[r.Supersedes] = true
		}
	}
	out := make([]Reading, 0, len(rs))
	for _, r := range rs {
		if r.Void || superseded[r.ID] {
			continue
		}
		out = append(out, r)
	}
	return out
}

// subjectTables maps a subject kind to its design-record table.
var subjectTables = map[string]string{
	SubjectOutlet:       "outlets",
	SubjectTraverse:     "traverses",
	SubjectCapacityTest: "capacity_tests",
	SubjectWaterTest:    "water_tests",
	SubjectSystem:       "systems",
}

// AddReadings stores a batch of at most 500 readings in job jobID, in one write
// transaction, and returns one ReadingResult per reading, in order:
//   - "duplicate" when a reading with that ID is already stored in the job
//     (also the second of two equal IDs in one batch), with the stored Seq;
//     the rest of the reading is not looked at, so a retry is always safe;
//   - "rejected" with the JSON field and the reason when Validate fails, the
//     ID belongs to another job's reading, job_id names another job, the
//     subject is not a live record of its kind in the job, the point is past
//     the traverse's point count, the instrument is not one of the job's (a
//     deleted one is accepted: the reading was taken with it), the device is
//     unknown, or supersedes names no reading of the job on the same subject;
//   - "stored" with its change sequence number otherwise.
//
// The store sets JobID, ReceivedAt (db.Now) and Seq. Provenance comes from a:
// DeviceID always when a device made the request (a.DeviceID set), else the
// reading's own; Technician from a.Name when the reading has none. A rejected
// reading never keeps the others from being stored; any other failure stores
// nothing and returns the error.
//
// Errors: Invalid (field "readings") for more than 500 readings; NotFound
// (field "job_id") for an unknown job; internal errors wrapped.
func (db *DB) AddReadings(ctx context.Context, a Actor, jobID string, rs []Reading) ([]ReadingResult, error) {
	if len(rs) > MaxReadingsBatch {
		return nil, Errorf(Invalid, "readings", "a batch holds at most %d readings; this one has %d", MaxReadingsBatch, len(rs))
	}
	if !validUUID(jobID) {
		return nil, Errorf(NotFound, "job_id", "job %q not found", jobID)
	}
	at, stamp := db.stamp()
	results := make([]ReadingResult, len(rs))
	err := db.writeReadings(ctx, func(tx *sql.Tx, st *stmtCache) error {
		u, err := jobUnits(tx, jobID)
		if err != nil {
			return err
		}
		b := &readingBatch{st: st, jobID: jobID, units: u, now: at, stamp: stamp,
			subjects: map[string]*subjectInfo{}, known: map[string]error{}}
		if err := st.QueryRow("SELECT seq FROM jobs WHERE id = ?", jobID).Scan(&b.seq); err != nil {
			return fmt.Errorf("job %s: change number: %w", jobID, err)
		}
		startSeq := b.seq
		for i := range rs {
			r := rs[i]
			if results[i], err = b.add(a, &r); err != nil {
				return err
			}
		}
		if b.seq == startSeq {
			return nil
		}
		// One update for the batch rather than one per reading: the batch holds
		// the only writer, so nobody else hands out numbers meanwhile.
		_, err = st.Exec("UPDATE jobs SET seq = ? WHERE id = ?", b.seq, jobID)
		return err
	})
	if err != nil {
		return nil, wrapStore("add readings", err)
	}
	return results, nil
}

// readingBatch is the state of one AddReadings transaction; it caches the
// lookups that the readings of a batch share.
type readingBatch struct {
	st       *stmtCache
	jobID    string
	units    measure.UnitSystem
	now      time.Time
	stamp    string
	subjects map[string]*subjectInfo // by kind + "/" + id
	known    map[string]error        // instrument and device checks, by table + "/" + id
	seq      int64                   // the job's last change number handed out
}

const lookupReadingSQL = "SELECT job_id, seq, subject_kind, subject_id, quantity, point, value, unit, stage, void FROM readings WHERE id = ?"

const insertReadingSQL = `INSERT INTO readings (id, job_id, subject_kind, subject_id, quantity, point, value, unit,
	stage, instrument_id, technician, device_id, taken_at, received_at, supersedes, void, note, seq, confirmed)
	VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`

// subjectInfo is a looked-up subject: err rejects readings on it; points is
// the traverse's point count, or pointsErr why it has none.
type subjectInfo struct {
	err       error
	points    int
	pointsErr error
	deleted   string // set when the subject was deleted: the note stored readings get
}

// add handles one reading. A rejection is a result; only internal errors are
// returned.
func (b *readingBatch) add(a Actor, r *Reading) (ReadingResult, error) {
	// Phones make UUIDs in either case (iOS in upper); the store keeps one form.
	res := ReadingResult{ID: r.ID} // answered as the client sent it, so it can match
	for _, id := range []*string{&r.ID, &r.JobID, &r.SubjectID, &r.InstrumentID, &r.Supersedes} {
		*id = strings.ToLower(*id)
	}
	if validUUID(r.ID) {
		var job string
		var seq int64
		var stored Reading
		err := b.st.QueryRow(lookupReadingSQL, r.ID).Scan(&job, &seq, &stored.SubjectKind, &stored.SubjectID,
			&stored.Quantity, &stored.Point, &stored.Value, &stored.Unit, &stored.Stage, &stored.Void)
		switch {
		case err == nil && job == b.jobID && !sameMeasurement(stored, *r):
			// Answering "duplicate" would let the client drop a value never stored.
			return rejected(res, Errorf(Invalid, "id", "is already the id of a different reading (%s %s %s); make a new id",
				stored.Quantity, formatValue(stored.Value), stored.Unit)), nil
		case err == nil && job == b.jobID:
			res.Status, res.Seq = ReadingDuplicate, seq
			return res, nil
		case err == nil:
			return rejected(res, Errorf(Invalid, "id", "is already the id of a reading in another job; make a new one")), nil
		case !errors.Is(err, sql.ErrNoRows):
			return res, fmt.Errorf("look up reading %s: %w", r.ID, err)
		}
	}
	if r.JobID != "" && r.JobID != b.jobID {
		return rejected(res, Errorf(Invalid, "job_id", "names job %q but the batch was sent to job %s", r.JobID, b.jobID)), nil
	}
	r.JobID = b.jobID
	if a.DeviceID != "" {
		r.DeviceID = a.DeviceID
	}
	if strings.TrimSpace(r.Technician) == "" {
		r.Technician = a.Name
	}
	if err := r.Validate(b.now); err != nil {
		return rejected(res, err), nil
	}
	if err := b.check(r); err != nil {
		var e *Error
		if errors.As(err, &e) && e.Code == Invalid {
			return rejected(res, err), nil
		}
		return res, err
	}
	seq := b.seq + 1
	_, err := b.st.Exec(insertReadingSQL, r.ID, r.JobID, r.SubjectKind, r.SubjectID, r.Quantity, r.Point, r.Value, r.Unit,
		r.Stage, nullString(r.InstrumentID), r.Technician, nullString(r.DeviceID), r.TakenAt.UTC().Format(timeLayout), b.stamp,
		nullString(r.Supersedes), r.Void, r.Note, seq, r.Confirmed)
	if err != nil {
		return res, fmt.Errorf("store reading %s: %w", r.ID, err)
	}
	b.seq = seq
	res.Status, res.Seq = ReadingStored, seq
	if sub := b.subjects[r.SubjectKind+"/"+r.SubjectID]; sub != nil {
		res.Reason = sub.deleted
	}
	return res, nil
}

// sameMeasurement reports whether a retried reading says what the stored one
// says; provenance and times may differ between a retry and the original.
func sameMeasurement(stored, r Reading) bool {
	sameValue := stored.Value == nil && r.Value == nil ||
		stored.Value != nil && r.Value != nil && *stored.Value == *r.Value
	return sameValue && stored.SubjectKind == r.SubjectKind && stored.SubjectID == r.SubjectID &&
		stored.Quantity == r.Quantity && stored.Point == r.Point && stored.Unit == r.Unit &&
		stored.Stage == r.Stage && stored.Void == r.Void
}

func formatValue(v *float64) string {
	if v == nil {
		return "void"
	}
	return strconv.FormatFloat(*v, 'g', -1, 64)
}

func rejected(res ReadingResult, err error) ReadingResult {
	res.Status, res.Field, res.Reason = ReadingRejected, ErrorField(err), ErrorMessage(err)
	return res
}

// check does the checks that need the store: subject, point count,
// instrument, device and superseded reading. Rejections are Invalid errors.
func (b *readingBatch) check(r *Reading) error {
	s, err := b.subject(r.SubjectKind, r.SubjectID)
	if err != nil {
		return err
	}
	if s.err != nil {
		return s.err
	}
	if q, _ := LookupQuantity(r.SubjectKind, r.Quantity); q.Points == PointTraverse {
		if s.pointsErr != nil {
			return s.pointsErr
		}
		if r.Point > s.points {
			return Errorf(Invalid, "point", "is %d; this traverse has points 1 to %d", r.Point, s.points)
		}
	}
	if r.InstrumentID != "" {
		if err := b.exists("instruments", "instrument_id", r.InstrumentID,
			"SELECT 1 FROM instruments WHERE id = ? AND job_id = ?", r.InstrumentID, b.jobID); err != nil {
			return err
		}
	}
	if r.DeviceID != "" {
		if err := b.exists("devices", "device_id", r.DeviceID, "SELECT 1 FROM devices WHERE id = ?", r.DeviceID); err != nil {
			return err
		}
	}
	return checkSupersedes(b.st.QueryRow, b.jobID, r)
}

// checkSupersedes requires the reading r corrects or voids to be in the job and
// to be the same measurement: subject, quantity, point and stage. A correction
// of anything else would silently remove an unrelated reading from the results.
func checkSupersedes(queryRow func(query string, args ...any) rowScanner, jobID string, r *Reading) error {
	if r.Supersedes == "" {
		return nil
	}
	var job, kind, subject, quantity, stage string
	var point int
	err := queryRow("SELECT job_id, subject_kind, subject_id, quantity, point, stage FROM readings WHERE id = ?",
		r.Supersedes).Scan(&job, &kind, &subject, &quantity, &point, &stage)
	switch {
	case errors.Is(err, sql.ErrNoRows) || err == nil && job != jobID:
		return Errorf(Invalid, "supersedes", "no reading %s in this job", r.Supersedes)
	case err != nil:
		return fmt.Errorf("look up reading %s: %w", r.Supersedes, err)
	case kind != r.SubjectKind || subject != r.SubjectID:
		return Errorf(Invalid, "supersedes", "reading %s is of another record (%s %s); a correction or void must be of the same one",
			r.Supersedes, words(kind), subject)
	case quantity != r.Quantity || point != r.Point || stage != r.Stage:
		return Errorf(Invalid, "supersedes", "reading %s is the %s at point %d, %s; a correction or void must be of the same quantity, point and stage",
			r.Supersedes, quantityWords(kind, quantity), point, words(stage))
	}
	return nil
}

// subject looks up (once per batch) the live design record a reading is on.
func (b *readingBatch) subject(kind, id string) (*subjectInfo, error) {
	key := kind + "/" + id
	if s, ok := b.subjects[key]; ok {
		return s, nil
	}
	s := &subjectInfo{}
	entity := strings.ReplaceAll(kind, "_", " ")
	var (
		data    string
		deleted bool
	)
	err := b.st.QueryRow("SELECT data, deleted FROM "+subjectTables[kind]+" WHERE id = ? AND job_id = ?", id, b.jobID).
		Scan(&data, &deleted)
	switch {
	case errors.Is(err, sql.ErrNoRows):
		s.err = Errorf(Invalid, "subject_id", "no %s %s in this job", entity, id)
	case err != nil:
		return nil, fmt.Errorf("look up %s %s: %w", entity, id, err)
	case deleted:
		// A device that was offline may still send readings of a record the
		// lead has since deleted: keep them, never lose a reading, and say so.
		s.deleted = fmt.Sprintf("stored, but %s %s was deleted: the reading is kept for the record and counts in no result", entity, id)
		if kind == SubjectTraverse {
			s.points, s.pointsErr = traversePoints(data, b.units)
		}
	case kind == SubjectTraverse:
		s.points, s.pointsErr = traversePoints(data, b.units)
	}
	b.subjects[key] = s
	return s, nil
}

// traversePoints returns the point count of a stored traverse's layout. A
// layout that cannot be built rejects point readings with field "point".
func traversePoints(data string, u measure.UnitSystem) (int, error) {
	var t Traverse
	if err := json.Unmarshal([]byte(data), &t); err != nil {
		return 0, fmt.Errorf("traverse: stored data: %w", err)
	}
	l, err := t.Layout(u)
	if err == nil {
		var pts []measure.TraversePoint
		if pts, err = l.Points(); err == nil {
			return len(pts), nil
		}
	}
	return 0, Errorf(Invalid, "point", "the traverse's layout has no points (%s): fix the traverse first", ErrorMessage(err))
}

// exists rejects (with field) a reference that query finds no row for; the
// answer is cached by table and id for the batch.
func (b *readingBatch) exists(table, field, id, query string, args ...any) error {
	key := table + "/" + id
	if err, ok := b.known[key]; ok {
		return err
	}
	var one int
	err := b.st.QueryRow(query, args...).Scan(&one)
	switch {
	case errors.Is(err, sql.ErrNoRows):
		err = Errorf(Invalid, field, "no %s %s here", words(strings.TrimSuffix(table, "s")), id)
	case err != nil:
		return fmt.Errorf("look up %s %s: %w", table, id, err)
	}
	b.known[key] = err
	return err
}

// Readings returns every reading of the job, superseded and void ones
// included, in the order stored (by Seq). Errors: NotFound (field "job_id").
func (db *DB) Readings(ctx context.Context, jobID string) ([]Reading, error) {
	if !validUUID(jobID) {
		return nil, Errorf(NotFound, "job_id", "job %q not found", jobID)
	}
	var out []Reading
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		var one int
		err := tx.QueryRowContext(ctx, "SELECT 1 FROM jobs WHERE id = ?", jobID).Scan(&one)
		if errors.Is(err, sql.ErrNoRows) {
			return Errorf(NotFound, "job_id", "job %s not found", jobID)
		}
		if err != nil {
			return err
		}
		out, err = listReadings(ctx, tx, "WHERE job_id = ? ORDER BY seq, rowid", jobID)
		return err
	})
	if err != nil {
		return nil, wrapStore("readings", err)
	}
	return out, nil
}
