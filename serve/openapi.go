package serve

import (
	_ "embed"
	"net/http"
)

// openAPIDocument describes every route (a test holds the two together).
//
//go:embed openapi.json
var openAPIDocument []byte

func (s *Server) getOpenAPI(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	writeBody(w, http.StatusOK, "application/json", openAPIDocument)
}
