package schema

import (
	"context"
	"database/sql"
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"net/url"
	"os"
	"path"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/mattn/go-sqlite3"
)

//go:embed migrations/*.sql
var migrationFiles embed.FS

// timeLayout is the one time format in the store: RFC 3339, UTC, milliseconds.
const timeLayout = "2006-01-02T15:04:05.000Z07:00"

// DB is the fieldtab store: one SQLite file. Writes go through a single
// connection in immediate transactions, so concurrent requests queue instead of
// failing with "database is locked"; reads use a separate read-only pool and see
// the last committed state (WAL).
type DB struct {
	Path string

	// Now is the clock, UTC; tests set it for repeatable output.
	Now func() time.Time

	write *sql.DB
	read  *sql.DB

	// ckpt runs WAL checkpoints off the writer's path; stop ends its loop.
	ckpt     *sql.DB
	stopCkpt chan struct{}
	ckptDone chan struct{}

	// writeTurn hands the writer connection to waiting writers in arrival order.
	// database/sql gives a freed connection to any waiter, which under load left
	// some requests waiting many turns (a p99 of 300 ms at a p50 of 45 ms).
	writeTurn chan struct{}

	// readings queues AddReadings calls for the next group commit.
	readings readingGroup

	bootID  string
	epoch   string // see epoch.go
	durable durableSeqs
	files   heldFiles // descriptors Sync uses; see heldFiles
}

// Open opens (creating if needed, with mode 0600) the store at path, applies any
// pending migrations and checks the file's integrity. It refuses a file written
// by a newer fieldtab, and one that fails PRAGMA integrity_check.
func Open(ctx context.Context, path string) (*DB, error) {
	if path == "" {
		return nil, Errorf(Invalid, "db", "no database path given")
	}
	if err := createPrivate(path); err != nil {
		return nil, fmt.Errorf("open %s: %w", path, err)
	}
	db := &DB{Path: path, Now: func() time.Time { return time.Now().UTC() }, writeTurn: make(chan struct{}, 1), bootID: newBootID()}
	var err error
	if db.write, err = sql.Open(driverName, dsn(path, false)); err != nil {
		return nil, fmt.Errorf("open %s: %w", path, err)
	}
	db.write.SetMaxOpenConns(1)
	db.write.SetConnMaxIdleTime(0)
	if err := db.checkIntegrity(ctx); err != nil {
		db.write.Close()
		return nil, err
	}
	if err := db.migrate(ctx); err != nil {
		db.write.Close()
		return nil, err
	}
	if err := db.beginEpoch(ctx); err != nil {
		db.write.Close()
		return nil, err
	}
	if db.read, err = sql.Open(driverName, dsn(path, true)); err != nil {
		db.write.Close()
		return nil, fmt.Errorf("open %s: %w", path, err)
	}
	db.read.SetMaxOpenConns(4)
	if err := db.startCheckpoints(ctx); err != nil {
		db.Close()
		return nil, err
	}
	return db, nil
}

// driverName is go-sqlite3 with the settings its DSN cannot carry, applied to
// every connection:
//   - no automatic checkpoints: the background loop does them (startCheckpoints);
//   - a WAL that grew under load with no pause for the passive checkpoint to
//     catch up (some 300 MB in a 6 s stress run) is cut back to 64 MiB by the
//     first commit after it has.
const driverName = "sqlite3_fieldtab"

func init() {
	sql.Register(driverName, &sqlite3.SQLiteDriver{ConnectHook: func(c *sqlite3.SQLiteConn) error {
		_, err := c.Exec("PRAGMA wal_autocheckpoint = 0; PRAGMA journal_size_limit = 67108864", nil)
		return err
	}})
}

// checkpointEvery is how often the background loop checkpoints and syncs the
// disk: the most a power cut can take back of what the store acknowledged.
const checkpointEvery = 250 * time.Millisecond

// startCheckpoints moves WAL checkpoints off the commit path. SQLite's own
// automatic checkpoint runs inside whichever commit crosses 1,000 pages and
// held the one writer for 50–90 ms under load; a PASSIVE checkpoint from a
// connection of its own never blocks writers or readers. The same loop syncs
// the disk (see Sync).
func (db *DB) startCheckpoints(ctx context.Context) error {
	var err error
	if db.ckpt, err = sql.Open(driverName, dsn(db.Path, false)); err != nil {
		return fmt.Errorf("open %s: %w", db.Path, err)
	}
	db.ckpt.SetMaxOpenConns(1)
	if err := db.Sync(ctx); err != nil {
		return err
	}
	db.stopCkpt, db.ckptDone = make(chan struct{}), make(chan struct{})
	go func() {
		defer close(db.ckptDone)
		t := time.NewTicker(checkpointEvery)
		defer t.Stop()
		for {
			select {
			case <-db.stopCkpt:
				return
			case <-t.C:
				// A failed sync is retried on the next tick; DurableSeq waits and
				// the WAL only grows meanwhile.
				_ = db.Sync(context.Background())
			}
		}
	}()
	return nil
}

