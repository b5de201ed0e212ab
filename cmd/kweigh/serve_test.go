package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"net"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// TestServeRefusesBadStarts: listening beyond loopback without tokens, a
// bad size, a bad log format, an unknown spec and an empty token file all
// stop the command before it listens, with exit status 2 and the reason.
func TestServeRefusesBadStarts(t *testing.T) {
	empty := filepath.Join(t.TempDir(), "tokens")
	os.WriteFile(empty, []byte("# none yet\n"), 0o600)
	for _, c := range []struct {
		args []string
		says string
	}{
		{[]string{"--listen", "0.0.0.0:7359"}, "--token-file"},
		{[]string{"--listen", ":7359"}, "--no-auth"},
		{[]string{"--max-upload", "5XB"}, "--max-upload"},
		{[]string{"--log-format", "xml"}, "--log-format"},
		{[]string{"--spec", "kestrel-house"}, "kestrel-house"},
		{[]string{"--token-file", empty}, "no token"},
		{[]string{"--jobs", "0"}, "--jobs"},
		{[]string{"extra-argument"}, "no arguments"},
	} {
		code, _, stderr := kweigh(t, append([]string{"serve"}, c.args...)...)
		if code != exitTrouble || !strings.Contains(stderr, c.says) {
			t.Errorf("serve %v: exit %d, stderr %q (want 2 and %q)", c.args, code, stderr, c.says)
		}
	}
}

// freePort returns a loopback address nobody listens on now.
func freePort(t *testing.T) string {
	t.Helper()
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	addr := ln.Addr().String()
	ln.Close()
	return addr
}

// lockedBuffer is a stderr the server's goroutines may share.
type lockedBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

func waitHealthy(t *testing.T, url string) {
	t.Helper()
	deadline := time.Now().Add(30 * time.Second)
	for {
		resp, err := http.Get(url + "/healthz")
		if err == nil {
			resp.Body.Close()
			if resp.StatusCode == 200 {
				return
			}
		}
		if time.Now().After(deadline) {
			t.Fatalf("server at %s not healthy after 30 s: %v", url, err)
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// TestServeInProcess runs `kweigh serve` through the command line with JSON
// logs, judges one upload and stops it through its context (exit 0).
func TestServeInProcess(t *testing.T) {
	addr := freePort(t)
	specDir := t.TempDir()
	os.WriteFile(filepath.Join(specDir, "northgate.toml"), []byte("name = \"northgate-podcasts\"\nextends = \"podcast\"\n[timing]\nmax_trailing_silence_s = 3.0\n"), 0o600)
	ctx, cancel := context.WithCancel(context.Background())
	var stderr lockedBuffer
	done := make(chan int, 1)
	go func() {
		done <- run(ctx, []string{"kweigh", "serve", "--listen", addr, "--log-format", "json", "--spec", "podcast", "--jobs", "1", "--specs", specDir}, &bytes.Buffer{}, &stderr)
	}()
	url := "http://" + addr
	waitHealthy(t, url)
	// -16 LUFS stereo is the podcast target (common practice, no published
	// source): a -16 dBFS sine in both channels reads -16.0 LUFS (EBU Tech
	// 3341 case 1 scaled); the same signal twice is dual mono, which warns.
	wav := audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 3, 997, audiotest.DBFS(-16), audiotest.DBFS(-16)))
	resp, err := http.Post(url+"/v1/checks?name=lamplighter-s2e12.wav", "audio/wav", bytes.NewReader(wav))
	if err != nil {
		t.Fatal(err)
	}
	var obj map[string]any
	json.NewDecoder(resp.Body).Decode(&obj)
	resp.Body.Close()
	if resp.StatusCode != 200 || obj["spec"] != "podcast" || obj["path"] != "lamplighter-s2e12.wav" || obj["verdict"] != resp.Header.Get("Kweigh-Verdict") {
		t.Errorf("%d spec %v path %v verdict %v / %q", resp.StatusCode, obj["spec"], obj["path"], obj["verdict"], resp.Header.Get("Kweigh-Verdict"))
	}
	// GET /v1/specs/{id} is what `kweigh specs show --format json` prints.
	code, want, _ := kweigh(t, "specs", "show", "--format", "json", "podcast")
	sresp, err := http.Get(url + "/v1/specs/podcast")
	if err != nil {
		t.Fatal(err)
	}
	var got bytes.Buffer
	got.ReadFrom(sresp.Body)
	sresp.Body.Close()
	if code != exitOK || !jsonEqual(t, got.Bytes(), []byte(want)) {
		t.Errorf("GET /v1/specs/podcast differs from specs show --format json:\n%s\n%s", got.Bytes(), want)
	}
	// A spec from --specs is shown with its file's name, not the server's path.
	sresp, err = http.Get(url + "/v1/specs/northgate-podcasts")
	if err != nil {
		t.Fatal(err)
	}
	var house map[string]any
	json.NewDecoder(sresp.Body).Decode(&house)
	sresp.Body.Close()
	if house["file"] != "northgate.toml" || house["extends"] != "podcast" {
		t.Errorf("northgate-podcasts: file %v extends %v", house["file"], house["extends"])
	}
	cancel()
	select {
	case code := <-done:
		if code != exitOK {
			t.Errorf("exit %d after a requested stop, want 0\n%s", code, stderr.String())
		}
	case <-time.After(time.Minute):
		t.Fatal("serve did not stop")
	}
	var sawRequest bool
	sc := bufio.NewScanner(strings.NewReader(stderr.String()))
	for sc.Scan() {
		var line map[string]any
		if err := json.Unmarshal(sc.Bytes(), &line); err != nil {
			t.Errorf("--log-format json wrote a line that is not JSON: %q", sc.Text())
			continue
		}
		if line["msg"] == "request" && line["path"] == "/v1/checks" {
			sawRequest = line["spec"] == "podcast" && line["size"] == float64(len(wav)) && line["verdict"] == obj["verdict"]
		}
	}
	if !sawRequest {
		t.Errorf("no request log line with spec, size and verdict:\n%s", stderr.String())
	}
}

// TestServeStopsOnSignals runs the real binary: on SIGTERM (what service
// managers send) and on SIGINT it stops accepting, lets the check in
// flight finish and be answered, removes its temporary folder and exits 0.
func TestServeStopsOnSignals(t *testing.T) {
	bin := kweighBinary(t) // built once for the signal tests
	// A 3-minute file keeps the check busy for a moment while the signal
	// arrives.
	wav := audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 180, 997, audiotest.DBFS(-23), audiotest.DBFS(-23)))
	for _, sig := range []syscall.Signal{syscall.SIGTERM, syscall.SIGINT} {
		t.Run(sig.String(), func(t *testing.T) {
			tmp := filepath.Join(t.TempDir(), "tmp")
			os.Mkdir(tmp, 0o700)
			addr := freePort(t)
			cmd := exec.Command(bin, "serve", "--listen", addr, "--jobs", "1")
			cmd.Env = append(os.Environ(), "TMPDIR="+tmp)
			var stderr lockedBuffer
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			defer cmd.Process.Kill()
			url := "http://" + addr
			waitHealthy(t, url)
			type result struct {
				status  int
				verdict string
				err     error
			}
			answered := make(chan result, 1)
			go func() {
				resp, err := http.Post(url+"/v1/checks?name=long.wav", "audio/wav", bytes.NewReader(wav))
				if err != nil {
					answered <- result{err: err}
					return
				}
				resp.Body.Close()
				answered <- result{resp.StatusCode, resp.Header.Get("Kweigh-Verdict"), nil}
			}()
			deadline := time.Now().Add(30 * time.Second)
			for !strings.Contains(metrics(t, url), "kweigh_checks_in_flight 1") {
				if time.Now().After(deadline) {
					t.Fatalf("the check never started:\n%s", stderr.String())
				}
				time.Sleep(5 * time.Millisecond)
			}
			cmd.Process.Signal(sig)
			r := <-answered
			if r.err != nil || r.status != 200 || r.verdict == "" {
				t.Errorf("check in flight at %v: %+v", sig, r)
			}
			if err := cmd.Wait(); err != nil {
				t.Errorf("exit after %v: %v\n%s", sig, err, stderr.String())
			}
			if entries, _ := os.ReadDir(tmp); len(entries) != 0 {
				t.Errorf("temporary folder left in $TMPDIR: %v", entries)
			}
		})
	}
}

