package schema

import (
	"context"
	"path/filepath"
	"testing"
)

// TestEpoch: a store keeps its history across a clean close and starts a new
// one when it opens after a run that did not close (here: a second opening
// while the first still runs, which is what a crash leaves behind), and in a
// backup taken while it ran.
func TestEpoch(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "fieldtab.db")
	open := func(p string) *DB {
		t.Helper()
		db, err := Open(ctx, p)
		if err != nil {
			t.Fatal(err)
		}
		return db
	}
	a := open(path)
	first := a.Epoch()
	if len(first) != 16 {
		t.Fatalf("epoch %q: want 16 hex digits", first)
	}
	if err := a.Close(); err != nil {
		t.Fatal(err)
	}
	b := open(path)
	if b.Epoch() != first {
		t.Errorf("after a clean close the epoch went from %s to %s", first, b.Epoch())
	}
	backup := filepath.Join(t.TempDir(), "copy.db")
	if err := b.Backup(ctx, backup); err != nil {
		t.Fatal(err)
	}
	// b is still open: to the next opening, it looks like a crash.
	c := open(path)
	if c.Epoch() == b.Epoch() {
		t.Errorf("opened while the last run had not closed: epoch %s kept", c.Epoch())
	}
	for _, db := range []*DB{c, b} {
		if err := db.Close(); err != nil {
			t.Fatal(err)
		}
	}
	// A command run beside the server opens the store and closes it: the
	// server's own clean close still keeps its epoch for the next start.
	d := open(path)
	e := open(path)
	if err := e.Close(); err != nil {
		t.Fatal(err)
	}
	if err := d.Close(); err != nil {
		t.Fatal(err)
	}
	if f := open(path); f.Epoch() != d.Epoch() {
		t.Errorf("server %s closed cleanly after a command %s: reopened as %s", d.Epoch(), e.Epoch(), f.Epoch())
		f.Close()
	} else if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	r := open(backup)
	defer r.Close()
	if r.Epoch() == first || r.Epoch() == c.Epoch() {
		t.Errorf("a backup taken while the store ran kept epoch %s", r.Epoch())
	}
	if err := r.CheckEpoch(first); ErrorCode(err) != Gone || ErrorField(err) != "epoch" {
		t.Errorf("cursor of another history: %v, want gone on epoch", err)
	}
	if err := r.CheckEpoch(r.Epoch()); err != nil {
		t.Errorf("cursor of this history: %v", err)
	}
	if err := r.CheckEpoch(""); err != nil {
		t.Errorf("no epoch given: %v", err)
	}
}
