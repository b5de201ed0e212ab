package serve

import (
	"context"
	"encoding/json"
	"net/http"
	"os"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/rules"
)

// TestKeep: with --keep, a check's JSON object and HTML report can be
// fetched by id; unknown and malformed ids are 404; without --keep
// nothing is stored and the routes say so.
func TestKeep(t *testing.T) {
	keep := t.TempDir()
	ts := startServer(t, Config{KeepDir: keep})
	a := ts.postRaw(t, "?name=tidewater-ep7.wav", warnTone.wav())
	id := a.header.Get(HeaderCheckID)
	got := ts.get(t, "/v1/checks/"+id)
	if got.status != 200 || string(got.body) != string(a.body) {
		t.Errorf("kept JSON differs from the answer (%d):\n%s\n%s", got.status, got.body, a.body)
	}
	rep := ts.get(t, "/v1/checks/"+id+"/report")
	if rep.status != 200 || !strings.HasPrefix(rep.header.Get("Content-Type"), "text/html") ||
		!strings.Contains(string(rep.body), "tidewater-ep7.wav") || !strings.Contains(string(rep.body), "<svg") {
		t.Errorf("kept report: %d %q, %d bytes", rep.status, rep.header.Get("Content-Type"), len(rep.body))
	}
	if !strings.Contains(rep.header.Get("Content-Security-Policy"), "default-src 'none'") {
		t.Errorf("kept report without a content security policy")
	}
	for _, bad := range []string{"0123456789abcdef0123456789abcdef", "..%2f..%2fetc%2fpasswd", strings.ToUpper(id)} {
		if r := ts.get(t, "/v1/checks/"+bad); r.status != 404 {
			t.Errorf("GET /v1/checks/%s: %d", bad, r.status)
		}
	}
	entries, _ := os.ReadDir(keep)
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	if want := []string{id + ".html", id + ".json"}; !slices.Equal(names, want) {
		t.Errorf("keep folder holds %v, want %v", names, want)
	}

	plain := startServer(t, Config{})
	b := plain.postRaw(t, "?name=a.wav", passTone.wav())
	for _, p := range []string{"/v1/checks/" + b.header.Get(HeaderCheckID), "/v1/checks/" + b.header.Get(HeaderCheckID) + "/report"} {
		if r := plain.get(t, p); r.status != 404 || !strings.Contains(string(r.body), "--keep") {
			t.Errorf("GET %s without --keep: %d %s", p, r.status, r.body)
		}
	}
}

// TestHTMLAnswer: Accept: text/html gets the report itself, with the
// verdict in the header (what the upload page uses).
func TestHTMLAnswer(t *testing.T) {
	ts := startServer(t, Config{})
	a := ts.postRaw(t, "?name=promo.wav", failTone.wav(), "Accept", "text/html")
	if a.status != 200 || a.header.Get(HeaderVerdict) != "fail" || !strings.HasPrefix(a.header.Get("Content-Type"), "text/html") {
		t.Fatalf("%d %q %q", a.status, a.header.Get(HeaderVerdict), a.header.Get("Content-Type"))
	}
	if !strings.Contains(a.header.Get("Content-Security-Policy"), "default-src 'none'") {
		t.Errorf("HTML answer without a content security policy")
	}
	if !strings.Contains(string(a.body), "promo.wav") || !strings.Contains(string(a.body), "Full-scale test signals") {
		t.Errorf("the report lacks the file's label or the caution")
	}
}

// TestSpecsEndpoints: the list holds every built-in with the default
// marked; one spec describes its limits; an unknown one is 404.
func TestSpecsEndpoints(t *testing.T) {
	ts := startServer(t, Config{})
	var list struct {
		Default string        `json:"default"`
		Specs   []SpecSummary `json:"specs"`
	}
	a := ts.get(t, "/v1/specs")
	if err := json.Unmarshal(a.body, &list); err != nil {
		t.Fatal(err)
	}
	if len(list.Specs) != len(rules.Builtin()) || list.Default != "ebu-r128" {
		t.Errorf("%d specs (want %d), default %q", len(list.Specs), len(rules.Builtin()), list.Default)
	}
	defaults := 0
	for _, s := range list.Specs {
		if s.Default {
			defaults++
		}
		if s.ID == "ebu-r128" && !strings.Contains(s.Summary, "-23.0 LUFS") {
			t.Errorf("ebu-r128 summary %q", s.Summary)
		}
	}
	if defaults != 1 {
		t.Errorf("%d specs marked default", defaults)
	}
	var one SpecDescription
	if err := json.Unmarshal(ts.get(t, "/v1/specs/atsc-a85").body, &one); err != nil {
		t.Fatal(err)
	}
	// ATSC A/85:2013: -24 LKFS ±2 dB.
	integrated := ""
	for _, l := range one.Limits {
		if l.Check == "integrated" {
			integrated = l.Limit
		}
	}
	if one.ID != "atsc-a85" || !strings.Contains(integrated, "-24") || !strings.Contains(one.Source, "A/85") {
		t.Errorf("atsc-a85: %+v", one)
	}
	if r := ts.get(t, "/v1/specs/kestrel-house"); r.status != 404 {
		t.Errorf("unknown spec: %d", r.status)
	}
}

