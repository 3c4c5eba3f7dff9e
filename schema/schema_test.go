package schema

import (
	"context"
	"path/filepath"
	"testing"
	"time"
)

// testNow is the fixed clock MustOpenDB gives every test database.
var testNow = time.Date(2025, 3, 14, 9, 30, 0, 0, time.UTC)

// MustOpenDB opens a fresh store in a temporary directory with its clock fixed
// at testNow, and closes it when the test ends.
func MustOpenDB(tb testing.TB) *DB {
	tb.Helper()
	db, err := Open(context.Background(), filepath.Join(tb.TempDir(), "fieldtab.db"))
	if err != nil {
		tb.Fatalf("open test database: %v", err)
	}
	db.Now = func() time.Time { return testNow }
	tb.Cleanup(func() {
		if err := db.Close(); err != nil {
			tb.Errorf("close test database: %v", err)
		}
	})
	return db
}
