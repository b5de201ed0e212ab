package serve

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"net"
	"net/http"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"
)

// TestAuth: with tokens, the API needs one; health, readiness, metrics,
// the page and the OpenAPI document do not.
func TestAuth(t *testing.T) {
	ts := startServer(t, Config{Tokens: NewTokens("kestrel-7f3a9c", "second-token-2b")})
	body := passTone.wav()
	for _, c := range []struct {
		name   string
		header []string
		status int
	}{
		{"no token", nil, 401},
		{"wrong token", []string{"Authorization", "Bearer kestrel-7f3a9d"}, 401},
		{"not bearer", []string{"Authorization", "Basic a2VzdHJlbA=="}, 401},
		{"right token", []string{"Authorization", "Bearer kestrel-7f3a9c"}, 200},
		{"second token, lower-case scheme", []string{"Authorization", "bearer second-token-2b"}, 200},
	} {
		a := ts.postRaw(t, "?name=a.wav", body, c.header...)
		if a.status != c.status {
			t.Errorf("%s: status %d, want %d: %s", c.name, a.status, c.status, a.body)
		}
		if c.status == 401 && !strings.HasPrefix(a.header.Get("WWW-Authenticate"), "Bearer") {
			t.Errorf("%s: WWW-Authenticate %q", c.name, a.header.Get("WWW-Authenticate"))
		}
	}
	for _, p := range []string{"/v1/specs", "/v1/specs/ebu-r128", "/v1/checks/0123456789abcdef0123456789abcdef"} {
		if a := ts.get(t, p); a.status != 401 {
			t.Errorf("GET %s without token: %d, want 401", p, a.status)
		}
	}
	if a := ts.get(t, "/v1/specs", "Authorization", "Bearer kestrel-7f3a9c"); a.status != 200 {
		t.Errorf("GET /v1/specs with token: %d", a.status)
	}
	for _, p := range []string{"/healthz", "/readyz", "/metrics", "/", "/v1/openapi.json"} {
		if a := ts.get(t, p); a.status != 200 {
			t.Errorf("GET %s without token: %d, want 200", p, a.status)
		}
	}
	if got := metricValue(t, ts, "kweigh_rejected_total", "reason", "unauthorised"); got != 3 {
		t.Errorf("rejected unauthorised = %v, want 3", got)
	}
}

// countingReader produces n zero bytes, counting what was read.
type countingReader struct {
	n    int64
	read atomic.Int64
}

func (c *countingReader) Read(p []byte) (int, error) {
	left := c.n - c.read.Load()
	if left <= 0 {
		return 0, io.EOF
	}
	if int64(len(p)) > left {
		p = p[:left]
	}
	clear(p)
	c.read.Add(int64(len(p)))
	return len(p), nil
}

// TestOversized: a declared length beyond --max-upload is refused before
// any byte is read; a body without a declared length (chunked) is refused
// as soon as it passes the limit, long before the client has sent it all.
func TestOversized(t *testing.T) {
	const limit = 256 << 10
	ts := startServer(t, Config{MaxUpload: limit})

	// Declared too large: answered from the headers alone.
	conn, err := net.Dial("tcp", ts.addr)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	fmt.Fprintf(conn, "POST /v1/checks HTTP/1.1\r\nHost: x\r\nContent-Type: audio/wav\r\nContent-Length: %d\r\n\r\n", 64<<20)
	conn.SetReadDeadline(time.Now().Add(10 * time.Second))
	resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
	if err != nil {
		t.Fatalf("no answer to a declared 64 MiB upload without its body: %v", err)
	}
	msg, _ := io.ReadAll(resp.Body)
	if resp.StatusCode != 413 || !strings.Contains(string(msg), "256 KiB") {
		t.Errorf("declared too large: %d %s", resp.StatusCode, msg)
	}

	// Chunked: the client streams 64 MiB; the answer comes before.
	body := &countingReader{n: 64 << 20}
	req, _ := http.NewRequest("POST", ts.url+"/v1/checks?name=huge.wav", body)
	req.ContentLength = -1 // chunked: no declared length
	res, err := ts.client.Do(req)
	sent := body.read.Load()
	if err != nil {
		t.Fatalf("chunked oversized upload: %v (client had sent %d bytes)", err, sent)
	}
	data, _ := io.ReadAll(res.Body)
	res.Body.Close()
	if res.StatusCode != 413 {
		t.Fatalf("chunked oversized upload: %d %s", res.StatusCode, data)
	}
	if sent >= body.n/2 {
		t.Errorf("the answer came after %d of %d bytes: the limit was not enforced while reading", sent, body.n)
	}
	if got := metricValue(t, ts, "kweigh_rejected_total", "reason", "too_large"); got != 2 {
		t.Errorf("rejected too_large = %v, want 2", got)
	}
	if files := ts.tempFiles(t); len(files) != 0 {
		t.Errorf("temporary files left: %v", files)
	}
	// A body exactly at the limit is taken (it is not audio here: 422).
	if a := ts.postRaw(t, "", bytes.Repeat([]byte{'x'}, limit)); a.status != 422 {
		t.Errorf("body at the limit: %d %s", a.status, a.body)
	}
}

