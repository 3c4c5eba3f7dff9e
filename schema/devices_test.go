package schema

import (
	"context"
	"encoding/base64"
	"strings"
	"testing"
	"time"
)

func TestDevices(t *testing.T) {
	ctx := context.Background()
	db := MustOpenDB(t)

	d, token, err := db.CreateDevice(ctx, lead, "Sam's phone", RoleTechnician)
	if err != nil {
		t.Fatal(err)
	}
	t.Run("OKCreate", func(t *testing.T) {
		if !validUUID(d.ID) || d.Name != "Sam's phone" || d.Role != RoleTechnician || !d.CreatedAt.Equal(testNow) ||
			d.LastSeen != nil || d.RevokedAt != nil {
			t.Errorf("device %+v", d)
		}
		raw, err := base64.RawURLEncoding.DecodeString(token)
		if err != nil || len(raw) != 32 {
			t.Errorf("token %q: want 32 random bytes in base64url (%v)", token, err)
		}
		var stored string
		if err := db.read.QueryRow("SELECT token_hash FROM devices WHERE id = ?", d.ID).Scan(&stored); err != nil {
			t.Fatal(err)
		}
		if stored == token || stored != hashToken(token) || len(stored) != 64 {
			t.Errorf("token_hash %q: want the hex SHA-256 of the token, never the token", stored)
		}
		_, token2, err := db.CreateDevice(ctx, lead, "Sam's phone", RoleTechnician)
		if err != nil {
			t.Fatal(err)
		}
		if token2 == token {
			t.Error("two devices got the same token")
		}
	})
	t.Run("ErrCreate", func(t *testing.T) {
		for _, tt := range []struct {
			name, devName, role, field string
		}{
			{"ErrNameRequired", " ", RoleLead, "name"},
			{"ErrNameTooLong", strings.Repeat("n", 201), RoleLead, "name"},
			{"ErrNameControl", "tab\tlet", RoleLead, "name"},
			{"ErrRoleMissing", "Tablet", "", "role"},
			{"ErrRoleUnknown", "Tablet", "admin", "role"},
		} {
			t.Run(tt.name, func(t *testing.T) {
				_, tok, err := db.CreateDevice(ctx, lead, tt.devName, tt.role)
				assertErr(t, err, Invalid, tt.field)
				if tok != "" {
					t.Error("a rejected device got a token")
				}
			})
		}
	})
	t.Run("OKByToken", func(t *testing.T) {
		got, err := db.DeviceByToken(ctx, token)
		if err != nil {
			t.Fatal(err)
		}
		if got.ID != d.ID || got.LastSeen == nil || !got.LastSeen.Equal(testNow) {
			t.Errorf("DeviceByToken = %+v, want %s last seen now", got, d.ID)
		}
	})
	t.Run("OKLastSeenAtMostOncePerMinute", func(t *testing.T) {
		lastSeen := func() string {
			var s string
			if err := db.read.QueryRow("SELECT last_seen FROM devices WHERE id = ?", d.ID).Scan(&s); err != nil {
				t.Fatal(err)
			}
			return s
		}
		first := lastSeen()
		db.Now = func() time.Time { return testNow.Add(30 * time.Second) }
		if _, err := db.DeviceByToken(ctx, token); err != nil {
			t.Fatal(err)
		}
		if got := lastSeen(); got != first {
			t.Errorf("last_seen rewritten after 30 s: %s, was %s", got, first)
		}
		later := testNow.Add(61 * time.Second)
		db.Now = func() time.Time { return later }
		got, err := db.DeviceByToken(ctx, token)
		if err != nil {
			t.Fatal(err)
		}
		if s := lastSeen(); s != later.Format(timeLayout) || !got.LastSeen.Equal(later) {
			t.Errorf("last_seen %s after 61 s, want %s", s, later.Format(timeLayout))
		}
		db.Now = func() time.Time { return testNow }
	})
	t.Run("ErrUnknownToken", func(t *testing.T) {
		for _, tok := range []string{"", "nonsense", token + "x", strings.Repeat("A", 43), strings.Repeat("A", 10_000)} {
			_, err := db.DeviceByToken(ctx, tok)
			assertErr(t, err, Unauthorized, "")
		}
	})
	t.Run("OKList", func(t *testing.T) {
		list, err := db.Devices(ctx)
		if err != nil {
			t.Fatal(err)
		}
		if len(list) != 2 {
			t.Fatalf("%d devices listed, want 2", len(list))
		}
	})
	t.Run("OKRevoke", func(t *testing.T) {
		if err := db.RevokeDevice(ctx, lead, d.ID); err != nil {
			t.Fatal(err)
		}
		_, err := db.DeviceByToken(ctx, token)
		assertErr(t, err, Unauthorized, "")
		if err := db.RevokeDevice(ctx, lead, d.ID); err != nil {
			t.Errorf("revoking twice: %v", err)
		}
		list, err := db.Devices(ctx)
		if err != nil {
			t.Fatal(err)
		}
		for _, x := range list {
			if x.ID == d.ID && (x.RevokedAt == nil || !x.RevokedAt.Equal(testNow)) {
				t.Errorf("revoked device listed as %+v", x)
			}
		}
	})
	t.Run("ErrRevokeUnknown", func(t *testing.T) {
		assertErr(t, db.RevokeDevice(ctx, lead, NewID()), NotFound, "id")
		assertErr(t, db.RevokeDevice(ctx, lead, "phone-1"), NotFound, "id")
	})
	t.Run("OKAudit", func(t *testing.T) {
		entries, err := db.Audit(ctx, "")
		if err != nil {
			t.Fatal(err)
		}
		var got []string
		for _, e := range entries {
			if e.JobID != "" || e.Entity != "device" || e.Actor != lead.Name {
				t.Errorf("device audit entry %+v", e)
			}
			got = append(got, e.Action)
		}
		// Two creates and one revoke: the second revoke changed nothing.
		if strings.Join(got, ",") != "create,create,revoke" {
			t.Errorf("device audit %q, want create,create,revoke", strings.Join(got, ","))
		}
		if entries[2].EntityID != d.ID {
			t.Errorf("revoke entry names %s, want %s", entries[2].EntityID, d.ID)
		}
	})
}
