package schema

import (
	"context"
	"database/sql"
	"fmt"
	"slices"
	"sync"
)

// Group commit for readings. With 20 phones posting, batches that arrive while
// another commit runs queue up; whoever gets the writer next stores them all in
// one transaction, each inside its own savepoint, and commits once, sharing
// the transaction's fixed cost and the prepared statements. A batch is still
// all or nothing: an internal error rolls back its savepoint alone, and nobody
// hears "stored" before the shared commit.

// readingsCall is one AddReadings call waiting for a group.
type readingsCall struct {
	ctx     context.Context
	run     func(tx *sql.Tx, st *stmtCache) error // stores the batch; its results are the caller's
	err     error
	done    chan struct{}
	claimed bool // taken into a group; only the group's committer touches err
}

// readingGroup is the queue of calls not yet taken by a committer.
type readingGroup struct {
	mu      sync.Mutex
	pending []*readingsCall
}

// writeReadings queues run and waits until a group holding it has committed
// (or failed). The caller that gets the writer commits everything queued by
// then, its own call and the others'.
func (db *DB) writeReadings(ctx context.Context, run func(tx *sql.Tx, st *stmtCache) error) error {
	c := &readingsCall{ctx: ctx, run: run, done: make(chan struct{})}
	g := &db.readings
	g.mu.Lock()
	g.pending = append(g.pending, c)
	g.mu.Unlock()

	select {
	case db.writeTurn <- struct{}{}:
		db.commitPending()
		<-db.writeTurn
	case <-c.done:
	case <-ctx.Done():
		g.mu.Lock()
		if !c.claimed {
			g.pending = slices.DeleteFunc(g.pending, func(p *readingsCall) bool { return p == c })
			g.mu.Unlock()
			return ctx.Err()
		}
		g.mu.Unlock()
	}
	// Claimed by this caller's group or an earlier one: its committer closes
	// done before it gives up the writer.
	<-c.done
	return c.err
}

// commitPending stores every queued call in one transaction. The caller holds
// the writer turn.
func (db *DB) commitPending() {
	g := &db.readings
	g.mu.Lock()
	group := g.pending
	g.pending = nil
	for _, c := range group {
		c.claimed = true
	}
	g.mu.Unlock()
	if len(group) == 0 {
		return
	}
	defer func() {
		for _, c := range group {
			close(c.done)
		}
	}()
	fail := func(err error) {
		for _, c := range group {
			if c.err == nil {
				c.err = err
			}
		}
	}
	// The group outlives any one caller's request: a caller that gives up still
	// gets an error, the others' commit goes on.
	ctx := context.Background()
	tx, err := db.write.BeginTx(ctx, nil)
	if err != nil {
		fail(err)
		return
	}
	defer tx.Rollback() //nolint:errcheck // a no-op after Commit
	st := newStmtCache(ctx, tx)
	defer st.Close()
	for _, c := range group {
		if err := c.ctx.Err(); err != nil {
			c.err = err
			continue
		}
		if _, err := tx.ExecContext(ctx, "SAVEPOINT batch"); err != nil {
			fail(err)
			return
		}
		c.err = c.run(tx, st)
		undo := "RELEASE batch"
		if c.err != nil {
			undo = "ROLLBACK TO batch; RELEASE batch"
		}
		if _, err := tx.ExecContext(ctx, undo); err != nil {
			fail(err)
			return
		}
	}
	if err := tx.Commit(); err != nil {
		fail(fmt.Errorf("commit: %w", err))
	}
}

// stmtCache prepares each statement once per transaction: a group runs the
// same few lookups hundreds of times.
type stmtCache struct {
	ctx   context.Context
	tx    *sql.Tx
	stmts map[string]*sql.Stmt
}

func newStmtCache(ctx context.Context, tx *sql.Tx) *stmtCache {
	return &stmtCache{ctx: ctx, tx: tx, stmts: map[string]*sql.Stmt{}}
}

func (s *stmtCache) prepared(query string) (*sql.Stmt, error) {
	if st, ok := s.stmts[query]; ok {
		return st, nil
	}
	st, err := s.tx.PrepareContext(s.ctx, query)
	if err != nil {
		return nil, fmt.Errorf("prepare %q: %w", query, err)
	}
	s.stmts[query] = st
	return st, nil
}

// QueryRow runs a one-row query. A failed prepare comes back from Scan.
func (s *stmtCache) QueryRow(query string, args ...any) rowScanner {
	st, err := s.prepared(query)
	if err != nil {
		return errRow{err}
	}
	return st.QueryRowContext(s.ctx, args...)
}

// Exec runs a statement.
func (s *stmtCache) Exec(query string, args ...any) (sql.Result, error) {
	st, err := s.prepared(query)
	if err != nil {
		return nil, err
	}
	return st.ExecContext(s.ctx, args...)
}

func (s *stmtCache) Close() {
	for _, st := range s.stmts {
		st.Close()
	}
}

type rowScanner interface{ Scan(dest ...any) error }

type errRow struct{ err error }

func (r errRow) Scan(...any) error { return r.err }
