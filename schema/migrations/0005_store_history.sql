-- The store's history: a cursor a device holds (a job's change number) is
-- only meaningful within one history. `epoch` changes whenever the store opens
-- after a run that did not close cleanly (a crash, a power cut, a copy taken
-- while it ran), because changes the store had numbered may then be lost and
-- their numbers handed out again. `open` is 1 while a fieldtab has the store open.
CREATE TABLE store_history (
	id     INTEGER PRIMARY KEY CHECK (id = 1),
	epoch  TEXT NOT NULL,
	open   INTEGER NOT NULL CHECK (open IN (0, 1)),
	opened_at TEXT NOT NULL
);
