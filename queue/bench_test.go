package queue_test

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/internal/natstest"
	"github.com/kweigh/kweigh/queue"
)

// BenchmarkBatch200 submits 200 short files (5 s of 48 kHz stereo 16-bit
// each, so 16.7 minutes of audio) and waits for every result, on one and on
// two local worker processes (the real binary, built first) of one job
// each, against a server embedded in the benchmark's process. Each operation is one whole batch, uploads included (the
// audio is already in the store from the second operation on, as for a
// batch submitted again). The figure that matters is the ratio of the two.
func BenchmarkBatch200(b *testing.B) {
	dir := b.TempDir()
	for i := 0; i < 200; i++ {
		a := audiotest.DBFS(-18 - float64(i%10))
		p := filepath.Join(dir, fmt.Sprintf("shingle-bank-%03d.wav", i))
		if err := os.WriteFile(p, audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 5, 997, a, a)), 0o644); err != nil {
			b.Fatal(err)
		}
	}
	targets, err := engine.Collect([]string{dir})
	if err != nil {
		b.Fatal(err)
	}
	spec, _ := engine.LoadSpec("ebu-r128")
	opt := queue.SubmitOptions{Spec: spec, SpecRef: queue.SpecRef{Builtin: "ebu-r128"}}
	srv := natstest.Start(b, b.TempDir())
	bin := filepath.Join(b.TempDir(), "kweigh")
	if out, err := exec.Command("go", "build", "-o", bin, "../cmd/kweigh").CombinedOutput(); err != nil {
		b.Fatalf("go build: %v\n%s", err, out)
	}
	for _, workers := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", workers), func(b *testing.B) {
			prefix := fmt.Sprintf("BENCH%d", workers)
			q := connect(b, srv.URL, prefix)
			ctx, cancel := context.WithCancel(context.Background())
			var procs []*exec.Cmd
			defer func() {
				cancel()
				for _, w := range procs {
					w.Wait()
				}
			}()
			// The workers are real kweigh worker processes, as in use:
			// in this process they would share its Go scheduler with the
			// server and the submitter.
			for i := 0; i < workers; i++ {
				w := exec.CommandContext(ctx, bin, "worker", "--nats", srv.URL, "--queue-prefix", prefix, "--jobs", "1", "--name", fmt.Sprintf("bench-%d", i))
				w.Stderr = benchLog
				if err := w.Start(); err != nil {
					b.Fatal(err)
				}
				procs = append(procs, w)
			}
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				batch := queue.NewBatch()
				if _, err := q.Submit(context.Background(), batch, targets, opt); err != nil {
					b.Fatal(err)
				}
				wctx, wcancel := context.WithTimeout(context.Background(), 5*time.Minute)
				n := 0
				err := q.Wait(wctx, batch, len(targets), func(queue.Result) { n++ })
				wcancel()
				if err != nil || n != len(targets) {
					b.Fatalf("%d of %d results: %v", n, len(targets), err)
				}
			}
			b.ReportMetric(float64(len(targets))*float64(b.N)/b.Elapsed().Seconds(), "files/s")
		})
	}
}

// benchLog shows a worker's problems (not its per-job lines) during a
// benchmark.
var benchLog = problemsOnly{}

type problemsOnly struct{}

func (problemsOnly) Write(p []byte) (int, error) {
	if bytes.Contains(p, []byte("fetching")) || bytes.Contains(p, []byte("not published")) {
		os.Stderr.Write(p)
	}
	return len(p), nil
}
