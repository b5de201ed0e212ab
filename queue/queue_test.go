package queue_test

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"sync"
	"testing"
	"time"

	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/internal/natstest"
	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/queue"
)

// demoDir is the bundled demo delivery folder (made by testdata/make-demo.go).
var demoDir = filepath.Join("..", "testdata", "demo")

// delivery is the demo folder plus a file that is not audio (skipped), one
// named like audio that is not (an error), and a folder without a spec.
func delivery(t *testing.T) []string {
	t.Helper()
	dir := t.TempDir()
	write := func(rel string, data []byte) {
		p := filepath.Join(dir, rel)
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("tern-island/kweigh.toml", []byte("name = \"tern-island\"\nextends = \"podcast\"\n"))
	write("tern-island/running-order.txt", []byte("1. cold open\n"))
	write("tern-island/broken-take.wav", []byte("not audio at all"))
	a := audiotest.DBFS(-16)
	write("tern-island/ep1.wav", audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 3, 997, a, a)))
	write("unsorted/kweigh.toml", []byte("root = true\n"))
	write("unsorted/orphan.wav", audiotest.PCMWAV(48000, 1, 16, audiotest.Sine(48000, 1, 997, a)))
	return []string{demoDir, dir}
}

// connect starts a queue client on the server under a fresh prefix.
func connect(t testing.TB, url, prefix string) *queue.Queue {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Second)
	defer cancel()
	q, err := queue.Connect(ctx, queue.Dial{URL: url, Prefix: prefix, Name: t.Name()})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(q.Close)
	return q
}

// local judges targets as a local check does.
func local(targets []engine.Target, keepSeries bool) []engine.Record {
	out := make([]engine.Record, len(targets))
	opt := engine.Options{Specs: engine.NewSpecs()}
	opt.Measure.KeepSeries = keepSeries
	engine.Run(context.Background(), targets, 2,
		func(ctx context.Context, tg engine.Target) engine.Record { return engine.JudgeTarget(ctx, tg, opt) },
		func(i int, r engine.Record) { out[i] = r }, true)
	return out
}

// startWorkers runs n workers until the test ends.
func startWorkers(t *testing.T, url, prefix string, n int, cfg func(i int) queue.Config) (stop func()) {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	var wg sync.WaitGroup
	for i := 0; i < n; i++ {
		q := connect(t, url, prefix)
		wg.Add(1)
		go func() {
			defer wg.Done()
			if err := q.Work(ctx, cfg(i)); err != nil {
				t.Error(err)
			}
		}()
	}
	stop = func() { cancel(); wg.Wait() }
	t.Cleanup(stop)
	return stop
}

func name(i int) string { return "worker-" + string(rune('a'+i)) }

// collect waits for a batch's results, failing the test on a doubled one.
func collect(t *testing.T, q *queue.Queue, batch string, n int, limit time.Duration) map[int]queue.Result {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), limit)
	defer cancel()
	got := map[int]queue.Result{}
	err := q.Wait(ctx, batch, n, func(r queue.Result) {
		if _, dup := got[r.Index]; dup {
			t.Errorf("job %d emitted twice", r.Index)
		}
		got[r.Index] = r
	})
	if err != nil {
		t.Fatalf("waiting for batch %s: %v (%d of %d in)", batch, err, len(got), n)
	}
	return got
}

