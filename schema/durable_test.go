package schema

import (
	"context"
	"os"
	"os/exec"
	"testing"
)

// TestOutsideClientKeepsWAL: a technician's sqlite3 or spreadsheet driver that
// opens the store while fieldtab runs, reads, and closes must leave the WAL
// alone. The outside client is Debian's sqlite3 tool, in a process of its own
// (POSIX locks are per process): when the store's sync loop opened and closed
// the files by name, every lock SQLite held was dropped, the tool took itself
// for the last user, and deleted the WAL that later commits were still
// written to.
func TestOutsideClientKeepsWAL(t *testing.T) {
	if _, err := exec.LookPath("sqlite3"); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("the sqlite3 tool is missing; test.sh installs it")
		}
		t.Skip("the sqlite3 tool is missing; test.sh installs it")
	}
	ctx := context.Background()
	db := MustOpenDB(t)
	first := &Job{Name: "Before the outside read", Units: "ip"}
	if err := db.CreateJob(ctx, rdgLead, first); err != nil {
		t.Fatal(err)
	}
	for round := 0; round < 3; round++ {
		if err := db.Sync(ctx); err != nil {
			t.Fatal(err)
		}
		cmd := exec.Command("sqlite3", db.Path, "SELECT count(*) FROM jobs")
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("outside client: %v\n%s", err, out)
		}
		if _, err := os.Stat(db.Path + "-wal"); err != nil {
			t.Fatalf("round %d: the WAL is gone after an outside client's read: %v", round, err)
		}
	}
	second := &Job{Name: "After the outside read", Units: "ip"}
	if err := db.CreateJob(ctx, rdgLead, second); err != nil {
		t.Fatal(err)
	}
	// What was committed after the outside read must be in the file that the
	// next opening reads.
	path := db.Path
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	again, err := Open(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	defer again.Close()
	if _, err := again.Job(ctx, second.ID); err != nil {
		t.Errorf("the job created after the outside read is lost: %v", err)
	}
}
