package main

import (
	"bytes"
	"context"
	"encoding/json"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/internal/natstest"
	"github.com/kweigh/kweigh/queue"
	"github.com/kweigh/kweigh/rules"
)

// startQueueWorker runs a worker of the queue at url with prefix in the
// test process until the test ends.
func startQueueWorker(t *testing.T, url, prefix string) {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	wq, err := queue.Connect(ctx, queue.Dial{URL: url, Prefix: prefix})
	if err != nil {
		t.Fatal(err)
	}
	done := make(chan struct{})
	go func() {
		defer close(done)
		wq.Work(ctx, queue.Config{Jobs: 2, AckWait: 5 * time.Second})
	}()
	t.Cleanup(func() {
		cancel()
		<-done
		wq.Close()
	})
}

// TestWatchThroughQueue: `watch --once --nats` places every demo file as
// the local check judges it (its verdicts), the judging done by a worker of
// an embedded NATS server; the folder specs travel with the jobs.
func TestWatchThroughQueue(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	startQueueWorker(t, srv.URL, "WATCHQ")
	_, checkOut, _ := kweigh(t, "check", "--format", "jsonl", demoDir)
	want := map[string]string{}
	for _, line := range strings.Split(strings.TrimSpace(checkOut), "\n") {
		var r struct{ Path, Verdict string }
		if err := json.Unmarshal([]byte(line), &r); err != nil {
			t.Fatal(err)
		}
		rel, _ := filepath.Rel(demoDir, r.Path)
		want[filepath.ToSlash(rel)] = r.Verdict
	}
	root := t.TempDir()
	inbox := filepath.Join(root, "drop")
	copyTree(t, demoDir, inbox)
	code, out, errOut := kweigh(t, "watch", "--once", "--settle", "100ms", "--nats", srv.URL, "--queue-prefix", "WATCHQ",
		"--passed", filepath.Join(root, "passed"), "--failed", filepath.Join(root, "failed"), inbox)
	if code != exitTrouble { // the demo's broken archive interview
		t.Errorf("watch --once --nats exit %d, want %d\n%s", code, exitTrouble, errOut)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != len(want) {
		t.Fatalf("%d lines, want %d:\n%s\n%s", len(lines), len(want), out, errOut)
	}
	for _, line := range lines {
		var r struct{ Path, Verdict string }
		if err := json.Unmarshal([]byte(line), &r); err != nil {
			t.Fatal(err)
		}
		rel, _ := filepath.Rel(inbox, r.Path)
		if r.Verdict != want[filepath.ToSlash(rel)] {
			t.Errorf("%s: %s through the queue, %s locally", rel, r.Verdict, want[filepath.ToSlash(rel)])
		}
	}
}

// TestServeThroughQueue: `serve --nats` answers an upload with the verdict
// a worker gave, labelled with the client's name (never the server's
// temporary path), and still refuses what is not audio itself (422).
func TestServeThroughQueue(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	startQueueWorker(t, srv.URL, "SERVEQ")
	addr := freePort(t)
	ctx, cancel := context.WithCancel(context.Background())
	var stderr lockedBuffer
	done := make(chan int, 1)
	go func() {
		done <- run(ctx, []string{"kweigh", "serve", "--listen", addr, "--spec", "ebu-r128", "--jobs", "1",
			"--nats", srv.URL, "--queue-prefix", "SERVEQ"}, &bytes.Buffer{}, &stderr)
	}()
	url := "http://" + addr
	waitHealthy(t, url)
	// A 997 Hz sine of -23 dBFS peak on both channels reads -23.0 LUFS
	// (EBU Tech 3341 case 1); the verdict must be the one a local
	// judgement of the same bytes gives.
	x := audiotest.Sine(48000, 4, 997, audiotest.DBFS(-23), audiotest.DBFS(-23))
	wav := audiotest.PCMWAV(48000, 2, 24, x)
	local := filepath.Join(t.TempDir(), "quayside-ep05.wav")
	if err := os.WriteFile(local, wav, 0o600); err != nil {
		t.Fatal(err)
	}
	spec, _ := rules.Lookup("ebu-r128")
	wantVerdict := string(engine.Judge(context.Background(), local, engine.Options{Spec: spec}).Verdict())
	resp, err := http.Post(url+"/v1/checks?name=quayside-ep05.wav", "audio/wav", bytes.NewReader(wav))
	if err != nil {
		t.Fatal(err)
	}
	var obj struct {
		Path, Verdict, Spec string
		Integrated          *float64 `json:"integrated_lufs"`
	}
	json.NewDecoder(resp.Body).Decode(&obj)
	resp.Body.Close()
	if resp.StatusCode != 200 || obj.Path != "quayside-ep05.wav" || obj.Spec != "ebu-r128" || obj.Integrated == nil ||
		*obj.Integrated < -23.1 || *obj.Integrated > -22.9 || obj.Verdict != wantVerdict || obj.Verdict != resp.Header.Get("Kweigh-Verdict") {
		t.Errorf("status %d, %+v (header %q, local verdict %s)", resp.StatusCode, obj, resp.Header.Get("Kweigh-Verdict"), wantVerdict)
	}
	resp, err = http.Post(url+"/v1/checks?name=notes.txt", "text/plain", strings.NewReader("not audio at all, just words"))
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusUnprocessableEntity {
		t.Errorf("not audio through the queue gate: %d, want 422", resp.StatusCode)
	}
	cancel()
	select {
	case code := <-done:
		if code != exitOK {
			t.Errorf("exit %d\n%s", code, stderr.String())
		}
	case <-time.After(time.Minute):
		t.Fatal("serve did not stop")
	}
}
