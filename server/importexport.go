package server

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"net/http"
	"strconv"
	"strings"

	"github.com/gorilla/mux"

	"fieldtab/schema"
)

// Upload limits of the import endpoints, matching schema's own: a schedule of
// 16 MiB and a job document of 256 MiB (a big job with every reading).
const (
	maxScheduleBody    = 16 << 20
	maxJobDocumentBody = 256 << 20
)

func (s *Server) registerImportExportRoutes(r *mux.Router) {
	r.HandleFunc("/jobs/import", s.writing(s.leadOnly(s.handleJobImport))).Methods(http.MethodPost)
	r.HandleFunc("/jobs/{job}/import/outlets", s.writing(s.leadOnly(s.scheduleImport(s.DB.ImportOutletSchedule)))).Methods(http.MethodPost)
	r.HandleFunc("/jobs/{job}/import/equipment", s.writing(s.leadOnly(s.scheduleImport(s.DB.ImportEquipmentSchedule)))).Methods(http.MethodPost)
	r.HandleFunc("/jobs/{job}/export.csv", s.handleResultsCSV).Methods(http.MethodGet)
	r.HandleFunc("/jobs/{job}/readings.csv", s.handleReadingsCSV).Methods(http.MethodGet)
	r.HandleFunc("/jobs/{job}/export.json", s.handleJobExport).Methods(http.MethodGet)
}

// scheduleImporter is schema's ImportOutletSchedule or ImportEquipmentSchedule.
type scheduleImporter func(ctx context.Context, a schema.Actor, jobID string, r io.Reader, dryRun bool) (schema.ImportReport, error)

// scheduleImport answers a CSV schedule upload (the body, any content type)
// with the import's report. ?dry_run=1 previews: 200 with the problems by
// line and column, nothing stored. A real import with problems stores nothing
// and answers 400 with the same report and an "error".
func (s *Server) scheduleImport(imp scheduleImporter) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		dryRun, err := boolParam(r, "dry_run")
		if err != nil {
			s.writeError(w, r, err)
			return
		}
		r.Body = http.MaxBytesReader(w, r.Body, maxScheduleBody)
		rep, err := imp(r.Context(), actorOf(r), jobID(r), r.Body, dryRun)
		if err != nil {
			s.writeError(w, r, uploadError(err))
			return
		}
		if len(rep.Problems) > 0 && !dryRun {
			writeJSON(w, http.StatusBadRequest, struct {
				Error string `json:"error"`
				Field string `json:"field"`
				schema.ImportReport
			}{fmt.Sprintf("the schedule has %s; nothing was imported", problems(len(rep.Problems))), "file", rep})
			return
		}
		writeJSON(w, http.StatusOK, rep)
	}
}

func problems(n int) string {
	if n == 1 {
		return "1 problem"
	}
	return strconv.Itoa(n) + " problems"
}

// handleJobImport merges a job document (GET export.json of this or another
// server) into this store: 201 when the job is new here, else 200.
func (s *Server) handleJobImport(w http.ResponseWriter, r *http.Request) {
	r.Body = http.MaxBytesReader(w, r.Body, maxJobDocumentBody)
	rep, err := s.DB.ImportJobJSON(r.Context(), actorOf(r), r.Body)
	if err != nil {
		s.writeError(w, r, uploadError(err))
		return
	}
	status := http.StatusOK
	if rep.JobCreated {
		status = http.StatusCreated
		w.Header().Set("Location", strings.TrimSuffix(r.URL.Path, "/import")+"/"+rep.JobID)
	}
	writeJSON(w, status, rep)
}

// handleResultsCSV answers the job's results as one CSV table for a
// spreadsheet.
func (s *Server) handleResultsCSV(w http.ResponseWriter, r *http.Request) {
	snap, res, err := s.jobResults(r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	var buf bytes.Buffer
	if err := schema.WriteResultsCSV(&buf, snap, res); err != nil {
		s.writeError(w, r, err)
		return
	}
	writeFile(w, "text/csv; charset=utf-8", fileName(snap.Job, "results.csv"), buf.Bytes())
}

// handleReadingsCSV answers every reading of the job, superseded and void
// ones included, as CSV.
func (s *Server) handleReadingsCSV(w http.ResponseWriter, r *http.Request) {
	snap, err := s.DB.Snapshot(r.Context(), jobID(r))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	var buf bytes.Buffer
	if err := schema.WriteReadingsCSV(&buf, snap); err != nil {
		s.writeError(w, r, err)
		return
	}
	writeFile(w, "text/csv; charset=utf-8", fileName(snap.Job, "readings.csv"), buf.Bytes())
}

// handleJobExport answers the whole job with its history as one job
// document, which POST /jobs/import takes back.
func (s *Server) handleJobExport(w http.ResponseWriter, r *http.Request) {
	job, err := s.DB.Job(r.Context(), jobID(r))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	// Buffered, so that a failure is still an error status, not a cut file.
	var buf bytes.Buffer
	if err := s.DB.ExportJobJSON(r.Context(), job.ID, &buf); err != nil {
		s.writeError(w, r, err)
		return
	}
	writeFile(w, "application/json; charset=utf-8", fileName(job, "job.json"), buf.Bytes())
}

func writeFile(w http.ResponseWriter, contentType, name string, b []byte) {
	w.Header().Set("Content-Type", contentType)
	w.Header().Set("Content-Disposition", `attachment; filename="`+name+`"`)
	w.Header().Set("Content-Length", strconv.Itoa(len(b)))
	w.Header().Set("Cache-Control", "no-store")
	w.Header().Set("X-Content-Type-Options", "nosniff")
	w.WriteHeader(http.StatusOK)
	_, _ = w.Write(b) // the client went away; nothing to tell it
}

// fileName is a download name made of the job's name (letters, digits and
// dashes only, so it needs no quoting) and suffix.
func fileName(j schema.Job, suffix string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(j.Name) {
		if r < 128 && (r >= 'a' && r <= 'z' || r >= '0' && r <= '9') {
			b.WriteRune(r)
			dash = false
		} else if !dash && b.Len() > 0 {
			b.WriteByte('-')
			dash = true
		}
		if b.Len() >= 60 {
			break
		}
	}
	name := strings.Trim(b.String(), "-")
	if name == "" {
		name = "job"
	}
	return name + "-" + suffix
}

// uploadError turns an upload cut off by the size limit into 413.
func uploadError(err error) error {
	var maxErr *http.MaxBytesError
	if errors.As(err, &maxErr) {
		return &httpError{status: http.StatusRequestEntityTooLarge, msg: fmt.Sprintf("the body is larger than %d bytes", maxErr.Limit)}
	}
	return err
}

// boolParam reads an optional ?name= flag: absent, 0 or false is false; 1,
// true or an empty value is true.
func boolParam(r *http.Request, name string) (bool, error) {
	q := r.URL.Query()
	if !q.Has(name) {
		return false, nil
	}
	v := q.Get(name)
	if v == "" {
		return true, nil
	}
	b, err := strconv.ParseBool(v)
	if err != nil {
		return false, schema.Errorf(schema.Invalid, name, "%q is not accepted; give 1 or 0", v)
	}
	return b, nil
}
