package watch

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"io"
	"log/slog"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/kweigh/kweigh/rules"
)

// Test signals. EBU Tech 3341 (v4, 2023) table 1, case 1: a 1 kHz sine at
// -23.0 dBFS in both channels of a stereo file reads -23.0 ±0.1 LUFS, the
// EBU R 128 target, so it passes ebu-r128; at -10 dBFS it reads -10 LUFS
// and fails.
const (
	passDBFS = -23.0
	failDBFS = -10.0
	testRate = 48000
)

// wavBytes is a 16-bit stereo PCM WAV of a 1 kHz sine at level dBFS, the
// right channel a quarter period behind the left: BS.1770 sums the channel
// powers, so the loudness is that of Tech 3341's case, but the channels
// differ (identical ones would be judged dual mono).
func wavBytes(seconds, dbfs float64) []byte {
	frames := int(seconds * testRate)
	amp := math.Pow(10, dbfs/20) * 32767
	var b bytes.Buffer
	data := frames * 4
	b.WriteString("RIFF")
	binary.Write(&b, binary.LittleEndian, uint32(36+data))
	b.WriteString("WAVEfmt ")
	for _, v := range []any{uint32(16), uint16(1), uint16(2), uint32(testRate), uint32(testRate * 4), uint16(4), uint16(16)} {
		binary.Write(&b, binary.LittleEndian, v)
	}
	b.WriteString("data")
	binary.Write(&b, binary.LittleEndian, uint32(data))
	for i := 0; i < frames; i++ {
		ph := 2 * math.Pi * 1000 * float64(i) / testRate
		l := int16(math.Round(amp * math.Sin(ph)))
		r := int16(math.Round(amp * math.Cos(ph)))
		binary.Write(&b, binary.LittleEndian, [2]int16{l, r})
	}
	return b.Bytes()
}

func writeWAV(t testing.TB, path string, seconds, dbfs float64) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, wavBytes(seconds, dbfs), 0o644); err != nil {
		t.Fatal(err)
	}
}

// testJudge is the check judge against ebu-r128 for every file.
func testJudge(t testing.TB) JudgeFunc {
	spec, err := rules.Lookup("ebu-r128")
	if err != nil {
		t.Fatal(err)
	}
	return CheckJudge(JudgeOptions{Spec: spec, Version: "test", Caution: "test signals: keep monitoring levels down"})
}

// lines is a concurrency-safe writer that collects output lines.
type lines struct {
	mu  sync.Mutex
	buf bytes.Buffer
}

func (l *lines) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.buf.Write(p)
}

// records parses the JSON lines written so far.
func (l *lines) records(t testing.TB) []map[string]any {
	l.mu.Lock()
	defer l.mu.Unlock()
	var out []map[string]any
	for _, line := range strings.Split(strings.TrimSpace(l.buf.String()), "\n") {
		if line == "" {
			continue
		}
		var m map[string]any
		if err := json.Unmarshal([]byte(line), &m); err != nil {
			t.Fatalf("output line %q: %v", line, err)
		}
		out = append(out, m)
	}
	return out
}

// byPath indexes records by their path below root.
func byPath(t testing.TB, recs []map[string]any, root string) map[string][]map[string]any {
	out := map[string][]map[string]any{}
	for _, r := range recs {
		p, _ := r["path"].(string)
		rel, err := filepath.Rel(root, p)
		if err != nil {
			t.Fatal(err)
		}
		out[filepath.ToSlash(rel)] = append(out[filepath.ToSlash(rel)], r)
	}
	return out
}

// waitFor polls cond until it holds or the deadline passes.
func waitFor(t testing.TB, what string, limit time.Duration, cond func() bool) {
	t.Helper()
	deadline := time.Now().Add(limit)
	for !cond() {
		if time.Now().After(deadline) {
			t.Fatalf("timed out after %v waiting for %s", limit, what)
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// running is a watcher started in the background.
type running struct {
	cancel context.CancelFunc
	done   chan struct{}
	sum    Summary
	err    error
}

func start(t testing.TB, o Options) *running {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	r := &running{cancel: cancel, done: make(chan struct{})}
	go func() {
		defer close(r.done)
		r.sum, r.err = Run(ctx, o)
	}()
	t.Cleanup(func() { r.stop(t) })
	return r
}

func (r *running) stop(t testing.TB) Summary {
	t.Helper()
	r.cancel()
	select {
	case <-r.done:
	case <-time.After(20 * time.Second):
		t.Fatal("watcher did not stop within 20 s of cancellation")
	}
	if r.err != nil {
		t.Fatalf("watcher: %v", r.err)
	}
	return r.sum
}

// ledgerRows reads every row of the ledger in state.
func ledgerRows(t testing.TB, state string) []Entry {
	t.Helper()
	l, err := OpenLedgerReader(state)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	rows, err := l.Since(context.Background(), time.Time{})
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

// filesUnder lists the regular files below dir (slash-separated, relative),
// hidden ones included.
func filesUnder(t testing.TB, dir string) []string {
	t.Helper()
	var out []string
	filepath.Walk(dir, func(p string, info os.FileInfo, err error) error {
		if err == nil && info.Mode().IsRegular() {
			rel, _ := filepath.Rel(dir, p)
			out = append(out, filepath.ToSlash(rel))
		}
		return nil
	})
	return out
}

// newTextLogger logs as the command line does, into w.
func newTextLogger(w io.Writer) *slog.Logger { return slog.New(slog.NewTextHandler(w, nil)) }
