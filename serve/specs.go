package serve

import (
	"bytes"
	"net/http"

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

// SpecDescription is the default answer of GET /v1/specs/{id}: the spec's
// identity and source, its one-line summary, where each limit comes from,
// and the full description `kweigh specs show` prints.
type SpecDescription struct {
	ID           string            `json:"id"`
	Title        string            `json:"title"`
	Description  string            `json:"description"`
	Source       string            `json:"source"`
	Marker       string            `json:"marker"`
	Extends      string            `json:"extends,omitempty"`
	Summary      string            `json:"summary"`
	LimitSources map[string]string `json:"limit_sources"`
	Notes        []string          `json:"notes"`
	Text         string            `json:"text"`
}

// DescribeSpec returns a spec's SpecDescription.
func DescribeSpec(s *rules.Spec) any {
	var text bytes.Buffer
	s.Describe(&text) // a bytes.Buffer does not fail
	d := SpecDescription{
		ID: s.ID, Title: s.Title, Description: s.Description, Source: s.Source.String(), Marker: s.Source.Marker,
		Extends: s.Extends, Summary: s.Summary(), LimitSources: s.LimitSources, Notes: s.Notes, Text: text.String(),
	}
	if d.LimitSources == nil {
		d.LimitSources = map[string]string{}
	}
	if d.Notes == nil {
		d.Notes = []string{}
	}
	return d
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
