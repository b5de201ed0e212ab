package serve

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"io"
	"log/slog"
	"mime/multipart"
	"net"
	"net/http"
	"os"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/kweigh/kweigh/rules"
)

// syncBuffer is a log sink the server's goroutines may share.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

// lines returns the JSON log lines whose msg is "request".
func (s *syncBuffer) requests(t *testing.T) []map[string]any {
	s.mu.Lock()
	defer s.mu.Unlock()
	var out []map[string]any
	for _, line := range strings.Split(s.b.String(), "\n") {
		if line == "" {
			continue
		}
		var m map[string]any
		if err := json.Unmarshal([]byte(line), &m); err != nil {
			t.Fatalf("log line is not JSON: %q", line)
		}
		if m["msg"] == "request" {
			out = append(out, m)
		}
	}
	return out
}

// testServer is a real server on a loopback port.
type testServer struct {
	*Server
	url    string
	addr   string
	logs   *syncBuffer
	stop   context.CancelFunc
	done   chan error
	client *http.Client
	once   sync.Once
}

// startServer runs a server with cfg (the ebu-r128 default spec when cfg
// has no catalogue) on 127.0.0.1 and stops it when the test ends, checking
// that its temporary folder is gone then.
func startServer(t *testing.T, cfg Config) *testServer {
	t.Helper()
	if cfg.Catalogue == nil {
		cfg.Catalogue = catalogue(t)
	}
	logs := &syncBuffer{}
	if cfg.Logger == nil {
		cfg.Logger = slog.New(slog.NewJSONHandler(logs, nil))
	}
	if cfg.TempDir == "" {
		cfg.TempDir = t.TempDir()
	}
	if cfg.Jobs == 0 {
		cfg.Jobs = 2
	}
	srv, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	ts := &testServer{Server: srv, addr: ln.Addr().String(), url: "http://" + ln.Addr().String(), logs: logs,
		stop: cancel, done: make(chan error, 1), client: &http.Client{Timeout: time.Minute}}
	go func() { ts.done <- srv.Serve(ctx, ln) }()
	t.Cleanup(func() {
		ts.shutdown(t)
		if _, err := os.Stat(srv.TempDir()); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("temporary folder %s left after shutdown (stat: %v)", srv.TempDir(), err)
		}
	})
	return ts
}

// shutdown stops the server (once) and waits for Serve to return.
func (ts *testServer) shutdown(t *testing.T) {
	t.Helper()
	ts.once.Do(func() {
		ts.stop()
		select {
		case err := <-ts.done:
			if err != nil {
				t.Errorf("Serve: %v", err)
			}
		case <-time.After(time.Minute):
			t.Fatal("server did not stop within a minute")
		}
	})
}

func catalogue(t testing.TB) *Catalogue {
	t.Helper()
	def, err := rules.Lookup("ebu-r128")
	if err != nil {
		t.Fatal(err)
	}
	c, err := NewCatalogue(def)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// answer is a response read in full.
type answer struct {
	status int
	header http.Header
	body   []byte
}

// json decodes the body as one object.
func (a answer) json(t *testing.T) map[string]any {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal(a.body, &m); err != nil {
		t.Fatalf("answer %d is not a JSON object: %v\n%s", a.status, err, a.body)
	}
	return m
}

func (ts *testServer) do(t *testing.T, req *http.Request) answer {
	t.Helper()
	resp, err := ts.client.Do(req)
	if err != nil {
		t.Fatalf("%s %s: %v", req.Method, req.URL, err)
	}
	defer resp.Body.Close()
	body, err := io.ReadAll(resp.Body)
	if err != nil {
		t.Fatalf("%s %s: reading the answer: %v", req.Method, req.URL, err)
	}
	return answer{resp.StatusCode, resp.Header, body}
}

// postRaw uploads body as the raw request body.
func (ts *testServer) postRaw(t *testing.T, query string, body []byte, header ...string) answer {
	t.Helper()
	req, err := http.NewRequest("POST", ts.url+"/v1/checks"+query, bytes.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/octet-stream")
	for i := 0; i+1 < len(header); i += 2 {
		req.Header.Set(header[i], header[i+1])
	}
	return ts.do(t, req)
}

// postForm uploads body as the file part of a multipart form, with the
// given extra fields.
func (ts *testServer) postForm(t *testing.T, filename string, body []byte, fields ...string) answer {
	t.Helper()
	var b bytes.Buffer
	mw := multipart.NewWriter(&b)
	for i := 0; i+1 < len(fields); i += 2 {
		mw.WriteField(fields[i], fields[i+1])
	}
	fw, err := mw.CreateFormFile("file", filename)
	if err != nil {
		t.Fatal(err)
	}
	fw.Write(body)
	mw.Close()
	req, err := http.NewRequest("POST", ts.url+"/v1/checks", &b)
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Content-Type", mw.FormDataContentType())
	return ts.do(t, req)
}

func (ts *testServer) get(t *testing.T, path string, header ...string) answer {
	t.Helper()
	req, err := http.NewRequest("GET", ts.url+path, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i+1 < len(header); i += 2 {
		req.Header.Set(header[i], header[i+1])
	}
	return ts.do(t, req)
}

// tempFiles lists what is in the server's private folder.
func (ts *testServer) tempFiles(t *testing.T) []string {
	t.Helper()
	entries, err := os.ReadDir(ts.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}

// waitFor polls cond for up to d.
func waitFor(t *testing.T, d time.Duration, what string, cond func() bool) {
	t.Helper()
	deadline := time.Now().Add(d)
	for !cond() {
		if time.Now().After(deadline) {
			t.Fatalf("waited %v for %s", d, what)
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// postMultipart sends a multipart form of the given fields and no file.
func (ts *testServer) postMultipart(t *testing.T, fields []string) answer {
	t.Helper()
	var b bytes.Buffer
	mw := multipart.NewWriter(&b)
	for i := 0; i+1 < len(fields); i += 2 {
		mw.WriteField(fields[i], fields[i+1])
	}
	mw.Close()
	req, err := http.NewRequest("POST", ts.url+"/v1/checks", &b)
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Content-Type", mw.FormDataContentType())
	return ts.do(t, req)
}

func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o600); err != nil {
		t.Fatal(err)
	}
}
