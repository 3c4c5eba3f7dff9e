package schema

import (
	"context"
	"database/sql"
	"errors"
	"path/filepath"
	"sync"
	"testing"
	"time"
)

// waitPending waits until n calls are queued for the next group.
func waitPending(t *testing.T, db *DB, n int) {
	t.Helper()
	for deadline := time.Now().Add(5 * time.Second); time.Now().Before(deadline); time.Sleep(time.Millisecond) {
		db.readings.mu.Lock()
		got := len(db.readings.pending)
		db.readings.mu.Unlock()
		if got == n {
			return
		}
	}
	t.Fatalf("%d calls never queued", n)
}

// Calls queued while the writer is busy share one transaction; one that fails
// is rolled back alone and the others commit.
func TestGroupCommitSharesOneTransaction(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	if _, err := db.write.Exec("CREATE TABLE scratch (n INTEGER)"); err != nil {
		t.Fatal(err)
	}
	db.writeTurn <- struct{}{} // the writer is busy: calls queue up

	var (
		wg   sync.WaitGroup
		mu   sync.Mutex
		txs  = map[*sql.Tx]bool{}
		errs = make([]error, 3)
		boom = errors.New("boom")
	)
	for i := range 3 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			errs[i] = db.writeReadings(ctx, func(tx *sql.Tx, st *stmtCache) error {
				mu.Lock()
				txs[tx] = true
				mu.Unlock()
				if _, err := st.Exec("INSERT INTO scratch VALUES (?)", i); err != nil {
					return err
				}
				if i == 1 {
					return boom // after its insert: the savepoint must undo it
				}
				return nil
			})
		}()
	}
	waitPending(t, db, 3)
	<-db.writeTurn
	wg.Wait()

	if len(txs) != 1 {
		t.Errorf("%d transactions for 3 queued calls; want 1", len(txs))
	}
	if errs[0] != nil || errs[2] != nil || !errors.Is(errs[1], boom) {
		t.Errorf("errors %v; want nil, boom, nil", errs)
	}
	var got []int
	rows, err := db.write.Query("SELECT n FROM scratch ORDER BY n")
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	for rows.Next() {
		var n int
		rows.Scan(&n)
		got = append(got, n)
	}
	if len(got) != 2 || got[0] != 0 || got[1] != 2 {
		t.Errorf("rows %v after the group; want [0 2]", got)
	}
}

// A caller that gives up while queued is taken out of the queue and stores
// nothing.
func TestGroupCommitCancelledWhileQueued(t *testing.T) {
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	seq := jobSeq(t, db, f.job)
	db.writeTurn <- struct{}{}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error)
	go func() {
		_, err := db.AddReadings(ctx, rdgLead, f.job, f.batch())
		done <- err
	}()
	waitPending(t, db, 1)
	cancel()
	err := <-done
	waitPending(t, db, 0)
	<-db.writeTurn
	if !errors.Is(err, context.Canceled) {
		t.Errorf("AddReadings returned %v; want context.Canceled", err)
	}
	if got := jobSeq(t, db, f.job); got != seq {
		t.Errorf("job seq %d after a cancelled batch; want %d", got, seq)
	}
}

// DurableSeq never runs ahead of what is stored and catches up after a sync;
// BootID changes with every opening.
func TestDurableSeq(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "durable.db")
	db, err := Open(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	f := mustReadingsFixture(t, db)
	if _, err := db.AddReadings(ctx, rdgLead, f.job, f.batch()); err != nil {
		t.Fatal(err)
	}
	stored := jobSeq(t, db, f.job)
	if d := db.DurableSeq(f.job); d > stored {
		t.Errorf("DurableSeq %d ahead of the stored seq %d", d, stored)
	}
	if err := db.Sync(ctx); err != nil {
		t.Fatal(err)
	}
	if d := db.DurableSeq(f.job); d != stored {
		t.Errorf("DurableSeq %d after Sync; want %d", d, stored)
	}
	// The background loop gets there on its own too.
	if _, err := db.AddReadings(ctx, rdgLead, f.job, f.batch()); err != nil {
		t.Fatal(err)
	}
	stored = jobSeq(t, db, f.job)
	for deadline := time.Now().Add(5 * time.Second); db.DurableSeq(f.job) != stored; time.Sleep(10 * time.Millisecond) {
		if time.Now().After(deadline) {
			t.Fatalf("DurableSeq %d never reached %d", db.DurableSeq(f.job), stored)
		}
	}
	boot := db.BootID()
	if len(boot) != 16 {
		t.Errorf("BootID %q; want 16 hex digits", boot)
	}
	db.Close()
	db, err = Open(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if db.BootID() == boot {
		t.Error("BootID unchanged by reopening")
	}
	if d := db.DurableSeq(f.job); d != stored {
		t.Errorf("DurableSeq %d on reopening; want %d (everything on disk at Open)", d, stored)
	}
}
