-- fieldtab store, version 1.
--
-- Design records (jobs, instruments, systems, outlets, traverses, capacity tests,
-- water tests) keep their identity and relations in columns and their attributes as
-- a JSON document validated by the Go type of that record. Every row carries the
-- job's change sequence number at its last change, so a device can ask for
-- "everything since N"; design records are soft-deleted so a deletion travels too.
-- Readings are append-only: triggers refuse UPDATE and DELETE.
-- Times are RFC 3339 UTC text with millisecond precision.

CREATE TABLE jobs (
	id         TEXT PRIMARY KEY,
	data       TEXT NOT NULL,
	seq        INTEGER NOT NULL DEFAULT 0, -- last change sequence number handed out
	created_at TEXT NOT NULL,
	updated_at TEXT NOT NULL
);

CREATE TABLE instruments (
	id         TEXT PRIMARY KEY,
	job_id     TEXT NOT NULL REFERENCES jobs(id),
	tag        TEXT NOT NULL,
	data       TEXT NOT NULL,
	seq        INTEGER NOT NULL,
	created_at TEXT NOT NULL,
	updated_at TEXT NOT NULL,
	deleted    INTEGER NOT NULL DEFAULT 0
);
CREATE UNIQUE INDEX instruments_tag ON instruments(job_id, tag) WHERE deleted = 0;
CREATE INDEX instruments_seq ON instruments(job_id, seq);

CREATE TABLE systems (
	id         TEXT PRIMARY KEY,
	job_id     TEXT NOT NULL REFERENCES jobs(id),
	tag        TEXT NOT NULL,
	data       TEXT NOT NULL,
	seq        INTEGER NOT NULL,
	created_at TEXT NOT NULL,
	updated_at TEXT NOT NULL,
	deleted    INTEGER NOT NULL DEFAULT 0
);
CREATE UNIQUE INDEX systems_tag ON systems(job_id, tag) WHERE deleted = 0;
CREATE INDEX systems_seq ON systems(job_id, seq);

CREATE TABLE outlets (
	id         TEXT PRIMARY KEY,
	job_id     TEXT NOT NULL REFERENCES jobs(id),
	system_id  TEXT NOT NULL REFERENCES systems(id),
	tag        TEXT NOT NULL,
	data       TEXT NOT NULL,
	seq        INTEGER NOT NULL,
	created_at TEXT NOT NULL,
	updated_at TEXT NOT NULL,
	deleted    INTEGER NOT NULL DEFAULT 0
);
CREATE UNIQUE INDEX outlets_tag ON outlets(job_id, tag) WHERE deleted = 0;
CREATE INDEX outlets_seq ON outlets(job_id, seq);
CREATE INDEX outlets_system ON outlets(system_id);

CREATE TABLE traverses (
	id         TEXT PRIMARY KEY,
	job_id     TEXT NOT NULL REFERENCES jobs(id),
	system_id  TEXT NOT NULL REFERENCES systems(id),
	tag        TEXT NOT NULL,
	data       TEXT NOT NULL,
	seq        INTEGER NOT NULL,
	created_at TEXT NOT NULL,
	updated_at TEXT NOT NULL,
	deleted    INTEGER NOT NULL DEFAULT 0
);
CREATE UNIQUE INDEX traverses_tag ON traverses(job_id, tag) WHERE deleted = 0;
CREATE INDEX traverses_seq ON traverses(job_id, seq);

CREATE TABLE capacity_tests (
	id         TEXT PRIMARY KEY,
	job_id     TEXT NOT NULL REFERENCES jobs(id),
	system_id  TEXT NOT NULL REFERENCES systems(id),
	tag        TEXT NOT NULL,
	data       TEXT NOT NULL,
	seq        INTEGER NOT NULL,
	created_at TEXT NOT NULL,
	updated_at TEXT NOT NULL,
	deleted    INTEGER NOT NULL DEFAULT 0
);
CREATE UNIQUE INDEX capacity_tests_tag ON capacity_tests(job_id, tag) WHERE deleted = 0;
CREATE INDEX capacity_tests_seq ON capacity_tests(job_id, seq);