// Close closes both connection pools.
func (db *DB) Close() error {
	var errs []error
	if db.stopCkpt != nil {
		close(db.stopCkpt)
		<-db.ckptDone
		errs = append(errs, db.endEpoch())
		// Fold the WAL into the main file so a copied .db is whole on its own.
		_, err := db.ckpt.Exec("PRAGMA wal_checkpoint(TRUNCATE)")
		errs = append(errs, err, db.ckpt.Close())
		db.stopCkpt = nil
	}
	if db.read != nil {
		errs = append(errs, db.read.Close())
	}
	if db.write != nil {
		errs = append(errs, db.write.Close())
	}
	errs = append(errs, db.files.close())
	return errors.Join(errs...)
}

// dsn carries the pragmas in the connection string so that every pooled
// connection gets them, not just the first one an Exec happens to reach.
func dsn(path string, readOnly bool) string {
	q := url.Values{}
	q.Set("_journal_mode", "WAL")
	q.Set("_foreign_keys", "on")
	q.Set("_busy_timeout", "10000")
	q.Set("_synchronous", "NORMAL") // see durable.go
	if readOnly {
		q.Set("mode", "ro")
		q.Set("_query_only", "on")
	} else {
		q.Set("_txlock", "immediate")
	}
	return "file:" + path + "?" + q.Encode()
}

// createPrivate creates an empty database file readable by its owner only, so
// SQLite (which gives -wal and -shm files the main file's mode) never makes a
// world-readable store.
func createPrivate(path string) error {
	if err := os.MkdirAll(filepath.Dir(path), 0o700); err != nil {
		return err
	}
	f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o600)
	if errors.Is(err, fs.ErrExist) {
		return nil
	}
	if err != nil {
		return err
	}
	return f.Close()
}

func (db *DB) checkIntegrity(ctx context.Context) error {
	rows, err := db.write.QueryContext(ctx, "PRAGMA integrity_check")
	if err != nil {
		return db.damaged(err)
	}
	defer rows.Close()
	var problems []string
	for rows.Next() {
		var s string
		if err := rows.Scan(&s); err != nil {
			return db.damaged(err)
		}
		if s != "ok" {
			problems = append(problems, s)
		}
	}
	if err := rows.Err(); err != nil {
		return db.damaged(err)
	}
	if len(problems) > 0 {
		if len(problems) > 5 {
			problems = append(problems[:5], "…")
		}
		return Errorf(Internal, "db", "%s failed its integrity check and was not opened; restore the last backup (fieldtab backup) or keep a copy for recovery: %s",
			db.Path, strings.Join(problems, "; "))
	}
	return nil
}

// damaged explains an error of the integrity check: a file SQLite finds
// malformed, or not a database at all, is refused with the same advice as a
// failed check; anything else is passed on.
func (db *DB) damaged(err error) error {
	var se sqlite3.Error
	if errors.As(err, &se) && (se.Code == sqlite3.ErrCorrupt || se.Code == sqlite3.ErrNotADB) {
		return Errorf(Internal, "db", "%s is damaged (%v) and was not opened; restore the last backup (fieldtab backup) or keep a copy for recovery",
			db.Path, se)
	}
	return fmt.Errorf("open %s: integrity check: %w", db.Path, err)
}

type migration struct {
	version int
	name    string
	sql     string
}

func migrations() ([]migration, error) {
	entries, err := fs.ReadDir(migrationFiles, "migrations")
	if err != nil {
		return nil, err
	}
	var ms []migration
	for _, e := range entries {
		num, _, ok := strings.Cut(e.Name(), "_")
		v, err := strconv.Atoi(num)
		if !ok || err != nil {
			return nil, fmt.Errorf("migration %q: name must start with its number", e.Name())
		}
		b, err := migrationFiles.ReadFile(path.Join("migrations", e.Name()))
		if err != nil {
			return nil, err
		}
		ms = append(ms, migration{version: v, name: e.Name(), sql: string(b)})
	}
	sort.Slice(ms, func(i, j int) bool { return ms[i].version < ms[j].version })
	return ms, nil
}

