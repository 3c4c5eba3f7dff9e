package server

import (
	"net/http"
	"strconv"

	"github.com/gorilla/mux"

	"fieldtab/schema"
)

func (s *Server) registerJobRoutes(r *mux.Router) {
	r.HandleFunc("/jobs", s.handleJobList).Methods(http.MethodGet)
	r.HandleFunc("/jobs", s.writing(s.leadOnly(s.handleJobCreate))).Methods(http.MethodPost)
	r.HandleFunc("/jobs/{job}", s.handleJobGet).Methods(http.MethodGet)
	r.HandleFunc("/jobs/{job}", s.writing(s.leadOnly(s.handleJobUpdate))).Methods(http.MethodPut)
	r.HandleFunc("/jobs/{job}/changes", s.handleJobChanges).Methods(http.MethodGet)
	r.HandleFunc("/jobs/{job}/audit", s.leadOnly(s.handleJobAudit)).Methods(http.MethodGet)
}

func (s *Server) handleJobList(w http.ResponseWriter, r *http.Request) {
	jobs, err := s.DB.Jobs(r.Context())
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, map[string]any{"jobs": jobs})
}

func (s *Server) handleJobCreate(w http.ResponseWriter, r *http.Request) {
	var j schema.Job
	if err := decodeJSON(w, r, &j); err != nil {
		s.writeError(w, r, err)
		return
	}
	if err := s.DB.CreateJob(r.Context(), actorOf(r), &j); err != nil {
		s.writeError(w, r, err)
		return
	}
	w.Header().Set("Location", r.URL.Path+"/"+j.ID)
	writeJSON(w, http.StatusCreated, j)
}

// jobView is GET /jobs/{job}: the job, its records with their current
// readings (superseded and void ones left out), and every figure measure
// derives from them.
type jobView struct {
	Epoch    string           `json:"epoch"` // the history job.seq belongs to; send it back with changes
	Job      schema.Job       `json:"job"`
	Snapshot *schema.Snapshot `json:"snapshot"`
	Results  *schema.Results  `json:"results"`
}

// jobResults loads the request's job and computes its results, as of now.
func (s *Server) jobResults(r *http.Request) (*schema.Snapshot, *schema.Results, error) {
	snap, err := s.DB.Snapshot(r.Context(), jobID(r))
	if err != nil {
		return nil, nil, err
	}
	res, err := schema.ComputeResults(snap, s.now())
	return snap, res, err
}

func (s *Server) handleJobGet(w http.ResponseWriter, r *http.Request) {
	snap, res, err := s.jobResults(r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	// After ComputeResults, which picks the current readings itself.
	snap.Readings = schema.CurrentReadings(snap.Readings)
	writeJSON(w, http.StatusOK, jobView{Epoch: s.DB.Epoch(), Job: snap.Job, Snapshot: snap, Results: res})
}

// handleJobUpdate replaces the job's fields. The path names the job; a body
// id that names another is refused rather than silently ignored.
func (s *Server) handleJobUpdate(w http.ResponseWriter, r *http.Request) {
	var j schema.Job
	if err := decodeJSON(w, r, &j); err != nil {
		s.writeError(w, r, err)
		return
	}
	if err := pathWins("id", &j.ID, jobID(r)); err != nil {
		s.writeError(w, r, err)
		return
	}
	if err := s.DB.UpdateJob(r.Context(), actorOf(r), &j); err != nil {
		s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, j)
}

// changesView is a ChangesSince snapshot with the number to ask from next.
type changesView struct {
	*schema.Snapshot
	Seq int64 `json:"seq"`
	durability
}

func (s *Server) handleJobChanges(w http.ResponseWriter, r *http.Request) {
	since, err := sinceParam(r)
	if err == nil {
		err = s.DB.CheckEpoch(r.URL.Query().Get("epoch"))
	}
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	snap, err := s.DB.ChangesSince(r.Context(), jobID(r), since)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, changesView{Snapshot: snap, Seq: snap.Job.Seq, durability: s.durability(jobID(r))})
}

func (s *Server) handleJobAudit(w http.ResponseWriter, r *http.Request) {
	entries, err := s.DB.Audit(r.Context(), jobID(r))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	writeJSON(w, http.StatusOK, map[string]any{"audit": entries})
}

// pathWins sets *body to the path's value, refusing (Invalid, field) a body
// value that names something else.
func pathWins(field string, body *string, path string) error {
	if *body != "" && *body != path {
		return schema.Errorf(schema.Invalid, field, "is %q but the path names %q; leave it out or make them agree", *body, path)
	}
	*body = path
	return nil
}

// sinceParam reads ?since=N, a change number of 0 or more.
func sinceParam(r *http.Request) (int64, error) {
	q := r.URL.Query()
	if !q.Has("since") {
		return 0, schema.Errorf(schema.Invalid, "since", "is required: give the last seq you have, or 0 for everything")
	}
	n, err := strconv.ParseInt(q.Get("since"), 10, 64)
	if err != nil || n < 0 {
		return 0, schema.Errorf(schema.Invalid, "since", "%q is not a change number; give a whole number of 0 or more", q.Get("since"))
	}
	return n, nil
}
