-- Join codes live in the store, so that `fieldtab join-code` on the lead's
-- laptop can make one while `fieldtab serve` runs in another process. Only the
-- code's SHA-256 is kept, as for device tokens.
CREATE TABLE join_codes (
	code_hash  TEXT PRIMARY KEY, -- SHA-256 of the code without its dash, hex
	role       TEXT NOT NULL CHECK (role IN ('lead', 'technician')),
	created_at TEXT NOT NULL,
	expires_at TEXT NOT NULL,
	used_at    TEXT -- set when a lead code pairs its one device
);
CREATE INDEX join_codes_expires ON join_codes (expires_at);
