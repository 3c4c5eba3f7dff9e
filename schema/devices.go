package schema

import (
	"context"
	"crypto/rand"
	"crypto/sha256"
	"database/sql"
	"encoding/base64"
	"encoding/hex"
	"errors"
	"time"
)

// Devices are the phones and tablets paired with this server. A device proves
// itself with a bearer token that is shown once, at pairing; the store keeps
// only its SHA-256, so a copy of the database does not hand out logins.

// tokenBytes is the entropy of a device token; its text is base64url without
// padding (43 characters).
const tokenBytes = 32

// lastSeenEvery is how stale last_seen may get before a request refreshes it,
// so that authenticating is not a write on every request.
const lastSeenEvery = time.Minute

func hashToken(token string) string {
	sum := sha256.Sum256([]byte(token))
	return hex.EncodeToString(sum[:])
}

// CreateDevice pairs a device: name (required, at most 200 characters) and role
// (RoleLead or RoleTechnician). It returns the device and its bearer token,
// which is not stored and cannot be shown again. Errors: Invalid (field "name"
// or "role").
func (db *DB) CreateDevice(ctx context.Context, a Actor, name, role string) (Device, string, error) {
	if err := checkText("name", name, true, maxNameLen); err != nil {
		return Device{}, "", err
	}
	if err := checkKind("role", role, []string{RoleLead, RoleTechnician}); err != nil {
		return Device{}, "", err
	}
	var d Device
	var token string
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		var err error
		d, token, err = db.insertDevice(tx, a, name, role)
		return err
	})
	if err != nil {
		return Device{}, "", wrapStore("create device", err)
	}
	return d, token, nil
}

// insertDevice adds a device with a new token in tx; name and role are
// already checked.
func (db *DB) insertDevice(tx *sql.Tx, a Actor, name, role string) (Device, string, error) {
	var raw [tokenBytes]byte
	rand.Read(raw[:]) // never fails since Go 1.24
	token := base64.RawURLEncoding.EncodeToString(raw[:])
	at, now := db.stamp()
	d := Device{ID: NewID(), Name: name, Role: role, CreatedAt: at}
	if _, err := tx.Exec("INSERT INTO devices (id, name, role, token_hash, created_at) VALUES (?, ?, ?, ?, ?)",
		d.ID, d.Name, d.Role, hashToken(token), now); err != nil {
		return Device{}, "", err
	}
	if err := addAudit(tx, at, a, "", "create", "device", d.ID, map[string]any{"name": name, "role": role}); err != nil {
		return Device{}, "", err
	}
	return d, token, nil
}

// DeviceByToken returns the device that holds token, and notes that it was
// seen (at most once a minute). Errors: Unauthorized for an unknown or revoked
// token.
func (db *DB) DeviceByToken(ctx context.Context, token string) (Device, error) {
	if token == "" || len(token) > 2*base64.RawURLEncoding.EncodedLen(tokenBytes) {
		return Device{}, Errorf(Unauthorized, "", "no valid device token given")
	}
	var d Device
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		var err error
		d, err = scanDevice(tx.QueryRow("SELECT "+deviceColumns+" FROM devices WHERE token_hash = ?", hashToken(token)))
		return err
	})
	if errors.Is(err, sql.ErrNoRows) {
		return Device{}, Errorf(Unauthorized, "", "unknown device token; pair the device again")
	}
	if err != nil {
		return Device{}, wrapStore("device by token", err)
	}
	if d.RevokedAt != nil {
		return Device{}, Errorf(Unauthorized, "", "this device was unpaired; pair it again")
	}
	at, now := db.stamp()
	if d.LastSeen == nil || at.Sub(*d.LastSeen) >= lastSeenEvery || at.Before(*d.LastSeen) {
		cutoff := at.Add(-lastSeenEvery).Format(timeLayout)
		// The WHERE repeats the staleness test so that concurrent requests of one
		// device write once, and never over a revocation made meanwhile.
		if _, err := db.write.ExecContext(ctx,
			"UPDATE devices SET last_seen = ? WHERE id = ? AND revoked_at IS NULL AND (last_seen IS NULL OR last_seen <= ? OR last_seen > ?)",
			now, d.ID, cutoff, now); err != nil {
			return Device{}, wrapStore("device by token: last seen", err)
		}
		d.LastSeen = &at
	}
	return d, nil
}

// RevokeDevice unpairs a device: its token stops working at once. Revoking a
// revoked device changes nothing. Errors: NotFound.
func (db *DB) RevokeDevice(ctx context.Context, a Actor, id string) error {
	if !validUUID(id) {
		return Errorf(NotFound, "id", "device %q not found", id)
	}
	at, now := db.stamp()
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		d, err := scanDevice(tx.QueryRow("SELECT "+deviceColumns+" FROM devices WHERE id = ?", id))
		if errors.Is(err, sql.ErrNoRows) {
			return Errorf(NotFound, "id", "device %s not found", id)
		}
		if err != nil || d.RevokedAt != nil {
			return err
		}
		if _, err := tx.Exec("UPDATE devices SET revoked_at = ? WHERE id = ?", now, id); err != nil {
			return err
		}
		return addAudit(tx, at, a, "", "revoke", "device", id, map[string]any{"name": d.Name, "role": d.Role})
	})
	return wrapStore("revoke device", err)
}

// Devices returns every paired device, revoked ones included, oldest first.
func (db *DB) Devices(ctx context.Context) ([]Device, error) {
	devices := []Device{}
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		rows, err := tx.QueryContext(ctx, "SELECT "+deviceColumns+" FROM devices ORDER BY created_at, id")
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			d, err := scanDevice(rows)
			if err != nil {
				return err
			}
			devices = append(devices, d)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, wrapStore("devices", err)
	}
	return devices, nil
}

const deviceColumns = "id, name, role, created_at, last_seen, revoked_at"

func scanDevice(row interface{ Scan(...any) error }) (Device, error) {
	var (
		d                 Device
		created           string
		lastSeen, revoked sql.NullString
		err               error
	)
	if err := row.Scan(&d.ID, &d.Name, &d.Role, &created, &lastSeen, &revoked); err != nil {
		return Device{}, err
	}
	if d.CreatedAt, err = parseStamp(created); err != nil {
		return Device{}, err
	}
	for _, f := range []struct {
		s   sql.NullString
		dst **time.Time
	}{{lastSeen, &d.LastSeen}, {revoked, &d.RevokedAt}} {
		if f.s.Valid {
			t, err := parseStamp(f.s.String)
			if err != nil {
				return Device{}, err
			}
			*f.dst = &t
		}
	}
	return d, nil
}