// SchemaVersion is the newest migration this build knows.
func SchemaVersion() int {
	ms, err := migrations()
	if err != nil || len(ms) == 0 {
		return 0
	}
	return ms[len(ms)-1].version
}

// migrate applies pending migrations, each in its own transaction together
// with its row in schema_migrations.
func (db *DB) migrate(ctx context.Context) error {
	ms, err := migrations()
	if err != nil {
		return err
	}
	if _, err := db.write.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_migrations (
		version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)`); err != nil {
		return fmt.Errorf("migrate %s: %w", db.Path, err)
	}
	var current int
	if err := db.write.QueryRowContext(ctx, "SELECT COALESCE(MAX(version), 0) FROM schema_migrations").Scan(&current); err != nil {
		return fmt.Errorf("migrate %s: %w", db.Path, err)
	}
	if newest := ms[len(ms)-1].version; current > newest {
		return Errorf(Conflict, "db", "%s was written by a newer fieldtab (schema version %d; this build knows up to %d): upgrade fieldtab to open it",
			db.Path, current, newest)
	}
	for _, m := range ms {
		if m.version <= current {
			continue
		}
		err := db.writeTx(ctx, func(tx *sql.Tx) error {
			if _, err := tx.ExecContext(ctx, m.sql); err != nil {
				return err
			}
			_, err := tx.ExecContext(ctx, "INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)",
				m.version, m.name, db.now())
			return err
		})
		if err != nil {
			return fmt.Errorf("migrate %s: %s: %w", db.Path, m.name, err)
		}
	}
	return nil
}

func (db *DB) now() string { return db.Now().UTC().Format(timeLayout) }

// writeTx runs fn in an immediate transaction on the writer connection and
// commits it, or rolls it back if fn or the commit fails.
func (db *DB) writeTx(ctx context.Context, fn func(tx *sql.Tx) error) error {
	// Goroutines blocked sending on a channel are woken first-in, first-out.
	select {
	case db.writeTurn <- struct{}{}:
	case <-ctx.Done():
		return ctx.Err()
	}
	defer func() { <-db.writeTurn }()
	tx, err := db.write.BeginTx(ctx, nil)
	if err != nil {
		return err
	}
	defer tx.Rollback() //nolint:errcheck // a no-op after Commit
	if err := fn(tx); err != nil {
		return err
	}
	return tx.Commit()
}

// readTx runs fn in a read-only transaction, so every query it makes sees one
// consistent snapshot.
func (db *DB) readTx(ctx context.Context, fn func(tx *sql.Tx) error) error {
	tx, err := db.read.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return err
	}
	defer tx.Rollback() //nolint:errcheck // read-only: nothing to commit
	return fn(tx)
}

// Backup writes a consistent copy of the store to dst (mode 0600), safe while
// the server runs: VACUUM INTO reads one snapshot and leaves writers alone.
// dst must not exist yet.
func (db *DB) Backup(ctx context.Context, dst string) error {
	f, err := os.OpenFile(dst, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		return Errorf(Invalid, "out", "backup target %s: %v", dst, err)
	}
	f.Close()
	// A dedicated read-write connection: VACUUM INTO opens its target with the
	// source connection's flags, so the read-only pool cannot write it, and the
	// writer connection would hold up every write while the copy runs.
	conn, err := sql.Open(driverName, dsn(db.Path, false))
	if err != nil {
		os.Remove(dst)
		return fmt.Errorf("backup to %s: %w", dst, err)
	}
	defer conn.Close()
	if _, err := conn.ExecContext(ctx, "VACUUM INTO ?", dst); err != nil {
		os.Remove(dst)
		return fmt.Errorf("backup to %s: %w", dst, err)
	}
	// With synchronous=NORMAL nothing promises the copy reached the disk; a
	// backup that vanishes in a power cut is no backup.
	if err := syncFile(dst); err != nil {
		return fmt.Errorf("backup to %s: %w", dst, err)
	}
	return nil
}

// IntegrityCheck runs PRAGMA integrity_check and returns nil when it says ok.
func (db *DB) IntegrityCheck(ctx context.Context) error { return db.checkIntegrity(ctx) }

// isConstraint reports whether err is the SQLite constraint failure ext (such
// as sqlite3.ErrConstraintUnique), matched by code, not by message.
func isConstraint(err error, ext sqlite3.ErrNoExtended) bool {
	var se sqlite3.Error
	return errors.As(err, &se) && se.Code == sqlite3.ErrConstraint && se.ExtendedCode == ext
}
