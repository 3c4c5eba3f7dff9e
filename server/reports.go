package server

import (
	"bytes"
	"encoding/base64"
	"errors"
	"fmt"
	"io/fs"
	"mime"
	"net/http"
	"strconv"
	"strings"
	"sync"

	"github.com/gorilla/mux"

	"fieldtab/report"
	"fieldtab/schema"
)

// maxSignaturePNG bounds the drawn signature; base64 makes it a third larger,
// which still fits maxBody with the other fields.
const maxSignaturePNG = 512 << 10

func (s *Server) registerReportRoutes(r *mux.Router) {
	r.HandleFunc("/jobs/{job}/reports", s.handleReportList).Methods(http.MethodGet)
	r.HandleFunc("/jobs/{job}/reports/{revision:[0-9]+}.pdf", s.handleReportDownload).Methods(http.MethodGet)
	r.HandleFunc("/jobs/{job}/report/preview.pdf", s.leadOnly(s.handleReportPreview)).Methods(http.MethodGet)
	r.HandleFunc("/jobs/{job}/report/sign", s.writing(s.leadOnly(s.handleReportSign))).Methods(http.MethodPost)
}

// jobLock returns the mutex that serialises signing of one job, so that two
// leads signing at once do not both render the same revision number.
func (s *Server) jobLock(job string) *sync.Mutex {
	s.signMu.Lock()
	defer s.signMu.Unlock()
	if s.signing == nil {
		s.signing = map[string]*sync.Mutex{}
	}
	m, ok := s.signing[job]
	if !ok {
		m = &sync.Mutex{}
		s.signing[job] = m
	}
	return m
}

func (s *Server) handleReportList(w http.ResponseWriter, r *http.Request) {
	rs, err := s.DB.Reports(r.Context(), jobID(r))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	next := 1
	if len(rs) > 0 {
		next = rs[len(rs)-1].Revision + 1
	}
	writeJSON(w, http.StatusOK, map[string]any{"reports": rs, "next_revision": next})
}

// renderInput is the next revision's report input, as of the server's clock.
func (s *Server) renderInput(r *http.Request) (report.Input, error) {
	return report.Next(r.Context(), s.DB, jobID(r), s.now())
}

func writePDF(w http.ResponseWriter, pdf []byte, disposition, filename string) {
	h := w.Header()
	h.Set("Content-Type", "application/pdf")
	h.Set("Content-Disposition", mime.FormatMediaType(disposition, map[string]string{"filename": filename}))
	h.Set("Content-Length", strconv.Itoa(len(pdf)))
	h.Set("Cache-Control", "no-store")
	h.Set("X-Content-Type-Options", "nosniff")
	w.WriteHeader(http.StatusOK)
	_, _ = w.Write(pdf)
}

// reportFilename is a download name from the job's name and the revision.
func reportFilename(job string, revision int, suffix string) string {
	name := strings.Map(func(c rune) rune {
		switch {
		case c == '/' || c == '\\' || c == '"' || c < ' ' || c == 0x7f:
			return -1
		}
		return c
	}, strings.TrimSpace(job))
	if name == "" {
		name = "job"
	}
	return fmt.Sprintf("%s report rev %d%s.pdf", name, revision, suffix)
}

