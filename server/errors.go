package server

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"reflect"
	"strconv"
	"strings"
	"time"

	"fieldtab/schema"
)

// httpError is an error with a status of its own, for conditions that are HTTP
// matters rather than domain ones (a body too large, too many requests).
type httpError struct {
	status int
	field  string
	msg    string
}

func (e *httpError) Error() string { return e.msg }

// statusOf maps an error to its HTTP status: the one place codes meet statuses.
func statusOf(err error) int {
	var he *httpError
	if errors.As(err, &he) {
		return he.status
	}
	switch schema.ErrorCode(err) {
	case schema.Invalid:
		return http.StatusBadRequest
	case schema.NotFound:
		return http.StatusNotFound
	case schema.Conflict:
		return http.StatusConflict
	case schema.Unauthorized:
		return http.StatusUnauthorized
	case schema.Forbidden:
		return http.StatusForbidden
	case schema.Gone:
		return http.StatusGone
	}
	return http.StatusInternalServerError
}

// writeError answers with {"error": message, "field": field}. Internal errors
// are logged and answered with a generic message: their text never leaves.
func (s *Server) writeError(w http.ResponseWriter, r *http.Request, err error) {
	status := statusOf(err)
	body := map[string]string{}
	var he *httpError
	switch {
	case errors.As(err, &he):
		body["error"], body["field"] = he.msg, he.field
	case status == http.StatusInternalServerError:
		s.Logger.Error("request failed", "method", r.Method, "path", r.URL.Path, "err", err)
		body["error"] = "internal error"
	default:
		body["error"], body["field"] = schema.ErrorMessage(err), schema.ErrorField(err)
	}
	if body["field"] == "" {
		delete(body, "field")
	}
	switch status {
	case http.StatusUnauthorized:
		w.Header().Set("WWW-Authenticate", `Bearer realm="fieldtab"`)
	case http.StatusTooManyRequests:
		w.Header().Set("Retry-After", strconv.Itoa(int(guessWindow.Seconds())))
	}
	writeJSON(w, status, body)
}

func writeJSON(w http.ResponseWriter, status int, v any) {
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(true)
	_ = enc.Encode(v) // the client went away; nothing to tell it
}

// decodeJSON reads one JSON value from a size-limited body into v, refusing
// unknown fields and trailing data, with errors that name the field.
func decodeJSON(w http.ResponseWriter, r *http.Request, v any) error {
	r.Body = http.MaxBytesReader(w, r.Body, maxBody)
	dec := json.NewDecoder(r.Body)
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return decodeError(err)
	}
	if err := dec.Decode(&struct{}{}); !errors.Is(err, io.EOF) {
		return &httpError{status: http.StatusBadRequest, msg: "the body must hold exactly one JSON value"}
	}
	return nil
}

func decodeError(err error) error {
	var (
		maxErr    *http.MaxBytesError
		typeErr   *json.UnmarshalTypeError
		syntaxErr *json.SyntaxError
		timeErr   *time.ParseError
	)
	switch {
	case errors.As(err, &maxErr):
		return &httpError{status: http.StatusRequestEntityTooLarge, msg: fmt.Sprintf("the body is larger than %d bytes", maxErr.Limit)}
	case errors.As(err, &typeErr):
		return &httpError{status: http.StatusBadRequest, field: typeErr.Field,
			msg: fmt.Sprintf("%s must be %s, not %s", fieldOr(typeErr.Field), jsonType(typeErr.Type), typeErr.Value)}
	case errors.As(err, &timeErr):
		return &httpError{status: http.StatusBadRequest,
			msg: fmt.Sprintf("%q is not a time; times are RFC 3339 text such as 2025-03-14T09:30:00Z", timeErr.Value)}
	case errors.As(err, &syntaxErr):
		return &httpError{status: http.StatusBadRequest, msg: fmt.Sprintf("malformed JSON at byte %d", syntaxErr.Offset)}
	case errors.Is(err, io.EOF):
		return &httpError{status: http.StatusBadRequest, msg: "the body is empty; a JSON object is expected"}
	case strings.HasPrefix(err.Error(), "json: unknown field "):
		field := strings.Trim(strings.TrimPrefix(err.Error(), "json: unknown field "), `"`)
		return &httpError{status: http.StatusBadRequest, field: field, msg: fmt.Sprintf("unknown field %q", field)}
	}
	return &httpError{status: http.StatusBadRequest, msg: "malformed JSON: " + err.Error()}
}

// jsonType names a Go type as the JSON a client should send.
func jsonType(t reflect.Type) string {
	if t == reflect.TypeFor[time.Time]() {
		return "a time (RFC 3339 text)"
	}
	switch t.Kind() {
	case reflect.Float32, reflect.Float64:
		return "a number"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return "a whole number"
	case reflect.String:
		return "a string"
	case reflect.Bool:
		return "true or false"
	case reflect.Slice, reflect.Array:
		return "a list"
	case reflect.Struct, reflect.Map:
		return "an object"
	case reflect.Pointer:
		return jsonType(t.Elem())
	}
	return "a JSON value"
}

func fieldOr(f string) string {
	if f == "" {
		return "the body"
	}
	return f
}