// rawUpload starts a request by hand: headers with the given length, then
// the first bytes of the body. The caller decides what the client does next.
func rawUpload(t *testing.T, addr string, length int, first []byte) net.Conn {
	t.Helper()
	conn, err := net.Dial("tcp", addr)
	if err != nil {
		t.Fatal(err)
	}
	fmt.Fprintf(conn, "POST /v1/checks?name=slow.wav HTTP/1.1\r\nHost: x\r\nContent-Length: %d\r\n\r\n", length)
	if _, err := conn.Write(first); err != nil {
		t.Fatal(err)
	}
	return conn
}

// TestClientDisconnects: a client that goes away mid-upload leaves no
// temporary file and frees its place.
func TestClientDisconnects(t *testing.T) {
	ts := startServer(t, Config{Jobs: 1, Queue: 1})
	wav := failTone.wav()
	conn := rawUpload(t, ts.addr, len(wav), wav[:len(wav)/3])
	waitFor(t, 5*time.Second, "the upload's temporary file", func() bool { return len(ts.tempFiles(t)) == 1 })
	conn.Close()
	waitFor(t, 5*time.Second, "the temporary file to go", func() bool { return len(ts.tempFiles(t)) == 0 })
	waitFor(t, 5*time.Second, "the place to be free", func() bool { return metricValue(t, ts, "kweigh_uploads_in_progress", "", "") == 0 })
	if got := metricValue(t, ts, "kweigh_rejected_total", "reason", "incomplete"); got != 1 {
		t.Errorf("rejected incomplete = %v, want 1", got)
	}
	if a := ts.postRaw(t, "?name=next.wav", wav); a.status != 200 {
		t.Errorf("the next upload: %d %s", a.status, a.body)
	}
}

// TestSlowClients: a client that sends its headers too slowly is cut off
// after the header timeout; one that stalls inside its body after the
// stall timeout, with a 408, its temporary file removed and its place
// freed.
func TestSlowClients(t *testing.T) {
	const timeout = 300 * time.Millisecond
	ts := startServer(t, Config{Jobs: 1, Queue: 1, HeaderTimeout: timeout, StallTimeout: timeout})

	// Headers never finished.
	conn, err := net.Dial("tcp", ts.addr)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	fmt.Fprintf(conn, "POST /v1/checks HTTP/1.1\r\nHost: x\r\n")
	start := time.Now()
	conn.SetReadDeadline(time.Now().Add(10 * time.Second))
	io.Copy(io.Discard, conn) // returns when the server closes the connection
	if took := time.Since(start); took > 3*time.Second {
		t.Errorf("slow headers: connection held %v (header timeout %v)", took, timeout)
	}

	// Body stalls after a third.
	wav := failTone.wav()
	body := rawUpload(t, ts.addr, len(wav), wav[:len(wav)/3])
	defer body.Close()
	start = time.Now()
	body.SetReadDeadline(time.Now().Add(10 * time.Second))
	resp, err := http.ReadResponse(bufio.NewReader(body), nil)
	took := time.Since(start)
	if err != nil {
		t.Fatalf("stalled body: no answer (%v) after %v", err, took)
	}
	resp.Body.Close()
	if resp.StatusCode != 408 || took > 3*time.Second {
		t.Errorf("stalled body: %d after %v, want 408 after about %v", resp.StatusCode, took, timeout)
	}
	waitFor(t, 5*time.Second, "the temporary file to go", func() bool { return len(ts.tempFiles(t)) == 0 })
	if got := metricValue(t, ts, "kweigh_rejected_total", "reason", "incomplete"); got != 1 {
		t.Errorf("rejected incomplete = %v after a stalled body, want 1", got)
	}
	if a := ts.get(t, "/readyz"); a.status != 200 {
		t.Errorf("readyz after the slow clients: %d %s", a.status, a.body)
	}
	if a := ts.postRaw(t, "?name=next.wav", wav); a.status != 200 {
		t.Errorf("the next upload: %d %s", a.status, a.body)
	}
}

