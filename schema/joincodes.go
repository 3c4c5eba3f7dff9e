package schema

import (
	"context"
	"crypto/rand"
	"database/sql"
	"errors"
	"strings"
	"time"
)

// Join codes: short, typed or scanned once per device. A technician code may
// be used by the whole crew until it expires; a lead code pairs one device.
// The store keeps only a code's SHA-256, so a copy of the database hands out
// no way in. Wrong guesses are limited by the server, per client.
const (
	// JoinCodeTTL is how long a join code is valid after it is made.
	JoinCodeTTL      = 15 * time.Minute
	joinCodeLen      = 8
	joinCodeAlphabet = "23456789ABCDEFGHJKMNPQRSTUVWXYZ" // no 0/O, 1/I/L
)

// NormaliseJoinCode is a typed code as stored: upper case, without dashes or
// spaces ("abcd-efgh" → "ABCDEFGH").
func NormaliseJoinCode(typed string) string {
	return strings.ToUpper(strings.NewReplacer("-", "", " ", "").Replace(typed))
}

// CreateJoinCode makes a join code for role (RoleLead or RoleTechnician),
// valid from now for JoinCodeTTL, and returns it formatted for reading aloud
// ("ABCD-EFGH") with its expiry. now is the caller's clock, so that a server's
// clock and the store's agree on expiry. Errors: Invalid (field "role").
func (db *DB) CreateJoinCode(ctx context.Context, a Actor, role string, now time.Time) (string, time.Time, error) {
	if err := checkKind("role", role, []string{RoleLead, RoleTechnician}); err != nil {
		return "", time.Time{}, err
	}
	b := make([]byte, joinCodeLen)
	rand.Read(b) // never fails since Go 1.24
	for i := range b {
		// 256 is not a multiple of 31; the bias (under 1 %) does not matter for a
		// code that lives minutes behind a guess limit.
		b[i] = joinCodeAlphabet[int(b[i])%len(joinCodeAlphabet)]
	}
	code := string(b)
	now = now.UTC().Truncate(time.Millisecond)
	expires := now.Add(JoinCodeTTL)
	at, _ := db.stamp()
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		// Expired codes are of no use to anyone: drop them as new ones come.
		if _, err := tx.Exec("DELETE FROM join_codes WHERE expires_at <= ?", now.Format(timeLayout)); err != nil {
			return err
		}
		if _, err := tx.Exec("INSERT INTO join_codes (code_hash, role, created_at, expires_at) VALUES (?, ?, ?, ?)",
			hashToken(code), role, now.Format(timeLayout), expires.Format(timeLayout)); err != nil {
			return err
		}
		return addAudit(tx, at, a, "", "create", "join_code", "", map[string]any{"role": role, "expires_at": expires.Format(timeLayout)})
	})
	if err != nil {
		return "", time.Time{}, wrapStore("create join code", err)
	}
	return code[:4] + "-" + code[4:], expires, nil
}

// ErrJoinCode is the Unauthorized error of a wrong, used or expired join code;
// the server counts it as a wrong guess.
var ErrJoinCode = Errorf(Unauthorized, "code", "this join code is wrong or has expired; ask the lead for the current code")

// PairDevice pairs a device with a join code typed in any case, with or
// without its dash: the code must exist, be unexpired at now and, for a lead
// code, unused. In one transaction it spends a lead code and creates the
// device (see CreateDevice), so a refused name keeps the code. Errors:
// Invalid (field "name"), ErrJoinCode.
func (db *DB) PairDevice(ctx context.Context, typedCode, name string, now time.Time) (Device, string, error) {
	if err := checkText("name", name, true, maxNameLen); err != nil {
		return Device{}, "", err
	}
	code := NormaliseJoinCode(typedCode)
	if len(code) != joinCodeLen {
		return Device{}, "", ErrJoinCode
	}
	var d Device
	var token string
	err := db.writeTx(ctx, func(tx *sql.Tx) error {
		var role string
		err := tx.QueryRow("SELECT role FROM join_codes WHERE code_hash = ? AND used_at IS NULL AND expires_at > ?",
			hashToken(code), now.UTC().Format(timeLayout)).Scan(&role)
		if errors.Is(err, sql.ErrNoRows) {
			return ErrJoinCode
		}
		if err != nil {
			return err
		}
		if role == RoleLead {
			if _, err := tx.Exec("UPDATE join_codes SET used_at = ? WHERE code_hash = ?", now.UTC().Format(timeLayout), hashToken(code)); err != nil {
				return err
			}
		}
		d, token, err = db.insertDevice(tx, Actor{Name: name, Role: role}, name, role)
		return err
	})
	if err != nil {
		return Device{}, "", wrapStore("pair device", err)
	}
	return d, token, nil
}
