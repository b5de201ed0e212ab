package serve

import (
	"bytes"
	_ "embed"
	"html/template"
	"net/http"
)

//go:embed page.html
var pageSource string

var pageTemplate = template.Must(template.New("page").Parse(pageSource))

// pageCSP keeps the upload page and the report shown inside it to what
// they carry themselves: nothing is loaded from elsewhere, the only
// connection is back to this server.
const pageCSP = "default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:; " +
	"connect-src 'self'; frame-src 'self'; base-uri 'none'; form-action 'self'; frame-ancestors 'self'"

// reportCSP is the same for a kept report opened on its own.
const reportCSP = "default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:; " +
	"base-uri 'none'; form-action 'none'"

type pageView struct {
	Caution   string
	Specs     []SpecSummary
	Auth      bool
	Version   string
	MaxUpload string
}

// getPage serves the upload page: choose or drop a file, pick a spec, see
// the verdict and the HTML report inline.
func (s *Server) getPage(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	v := pageView{Caution: Caution, Auth: s.cfg.Tokens != nil, Version: s.cfg.Version, MaxUpload: formatBytes(s.cfg.MaxUpload)}
	if v.Version == "" {
		v.Version = "devel"
	}
	for _, sp := range s.cfg.Catalogue.Specs() {
		v.Specs = append(v.Specs, SpecSummary{ID: sp.ID, Title: sp.Title, Default: sp.ID == s.cfg.Catalogue.Default()})
	}
	var b bytes.Buffer
	if err := pageTemplate.Execute(&b, v); err != nil {
		s.log.Error("upload page", "err", err)
		writeError(w, http.StatusInternalServerError, "the upload page cannot be made")
		return
	}
	w.Header().Set("Content-Security-Policy", pageCSP)
	w.Header().Set("Referrer-Policy", "no-referrer")
	writeBody(w, http.StatusOK, "text/html; charset=utf-8", b.Bytes())
}
