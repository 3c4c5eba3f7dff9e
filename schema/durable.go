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
		if err := syncFile(name); err != nil {
			return fmt.Errorf("sync %s: %w", db.Path, err)
		}
	}
	db.durable.mu.Lock()
	db.durable.seqs = seqs
	db.durable.mu.Unlock()
	return nil
}

// syncFile fsyncs a file by name. A missing WAL (just truncated by a
// checkpoint) has nothing to sync.
func syncFile(name string) error {
	f, err := os.OpenFile(name, os.O_RDWR, 0)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	defer f.Close()
	return f.Sync()
}

func newBootID() string {
	b := make([]byte, 8)
	_, _ = rand.Read(b) // crypto/rand.Read does not fail on Linux
	return hex.EncodeToString(b)
}