// TestServeAfterKill: a server killed with SIGKILL runs no clean-up and
// leaves its private folder in $TMPDIR; the next server started there
// removes it (internal/leftovers), and not the folder of a server still
// running beside it.
func TestServeAfterKill(t *testing.T) {
	bin := kweighBinary(t)
	tmp := filepath.Join(t.TempDir(), "tmp")
	os.Mkdir(tmp, 0o700)
	start := func() *exec.Cmd {
		addr := freePort(t)
		cmd := exec.Command(bin, "serve", "--listen", addr, "--jobs", "1")
		cmd.Env = append(os.Environ(), "TMPDIR="+tmp)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { cmd.Process.Kill(); cmd.Wait() })
		waitHealthy(t, "http://"+addr)
		return cmd
	}
	folders := func() []string {
		entries, _ := os.ReadDir(tmp)
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		return names
	}
	killed := start()
	first := folders()
	if len(first) != 1 || !strings.HasPrefix(first[0], "kweigh-serve-"+strconv.Itoa(killed.Process.Pid)+"-") {
		t.Fatalf("folders of the first server: %v", first)
	}
	killed.Process.Kill()
	killed.Wait()
	if got := folders(); len(got) != 1 {
		t.Fatalf("after SIGKILL: %v, want the folder left behind", got)
	}
	alive := start()
	second := start()
	got := folders()
	want := []string{"kweigh-serve-" + strconv.Itoa(alive.Process.Pid) + "-", "kweigh-serve-" + strconv.Itoa(second.Process.Pid) + "-"}
	if len(got) != 2 || slices.Contains(got, first[0]) {
		t.Fatalf("folders with two servers running after the kill: %v (killed one's: %s)", got, first[0])
	}
	for _, w := range want {
		if !slices.ContainsFunc(got, func(n string) bool { return strings.HasPrefix(n, w) }) {
			t.Errorf("no folder %s* among %v", w, got)
		}
	}
}

func metrics(t *testing.T, url string) string {
	resp, err := http.Get(url + "/metrics")
	if err != nil {
		return ""
	}
	defer resp.Body.Close()
	var b bytes.Buffer
	b.ReadFrom(resp.Body)
	return b.String()
}

// jsonEqual compares two JSON documents by value.
func jsonEqual(t *testing.T, a, b []byte) bool {
	t.Helper()
	var x, y any
	if err := json.Unmarshal(a, &x); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, a)
	}
	if err := json.Unmarshal(b, &y); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, b)
	}
	xa, _ := json.Marshal(x)
	ya, _ := json.Marshal(y)
	return bytes.Equal(xa, ya)
}
