package engine_test

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/rules"
)

// demoDir is the bundled demo delivery folder (made by testdata/make-demo.go).
var demoDir = filepath.Join("..", "testdata", "demo")

// writeFile writes data under dir, making folders on the way.
func writeFile(t *testing.T, dir, rel string, data []byte) string {
	t.Helper()
	path := filepath.Join(dir, rel)
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// lineUp is 2 s of a -23 dBFS 997 Hz stereo tone, 16-bit.
func lineUp() []byte {
	a := audiotest.DBFS(-23)
	return audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 2, 997, a, a))
}

func spec(name string) []byte {
	return []byte("name = \"" + name + "\"\nextends = \"ebu-r128\"\n")
}

// TestFindSpec: the nearest kweigh.toml from the file's folder upwards
// wins; "root = true" alone is a boundary; broken and non-regular spec files
// are errors naming the file, at once.
func TestFindSpec(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, dir, "kweigh.toml", spec("top"))
	writeFile(t, dir, "outlet/kweigh.toml", spec("outlet"))
	writeFile(t, dir, "outlet/week1/x.wav", nil)
	writeFile(t, dir, "outlet/week2/kweigh.toml", spec("week2"))
	writeFile(t, dir, "outlet/week2/y.wav", nil)
	writeFile(t, dir, "fenced/kweigh.toml", []byte("root = true\n"))
	writeFile(t, dir, "fenced/z.wav", nil)
	writeFile(t, dir, "fenced/inner/kweigh.toml", spec("inner"))
	writeFile(t, dir, "fenced/inner/w.wav", nil)
	writeFile(t, dir, "rooted/kweigh.toml", []byte("name = \"rooted\"\nroot = true\nextends = \"podcast\"\n"))
	writeFile(t, dir, "rooted/v.wav", nil)
	writeFile(t, dir, "broken/kweigh.toml", []byte("name = \"broken\"\n[loudness]\nmax_truepeak_dbtp = -2\n"))
	writeFile(t, dir, "broken/u.wav", nil)
	writeFile(t, dir, "big/kweigh.toml", make([]byte, engine.MaxSpecFileBytes+1))
	writeFile(t, dir, "big/s.wav", nil)
	if err := os.MkdirAll(filepath.Join(dir, "fifo"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := syscall.Mkfifo(filepath.Join(dir, "fifo", "kweigh.toml"), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		file     string
		spec     string // "" for none
		errWords string // in the error, "" for none
	}{
		{"outlet/week1/x.wav", "outlet", ""},
		{"outlet/week2/y.wav", "week2", ""},
		{"fenced/z.wav", "", "no spec"},
		{"fenced/inner/w.wav", "inner", ""},
		{"rooted/v.wav", "rooted", ""},
		{"broken/u.wav", "", "max_truepeak_dbtp"},
		{"big/s.wav", "", "larger than 1024 KiB"},
		{"fifo/t.wav", "", "not a regular file"},
		{"loose.wav", "top", ""},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			for _, find := range []func(string) (*specT, string, error){findPlain, engine.NewSpecs().Find} {
				done := make(chan struct{})
				var s *specT
				var err error
				go func() {
					defer close(done)
					s, _, err = find(filepath.Join(dir, tc.file))
				}()
				select {
				case <-done:
				case <-time.After(5 * time.Second):
					t.Fatal("spec search blocked")
				}
				got := ""
				if s != nil {
					got = s.ID
				}
				if got != tc.spec {
					t.Errorf("spec %q, want %q (err %v)", got, tc.spec, err)
				}
				if tc.errWords == "" && err != nil || tc.errWords != "" && (err == nil || !strings.Contains(err.Error(), tc.errWords)) {
					t.Errorf("error %v, want one saying %q", err, tc.errWords)
				}
			}
		})
	}
}

// TestFindSpecRelativeDot: "." and relative paths search the folders
// above the working folder too.
func TestFindSpecRelativeDot(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, dir, "kweigh.toml", spec("outlet"))
	writeFile(t, dir, "show/ep1.wav", nil)
	t.Chdir(filepath.Join(dir, "show"))
	for _, p := range []string{"ep1.wav", "./ep1.wav", "."} {
		s, file, err := engine.FindSpec(p)
		if err != nil || s.ID != "outlet" || file != filepath.Join(dir, "kweigh.toml") {
			t.Errorf("%s: spec %v from %q, err %v; want outlet", p, s, file, err)
		}
	}
}

// TestConcurrentJudgementsOwnOptions runs judgements with different
// decoder and layout options at the same time (run with -race): each must
// see its own options only.
func TestConcurrentJudgementsOwnOptions(t *testing.T) {
	flac := filepath.Join(demoDir, "quillbrook-stream", "quayside-sessions-ep03.flac")
	mono := writeFile(t, t.TempDir(), "mono.wav", audiotest.PCMWAV(48000, 1, 16, audiotest.Sine(48000, 1, 997, 0.1)))
	var wg sync.WaitGroup
	for i := 0; i < 2; i++ {
		skip := i%2 == 0
		wg.Add(2)
		go func() {
			defer wg.Done()
			opt := engine.Options{MeasureOnly: true}
			opt.Measure.Decode.SkipMD5 = skip
			rec := engine.Judge(context.Background(), flac, opt)
			noted := strings.Contains(strings.Join(rec.Measurement.Notes, " "), "MD5 verification turned off")
			if noted != skip || rec.Measurement.Error != "" {
				t.Errorf("SkipMD5 %v: note present %v, error %q", skip, noted, rec.Measurement.Error)
			}
		}()
		go func() {
			defer wg.Done()
			opt := engine.Options{MeasureOnly: true}
			want := "M"
			if skip {
				opt.Measure.Layout = []string{"C"}
				want = "C"
			}
			rec := engine.Judge(context.Background(), mono, opt)
			if got := rec.Measurement.ChannelLayout; len(got) != 1 || got[0] != want {
				t.Errorf("layout %v, want [%s]", got, want)
			}
		}()
	}
	wg.Wait()
}

