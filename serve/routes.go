package serve

import (
	"context"
	"encoding/json"
	"fmt"
	"log/slog"
	"net/http"
	"slices"
	"strings"
	"time"
)

// route is one endpoint. The table is the one place routes are declared:
// New registers it and a test holds it against the OpenAPI document.
type route struct {
	method, pattern string
	auth            bool // needs a bearer token when the server has tokens
	handle          func(w http.ResponseWriter, r *http.Request, rec *requestLog)
}

func (s *Server) routeTable() []route {
	return []route{
		{"POST", "/v1/checks", true, s.postCheck},
		{"GET", "/v1/checks/{id}", true, s.getCheck},
		{"GET", "/v1/checks/{id}/report", true, s.getReport},
		{"GET", "/v1/specs", true, s.getSpecs},
		{"GET", "/v1/specs/{id}", true, s.getSpec},
		{"GET", "/v1/openapi.json", false, s.getOpenAPI},
		{"GET", "/healthz", false, s.getHealth},
		{"GET", "/readyz", false, s.getReady},
		{"GET", "/metrics", false, s.getMetrics},
		{"GET", "/{$}", false, s.getPage},
	}
}

// requestLog collects what the request's log line reports.
type requestLog struct {
	id      string
	size    int64
	spec    string
	verdict string
	problem string
}

// statusWriter records the status written, and unwraps for
// http.ResponseController (read deadlines, flushing).
type statusWriter struct {
	http.ResponseWriter
	status int
}

func (w *statusWriter) WriteHeader(code int) {
	if w.status == 0 {
		w.status = code
	}
	w.ResponseWriter.WriteHeader(code)
}

func (w *statusWriter) Write(p []byte) (int, error) {
	if w.status == 0 {
		w.status = http.StatusOK
	}
	return w.ResponseWriter.Write(p)
}

func (w *statusWriter) Unwrap() http.ResponseWriter { return w.ResponseWriter }

// wrap adds what every route shares: the handler count for a graceful
// shutdown, the token check, a request id and the one log line.
func (s *Server) wrap(rt route) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		s.handlers.Add(1)
		defer s.handlers.Done()
		start := time.Now()
		rec := &requestLog{id: newID(), size: -1}
		sw := &statusWriter{ResponseWriter: w}
		// A client that does not read its answer cannot hold a handler:
		// every response is written within the write timeout (a check
		// moves this deadline once its verdict is ready).
		http.NewResponseController(sw).SetWriteDeadline(time.Now().Add(s.cfg.WriteTimeout))
		defer func() {
			attrs := []slog.Attr{
				slog.String("id", rec.id), slog.String("method", r.Method), slog.String("path", r.URL.Path),
				slog.String("remote", r.RemoteAddr), slog.Int("status", sw.status),
				slog.Float64("duration_s", time.Since(start).Seconds()),
			}
			if rec.size >= 0 {
				attrs = append(attrs, slog.Int64("size", rec.size))
			}
			if rec.spec != "" {
				attrs = append(attrs, slog.String("spec", rec.spec))
			}
			if rec.verdict != "" {
				attrs = append(attrs, slog.String("verdict", rec.verdict))
			}
			if rec.problem != "" {
				attrs = append(attrs, slog.String("problem", rec.problem))
			}
			level := slog.LevelInfo
			if sw.status >= 500 {
				level = slog.LevelWarn
			}
			s.log.LogAttrs(context.Background(), level, "request", attrs...)
		}()
		if rt.auth && s.cfg.Tokens != nil {
			tok, ok := bearer(r)
			if !ok || !s.cfg.Tokens.Allows(tok) {
				if rt.pattern == "/v1/checks" {
					s.metrics.reject(reasonUnauthorised)
				}
				sw.Header().Set("WWW-Authenticate", `Bearer realm="kweigh"`)
				rec.problem = "missing or wrong bearer token"
				writeError(sw, http.StatusUnauthorized, "a valid bearer token is required (Authorization: Bearer TOKEN)")
				return
			}
		}
		rt.handle(sw, r, rec)
	})
}

// noRoute answers what no route takes, in JSON like every other answer:
// 405 with Allow for a known path and another method, 404 otherwise.
func (s *Server) noRoute(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	var allow []string
	for _, rt := range s.routes {
		paths := http.NewServeMux()
		paths.Handle(rt.pattern, http.NotFoundHandler())
		probe := r.Clone(r.Context())
		probe.Method = rt.method
		if _, pattern := paths.Handler(probe); pattern != "" {
			allow = append(allow, rt.method)
		}
	}
	if len(allow) > 0 {
		if slices.Contains(allow, "GET") {
			allow = append(allow, "HEAD")
		}
		w.Header().Set("Allow", strings.Join(allow, ", "))
		rec.problem = "method not allowed"
		writeError(w, http.StatusMethodNotAllowed, fmt.Sprintf("%s is not allowed on %s (use %s)", r.Method, r.URL.Path, strings.Join(allow, ", ")))
		return
	}
	rec.problem = "no such route"
	writeError(w, http.StatusNotFound, fmt.Sprintf("no route %s (see /v1/openapi.json)", r.URL.Path))
}

// writeError answers with {"error": msg}.
func writeError(w http.ResponseWriter, status int, msg string) {
	writeJSON(w, status, map[string]string{"error": msg})
}

// writeJSON answers with v as indented JSON.
func writeJSON(w http.ResponseWriter, status int, v any) {
	data, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		status, data = http.StatusInternalServerError, []byte(`{"error": "encoding the answer failed"}`)
	}
	writeBody(w, status, "application/json", append(data, '\n'))
}

// writeBody answers with data, bounded by the write timeout.
func writeBody(w http.ResponseWriter, status int, contentType string, data []byte) {
	h := w.Header()
	h.Set("Content-Type", contentType)
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	w.Write(data)
}
