package schema

import (
	"context"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

func TestJoinCodes(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)

	t.Run("OKStoredAsHash", func(t *testing.T) {
		code, expires, err := db.CreateJoinCode(ctx, lead, RoleTechnician, testNow)
		if err != nil {
			t.Fatal(err)
		}
		if len(code) != 9 || code[4] != '-' || !expires.Equal(testNow.Add(JoinCodeTTL)) {
			t.Fatalf("code %q expires %v", code, expires)
		}
		var hash, role string
		if err := db.read.QueryRow("SELECT code_hash, role FROM join_codes").Scan(&hash, &role); err != nil {
			t.Fatal(err)
		}
		if hash != hashToken(NormaliseJoinCode(code)) || strings.Contains(hash, code[:4]) || role != RoleTechnician {
			t.Errorf("stored %q %q: want the hex SHA-256 of the code, never the code", hash, role)
		}
	})
	t.Run("OKCrewCodeManyDevicesUntilExpiry", func(t *testing.T) {
		code, _, err := db.CreateJoinCode(ctx, lead, RoleTechnician, testNow)
		if err != nil {
			t.Fatal(err)
		}
		for _, typed := range []string{code, strings.ToLower(code), strings.ReplaceAll(code, "-", " ")} {
			d, tok, err := db.PairDevice(ctx, typed, "Phone", testNow.Add(time.Minute))
			if err != nil || d.Role != RoleTechnician || tok == "" {
				t.Fatalf("pair with %q: %v %+v", typed, err, d)
			}
		}
		_, _, err = db.PairDevice(ctx, code, "Late phone", testNow.Add(JoinCodeTTL))
		assertErr(t, err, Unauthorized, "code")
	})
	t.Run("OKLeadCodeOnce", func(t *testing.T) {
		code, _, err := db.CreateJoinCode(ctx, lead, RoleLead, testNow)
		if err != nil {
			t.Fatal(err)
		}
		// A refused name spends nothing.
		_, _, err = db.PairDevice(ctx, code, " ", testNow)
		assertErr(t, err, Invalid, "name")
		d, _, err := db.PairDevice(ctx, code, "Lead tablet", testNow)
		if err != nil || d.Role != RoleLead {
			t.Fatalf("pair: %v %+v", err, d)
		}
		_, _, err = db.PairDevice(ctx, code, "Second tablet", testNow)
		assertErr(t, err, Unauthorized, "code")
	})
	t.Run("ErrWrongCodeAndRole", func(t *testing.T) {
		_, _, err := db.PairDevice(ctx, "AAAA-AAAA", "Phone", testNow)
		assertErr(t, err, Unauthorized, "code")
		_, _, err = db.PairDevice(ctx, "", "Phone", testNow)
		assertErr(t, err, Unauthorized, "code")
		_, _, err = db.CreateJoinCode(ctx, lead, "owner", testNow)
		assertErr(t, err, Invalid, "role")
	})
	t.Run("OKExpiredDropped", func(t *testing.T) {
		if _, _, err := db.CreateJoinCode(ctx, lead, RoleTechnician, testNow.Add(24*time.Hour)); err != nil {
			t.Fatal(err)
		}
		var n int
		if err := db.read.QueryRow("SELECT COUNT(*) FROM join_codes").Scan(&n); err != nil {
			t.Fatal(err)
		}
		if n != 1 {
			t.Errorf("%d join codes stored, want only the new one", n)
		}
	})
}

// A code made through one handle on the file pairs through another, as when
// `fieldtab join-code` runs beside `fieldtab serve`.
func TestJoinCodeAcrossHandles(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "fieldtab.db")
	a, err := Open(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	b, err := Open(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	code, _, err := b.CreateJoinCode(ctx, Actor{Name: "command line", Role: RoleLead}, RoleLead, time.Now())
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := a.PairDevice(ctx, code, "Lead tablet", time.Now()); err != nil {
		t.Fatal(err)
	}
	_, _, err = b.PairDevice(ctx, code, "Other", time.Now())
	assertErr(t, err, Unauthorized, "code")
}

func TestJobSummaries(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)
	f := mustReadingsFixture(t, db)
	tech := Actor{DeviceID: f.device, Name: "Sam", Role: RoleTechnician}
	rs := f.batch()
	if _, err := db.AddReadings(ctx, tech, f.job, rs); err != nil {
		t.Fatal(err)
	}
	// A correction replaces its reading; a void removes one: 6 - 1 = 5 count.
	fix := f.reading(SubjectOutlet, "flow", UnitCFM, 390)
	fix.Supersedes = rs[0].ID
	void := Reading{ID: NewID(), SubjectKind: rs[5].SubjectKind, SubjectID: rs[5].SubjectID, Quantity: rs[5].Quantity,
		Point: rs[5].Point, Unit: rs[5].Unit, Stage: rs[5].Stage, Technician: "Sam", TakenAt: rs[5].TakenAt,
		Void: true, Supersedes: rs[5].ID}
	res, err := db.AddReadings(ctx, tech, f.job, []Reading{fix, void})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range res {
		if r.Status != "stored" {
			t.Fatalf("correction/void: %+v", res)
		}
	}
	sums, err := db.JobSummaries(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(sums) != 2 {
		t.Fatalf("%d summaries, want 2", len(sums))
	}
	got := map[string]JobCounts{}
	for _, s := range sums {
		got[s.Job.ID] = s.Counts
	}
	// The fixture: one live outlet (a second deleted), one of each other kind.
	want := JobCounts{Systems: 1, Outlets: 1, Traverses: 1, CapacityTests: 1, WaterTests: 1, Readings: 5}
	if got[f.job] != want {
		t.Errorf("job counts %+v, want %+v", got[f.job], want)
	}
	if other := (JobCounts{Systems: 1}); got[f.other] != other {
		t.Errorf("other job counts %+v, want %+v", got[f.other], other)
	}
	snap, err := db.Snapshot(ctx, f.job)
	if err != nil {
		t.Fatal(err)
	}
	if n := len(CurrentReadings(snap.Readings)); n != want.Readings {
		t.Errorf("CurrentReadings gives %d, JobSummaries %d", n, want.Readings)
	}
}