// TestRunOrderAndCancel: ordered emission follows the targets whatever the
// finishing order; as-finished emission gets every record once; after a
// cancel no new target starts.
func TestRunOrderAndCancel(t *testing.T) {
	targets := make([]engine.Target, 20)
	for i := range targets {
		targets[i].Path = string(rune('a' + i))
	}
	slowFirst := func(_ context.Context, tg engine.Target) engine.Record {
		// Earlier targets take longer, so they finish last.
		time.Sleep(time.Duration(20-int(tg.Path[0]-'a')) * time.Millisecond)
		return engine.Record{Target: tg}
	}
	var got []int
	engine.Run(context.Background(), targets, 4, slowFirst, func(i int, r engine.Record) {
		if r.Target.Path != targets[i].Path {
			t.Errorf("record %d carries target %s", i, r.Target.Path)
		}
		got = append(got, i)
	}, true)
	for i, g := range got {
		if g != i {
			t.Fatalf("ordered emission %v", got)
		}
	}
	if len(got) != len(targets) {
		t.Fatalf("%d emitted, want %d", len(got), len(targets))
	}

	// The first target waits until another one has finished, so it cannot
	// be emitted first however the machine schedules the goroutines.
	otherDone := make(chan struct{})
	var once sync.Once
	firstWaits := func(ctx context.Context, tg engine.Target) engine.Record {
		if tg.Path == targets[0].Path {
			<-otherDone
		} else {
			defer once.Do(func() { close(otherDone) })
		}
		return engine.Record{Target: tg}
	}
	seen := map[int]int{}
	var order []int
	engine.Run(context.Background(), targets, 4, firstWaits, func(i int, _ engine.Record) {
		seen[i]++
		order = append(order, i)
	}, false)
	if len(seen) != len(targets) || order[0] == 0 {
		t.Errorf("as-finished emission %v: want every target once, the slow first one not first", order)
	}

	ctx, cancel := context.WithCancel(context.Background())
	started := 0
	var mu sync.Mutex
	n := 0
	engine.Run(ctx, targets, 2, func(ctx context.Context, tg engine.Target) engine.Record {
		mu.Lock()
		started++
		if started == 3 {
			cancel()
		}
		mu.Unlock()
		return engine.Record{Target: tg}
	}, func(int, engine.Record) { n++ }, true)
	if n < 3 || n > 4 {
		t.Errorf("%d records after cancelling at the third of %d with 2 workers, want 3 or 4", n, len(targets))
	}
}

// TestJudgeCancelled: a cancelled judgement stops and says so.
func TestJudgeCancelled(t *testing.T) {
	file := writeFile(t, t.TempDir(), "long.wav", audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 60, 997, 0.1, 0.1)))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	rec := engine.Judge(ctx, file, engine.Options{Spec: mustSpec(t, "ebu-r128")})
	if !rec.Interrupted() || !errors.Is(rec.Measurement.Err, context.Canceled) {
		t.Errorf("cancelled judgement: interrupted %v, err %v", rec.Interrupted(), rec.Measurement.Err)
	}
}

// TestJudgeNoSpecAndBrokenSpec: every problem is in the record.
func TestJudgeNoSpecAndBrokenSpec(t *testing.T) {
	dir := t.TempDir()
	fileA := writeFile(t, dir, "a/take.wav", lineUp())
	writeFile(t, dir, "a/kweigh.toml", []byte("root = true\n"))
	fileB := writeFile(t, dir, "b/take.wav", lineUp())
	writeFile(t, dir, "b/kweigh.toml", []byte("extends = 12\n"))
	for _, tc := range []struct{ file, words string }{{fileA, "no spec"}, {fileB, "extends"}} {
		rec := engine.Judge(context.Background(), tc.file, engine.Options{})
		if rec.Result == nil || rec.Verdict() != "error" || !strings.Contains(rec.Measurement.Error, tc.words) {
			t.Errorf("%s: verdict %v, error %q; want an error saying %q", tc.file, rec.Verdict(), rec.Measurement.Error, tc.words)
		}
		if rec.Passed(false) {
			t.Errorf("%s: an error record must not pass", tc.file)
		}
	}
}

// TestLoadSpecRefusesFIFO: --spec naming a FIFO fails at once.
func TestLoadSpecRefusesFIFO(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "house.toml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	done := make(chan error)
	go func() { _, err := engine.LoadSpec(fifo); done <- err }()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "not a regular file") {
			t.Errorf("LoadSpec(FIFO) = %v, want not a regular file", err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("LoadSpec blocked on a FIFO")
	}
	if s, err := engine.LoadSpec("podcast"); err != nil || s.ID != "podcast" {
		t.Errorf("LoadSpec(podcast) = %v, %v", s, err)
	}
}

type specT = rules.Spec

func findPlain(p string) (*specT, string, error) { return engine.FindSpec(p) }

func mustSpec(t *testing.T, name string) *specT {
	t.Helper()
	s, err := engine.LoadSpec(name)
	if err != nil {
		t.Fatal(err)
	}
	return s
}