func (s *Server) handleReportPreview(w http.ResponseWriter, r *http.Request) {
	in, err := s.renderInput(r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	var buf bytes.Buffer
	if err := report.Render(&buf, in); err != nil {
		s.writeError(w, r, err)
		return
	}
	writePDF(w, buf.Bytes(), "inline", reportFilename(in.Snapshot.Job.Name, in.Revision, " preview"))
}

func (s *Server) handleReportDownload(w http.ResponseWriter, r *http.Request) {
	rev, err := strconv.Atoi(mux.Vars(r)["revision"])
	if err != nil || rev < 1 {
		s.writeError(w, r, schema.Errorf(schema.NotFound, "revision", "no such revision"))
		return
	}
	job, err := s.DB.Job(r.Context(), jobID(r))
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	rec, pdf, err := s.DB.ReportPDF(r.Context(), jobID(r), rev)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	writePDF(w, pdf, "attachment", reportFilename(job.Name, rec.Revision, ""))
}

// signRequest is POST /jobs/{job}/report/sign.
type signRequest struct {
	Name          string `json:"name"`
	Certification string `json:"certification"`
	Organisation  string `json:"organisation"`
	SignaturePNG  string `json:"signature_png"` // base64, a data: URL prefix allowed
}

var pngMagic = []byte("\x89PNG\r\n\x1a\n")

// loadSigner reads the server's signer files; without them the answer is
// 503 with what to run, since no request can fix it.
func (s *Server) loadSigner() (report.Signer, error) {
	noSigner := &httpError{status: http.StatusServiceUnavailable,
		msg: "this server has no signer key and certificate: on the computer running fieldtab, run `fieldtab signer init --name ... --org ... --email ...` (or `fieldtab signer import FILE.p12`), then sign again"}
	if s.SignerDir == "" {
		return report.Signer{}, noSigner
	}
	signer, err := report.LoadSignerDir(s.SignerDir)
	if errors.Is(err, fs.ErrNotExist) {
		return report.Signer{}, noSigner
	}
	if err != nil {
		s.Logger.Error("signer files", "dir", s.SignerDir, "err", err)
		return report.Signer{}, &httpError{status: http.StatusServiceUnavailable,
			msg: "this server's signer key or certificate cannot be used (the server's log says why): run `fieldtab signer init --force` or `fieldtab signer import FILE.p12` again"}
	}
	return signer, nil
}

func (s *Server) handleReportSign(w http.ResponseWriter, r *http.Request) {
	var req signRequest
	if err := decodeJSON(w, r, &req); err != nil {
		s.writeError(w, r, err)
		return
	}
	b64 := strings.TrimSpace(req.SignaturePNG)
	if i := strings.Index(b64, ","); strings.HasPrefix(b64, "data:") && i > 0 {
		b64 = b64[i+1:]
	}
	if b64 == "" {
		s.writeError(w, r, schema.Errorf(schema.Invalid, "signature_png", "draw your signature first"))
		return
	}
	sig, err := base64.StdEncoding.DecodeString(b64)
	switch {
	case err != nil:
		s.writeError(w, r, schema.Errorf(schema.Invalid, "signature_png", "is not base64"))
		return
	case len(sig) > maxSignaturePNG:
		s.writeError(w, r, schema.Errorf(schema.Invalid, "signature_png", "is larger than %d KB", maxSignaturePNG>>10))
		return
	case !bytes.HasPrefix(sig, pngMagic):
		s.writeError(w, r, schema.Errorf(schema.Invalid, "signature_png", "is not a PNG image"))
		return
	}
	signer, err := s.loadSigner()
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	if n := strings.TrimSpace(req.Name); n != "" {
		signer.Name = n
	}
	org := strings.TrimSpace(req.Organisation)
	if o := signer.Certificate.Subject.Organization; org == "" && len(o) > 0 {
		org = o[0]
	}

	lock := s.jobLock(jobID(r))
	lock.Lock()
	defer lock.Unlock()
	in, err := s.renderInput(r)
	if err != nil {
		s.writeError(w, r, err)
		return
	}
	in.Signoff = &report.Signoff{Name: signer.Name, Certification: strings.TrimSpace(req.Certification),
		Organisation: org, SignedAt: in.Generated, SignaturePNG: sig}
	rec, _, err := report.Issue(r.Context(), s.DB, actorOf(r), in, signer)
	if err != nil {
		if schema.ErrorField(err) == "signoff.signature_png" {
			err = schema.Errorf(schema.Invalid, "signature_png", "%s", schema.ErrorMessage(err))
		}
		s.writeError(w, r, err)
		return
	}
	w.Header().Set("Location", fmt.Sprintf("/api/v1/jobs/%s/reports/%d.pdf", rec.JobID, rec.Revision))
	writeJSON(w, http.StatusCreated, rec)
}