// TestHealthAndShutdown: /healthz and /readyz answer; on shutdown a check
// in flight finishes and is answered, new connections are refused, and
// Serve returns with the temporary folder removed.
func TestHealthAndShutdown(t *testing.T) {
	started := make(chan struct{})
	release := make(chan struct{})
	// A judge that waits before doing the real work, so the test can stop
	// the server while a check is in flight.
	slow := func(ctx context.Context, name string, d decode.Decoder, spec *rules.Spec) *rules.Result {
		close(started)
		<-release
		return DefaultJudge(ctx, name, d, spec)
	}
	ts := startServer(t, Config{Judge: slow, Grace: time.Minute})
	if a := ts.get(t, "/healthz"); a.status != 200 || a.json(t)["status"] != "alive" {
		t.Errorf("healthz: %d %s", a.status, a.body)
	}
	if a := ts.get(t, "/readyz"); a.status != 200 || a.json(t)["status"] != "ready" {
		t.Errorf("readyz: %d %s", a.status, a.body)
	}
	answered := make(chan answer, 1)
	go func() { answered <- ts.postRaw(t, "?name=inflight.wav", passTone.wav()) }()
	<-started
	ts.stop()
	waitFor(t, 5*time.Second, "the listener to close", func() bool {
		_, err := http.Get(ts.url + "/healthz")
		return err != nil
	})
	close(release)
	a := <-answered
	if a.status != 200 || a.header.Get(HeaderVerdict) != "pass" {
		t.Errorf("check in flight during shutdown: %d %s", a.status, a.body)
	}
	ts.shutdown(t)
	if _, err := os.Stat(ts.TempDir()); !os.IsNotExist(err) {
		t.Errorf("temporary folder still there: %v", err)
	}
}

// TestGraceExpires: a check still running when the grace period ends is
// cancelled and the server stops at once.
func TestGraceExpires(t *testing.T) {
	started := make(chan struct{})
	stuck := func(ctx context.Context, name string, d decode.Decoder, spec *rules.Spec) *rules.Result {
		close(started)
		<-ctx.Done() // as measure.Stream does between blocks
		return DefaultJudge(ctx, name, d, spec)
	}
	ts := startServer(t, Config{Judge: stuck, Grace: 200 * time.Millisecond})
	go func() {
		// The connection is closed under it: no answer is expected.
		resp, err := http.Post(ts.url+"/v1/checks?name=long.wav", "audio/wav", strings.NewReader(string(passTone.wav())))
		if err == nil {
			resp.Body.Close()
		}
	}()
	<-started
	begin := time.Now()
	ts.shutdown(t)
	if took := time.Since(begin); took > 5*time.Second {
		t.Errorf("shutdown took %v with a 200 ms grace", took)
	}
}

// TestNoRoute: a path no route takes is a JSON 404; a known path with
// another method a JSON 405 with Allow.
func TestNoRoute(t *testing.T) {
	ts := startServer(t, Config{})
	if a := ts.get(t, "/v2/checks"); a.status != 404 || !strings.Contains(a.json(t)["error"].(string), "/v2/checks") {
		t.Errorf("unknown path: %d %s", a.status, a.body)
	}
	if a := ts.get(t, "/v1/checks"); a.status != 405 || a.header.Get("Allow") != "POST" {
		t.Errorf("GET /v1/checks: %d Allow %q %s", a.status, a.header.Get("Allow"), a.body)
	}
	req, _ := http.NewRequest("DELETE", ts.url+"/v1/specs/podcast", nil)
	if a := ts.do(t, req); a.status != 405 || !strings.HasPrefix(a.header.Get("Allow"), "GET") {
		t.Errorf("DELETE /v1/specs/podcast: %d Allow %q", a.status, a.header.Get("Allow"))
	}
}
