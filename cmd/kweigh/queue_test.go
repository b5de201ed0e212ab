package main

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/internal/natstest"
	"github.com/kweigh/kweigh/queue"
)

// worker is a real kweigh worker process.
type worker struct {
	cmd    *exec.Cmd
	log    *lockedBuffer
	exited chan struct{} // closed once the process has been waited for
	err    error         // Wait's error, set before exited is closed
}

// wait waits for the process to end (Wait is called once, by startWorker).
func (w *worker) wait() error {
	<-w.exited
	return w.err
}

// startWorker runs the binary as a worker with short timings and extra
// environment (the test hooks). The ack wait is 3 s: the worker's
// heartbeat comes every third of it, and with 1 s a worker starved of the
// CPU for a second on a loaded machine would lose its job to a
// redelivery that the tests' delivery counts do not expect.
func startWorker(t *testing.T, url, prefix, name string, env ...string) *worker {
	t.Helper()
	w := &worker{log: &lockedBuffer{}, exited: make(chan struct{})}
	w.cmd = exec.Command(kweighBinary(t), "worker", "--nats", url, "--queue-prefix", prefix, "--name", name,
		"--jobs", "1", "--ack-wait", "3s", "--max-deliveries", "2", "--drain", "500ms")
	w.cmd.Env = append(os.Environ(), env...)
	w.cmd.Stderr = w.log
	if err := w.cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { w.err = w.cmd.Wait(); close(w.exited) }()
	t.Cleanup(func() {
		w.cmd.Process.Kill()
		w.wait()
	})
	return w
}

// waitFor waits until the worker's log holds text.
func (w *worker) waitFor(t *testing.T, text string, limit time.Duration) {
	t.Helper()
	deadline := time.Now().Add(limit)
	for !strings.Contains(w.log.String(), text) {
		if time.Now().After(deadline) {
			t.Fatalf("worker log has no %q after %v:\n%s", text, limit, w.log.String())
		}
		time.Sleep(50 * time.Millisecond)
	}
}

// queueDelivery writes three short files for an invented outlet.
func queueDelivery(t *testing.T, names ...string) string {
	t.Helper()
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "kweigh.toml"), []byte("name = \"marram-fm\"\nextends = \"ebu-r128\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for i, n := range names {
		a := audiotest.DBFS(-22 - float64(i))
		if err := os.WriteFile(filepath.Join(dir, n), audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 2, 997, a, 0.9*a)), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

// checkLines runs kweigh check (locally, or with the queue arguments) with
// JSONL output and returns its records sorted, without the elapsed time.
func checkLines(t *testing.T, dir string, queueArgs ...string) ([]string, int, string) {
	t.Helper()
	args := append([]string{"check", "--format", "jsonl"}, queueArgs...)
	cmd := exec.Command(kweighBinary(t), append(args, dir)...)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	done := make(chan error, 1)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { done <- cmd.Wait() }()
	select {
	case <-done:
	case <-time.After(60 * time.Second):
		cmd.Process.Kill()
		<-done
		t.Fatalf("kweigh check %v did not finish:\n%s", queueArgs, stderr.String())
	}
	var lines []string
	for _, l := range strings.Split(strings.TrimSpace(stdout.String()), "\n") {
		if strings.Contains(l, `"path"`) {
			lines = append(lines, l)
		}
	}
	sort.Strings(lines)
	return lines, cmd.ProcessState.ExitCode(), stderr.String()
}

// TestQueueWorkerKilledMidJob: a worker process killed with SIGKILL while
// it holds a job loses it; after the ack wait another worker judges it, and
// check --nats prints every file once, as a local check does.
func TestQueueWorkerKilledMidJob(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	dir := queueDelivery(t, "dune-report-1.wav", "dune-report-2.wav", "dune-report-3.wav")
	want, wantCode, _ := checkLines(t, dir)
	victim := startWorker(t, srv.URL, "KILLED", "victim", stallOnEnv+"=dune-report-2.wav")
	type outcome struct {
		lines  []string
		code   int
		stderr string
	}
	res := make(chan outcome, 1)
	go func() {
		l, c, e := checkLines(t, dir, "--nats", srv.URL, "--queue-prefix", "KILLED")
		res <- outcome{l, c, e}
	}()
	victim.waitFor(t, "dune-report-2.wav: judging", 30*time.Second)
	if err := victim.cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	victim.wait()
	rescuer := startWorker(t, srv.URL, "KILLED", "rescuer")
	got := <-res
	if got.code != wantCode || strings.Join(got.lines, "\n") != strings.Join(want, "\n") {
		t.Errorf("check --nats: exit %d, records\n%s\nwant exit %d, records\n%s\nstderr %s",
			got.code, strings.Join(got.lines, "\n"), wantCode, strings.Join(want, "\n"), got.stderr)
	}
	rescuer.waitFor(t, "dune-report-2.wav: judging (delivery 2)", 30*time.Second)
}

