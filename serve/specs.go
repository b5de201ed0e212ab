package serve

import (
	"bytes"
	"net/http"
	"path/filepath"

	"github.com/kweigh/kweigh/rules"
)

// SpecSummary is one row of GET /v1/specs, the same row `kweigh specs
// --format json` gives.
type SpecSummary struct {
	ID      string `json:"id"`
	Title   string `json:"title"`
	Summary string `json:"summary"`
	Source  string `json:"source"`
	Marker  string `json:"marker"`
	// Default marks the spec used when a request names none.
	Default bool `json:"default"`
}

// SpecDescription is the default answer of GET /v1/specs/{id}, in the
// shape of `kweigh specs show --format json`: the spec's identity and
// source and every limit with where it comes from. File is the spec file's
// name only: the server's folders are nobody's business.
type SpecDescription struct {
	ID          string        `json:"id"`
	Title       string        `json:"title"`
	Description string        `json:"description"`
	Source      string        `json:"source"`
	Marker      string        `json:"marker"`
	Extends     string        `json:"extends,omitempty"`
	File        string        `json:"file,omitempty"`
	Root        bool          `json:"root,omitempty"`
	Limits      []rules.Limit `json:"limits"`
	Notes       []string      `json:"notes"`
}

// DescribeSpec returns a spec's SpecDescription.
func DescribeSpec(s *rules.Spec) any {
	d := SpecDescription{
		ID: s.ID, Title: s.Title, Description: s.Description, Source: s.Source.String(), Marker: s.Source.Marker,
		Extends: s.Extends, File: SpecFileName(s), Root: s.Root, Limits: s.Limits(), Notes: append([]string{}, s.Notes...),
	}
	if d.Limits == nil {
		d.Limits = []rules.Limit{}
	}
	return d
}

// SpecFileName is the base name of a user spec's file ("" for built-ins):
// what a client may see of where the server keeps it.
func SpecFileName(s *rules.Spec) string {
	if s.File == "" {
		return ""
	}
	return filepath.Base(s.File)
}

func (s *Server) getSpecs(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	specs := s.cfg.Catalogue.Specs()
	rows := make([]SpecSummary, 0, len(specs))
	for _, sp := range specs {
		rows = append(rows, SpecSummary{sp.ID, sp.Title, sp.Summary(), sp.Source.String(), sp.Source.Marker, sp.ID == s.cfg.Catalogue.Default()})
	}
	writeJSON(w, http.StatusOK, map[string]any{"default": s.cfg.Catalogue.Default(), "specs": rows})
}

func (s *Server) getSpec(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	id := r.PathValue("id")
	sp, ok := s.cfg.Catalogue.Lookup(id)
	if !ok || id == "" {
		rec.problem = "unknown spec"
		writeError(w, http.StatusNotFound, s.unknownSpec(id))
		return
	}
	writeJSON(w, http.StatusOK, s.cfg.DescribeSpec(sp))
}

func (s *Server) getHealth(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	writeJSON(w, http.StatusOK, map[string]string{"status": "alive"})
}

// getReady says whether an upload would be taken now: not while shutting
// down, nor with every place in the queue taken.
func (s *Server) getReady(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	switch {
	case s.draining.Load():
		writeJSON(w, http.StatusServiceUnavailable, map[string]string{"status": "shutting down"})
	case len(s.slots) >= cap(s.slots):
		writeJSON(w, http.StatusServiceUnavailable, map[string]string{"status": "busy"})
	default:
		writeJSON(w, http.StatusOK, map[string]any{"status": "ready", "jobs": s.cfg.Jobs, "queue": s.cfg.Queue,
			"uploads": len(s.slots), "checks_running": len(s.workers)})
	}
}

func (s *Server) getMetrics(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	var b bytes.Buffer
	s.metrics.writeTo(&b) // a bytes.Buffer does not fail
	writeBody(w, http.StatusOK, "text/plain; version=0.0.4; charset=utf-8", b.Bytes())
}
