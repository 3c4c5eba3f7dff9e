package schema

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"os"
	"sync"
)

// Durability. The store runs WAL with synchronous=NORMAL: a commit is safe from
// a crash of fieldtab itself (the WAL is in the operating system's hands), but
// the disk is synced only by the background loop, a few times a second. A
// commit that waited for the disk every time spent its p99 in fsync stalls of
// 100–500 ms on a shared machine. So the store says how far the disk has got:
// DurableSeq is a job's change number up to which everything is on disk, and
// BootID names this run of the store. A device keeps each reading in its
// outbox until DurableSeq covers it; if BootID changes first (the machine lost
// power), it sends the reading again, and the store's idempotency does the rest.

// durableSeqs holds each job's change number as of the last completed sync.
type durableSeqs struct {
	mu   sync.Mutex
	seqs map[string]int64
}

// BootID identifies this opening of the store; it changes at every Open.
func (db *DB) BootID() string { return db.bootID }

// DurableSeq returns the job's change number up to which every change is on
// disk: it survives a power cut, not just a crash of fieldtab. 0 for a job not
// synced yet (or unknown).
func (db *DB) DurableSeq(jobID string) int64 {
	db.durable.mu.Lock()
	defer db.durable.mu.Unlock()
	return db.durable.seqs[jobID]
}

// Sync makes every change committed so far durable and advances DurableSeq.
// The background loop calls it; tests and Close may too.
func (db *DB) Sync(ctx context.Context) error {
	// Commits visible to this read have written their WAL frames, so syncing
	// the files afterwards puts at least these change numbers on disk.
	rows, err := db.ckpt.QueryContext(ctx, "SELECT id, seq FROM jobs")
	if err != nil {
		return fmt.Errorf("sync %s: %w", db.Path, err)
	}
	seqs := map[string]int64{}
	for rows.Next() {
		var id string
		var seq int64
		if err := rows.Scan(&id, &seq); err != nil {
			rows.Close()
			return fmt.Errorf("sync %s: %w", db.Path, err)
		}
		seqs[id] = seq
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return fmt.Errorf("sync %s: %w", db.Path, err)
	}
	// A passive checkpoint never waits for readers or the writer. It may copy
	// frames into the main file, so that is synced as well as the WAL.
	if _, err := db.ckpt.ExecContext(ctx, "PRAGMA wal_checkpoint(PASSIVE)"); err != nil {
		return fmt.Errorf("sync %s: checkpoint: %w", db.Path, err)
	}
	for _, name := range []string{db.Path + "-wal", db.Path} {
		if err := db.files.sync(name); err != nil {
			return fmt.Errorf("sync %s: %w", db.Path, err)
		}
	}
	db.durable.mu.Lock()
	db.durable.seqs = seqs
	db.durable.mu.Unlock()
	return nil
}

// heldFiles keeps one descriptor of each store file open for the life of the
// store, to fsync through. Closing any descriptor of a file drops every POSIX
// lock this process holds on it, SQLite's included: a loop that opened and
// closed the files by name let an outside sqlite3 client believe it was the
// file's last user, so it checkpointed and deleted the WAL the server was
// still writing, and acknowledged readings went with it.
type heldFiles struct {
	mu    sync.Mutex
	files map[string]*os.File
}

// sync fsyncs the file called name through the held descriptor, opening it the
// first time. A missing file (no WAL yet) has nothing to sync. A file removed
// and made anew is another inode: its old descriptor is closed, which drops
// no lock on the new one.
func (h *heldFiles) sync(name string) error {
	h.mu.Lock()
	defer h.mu.Unlock()
	if f := h.files[name]; f != nil {
		held, errHeld := f.Stat()
		now, errNow := os.Stat(name)
		switch {
		case errors.Is(errNow, os.ErrNotExist):
			return nil
		case errHeld == nil && errNow == nil && os.SameFile(held, now):
			return f.Sync()
		}
		f.Close()
		delete(h.files, name)
	}
	f, err := os.OpenFile(name, os.O_RDWR, 0)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if h.files == nil {
		h.files = map[string]*os.File{}
	}
	h.files[name] = f
	return f.Sync()
}

// close closes the held descriptors; the store calls it after SQLite has
// closed its own, so no lock of SQLite's is dropped early.
func (h *heldFiles) close() error {
	h.mu.Lock()
	defer h.mu.Unlock()
	var errs []error
	for name, f := range h.files {
		errs = append(errs, f.Close())
		delete(h.files, name)
	}
	return errors.Join(errs...)
}

func newBootID() string {
	b := make([]byte, 8)
	_, _ = rand.Read(b) // crypto/rand.Read does not fail on Linux
	return hex.EncodeToString(b)
}

// syncFile fsyncs a file that no connection of the store holds open (a
// finished backup), by name.
func syncFile(name string) error {
	f, err := os.OpenFile(name, os.O_RDWR, 0)
	if err != nil {
		return err
	}
	defer f.Close()
	return f.Sync()
}
