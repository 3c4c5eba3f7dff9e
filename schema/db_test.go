package schema

import (
	"context"
	"database/sql"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"
)

// pragmaValue reads one PRAGMA on a specific pooled connection.
func pragmaValue(t *testing.T, conn *sql.Conn, name string) string {
	t.Helper()
	var v string
	if err := conn.QueryRowContext(context.Background(), "PRAGMA "+name).Scan(&v); err != nil {
		t.Fatalf("PRAGMA %s: %v", name, err)
	}
	return v
}

func TestDBPragmas(t *testing.T) {
	db := MustOpenDB(t)
	ctx := context.Background()
	want := map[string]string{"journal_mode": "wal", "foreign_keys": "1", "synchronous": "1", "busy_timeout": "10000",
		"wal_autocheckpoint": "0", "journal_size_limit": "67108864"}
	check := func(t *testing.T, pool *sql.DB, n int, extra map[string]string) {
		// Hold n connections at once so that the pool has to open more than its
		// first one: every one of them must carry the pragmas of the DSN.
		var conns []*sql.Conn
		for i := 0; i < n; i++ {
			c, err := pool.Conn(ctx)
			if err != nil {
				t.Fatal(err)
			}
			conns = append(conns, c)
		}
		for i, c := range conns {
			for name, v := range want {
				if got := pragmaValue(t, c, name); got != v {
					t.Errorf("connection %d: PRAGMA %s = %q, want %q", i, name, got, v)
				}
			}
			for name, v := range extra {
				if got := pragmaValue(t, c, name); got != v {
					t.Errorf("connection %d: PRAGMA %s = %q, want %q", i, name, got, v)
				}
			}
		}
		for _, c := range conns {
			c.Close()
		}
	}
	t.Run("OKWriter", func(t *testing.T) { check(t, db.write, 1, map[string]string{"query_only": "0"}) })
	t.Run("OKReaders", func(t *testing.T) { check(t, db.read, 4, map[string]string{"query_only": "1"}) })
}

func TestDBFileMode(t *testing.T) {
	db := MustOpenDB(t)
	if err := db.CreateJob(context.Background(), Actor{}, testJob()); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{db.Path, db.Path + "-wal", db.Path + "-shm"} {
		fi, err := os.Stat(p)
		if os.IsNotExist(err) && p != db.Path {
			continue
		}
		if err != nil {
			t.Fatal(err)
		}
		if m := fi.Mode().Perm(); m != 0o600 {
			t.Errorf("%s: mode %o, want 600", filepath.Base(p), m)
		}
	}
}

