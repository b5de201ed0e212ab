package serve

import (
	"errors"
	"fmt"
	"io/fs"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
)

// checkIDPattern is what newID makes; an id from a URL is checked against
// it before it comes near a path.
var checkIDPattern = regexp.MustCompile(`^[0-9a-f]{32}$`)

// keep stores a check's JSON object and HTML report in the keep folder,
// each written to a temporary name and renamed into place, so a reader
// never sees half a file.
func (s *Server) keep(id string, obj, page []byte) error {
	if err := writeAtomic(s.cfg.KeepDir, id+".json", obj); err != nil {
		return err
	}
	if page == nil {
		return nil
	}
	return writeAtomic(s.cfg.KeepDir, id+".html", page)
}

func writeAtomic(dir, name string, data []byte) error {
	f, err := os.CreateTemp(dir, "."+name+".*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	_, err = f.Write(data)
	if serr := f.Sync(); err == nil {
		err = serr
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(tmp, filepath.Join(dir, name))
	}
	if err != nil {
		os.Remove(tmp)
		return fmt.Errorf("%s: %w", filepath.Join(dir, name), err)
	}
	return nil
}

// getCheck answers GET /v1/checks/{id} from the keep folder.
func (s *Server) getCheck(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	s.serveKept(w, r, rec, ".json", "application/json")
}

// getReport answers GET /v1/checks/{id}/report from the keep folder.
func (s *Server) getReport(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	s.serveKept(w, r, rec, ".html", "text/html; charset=utf-8")
}

func (s *Server) serveKept(w http.ResponseWriter, r *http.Request, rec *requestLog, ext, contentType string) {
	id := r.PathValue("id")
	if s.cfg.KeepDir == "" {
		rec.problem = "reports are not kept"
		writeError(w, http.StatusNotFound, "this server keeps no reports (start it with --keep DIR)")
		return
	}
	if !checkIDPattern.MatchString(id) {
		rec.problem = "malformed check id"
		writeError(w, http.StatusNotFound, fmt.Sprintf("no check %q", id))
		return
	}
	data, err := os.ReadFile(filepath.Join(s.cfg.KeepDir, id+ext))
	switch {
	case errors.Is(err, fs.ErrNotExist):
		rec.problem = "unknown check id"
		writeError(w, http.StatusNotFound, fmt.Sprintf("no check %q", id))
		return
	case err != nil:
		s.log.Error("reading a kept report", "id", id, "err", err)
		writeError(w, http.StatusInternalServerError, "the kept report cannot be read")
		return
	}
	if ext == ".html" {
		w.Header().Set("Content-Security-Policy", reportCSP)
	}
	writeBody(w, http.StatusOK, contentType, data)
}
