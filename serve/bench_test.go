package serve

import (
	"context"
	"io"
	"log/slog"
	"net"
	"net/http"
	"os"
	"runtime"
	"slices"
	"sync"
	"testing"
	"time"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// benchServe uploads a WAV of the given length b.N times, from as many
// clients at once as the server has workers, to a real server on
// loopback, and reports checks per second and the p50 and p99 latency of
// an upload (sending, queueing, measuring, answering). The peer, in the
// same run, is the engine judging the same file from disk on as many
// goroutines (no HTTP, no copy): x-direct is the served rate over the
// direct one.
func benchServe(b *testing.B, seconds float64) {
	dir := b.TempDir()
	path := tone{seconds: seconds, dBFS: -23}.file(b, dir, "programme.wav")
	st, _ := os.Stat(path)
	jobs := runtime.GOMAXPROCS(0)
	srv, err := New(Config{Catalogue: catalogue(b), Jobs: jobs, Queue: 4 * jobs, TempDir: dir,
		Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		b.Fatal(err)
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		b.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- srv.Serve(ctx, ln) }()
	defer func() { cancel(); <-done }()
	url := "http://" + ln.Addr().String() + "/v1/checks?name=programme.wav"
	client := &http.Client{Transport: &http.Transport{MaxIdleConnsPerHost: jobs}}

	upload := func() time.Duration {
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		defer f.Close()
		start := time.Now()
		req, _ := http.NewRequest("POST", url, f)
		req.ContentLength = st.Size()
		resp, err := client.Do(req)
		if err != nil {
			b.Fatal(err)
		}
		io.Copy(io.Discard, resp.Body)
		resp.Body.Close()
		if resp.StatusCode != 200 || resp.Header.Get(HeaderVerdict) != "pass" {
			b.Fatalf("upload: %d %q", resp.StatusCode, resp.Header.Get(HeaderVerdict))
		}
		return time.Since(start)
	}
	parallel := func(n int, work func() time.Duration) ([]time.Duration, time.Duration) {
		lat := make([]time.Duration, n)
		next := make(chan int)
		var wg sync.WaitGroup
		start := time.Now()
		for range jobs {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for i := range next {
					lat[i] = work()
				}
			}()
		}
		for i := range n {
			next <- i
		}
		close(next)
		wg.Wait()
		return lat, time.Since(start)
	}

	upload() // warm the connection pool and the page cache
	b.ResetTimer()
	lat, took := parallel(b.N, upload)
	b.StopTimer()

	spec, _ := rules.Lookup("ebu-r128")
	_, direct := parallel(b.N, func() time.Duration {
		start := time.Now()
		rec := engine.Judge(context.Background(), path, engine.Options{Spec: spec, Measure: measure.Options{KeepSeries: true}})
		if rec.Result.Verdict != rules.Pass {
			b.Fatalf("direct: %s", rec.Result.Verdict)
		}
		return time.Since(start)
	})

	slices.Sort(lat)
	pct := func(p float64) float64 {
		i := min(len(lat)-1, int(p*float64(len(lat))))
		return float64(lat[i].Microseconds()) / 1000
	}
	served := float64(b.N) / took.Seconds()
	b.ReportMetric(served, "checks/s")
	b.ReportMetric(pct(0.50), "p50-ms")
	b.ReportMetric(pct(0.99), "p99-ms")
	b.ReportMetric(served/(float64(b.N)/direct.Seconds()), "x-direct")
	b.ReportMetric(float64(b.N)*seconds/took.Seconds(), "audio-s/s")
}

// BenchmarkServe10s: 10-second 48 kHz stereo 16-bit WAVs (1.9 MB).
func BenchmarkServe10s(b *testing.B) { benchServe(b, 10) }

// BenchmarkServe10min: 10-minute 48 kHz stereo 16-bit WAVs (115 MB). Keep
// the count small: -benchtime 4x.
func BenchmarkServe10min(b *testing.B) { benchServe(b, 600) }
