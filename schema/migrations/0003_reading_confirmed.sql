-- A value far from its design or from its neighbours is sent only after the
-- technician confirms it; the reading keeps that fact for the reading log.
ALTER TABLE readings ADD COLUMN confirmed INTEGER NOT NULL DEFAULT 0 CHECK (confirmed IN (0, 1));