// TestBusy: with every worker and queue place taken, an upload gets 503
// with Retry-After before its body is read, and /readyz says busy.
func TestBusy(t *testing.T) {
	ts := startServer(t, Config{Jobs: 1, Queue: 1, StallTimeout: 30 * time.Second})
	wav := passTone.wav()
	var held []net.Conn
	for range 2 {
		c := rawUpload(t, ts.addr, len(wav), wav[:1000])
		held = append(held, c)
	}
	waitFor(t, 5*time.Second, "two uploads in progress", func() bool { return metricValue(t, ts, "kweigh_uploads_in_progress", "", "") == 2 })
	a := ts.postRaw(t, "?name=third.wav", wav)
	if a.status != 503 {
		t.Fatalf("third upload: %d %s", a.status, a.body)
	}
	if s, err := strconv.Atoi(a.header.Get("Retry-After")); err != nil || s < 1 {
		t.Errorf("Retry-After %q", a.header.Get("Retry-After"))
	}
	if r := ts.get(t, "/readyz"); r.status != 503 || r.json(t)["status"] != "busy" {
		t.Errorf("readyz while full: %d %s", r.status, r.body)
	}
	// The held uploads complete: both are judged.
	for _, c := range held {
		c.Write(wav[1000:])
		c.SetReadDeadline(time.Now().Add(30 * time.Second))
		resp, err := http.ReadResponse(bufio.NewReader(c), nil)
		if err != nil {
			t.Fatal(err)
		}
		if resp.StatusCode != 200 || resp.Header.Get(HeaderVerdict) != "pass" {
			t.Errorf("held upload: %d %s", resp.StatusCode, resp.Header.Get(HeaderVerdict))
		}
		resp.Body.Close()
		c.Close()
	}
	if got := metricValue(t, ts, "kweigh_rejected_total", "reason", "busy"); got != 1 {
		t.Errorf("rejected busy = %v, want 1", got)
	}
}

// TestTricklingClient: a client that never pauses long enough to stall but
// sends so slowly that the whole request takes longer than the read
// timeout gets a 408 at the read timeout.
func TestTricklingClient(t *testing.T) {
	ts := startServer(t, Config{Jobs: 1, Queue: 1, StallTimeout: 400 * time.Millisecond, ReadTimeout: 800 * time.Millisecond})
	wav := passTone.wav()
	conn := rawUpload(t, ts.addr, len(wav), wav[:100])
	defer conn.Close()
	stop := make(chan struct{})
	defer close(stop)
	go func() {
		for i := 100; i < len(wav); i += 10 {
			select {
			case <-stop:
				return
			case <-time.After(100 * time.Millisecond):
			}
			if _, err := conn.Write(wav[i : i+10]); err != nil {
				return
			}
		}
	}()
	start := time.Now()
	conn.SetReadDeadline(time.Now().Add(10 * time.Second))
	resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
	took := time.Since(start)
	if err != nil {
		t.Fatalf("trickling client: no answer (%v) after %v", err, took)
	}
	resp.Body.Close()
	if resp.StatusCode != 408 || took < 700*time.Millisecond || took > 3*time.Second {
		t.Errorf("trickling client: %d after %v, want 408 after about 800 ms", resp.StatusCode, took)
	}
	waitFor(t, 5*time.Second, "the temporary file to go", func() bool { return len(ts.tempFiles(t)) == 0 })
}

// TestIdleConnectionClosed: a kept-alive connection that sends no next
// request is closed after the idle timeout.
func TestIdleConnectionClosed(t *testing.T) {
	ts := startServer(t, Config{IdleTimeout: 300 * time.Millisecond})
	conn, err := net.Dial("tcp", ts.addr)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	fmt.Fprintf(conn, "GET /healthz HTTP/1.1\r\nHost: x\r\n\r\n")
	br := bufio.NewReader(conn)
	resp, err := http.ReadResponse(br, nil)
	if err != nil {
		t.Fatal(err)
	}
	io.Copy(io.Discard, resp.Body)
	resp.Body.Close()
	start := time.Now()
	conn.SetReadDeadline(time.Now().Add(10 * time.Second))
	if n, err := br.Read(make([]byte, 1)); n != 0 || err == nil {
		t.Fatalf("read %d bytes, %v", n, err)
	}
	if took := time.Since(start); took > 3*time.Second {
		t.Errorf("idle connection held %v (idle timeout 300 ms)", took)
	}
}
