package server

import (
	"context"
	"net/http"

	"github.com/gorilla/mux"

	"fieldtab/schema"
)

// recordKind is the one handler set for the six design-record kinds, each at
// /jobs/{job}/{path}. schema's Create/Update/Delete/Get are generic over an
// unexported constraint, so each kind passes its instantiations in.
type recordKind[T any, P interface{ *T }] struct {
	path   string                      // URL segment, e.g. "capacity-tests"
	key    string                      // JSON key of the list, as in schema.Snapshot
	pick   func(*schema.Snapshot) []T  // the kind's records in a snapshot
	ids    func(P) (id, jobID *string) // the record's own and job IDs
	get    func(context.Context, *schema.DB, string, string) (P, error)
	create func(context.Context, *schema.DB, schema.Actor, P) error
	update func(context.Context, *schema.DB, schema.Actor, P) error
	del    func(context.Context, *schema.DB, schema.Actor, string, string) error
}

func (s *Server) registerRecordRoutes(r *mux.Router) {
	registerKind(s, r, recordKind[schema.Instrument, *schema.Instrument]{
		path: "instruments", key: "instruments",
		pick: func(sn *schema.Snapshot) []schema.Instrument { return sn.Instruments },
		ids:  func(x *schema.Instrument) (*string, *string) { return &x.ID, &x.JobID },
		get:  schema.Get[*schema.Instrument], create: schema.Create[*schema.Instrument],
		update: schema.Update[*schema.Instrument], del: schema.Delete[*schema.Instrument],
	})
	registerKind(s, r, recordKind[schema.System, *schema.System]{
		path: "systems", key: "systems",
		pick: func(sn *schema.Snapshot) []schema.System { return sn.Systems },
		ids:  func(x *schema.System) (*string, *string) { return &x.ID, &x.JobID },
		get:  schema.Get[*schema.System], create: schema.Create[*schema.System],
		update: schema.Update[*schema.System], del: schema.Delete[*schema.System],
	})
	registerKind(s, r, recordKind[schema.Outlet, *schema.Outlet]{
		path: "outlets", key: "outlets",
		pick: func(sn *schema.Snapshot) []schema.Outlet { return sn.Outlets },
		ids:  func(x *schema.Outlet) (*string, *string) { return &x.ID, &x.JobID },
		get:  schema.Get[*schema.Outlet], create: schema.Create[*schema.Outlet],
		update: schema.Update[*schema.Outlet], del: schema.Delete[*schema.Outlet],
	})
	registerKind(s, r, recordKind[schema.Traverse, *schema.Traverse]{
		path: "traverses", key: "traverses",
		pick: func(sn *schema.Snapshot) []schema.Traverse { return sn.Traverses },
		ids:  func(x *schema.Traverse) (*string, *string) { return &x.ID, &x.JobID },
		get:  schema.Get[*schema.Traverse], create: schema.Create[*schema.Traverse],
		update: schema.Update[*schema.Traverse], del: schema.Delete[*schema.Traverse],
	})
	registerKind(s, r, recordKind[schema.CapacityTest, *schema.CapacityTest]{
		path: "capacity-tests", key: "capacity_tests",
		pick: func(sn *schema.Snapshot) []schema.CapacityTest { return sn.CapacityTests },
		ids:  func(x *schema.CapacityTest) (*string, *string) { return &x.ID, &x.JobID },
		get:  schema.Get[*schema.CapacityTest], create: schema.Create[*schema.CapacityTest],
		update: schema.Update[*schema.CapacityTest], del: schema.Delete[*schema.CapacityTest],
	})
	registerKind(s, r, recordKind[schema.WaterTest, *schema.WaterTest]{
		path: "water-tests", key: "water_tests",
		pick: func(sn *schema.Snapshot) []schema.WaterTest { return sn.WaterTests },
		ids:  func(x *schema.WaterTest) (*string, *string) { return &x.ID, &x.JobID },
		get:  schema.Get[*schema.WaterTest], create: schema.Create[*schema.WaterTest],
		update: schema.Update[*schema.WaterTest], del: schema.Delete[*schema.WaterTest],
	})
}

func registerKind[T any, P interface{ *T }](s *Server, r *mux.Router, k recordKind[T, P]) {
	h := &recordHandlers[T, P]{s: s, k: k}
	base := "/jobs/{job}/" + k.path
	r.HandleFunc(base, h.handleList).Methods(http.MethodGet)
	r.HandleFunc(base, s.writing(s.leadOnly(h.handleCreate))).Methods(http.MethodPost)
	r.HandleFunc(base+"/{id}", h.handleGet).Methods(http.MethodGet)
	r.HandleFunc(base+"/{id}", s.writing(s.leadOnly(h.handleUpdate))).Methods(http.MethodPut)
	r.HandleFunc(base+"/{id}", s.writing(s.leadOnly(h.handleDelete))).Methods(http.MethodDelete)
}

type recordHandlers[T any, P interface{ *T }] struct {
	s *Server
	k recordKind[T, P]
}

// handleList answers the kind's live records in tag order. It reads them from
// the job's snapshot: schema has no per-kind list.
func (h *recordHandlers[T, P]) handleList(w http.ResponseWriter, r *http.Request) {
	snap, err := h.s.DB.Snapshot(r.Context(), jobID(r))
	if err != nil {
		h.s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, map[string]any{h.k.key: h.k.pick(snap)})
}

func (h *recordHandlers[T, P]) handleGet(w http.ResponseWriter, r *http.Request) {
	rec, err := h.k.get(r.Context(), h.s.DB, jobID(r), mux.Vars(r)["id"])
	if err != nil {
		h.s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, rec)
}

// decode reads the body into a new record whose job is the path's: a body
// job_id (or, with id set, a body id) naming another is refused.
func (h *recordHandlers[T, P]) decode(w http.ResponseWriter, r *http.Request, id string) (P, error) {
	rec := P(new(T))
	if err := decodeJSON(w, r, rec); err != nil {
		return nil, err
	}
	recID, recJob := h.k.ids(rec)
	if err := pathWins("job_id", recJob, jobID(r)); err != nil {
		return nil, err
	}
	if id != "" {
		if err := pathWins("id", recID, id); err != nil {
			return nil, err
		}
	}
	return rec, nil
}

func (h *recordHandlers[T, P]) handleCreate(w http.ResponseWriter, r *http.Request) {
	rec, err := h.decode(w, r, "")
	if err == nil {
		err = h.k.create(r.Context(), h.s.DB, actorOf(r), rec)
	}
	if err != nil {
		h.s.writeError(w, r, err)
		return
	}
	id, _ := h.k.ids(rec)
	w.Header().Set("Location", r.URL.Path+"/"+*id)
	writeJSON(w, http.StatusCreated, rec)
}

func (h *recordHandlers[T, P]) handleUpdate(w http.ResponseWriter, r *http.Request) {
	rec, err := h.decode(w, r, mux.Vars(r)["id"])
	if err == nil {
		err = h.k.update(r.Context(), h.s.DB, actorOf(r), rec)
	}
	if err != nil {
		h.s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, rec)
}

func (h *recordHandlers[T, P]) handleDelete(w http.ResponseWriter, r *http.Request) {
	if err := h.k.del(r.Context(), h.s.DB, actorOf(r), jobID(r), mux.Vars(r)["id"]); err != nil {
		h.s.writeError(w, r, err)
		return
	}
	w.WriteHeader(http.StatusNoContent)
}
