package watch

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// benchFiles is the size of the benchmark delivery: 1000 short files
// (0.5 s, 48 kHz stereo 16-bit, 96 KB each) in ten folders.
const benchFiles = 1000

// benchTemplate writes the delivery once; each iteration hard-links it into
// a fresh inbox.
func benchTemplate(b *testing.B) string {
	b.Helper()
	dir := b.TempDir()
	data := wavBytes(0.5, passDBFS)
	for i := 0; i < benchFiles; i++ {
		p := filepath.Join(dir, fmt.Sprintf("show%02d", i%10), fmt.Sprintf("ep%04d.wav", i))
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			b.Fatal(err)
		}
	}
	return dir
}

func linkTree(b *testing.B, from, to string) []string {
	b.Helper()
	var paths []string
	filepath.Walk(from, func(p string, info os.FileInfo, err error) error {
		if err != nil || info.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(from, p)
		dst := filepath.Join(to, rel)
		os.MkdirAll(filepath.Dir(dst), 0o755)
		if err := os.Link(p, dst); err != nil {
			b.Fatal(err)
		}
		paths = append(paths, dst)
		return nil
	})
	return paths
}

// BenchmarkOnce1000 is `kweigh watch --once` over 1000 short files: scan,
// settle, fingerprint, judge, report pair, move to passed/, each step
// committed to the ledger. Its peer, BenchmarkJudge1000, judges the same
// files with the same judge and workers and nothing else; the ratio of the
// two is what the hot folder's bookkeeping costs.
func BenchmarkOnce1000(b *testing.B) {
	tmpl := benchTemplate(b)
	judge := testJudge(b)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		root := b.TempDir()
		inbox := filepath.Join(root, "inbox")
		linkTree(b, tmpl, inbox)
		b.StartTimer()
		sum, err := Run(context.Background(), Options{
			Inboxes: []string{inbox}, Passed: filepath.Join(root, "passed"), Failed: filepath.Join(root, "failed"),
			Settle: 10 * time.Millisecond, Once: true, Judge: judge, Jobs: runtime.GOMAXPROCS(0),
		})
		if err != nil || sum.Files != benchFiles || sum.Passed != benchFiles {
			b.Fatalf("run: %+v, %v", sum, err)
		}
	}
	b.ReportMetric(float64(benchFiles*b.N)/b.Elapsed().Seconds(), "files/s")
}

// BenchmarkJudge1000 is the peer of BenchmarkOnce1000: the judge alone
// (measure, evaluate, render the record and the HTML page) on the same
// files with the same number of workers.
func BenchmarkJudge1000(b *testing.B) {
	tmpl := benchTemplate(b)
	judge := testJudge(b)
	var paths []string
	filepath.Walk(tmpl, func(p string, info os.FileInfo, err error) error {
		if err == nil && !info.IsDir() {
			paths = append(paths, p)
		}
		return err
	})
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		next := make(chan string)
		var wg sync.WaitGroup
		for w := 0; w < runtime.GOMAXPROCS(0); w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for p := range next {
					if j, err := judge(context.Background(), p, tmpl); err != nil || j.Verdict != "pass" {
						b.Errorf("%s: %s %v", p, j.Verdict, err)
					}
				}
			}()
		}
		for _, p := range paths {
			next <- p
		}
		close(next)
		wg.Wait()
	}
	b.ReportMetric(float64(benchFiles*b.N)/b.Elapsed().Seconds(), "files/s")
}

// BenchmarkIdle is the watcher at rest over an inbox whose 1000 files are
// all judged (they stay in place): file-system events on, the default 60 s
// rescan, and one polling watcher rescanning every 5 s. It reports the CPU
// the process used per second of wall time and the memory in use.
func BenchmarkIdle(b *testing.B) {
	for _, mode := range []string{"events", "poll5s"} {
		b.Run(mode, func(b *testing.B) {
			tmpl := benchTemplate(b)
			inbox := filepath.Join(b.TempDir(), "inbox")
			linkTree(b, tmpl, inbox)
			judge := testJudge(b)
			// Judge everything first.
			if _, err := Run(context.Background(), Options{Inboxes: []string{inbox}, Settle: 10 * time.Millisecond, Once: true, Judge: judge}); err != nil {
				b.Fatal(err)
			}
			o := Options{Inboxes: []string{inbox}, Settle: 5 * time.Second, Judge: judge}
			if mode == "poll5s" {
				o.Poll = 5 * time.Second
			}
			ctx, cancel := context.WithCancel(context.Background())
			done := make(chan error, 1)
			go func() { _, err := Run(ctx, o); done <- err }()
			time.Sleep(2 * time.Second) // the first scan and settling down
			runtime.GC()
			const window = 10 * time.Second
			b.ResetTimer()
			var cpu time.Duration
			for i := 0; i < b.N; i++ {
				c0 := audiotest.ProcessCPU()
				time.Sleep(window)
				cpu += audiotest.ProcessCPU() - c0
			}
			b.StopTimer()
			var ms runtime.MemStats
			runtime.ReadMemStats(&ms)
			cancel()
			if err := <-done; err != nil {
				b.Fatal(err)
			}
			b.ReportMetric(float64(cpu.Microseconds())/1000/(float64(b.N)*window.Seconds()), "cpu-ms/s")
			b.ReportMetric(float64(ms.HeapInuse)/(1<<20), "heap-MB")
			b.ReportMetric(rssMB(), "rss-MB")
		})
	}
}

// rssMB is the process's resident set from /proc (0 where there is none).
func rssMB() float64 {
	data, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	for _, line := range strings.Split(string(data), "\n") {
		if f := strings.Fields(line); len(f) >= 2 && f[0] == "VmRSS:" {
			kb, _ := strconv.ParseFloat(f[1], 64)
			return kb / 1024
		}
	}
	return 0
}