func asJSON(t *testing.T, v any) string {
	t.Helper()
	data, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

// TestBatchAcrossThreeWorkers: every file of a mixed delivery (three
// outlets' specs, a skipped text file, a broken file, a file with no spec)
// comes back once, identical to judging it locally, series included; more
// than one worker took part; a second submission of the same audio sends
// nothing.
func TestBatchAcrossThreeWorkers(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	const prefix = "T3W"
	startWorkers(t, srv.URL, prefix, 3, func(i int) queue.Config {
		return queue.Config{Name: name(i), AckWait: 5 * time.Second, BeforeJudge: func(context.Context, queue.Job) {
			time.Sleep(50 * time.Millisecond) // so that no one worker takes everything
		}}
	})
	targets, err := engine.Collect(delivery(t))
	if err != nil {
		t.Fatal(err)
	}
	q := connect(t, srv.URL, prefix)
	batch := queue.NewBatch()
	opt := queue.SubmitOptions{Specs: engine.NewSpecs(), KeepSeries: true}
	sub, err := q.Submit(context.Background(), batch, targets, opt)
	if err != nil {
		t.Fatal(err)
	}
	if sub.Jobs+sub.Local != len(targets) || sub.Local != 1 || sub.Present != 0 {
		t.Errorf("submitted %+v for %d targets; want 1 local (the file under a root = true boundary)", sub, len(targets))
	}
	got := collect(t, q, batch, len(targets), 60*time.Second)
	want := local(targets, true)
	workers := map[string]bool{}
	skipped := 0
	for i, w := range want {
		g := got[i]
		workers[g.Worker] = true
		if g.Record.Skipped != w.Skipped {
			t.Errorf("%s: skipped %v, want %v", targets[i].Path, g.Record.Skipped, w.Skipped)
		}
		if w.Skipped {
			skipped++
			continue
		}
		if a, b := asJSON(t, g.Record.Result), asJSON(t, w.Result); a != b {
			t.Errorf("%s: queue result differs from local\nqueue %s\nlocal %s", targets[i].Path, a, b)
		}
		if w.Measurement.Series != nil && !sameSeries(g.Record.Measurement.Series, w.Measurement.Series) {
			t.Errorf("%s: loudness series differ", targets[i].Path)
		}
		if (g.Record.Spec == nil) != (w.Spec == nil) || g.Record.Spec != nil && g.Record.Spec.ID != w.Spec.ID {
			t.Errorf("%s: spec %v, want %v", targets[i].Path, g.Record.Spec, w.Spec)
		}
	}
	if skipped != 1 {
		t.Errorf("%d skipped, want 1 (the running order)", skipped)
	}
	delete(workers, "")
	if len(workers) < 2 {
		t.Errorf("workers that took part: %v; want at least 2 of 3", workers)
	}
	// The same audio again: nothing uploaded.
	again, err := q.Submit(context.Background(), queue.NewBatch(), targets[:3], opt)
	if err != nil || again.Sent != 0 || again.Present != 3 {
		t.Errorf("second submission %+v, %v; want all 3 present, none sent", again, err)
	}
}

// sameSeries compares two series bit for bit (their undefined blocks are
// NaN, which == never matches).
func sameSeries(a, b *loudness.Series) bool {
	if a == nil || b == nil {
		return a == b
	}
	same := func(x, y []float32) bool {
		if len(x) != len(y) {
			return false
		}
		for i := range x {
			if math.Float32bits(x[i]) != math.Float32bits(y[i]) {
				return false
			}
		}
		return true
	}
	return a.Step == b.Step && same(a.Momentary, b.Momentary) && same(a.ShortTerm, b.ShortTerm) &&
		same(a.TruePeak, b.TruePeak) && same(a.SamplePeak, b.SamplePeak) && reflect.DeepEqual(a.ShortTermLevels, b.ShortTermLevels)
}

// oneFile submits one generated file of the given length as a batch.
func oneFile(t *testing.T, q *queue.Queue, seconds int) (string, []engine.Target) {
	t.Helper()
	dir := t.TempDir()
	p := filepath.Join(dir, "gullwing-ep9.wav")
	a := audiotest.DBFS(-23)
	if err := os.WriteFile(p, audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, float64(seconds), 997, a, a)), 0o644); err != nil {
		t.Fatal(err)
	}
	spec, err := engine.LoadSpec("ebu-r128")
	if err != nil {
		t.Fatal(err)
	}
	targets := []engine.Target{{Path: p, Root: p, Explicit: true}}
	batch := queue.NewBatch()
	if _, err := q.Submit(context.Background(), batch, targets, queue.SubmitOptions{Spec: spec, SpecRef: queue.SpecRef{Builtin: "ebu-r128"}}); err != nil {
		t.Fatal(err)
	}
	return batch, targets
}

