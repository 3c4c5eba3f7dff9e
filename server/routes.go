package server

import (
	"net/http"

	"github.com/gorilla/mux"
)

// registerRoutes adds the data API: jobs, their design records, readings,
// changes, audit and import/export. Every route needs a device token; the
// lead-only ones also a lead's device.
func (s *Server) registerRoutes(api *mux.Router) {
	r := api.NewRoute().Subrouter()
	r.Use(s.withDevice)
	s.registerImportExportRoutes(r) // first: /jobs/import must not be taken for a job ID
	s.registerJobRoutes(r)
	s.registerRecordRoutes(r)
	s.registerReadingRoutes(r)
	s.registerReferenceRoutes(r)
	s.registerReportRoutes(r)
}

// jobID is the {job} path variable.
func jobID(r *http.Request) string { return mux.Vars(r)["job"] }