CREATE TABLE water_tests (
	id         TEXT PRIMARY KEY,
	job_id     TEXT NOT NULL REFERENCES jobs(id),
	system_id  TEXT NOT NULL REFERENCES systems(id),
	tag        TEXT NOT NULL,
	data       TEXT NOT NULL,
	seq        INTEGER NOT NULL,
	created_at TEXT NOT NULL,
	updated_at TEXT NOT NULL,
	deleted    INTEGER NOT NULL DEFAULT 0
);
CREATE UNIQUE INDEX water_tests_tag ON water_tests(job_id, tag) WHERE deleted = 0;
CREATE INDEX water_tests_seq ON water_tests(job_id, seq);

CREATE TABLE devices (
	id         TEXT PRIMARY KEY,
	name       TEXT NOT NULL,
	role       TEXT NOT NULL CHECK (role IN ('lead', 'technician')),
	token_hash TEXT NOT NULL UNIQUE, -- SHA-256 of the bearer token, hex
	created_at TEXT NOT NULL,
	last_seen  TEXT,
	revoked_at TEXT
);

CREATE TABLE readings (
	id            TEXT PRIMARY KEY, -- client-made UUID: the idempotency key
	job_id        TEXT NOT NULL REFERENCES jobs(id),
	subject_kind  TEXT NOT NULL,
	subject_id    TEXT NOT NULL,
	quantity      TEXT NOT NULL,
	point         INTEGER NOT NULL DEFAULT 0, -- traverse point or motor leg, 1-based; 0 for none
	value         REAL,                       -- as entered; NULL only for a void
	unit          TEXT NOT NULL,              -- as entered
	stage         TEXT NOT NULL CHECK (stage IN ('as_found', 'final')),
	instrument_id TEXT REFERENCES instruments(id),
	technician    TEXT NOT NULL,
	device_id     TEXT REFERENCES devices(id),
	taken_at      TEXT NOT NULL,
	received_at   TEXT NOT NULL,
	supersedes    TEXT REFERENCES readings(id),
	void          INTEGER NOT NULL DEFAULT 0 CHECK (void IN (0, 1)),
	note          TEXT NOT NULL DEFAULT '',
	seq           INTEGER NOT NULL,
	CHECK (void = 1 OR value IS NOT NULL)
);
CREATE INDEX readings_subject ON readings(job_id, subject_kind, subject_id);
CREATE INDEX readings_seq ON readings(job_id, seq);

CREATE TRIGGER readings_append_only_update BEFORE UPDATE ON readings
BEGIN SELECT RAISE(ABORT, 'readings are append-only'); END;
CREATE TRIGGER readings_append_only_delete BEFORE DELETE ON readings
BEGIN SELECT RAISE(ABORT, 'readings are append-only'); END;
-- INSERT OR REPLACE deletes without firing delete triggers; refuse it here.
CREATE TRIGGER readings_append_only_replace BEFORE INSERT ON readings
WHEN EXISTS (SELECT 1 FROM readings WHERE id = NEW.id)
BEGIN SELECT RAISE(ABORT, 'readings are append-only'); END;

CREATE TABLE reports (
	id              TEXT PRIMARY KEY,
	job_id          TEXT NOT NULL REFERENCES jobs(id),
	revision        INTEGER NOT NULL,
	created_at      TEXT NOT NULL,
	signer          TEXT NOT NULL DEFAULT '',
	pdf             BLOB NOT NULL,
	pdf_sha256      TEXT NOT NULL,
	snapshot_sha256 TEXT NOT NULL,
	UNIQUE (job_id, revision)
);

CREATE TABLE audit (
	id        INTEGER PRIMARY KEY,
	at        TEXT NOT NULL,
	job_id    TEXT,
	device_id TEXT,
	actor     TEXT NOT NULL,
	action    TEXT NOT NULL, -- create, update, delete, revoke, import, ...
	entity    TEXT NOT NULL,
	entity_id TEXT NOT NULL,
	detail    TEXT NOT NULL DEFAULT '{}'
);
CREATE INDEX audit_job ON audit(job_id, id);
