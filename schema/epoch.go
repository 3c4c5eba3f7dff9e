package schema

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
)

// The store's history (epoch). Change numbers are handed out by the store and
// devices keep the last one they saw as a cursor. A power cut can take back
// the last few hundred milliseconds of commits (see durable.go), and a store
// restored from a backup is behind its devices: in both cases numbers a device
// has already passed would be given to new changes, and `changes?since=N`
// would never return them. So a cursor names its history as well: the epoch,
// which a store gets anew whenever it opens after a run that did not close
// cleanly. A cursor from another epoch is answered with "reload" (Gone).
//
// A clean Close marks the store closed; Open finds the mark still set after a
// crash, a power cut, or in a copy taken while the store ran (every backup
// fieldtab makes is one), and starts a new epoch. Only a file copied by hand
// from a cleanly closed store keeps its epoch; a device ahead of it is still
// told (Conflict), as long as it asks before new changes catch up.

// Epoch names this store's history; cursors from another epoch are refused.
func (db *DB) Epoch() string { return db.epoch }

// beginEpoch marks the store open, starting a new epoch if the last run did
// not close cleanly (or this is a new store). The mark reaches the disk with
// the first Sync, before any change number is handed out.
func (db *DB) beginEpoch(ctx context.Context) error {
	return db.writeTx(ctx, func(tx *sql.Tx) error {
		var epoch string
		var open int
		err := tx.QueryRowContext(ctx, "SELECT epoch, open FROM store_history WHERE id = 1").Scan(&epoch, &open)
		switch {
		case errors.Is(err, sql.ErrNoRows):
			epoch, open = "", 1
		case err != nil:
			return fmt.Errorf("open %s: read history: %w", db.Path, err)
		}
		if epoch == "" || open == 1 {
			epoch = newBootID()
		}
		_, err = tx.ExecContext(ctx, `INSERT INTO store_history (id, epoch, open, opened_at) VALUES (1, ?, 1, ?)
			ON CONFLICT (id) DO UPDATE SET epoch = excluded.epoch, open = 1, opened_at = excluded.opened_at`, epoch, db.now())
		if err != nil {
			return fmt.Errorf("open %s: mark open: %w", db.Path, err)
		}
		db.epoch = epoch
		return nil
	})
}

// endEpoch marks a clean close: everything committed is in the file. It
// writes back this run's own epoch, because a command run beside the server
// (job new, join-code) opens the store too and, finding it open, starts an
// epoch no device has seen: the server's clean stop should not make its
// devices reload. A lost tail takes this last frame with it, never only what
// came before it (WAL frames are chained), so a mark that survives is true.
func (db *DB) endEpoch() error {
	_, err := db.write.Exec("UPDATE store_history SET open = 0, epoch = ? WHERE id = 1", db.epoch)
	return err
}

// CheckEpoch refuses (Gone) a device's cursor from another history of the
// store. An empty epoch is not checked (a script that keeps only the number);
// ChangesSince still refuses a number ahead of the job (Conflict).
func (db *DB) CheckEpoch(epoch string) error {
	if epoch != "" && epoch != db.epoch {
		return Errorf(Gone, "epoch", "this cursor is from another history of the store (it lost unsynced changes or was restored since): "+
			"fetch the whole job (since=0) and send every reading you hold again")
	}
	return nil
}