// TestStallingWorkerKeepsItsJobByHeartbeats: a worker that takes four ack
// waits over a job but sends heartbeats keeps it (one delivery, its own
// result); one that sends none loses it to another worker after the ack
// wait, and the late result of the first is not taken twice.
func TestStallingWorkerKeepsItsJobByHeartbeats(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	const ackWait = time.Second
	stall := func(context.Context, queue.Job) { time.Sleep(4 * ackWait) }
	for _, tc := range []struct {
		prefix      string
		noHeartbeat bool
		wantWorker  string
		wantDeliv   int
	}{
		{"BEAT", false, "staller", 1},
		{"NOBEAT", true, "helper", 2},
	} {
		t.Run(tc.prefix, func(t *testing.T) {
			q := connect(t, srv.URL, tc.prefix)
			batch, _ := oneFile(t, q, 2)
			// The staller starts alone, so it takes the job.
			startWorkers(t, srv.URL, tc.prefix, 1, func(int) queue.Config {
				return queue.Config{Name: "staller", AckWait: ackWait, BeforeJudge: stall, NoHeartbeat: tc.noHeartbeat}
			})
			time.Sleep(ackWait / 2)
			startWorkers(t, srv.URL, tc.prefix, 1, func(int) queue.Config {
				return queue.Config{Name: "helper", AckWait: ackWait}
			})
			got := collect(t, q, batch, 1, 30*time.Second)[0]
			if got.Worker != tc.wantWorker || got.Deliveries != tc.wantDeliv {
				t.Errorf("judged by %s after %d deliveries, want %s after %d", got.Worker, got.Deliveries, tc.wantWorker, tc.wantDeliv)
			}
			if v := got.Record.Result.Verdict; v == "error" {
				t.Errorf("verdict %s: %s", v, got.Record.Measurement.Error)
			}
			if tc.noHeartbeat {
				// Let the staller finish and publish its late result:
				// collecting again still yields one result.
				time.Sleep(4 * ackWait)
				collect(t, q, batch, 1, 10*time.Second)
			}
		})
	}
}

// TestServerRestartMidBatch: the server (file storage) is restarted while
// two workers are judging a batch; the batch completes with every result
// once.
func TestServerRestartMidBatch(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	const prefix = "RESTART"
	q := connect(t, srv.URL, prefix)
	dir := t.TempDir()
	for i := 0; i < 12; i++ {
		a := audiotest.DBFS(-20 - float64(i))
		p := filepath.Join(dir, "saltmarsh-hour-"+string(rune('a'+i))+".wav")
		if err := os.WriteFile(p, audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 2, 997, a, a)), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	targets, err := engine.Collect([]string{dir})
	if err != nil {
		t.Fatal(err)
	}
	spec, _ := engine.LoadSpec("ebu-r128")
	batch := queue.NewBatch()
	if _, err := q.Submit(context.Background(), batch, targets, queue.SubmitOptions{Spec: spec, SpecRef: queue.SpecRef{Builtin: "ebu-r128"}}); err != nil {
		t.Fatal(err)
	}
	var judged sync.WaitGroup
	judged.Add(3)
	var once sync.Map
	startWorkers(t, srv.URL, prefix, 2, func(i int) queue.Config {
		return queue.Config{Name: name(i), AckWait: 2 * time.Second, BeforeJudge: func(_ context.Context, j queue.Job) {
			if _, dup := once.LoadOrStore(j.Index, true); !dup && j.Index < 3 {
				judged.Done()
			}
			time.Sleep(100 * time.Millisecond)
		}}
	})
	judged.Wait()
	srv.Restart(500 * time.Millisecond)
	got := collect(t, q, batch, len(targets), 60*time.Second)
	for i, tg := range targets {
		r := got[i].Record
		if r.Result == nil || r.Result.Verdict == "error" || r.Measurement.Path != tg.Path {
			t.Errorf("%s: %+v", tg.Path, r.Result)
		}
	}
}
