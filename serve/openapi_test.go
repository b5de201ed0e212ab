package serve

import (
	"encoding/json"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// openAPIDoc is the part of the committed document the test reads.
type openAPIDoc struct {
	OpenAPI string `json:"openapi"`
	Paths   map[string]map[string]struct {
		OperationID string                     `json:"operationId"`
		Responses   map[string]json.RawMessage `json:"responses"`
		Security    []map[string][]string      `json:"security"`
	} `json:"paths"`
}

// docPath turns a route pattern into an OpenAPI path ("/{$}" is "/").
func docPath(pattern string) string { return strings.TrimSuffix(pattern, "{$}") }

// TestOpenAPIMatchesRoutes holds the committed OpenAPI document and the
// route table together: the same paths and methods both ways, security
// where a route needs a token, and every status a plain request to a
// route gets is documented for it.
func TestOpenAPIMatchesRoutes(t *testing.T) {
	ts := startServer(t, Config{Tokens: NewTokens("kestrel-7f3a9c")})
	a := ts.get(t, "/v1/openapi.json")
	var doc openAPIDoc
	if err := json.Unmarshal(a.body, &doc); err != nil {
		t.Fatalf("served document is not JSON: %v", err)
	}
	if !strings.HasPrefix(doc.OpenAPI, "3.") {
		t.Errorf("openapi %q, want 3.x", doc.OpenAPI)
	}
	var routes, documented []string
	for _, rt := range ts.routes {
		routes = append(routes, strings.ToLower(rt.method)+" "+docPath(rt.pattern))
		op, ok := doc.Paths[docPath(rt.pattern)][strings.ToLower(rt.method)]
		if !ok {
			continue
		}
		if _, ok := op.Responses["200"]; !ok && rt.method == "GET" {
			t.Errorf("%s %s: no 200 documented", rt.method, rt.pattern)
		}
		_, has401 := op.Responses["401"]
		if rt.auth != has401 || rt.auth != (len(op.Security) > 0) {
			t.Errorf("%s %s: needs a token %v, document says 401 %v, security %v", rt.method, rt.pattern, rt.auth, has401, op.Security)
		}
	}
	for p, ops := range doc.Paths {
		for m := range ops {
			documented = append(documented, m+" "+p)
		}
	}
	sort.Strings(routes)
	sort.Strings(documented)
	if !slices.Equal(routes, documented) {
		t.Errorf("routes and document disagree:\nroutes     %v\ndocumented %v", routes, documented)
	}

	// Every status a request gets is in the document for its route.
	probe := func(method, route, url string, status int) {
		op := doc.Paths[route][method]
		if _, ok := op.Responses[strconv.Itoa(status)]; !ok {
			t.Errorf("%s %s answered %d, which the document does not list", method, url, status)
		}
	}
	tok := []string{"Authorization", "Bearer kestrel-7f3a9c"}
	for _, rt := range ts.routes {
		if rt.method != "GET" {
			continue
		}
		url := strings.ReplaceAll(docPath(rt.pattern), "{id}", "ebu-r128")
		probe("get", docPath(rt.pattern), url, ts.get(t, url, tok...).status)
		if rt.auth {
			probe("get", docPath(rt.pattern), url, ts.get(t, url).status)
		}
	}
	post := "/v1/checks"
	probe("post", post, post, ts.postRaw(t, "", passTone.wav(), tok...).status)
	probe("post", post, post, ts.postRaw(t, "", passTone.wav()).status)
	probe("post", post, post, ts.postRaw(t, "", notAudio, tok...).status)
	probe("post", post, post, ts.postRaw(t, "?spec=nope", notAudio, tok...).status)
}
