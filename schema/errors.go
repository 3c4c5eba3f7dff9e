package schema

import (
	"errors"
	"fmt"
)

// Code classifies an error so that callers (the server, the command line) can
// answer it without reading its text.
type Code string

// The error codes. Only Internal errors hide their message from clients.
const (
	Invalid      Code = "invalid"
	NotFound     Code = "not_found"
	Conflict     Code = "conflict"
	Unauthorized Code = "unauthorized"
	Forbidden    Code = "forbidden"
	Gone         Code = "gone" // a cursor from a history of the store that is no more
	Internal     Code = "internal"
)

// Error is an application error: a code, the field it concerns (in the JSON
// name the client used, "" when none) and a message fit to show a technician.
type Error struct {
	Code    Code
	Field   string
	Message string
}

func (e *Error) Error() string {
	if e.Field != "" {
		return fmt.Sprintf("%s: %s", e.Field, e.Message)
	}
	return e.Message
}

// Errorf returns an *Error with a formatted message.
func Errorf(code Code, field, format string, args ...any) *Error {
	return &Error{Code: code, Field: field, Message: fmt.Sprintf(format, args...)}
}

// ErrorCode returns the code of err: its *Error's code, or Internal for any
// other non-nil error, or "" for nil.
func ErrorCode(err error) Code {
	var e *Error
	switch {
	case err == nil:
		return ""
	case errors.As(err, &e):
		return e.Code
	}
	return Internal
}

// ErrorField returns the field of err's *Error, or "".
func ErrorField(err error) string {
	var e *Error
	if errors.As(err, &e) {
		return e.Field
	}
	return ""
}

// ErrorMessage returns the message of err's *Error, or "internal error" for
// anything else, so internal details never reach a client.
func ErrorMessage(err error) string {
	var e *Error
	if errors.As(err, &e) {
		return e.Message
	}
	return "internal error"
}