// TestQueuePoisonFile: a file that makes every worker crash is delivered
// --max-deliveries times (2), then the next worker ends it as an error
// result: check --nats reports it as an error (exit 2) and the other files
// normally.
func TestQueuePoisonFile(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	dir := queueDelivery(t, "reed-bed-1.wav", "reed-bed-poison.wav")
	res := make(chan []string, 1)
	var code int
	var stderr string
	go func() {
		var l []string
		l, code, stderr = checkLines(t, dir, "--nats", srv.URL, "--queue-prefix", "POISON")
		res <- l
	}()
	// A supervisor: a crashed worker is started again, a bounded number
	// of times.
	var lines []string
	crashes := 0
	for lines == nil {
		w := startWorker(t, srv.URL, "POISON", "poisoned", crashOnEnv+"=reed-bed-poison.wav")
		select {
		case lines = <-res:
			if lines == nil {
				t.Fatalf("check --nats printed no records: exit %d, stderr %s", code, stderr)
			}
		case <-w.exited:
			crashes++
			if crashes > 4 {
				t.Fatalf("%d crashes and no end to the poison loop; last log:\n%s", crashes, w.log.String())
			}
		}
	}
	if code != 2 || len(lines) != 2 {
		t.Fatalf("exit %d, %d records, want exit 2 and 2 records; stderr %s", code, len(lines), stderr)
	}
	if !strings.Contains(lines[1], `"verdict":"error"`) || !strings.Contains(lines[1], "given up after 2 deliveries") {
		t.Errorf("poison record: %s", lines[1])
	}
	if strings.Contains(lines[0], `"verdict":"error"`) {
		t.Errorf("the good file: %s", lines[0])
	}
	if crashes != 2 {
		t.Errorf("%d crashes, want 2 (the delivery limit)", crashes)
	}
}

// TestQueueWorkerSIGTERMHandsBack: a worker told to stop while it holds a
// job hands it back after --drain; it exits 0 and another worker judges
// the job at once (no ack wait).
func TestQueueWorkerSIGTERMHandsBack(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	dir := queueDelivery(t, "heron-hour-1.wav")
	res := make(chan int, 1)
	go func() { _, c, _ := checkLines(t, dir, "--nats", srv.URL, "--queue-prefix", "TERM"); res <- c }()
	w := startWorker(t, srv.URL, "TERM", "stopping", stallOnEnv+"=heron-hour-1.wav")
	w.waitFor(t, "heron-hour-1.wav: judging", 30*time.Second)
	w.cmd.Process.Signal(syscall.SIGTERM)
	w.waitFor(t, "handed back", 30*time.Second) // under the stall's minute: --drain, not the job, ended it
	if err := w.wait(); err != nil {
		t.Errorf("worker after SIGTERM: %v\n%s", err, w.log.String())
	}
	next := startWorker(t, srv.URL, "TERM", "next")
	// -22 dBFS left and 0.9 of it right read 10·log10((1 + 0.81)/2) dB
	// from -22: -22.4 LUFS, inside R 128's -23 ± 1 LU, so the file passes.
	if c := <-res; c != 0 {
		t.Errorf("check --nats exit %d, want 0 (the file passes R 128)", c)
	}
	next.waitFor(t, "heron-hour-1.wav: judging (delivery 2)", 30*time.Second)
}

// TestQueueDetachAndResults: check --nats --detach prints a batch id and
// exits; an in-process worker judges the batch; kweigh results prints the
// JSON report and exits exactly as a local check of the demo delivery,
// apart from the time it was made and took. Collecting twice works.
func TestQueueDetachAndResults(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	q := []string{"--nats", srv.URL, "--queue-prefix", "DETACH"}
	code, out, errOut := kweigh(t, append(append([]string{"check", "--detach"}, q...), demoDir)...)
	batch := strings.TrimSpace(out)
	if code != 0 || !queue.ValidBatch(batch) || !strings.Contains(errOut, "kweigh results") {
		t.Fatalf("detach: exit %d, stdout %q, stderr %s", code, out, errOut)
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	wq, err := queue.Connect(ctx, queue.Dial{URL: srv.URL, Prefix: "DETACH"})
	if err != nil {
		t.Fatal(err)
	}
	defer wq.Close()
	go wq.Work(ctx, queue.Config{Jobs: 2, AckWait: 5 * time.Second})
	wantCode, want, _ := kweigh(t, "check", "--format", "json", demoDir)
	clean := func(s string) string {
		var lines []string
		for _, l := range strings.Split(s, "\n") {
			if !strings.Contains(l, `"generated"`) && !strings.Contains(l, `"elapsed_s"`) {
				lines = append(lines, l)
			}
		}
		return strings.Join(lines, "\n")
	}
	for round := 0; round < 2; round++ {
		code, got, errOut := kweigh(t, append(append([]string{"results", "--format", "json"}, q...), batch)...)
		if code != wantCode || clean(got) != clean(want) {
			t.Errorf("round %d: results exit %d, want %d; output differs from the local check: %v\nstderr %s", round, code, wantCode, clean(got) != clean(want), errOut)
		}
	}
}

// TestQueueMistakes: queue options without a queue, a malformed or unknown
// batch id and an unreachable server are clear errors (exit 2) naming the
// problem, at once.
func TestQueueMistakes(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	closed := "nats://127.0.0.1:1" // nothing listens on port 1
	for _, tc := range []struct {
		args  []string
		words string
	}{
		{[]string{"check", "--detach", demoDir}, "--detach needs --nats"},
		{[]string{"check", "--creds", "x.creds", demoDir}, "--creds needs --nats"},
		{[]string{"check", "--nats", srv.URL, "--queue-prefix", "a.b", demoDir}, "only letters, digits"},
		{[]string{"results", "--nats", srv.URL, "no/such"}, "not a batch id"},
		{[]string{"results", "--nats", srv.URL, "20260101T000000-000000000000"}, "no such batch"},
		{[]string{"results", demoDir}, "nats"},
		{[]string{"worker", "--nats", closed}, "127.0.0.1:1"},
		{[]string{"check", "--nats", closed, demoDir}, "127.0.0.1:1"},
		{[]string{"worker", "--nats", srv.URL, demoDir}, "no file arguments"},
	} {
		start := time.Now()
		code, _, errOut := kweigh(t, tc.args...)
		if code != 2 || !strings.Contains(errOut, tc.words) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", tc.args, code, errOut, tc.words)
		}
		if d := time.Since(start); d > 10*time.Second {
			t.Errorf("%v took %v", tc.args, d)
		}
	}
}
