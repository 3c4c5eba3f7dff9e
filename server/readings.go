package server

import (
	"bytes"
	"encoding/json"
	"errors"
	"net/http"

	"github.com/gorilla/mux"

	"fieldtab/schema"
)

func (s *Server) registerReadingRoutes(r *mux.Router) {
	r.HandleFunc("/jobs/{job}/readings", s.writing(s.handleReadingsCreate)).Methods(http.MethodPost)
	r.HandleFunc("/jobs/{job}/readings", s.handleReadingsList).Methods(http.MethodGet)
}

// readingsRequest is a batch of readings, as a device's outbox sends it. Its
// items are decoded one by one after counting them, so a body of a million
// tiny items costs a slice of raw messages, not a million readings.
type readingsRequest struct {
	Readings []json.RawMessage `json:"readings"`
}

// readingsResponse gives each reading's fate, in the batch's order, and the
// highest change number among them (0 when none was stored or known). A
// device keeps a stored reading until durable_seq reaches its seq under the
// same boot_id (see schema.DB.DurableSeq).
type readingsResponse struct {
	Results []schema.ReadingResult `json:"results"`
	Seq     int64                  `json:"seq"`
	durability
}

// durability says how far the job's changes are on disk in this run of the
// store.
type durability struct {
	BootID     string `json:"boot_id"`
	DurableSeq int64  `json:"durable_seq"`
	Epoch      string `json:"epoch"` // the store's history the change numbers belong to
}

func (s *Server) durability(job string) durability {
	return durability{BootID: s.DB.BootID(), DurableSeq: s.DB.DurableSeq(job), Epoch: s.DB.Epoch()}
}

// handleReadingsCreate stores a batch in one transaction. A reading that does
// not decode, or that the store rejects, is reported in its result and keeps
// none of the others from being stored; only a body that is not a batch at all
// is refused as a whole.
func (s *Server) handleReadingsCreate(w http.ResponseWriter, r *http.Request) {
	var req readingsRequest
	if err := decodeJSON(w, r, &req); err != nil {
		s.writeError(w, r, err)
		return
	}
	if req.Readings == nil {
		s.writeError(w, r, schema.Errorf(schema.Invalid, "readings", "is required: a list of at most %d readings", schema.MaxReadingsBatch))
		return
	}
	if n := len(req.Readings); n > schema.MaxReadingsBatch {
		s.writeError(w, r, schema.Errorf(schema.Invalid, "readings", "a batch holds at most %d readings; this one has %d", schema.MaxReadingsBatch, n))
		return
	}
	// An item that does not decode is rejected on its own, like one the store
	// refuses: a single bad entry must not block a device's whole outbox.
	results := make([]schema.ReadingResult, len(req.Readings))
	var (
		rs  []schema.Reading
		idx []int
	)
	for i, raw := range req.Readings {
		var rd schema.Reading
		if err := decodeItem(raw, &rd); err != nil {
			results[i] = rejectUndecoded(raw, err)
			continue
		}
		rs, idx = append(rs, rd), append(idx, i)
	}
	stored, err := s.DB.AddReadings(r.Context(), actorOf(r), jobID(r), rs)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	for j, res := range stored {
		results[idx[j]] = res
	}
	resp := readingsResponse{Results: results, durability: s.durability(jobID(r))}
	for _, res := range results {
		resp.Seq = max(resp.Seq, res.Seq)
	}
	writeJSON(w, http.StatusOK, resp)
}

// handleReadingsList answers every reading of the job, superseded and void
// ones included, in the order stored.
func (s *Server) handleReadingsList(w http.ResponseWriter, r *http.Request) {
	rs, err := s.DB.Readings(r.Context(), jobID(r))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, map[string]any{"readings": rs})
}

// decodeItem decodes one JSON value (an item of a list already read) into v,
// refusing unknown fields as decodeJSON does.
func decodeItem(raw json.RawMessage, v any) error {
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return decodeError(err)
	}
	return nil
}

// rejectUndecoded is the result for an item that is not a reading: its id if
// one can be read, the field at fault and why.
func rejectUndecoded(raw json.RawMessage, err error) schema.ReadingResult {
	var id struct {
		ID string `json:"id"`
	}
	_ = json.Unmarshal(raw, &id) // best effort: the item is malformed anyway
	res := schema.ReadingResult{ID: id.ID, Status: schema.ReadingRejected, Field: "(item)", Reason: err.Error()}
	var he *httpError
	if errors.As(err, &he) && he.field != "" {
		res.Field = he.field
	}
	return res
}