func schemaMigrationRows(t *testing.T, path string) []string {
	t.Helper()
	raw, err := sql.Open("sqlite3", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer raw.Close()
	rows, err := raw.Query("SELECT version, name, applied_at FROM schema_migrations ORDER BY version")
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	var out []string
	for rows.Next() {
		var v int
		var name, at string
		if err := rows.Scan(&v, &name, &at); err != nil {
			t.Fatal(err)
		}
		out = append(out, fmt.Sprintf("%d %s %s", v, name, at))
	}
	if err := rows.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

func TestDBMigrations(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "m.db")

	t.Run("OKAppliedOnce", func(t *testing.T) {
		db, err := Open(ctx, path)
		if err != nil {
			t.Fatal(err)
		}
		db.Close()
		first := schemaMigrationRows(t, path)
		ms, err := migrations()
		if err != nil {
			t.Fatal(err)
		}
		if len(first) != len(ms) || len(first) == 0 {
			t.Fatalf("schema_migrations has %d rows, want %d: %q", len(first), len(ms), first)
		}
		if !strings.HasPrefix(first[len(first)-1], strconv.Itoa(SchemaVersion())+" ") {
			t.Errorf("last migration row %q, want version %d", first[len(first)-1], SchemaVersion())
		}
		// A reopen applies nothing: the rows (with their applied_at) are unchanged.
		db, err = Open(ctx, path)
		if err != nil {
			t.Fatalf("reopen: %v", err)
		}
		db.Close()
		if again := schemaMigrationRows(t, path); strings.Join(again, "\n") != strings.Join(first, "\n") {
			t.Errorf("reopen changed schema_migrations:\n%q\nwant\n%q", again, first)
		}
	})

	t.Run("ErrNewerSchema", func(t *testing.T) {
		raw, err := sql.Open("sqlite3", "file:"+path)
		if err != nil {
			t.Fatal(err)
		}
		newer := SchemaVersion() + 1
		if _, err := raw.Exec("INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, 'future.sql', '2030-01-01T00:00:00.000Z')", newer); err != nil {
			t.Fatal(err)
		}
		raw.Close()
		db, err := Open(ctx, path)
		if err == nil {
			db.Close()
			t.Fatal("Open accepted a database from a newer schema")
		}
		if ErrorCode(err) != Conflict {
			t.Errorf("code %q, want %q (%v)", ErrorCode(err), Conflict, err)
		}
		msg := err.Error()
		if !strings.Contains(msg, strconv.Itoa(newer)) || !strings.Contains(msg, strconv.Itoa(SchemaVersion())) {
			t.Errorf("message %q should name versions %d and %d", msg, newer, SchemaVersion())
		}
	})
}

func TestDBCorrupt(t *testing.T) {
	ctx := context.Background()
	// makeDB writes a real store with some pages of data and closes it.
	makeDB := func(t *testing.T) (string, int) {
		path := filepath.Join(t.TempDir(), "c.db")
		db, err := Open(ctx, path)
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; i < 50; i++ {
			j := testJob()
			j.Name = strings.Repeat("Corrupt test job ", 11)
			if err := db.CreateJob(ctx, Actor{}, j); err != nil {
				t.Fatal(err)
			}
		}
		var pageSize int
		if err := db.write.QueryRow("PRAGMA page_size").Scan(&pageSize); err != nil {
			t.Fatal(err)
		}
		db.Close() // the last close checkpoints the WAL into the main file
		if _, err := os.Stat(path + "-wal"); err == nil {
			t.Fatal("WAL still present after close; the damage would not land in the main file")
		}
		return path, pageSize
	}
	for _, tt := range []struct {
		name string
		page int // 1-based page to overwrite
	}{
		{"ErrGarbageOverPage2", 2},
		{"ErrGarbageOverHeader", 1},
	} {
		t.Run(tt.name, func(t *testing.T) {
			path, pageSize := makeDB(t)
			f, err := os.OpenFile(path, os.O_WRONLY, 0)
			if err != nil {
				t.Fatal(err)
			}
			garbage := []byte(strings.Repeat("\xde\xad\xbe\xef", pageSize/4))
			if _, err := f.WriteAt(garbage, int64((tt.page-1)*pageSize)); err != nil {
				t.Fatal(err)
			}
			f.Close()

			db, err := Open(ctx, path)
			if err == nil {
				db.Close()
				t.Fatal("Open accepted a damaged database")
			}
			if msg := err.Error(); !strings.Contains(msg, path) || !strings.Contains(msg, "restore the last backup") {
				t.Errorf("refusal %q should name the file and say to restore the backup", msg)
			}
		})
	}
}

func TestDBBackupWhileWriting(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	for i := 0; i < 10; i++ {
		if err := db.CreateJob(ctx, Actor{}, testJob()); err != nil {
			t.Fatal(err)
		}
	}
	stop := make(chan struct{})
	var wg sync.WaitGroup
	var writeErr error
	wg.Add(1)
	go func() {
		defer wg.Done()
		for {
			select {
			case <-stop:
				return
			default:
			}
			if err := db.CreateJob(ctx, Actor{}, testJob()); err != nil {
				writeErr = err
				return
			}
		}
	}()
	dst := filepath.Join(t.TempDir(), "backup.db")
	time.Sleep(20 * time.Millisecond)
	err := db.Backup(ctx, dst)
	close(stop)
	wg.Wait()
	if err != nil {
		t.Fatalf("backup: %v", err)
	}
	if writeErr != nil {
		t.Fatalf("writer during backup: %v", writeErr)
	}
	fi, err := os.Stat(dst)
	if err != nil {
		t.Fatal(err)
	}
	if m := fi.Mode().Perm(); m != 0o600 {
		t.Errorf("backup mode %o, want 600", m)
	}
	b, err := Open(ctx, dst) // Open runs integrity_check
	if err != nil {
		t.Fatalf("open backup: %v", err)
	}
	defer b.Close()
	if err := b.IntegrityCheck(ctx); err != nil {
		t.Fatalf("backup integrity: %v", err)
	}
	jobs, err := b.Jobs(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(jobs) < 10 {
		t.Errorf("backup holds %d jobs, want at least 10", len(jobs))
	}

	t.Run("ErrTargetExists", func(t *testing.T) {
		err := db.Backup(ctx, dst)
		if ErrorCode(err) != Invalid || ErrorField(err) != "out" {
			t.Errorf("got %v (code %q field %q), want invalid/out", err, ErrorCode(err), ErrorField(err))
		}
	})
}

func TestDBConcurrentWriters(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	const writers, each = 20, 20
	var wg sync.WaitGroup
	errs := make(chan error, writers*each)
	for w := 0; w < writers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; i < each; i++ {
				if err := db.CreateJob(ctx, Actor{Name: "writer"}, testJob()); err != nil {
					errs <- err
				}
				if _, err := db.Jobs(ctx); err != nil { // readers beside the writers
					errs <- err
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Errorf("concurrent write: %v", err)
	}
	jobs, err := db.Jobs(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(jobs) != writers*each {
		t.Errorf("%d jobs stored, want %d", len(jobs), writers*each)
	}
}
