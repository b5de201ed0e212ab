package flac

import (
	"bytes"
	"context"
	"errors"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/loudness"
	kmeasure "github.com/kweigh/kweigh/measure"
)

// readAll decodes d to its end and returns the samples and the final
// error (nil for io.EOF).
func readAll(t *testing.T, d decode.Decoder) ([]float64, error) {
	t.Helper()
	var out []float64
	buf := make([]float64, 1000*d.Info().Channels)
	for {
		n, err := d.ReadFrames(buf)
		out = append(out, buf[:n*d.Info().Channels]...)
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return out, err
		}
	}
}

// sectionCases are streams made by Debian's flac 1.4 from synthesised
// programme (bench_test.go): with its default seek table (a point every
// 10 s), without one, small blocks of 16-bit mono, and 5.1.
var sectionCases = []struct {
	name                        string
	seconds, rate, channels, bs int
	opts                        []string
}{
	{"stereo24-seektable", 25, 48000, 2, 24, []string{"-5"}},
	{"stereo24-no-seektable", 25, 48000, 2, 24, []string{"-5", "--no-seektable"}},
	{"mono16-blocks1152", 20, 44100, 1, 16, []string{"-3", "--blocksize=1152", "--no-seektable"}},
	{"5.1-24", 12, 48000, 6, 24, []string{"-5", "--channel-map=none"}},
}

// TestSectionsMatchOnePass decodes each stream in one pass and then in
// sections cut at random samples (each section starting a pre-roll
// before its cut, like package measure's), two or three of them at a time
// on their own goroutines: every section must give exactly the one-pass
// samples of its span (lossless: no tolerance), and the sections together
// must verify the MD5. With STREAMINFO's MD5 altered, the sections must
// end in exactly the error one pass ends with.
func TestSectionsMatchOnePass(t *testing.T) {
	for _, tc := range sectionCases {
		t.Run(tc.name, func(t *testing.T) {
			data := encodeFLAC(t, programme(tc.seconds, tc.rate, tc.channels, tc.bs), tc.rate, tc.channels, tc.bs, tc.opts...)
			open := func(data []byte) *Decoder {
				d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), DefaultOptions())
				if err != nil {
					t.Fatal(err)
				}
				return d
			}
			want, err := readAll(t, open(data))
			if err != nil {
				t.Fatal(err)
			}
			ch := tc.channels
			total := int64(len(want) / ch)
			rng := rand.New(rand.NewPCG(uint64(tc.seconds), 3))
			for trial := range 3 {
				d := open(data)
				if got := d.SplitFrames(); got != total {
					t.Fatalf("SplitFrames %d, want %d", got, total)
				}
				cuts := []int64{0}
				for cuts[len(cuts)-1] < total {
					cuts = append(cuts, min(total, cuts[len(cuts)-1]+1+rng.Int64N(total/3)))
				}
				pre := int64(tc.rate) // one second, as loudness.PreRollSeconds
				var wg sync.WaitGroup
				errs := make([]error, len(cuts)-1)
				gotSec := make([][]float64, len(cuts)-1)
				workers := 2 + trial%2
				next := make(chan int, len(cuts))
				for k := range len(cuts) - 1 {
					next <- k
				}
				close(next)
				for range workers {
					wg.Add(1)
					go func() {
						defer wg.Done()
						for k := range next {
							from := max(0, cuts[k]-pre)
							s, err := d.Section(from, cuts[k+1])
							if err != nil {
								errs[k] = err
								continue
							}
							gotSec[k], errs[k] = readAllQuiet(s)
							gotSec[k] = gotSec[k][(cuts[k]-from)*int64(ch):]
						}
					}()
				}
				wg.Wait()
				for k := range gotSec {
					if errs[k] != nil {
						t.Fatalf("section %d: %v", k, errs[k])
					}
					w := want[cuts[k]*int64(ch) : cuts[k+1]*int64(ch)]
					if len(gotSec[k]) != len(w) {
						t.Fatalf("section %d (%d–%d): %d samples, want %d", k, cuts[k], cuts[k+1], len(gotSec[k]), len(w))
					}
					for i := range w {
						if gotSec[k][i] != w[i] {
							t.Fatalf("section %d (%d–%d): sample %d = %v, one pass %v", k, cuts[k], cuts[k+1], i, gotSec[k][i], w[i])
						}
					}
				}
				if err := d.CheckSections(); err != nil || !d.MD5Verified() {
					t.Fatalf("trial %d: CheckSections %v, verified %v", trial, err, d.MD5Verified())
				}
			}

			// STREAMINFO's MD5 is the last 16 of its 34 bytes, which
			// start at byte 8.
			bad := append([]byte(nil), data...)
			bad[8+18+3] ^= 0x40
			_, onePass := readAll(t, open(bad))
			var ie *decode.IntegrityError
			if !errors.As(onePass, &ie) {
				t.Fatalf("one pass of the altered stream ends in %v", onePass)
			}
			d := open(bad)
			half := total / 2
			for _, span := range [][2]int64{{half - int64(tc.rate), total}, {0, half}} {
				s, err := d.Section(span[0], span[1])
				if err != nil {
					t.Fatal(err)
				}
				if _, err := readAllQuiet(s); err != nil {
					t.Fatal(err)
				}
			}
			err = d.CheckSections()
			if err == nil || err.Error() != onePass.Error() || !errors.As(err, &ie) {
				t.Fatalf("sections of the altered stream: %v; one pass: %v", err, onePass)
			}
		})
	}
}

// readAllQuiet is readAll for goroutines (no t).
func readAllQuiet(d decode.Decoder) ([]float64, error) {
	var out []float64
	buf := make([]float64, 1000*d.Info().Channels)
	for {
		n, err := d.ReadFrames(buf)
		out = append(out, buf[:n*d.Info().Channels]...)
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return out, err
		}
		if n == 0 {
			return out, errors.New("no progress")
		}
	}
}

// TestLocateLandsNearTheTarget checks that the frame a section starts at
// holds its first sample or comes shortly before it (within the probe
// span, so little is decoded and dropped), with and without a seek table,
// and that a section of a damaged stream ends in an error instead of
// resynchronising.
func TestLocateLandsNearTheTarget(t *testing.T) {
	for _, tc := range sectionCases[:2] {
		data := encodeFLAC(t, programme(tc.seconds, tc.rate, tc.channels, tc.bs), tc.rate, tc.channels, tc.bs, tc.opts...)
		d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		if tc.name == "stereo24-seektable" && d.seekPoints == 0 {
			t.Fatal("flac wrote no seek table")
		}
		if tc.name == "stereo24-no-seektable" && d.seekPoints != 0 {
			t.Fatal("flac wrote a seek table")
		}
		for _, target := range []uint64{0, 4095, 4096, 480000, 480001, 1000003, d.si.samples - 1} {
			off, first := d.locate(target)
			if first > target {
				t.Errorf("%s: locate(%d) gives a frame starting at sample %d", tc.name, target, first)
			}
			// At most a probe span of frames before the target.
			if lag := target - first; lag > uint64(3*d.probeSpan()) {
				t.Errorf("%s: locate(%d) starts %d samples early (byte %d)", tc.name, target, lag, off)
			}
		}
		// Damage a frame in the middle: the section across it fails.
		bad := append([]byte(nil), data...)
		bad[len(bad)/2] ^= 0xFF
		d, err = NewDecoder(bytes.NewReader(bad), int64(len(bad)), DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		s, err := d.Section(0, int64(d.si.samples))
		if err != nil {
			t.Fatal(err)
		}
		var ie *decode.IntegrityError
		if _, err := readAllQuiet(s); err == nil || errors.As(err, &ie) {
			t.Errorf("%s: a section across damage ends in %v, want a plain error", tc.name, err)
		}
	}
}

// FuzzFLACSections cuts whatever stream the fuzzer makes into three
// sections (the middle one starting before the first one ends, like a
// pre-roll). Nothing may panic or loop; a section either fails with an
// error or ends with io.EOF; and when one pass decodes the stream cleanly,
// every section that succeeds must give exactly the one-pass samples of
// its span, and when all do, CheckSections must agree with one pass (nil,
// or the same MD5 report). The seed corpus is in
// testdata/fuzz/FuzzFLACSections plus the small fixtures.
func FuzzFLACSections(f *testing.F) {
	for _, name := range []string{"mono8-8k.flac", "mono16-24k.flac"} {
		f.Add(audiotest.Fixture(f, name))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		open := func() *Decoder {
			d, err := NewDecoder(bytes.NewReader(data), int64(len(data)), DefaultOptions())
			if err != nil {
				return nil
			}
			return d
		}
		d := open()
		if d == nil {
			return
		}
		total := d.SplitFrames()
		if total == 0 || total > 1<<22 {
			return
		}
		ch := int64(d.Info().Channels)
		want, onePass := readAllQuiet(open())
		var ie *decode.IntegrityError
		clean := onePass == nil || errors.As(onePass, &ie) && strings.HasPrefix(ie.Problem, "MD5 of the decoded audio")
		cuts := [][2]int64{{0, total / 3}, {max(0, total/3-10), 2 * total / 3}, {2 * total / 3, total}}
		all := true
		for _, c := range cuts {
			s, err := d.Section(c[0], c[1])
			if err != nil {
				t.Fatalf("Section(%d, %d) of %d: %v", c[0], c[1], total, err)
			}
			got, err := readAllQuiet(s)
			if err != nil {
				all = false
				continue
			}
			if int64(len(got)) != (c[1]-c[0])*ch {
				t.Fatalf("section %v: %d samples, want %d", c, len(got), (c[1]-c[0])*ch)
			}
			if clean && int64(len(want)) == total*ch {
				w := want[c[0]*ch : c[1]*ch]
				for i := range w {
					if got[i] != w[i] {
						t.Fatalf("section %v: sample %d = %v, one pass %v", c, i, got[i], w[i])
					}
				}
			}
		}
		if !all || !clean || int64(len(want)) != total*ch {
			return
		}
		err := d.CheckSections()
		if (err == nil) != (onePass == nil) || err != nil && err.Error() != onePass.Error() {
			t.Fatalf("CheckSections %v, one pass %v", err, onePass)
		}
	})
}

// TestSectionsMemoryFlat measures a 5-minute and a 25-minute stream on
// two cores through sections (package measure, MD5 checked across them).
// Its frames are tiny (a constant subframe per 4096 samples), so they
// decode far faster than the MD5 runs and the longer file reaches the
// chain's bound. It checks the design's bound twice: exactly, on the
// chain's own high-water mark of chunks (chainMemoryBound for the two
// cores and the largest section measure made, which must be within
// maxSectionBytes plus the pre-roll), and on the peak live heap sampled
// every 20 ms, whose growth from the short file to the long one must stay
// within that same bound. Bytes kept for the MD5 that grew with the
// file's length (2 B a sample, 115 MB over the 20 minutes) fail both.
func TestSectionsMemoryFlat(t *testing.T) {
	if testing.Short() {
		t.Skip("measures 30 minutes of audio")
	}
	const rate, frameBytes = 48000, 2 // constantFLAC: 48 kHz mono 16-bit
	level := func(i int) int16 { return int16(i%200*100 - 10000) }
	type use struct{ heap, chain, section uint64 }
	peak := func(minutes int) use {
		data, _ := constantFLAC(rate*60*minutes/4096, level)
		path := filepath.Join(t.TempDir(), "long.flac")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		d, err := NewDecoder(f, int64(len(data)), DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		runtime.GC()
		var most atomic.Uint64
		stop := make(chan struct{})
		done := make(chan struct{})
		go func() {
			defer close(done)
			var ms runtime.MemStats
			for {
				runtime.GC() // the live heap, not the garbage between collections
				runtime.ReadMemStats(&ms)
				if ms.HeapAlloc > most.Load() {
					most.Store(ms.HeapAlloc)
				}
				select {
				case <-stop:
					return
				case <-time.After(20 * time.Millisecond):
				}
			}
		}()
		m := kmeasure.Stream(context.Background(), path, d, kmeasure.Options{Cores: kmeasure.NewCores(2)})
		close(stop)
		<-done
		if m.Err != nil || m.Damaged != "" {
			t.Fatalf("%d min: %v %s", minutes, m.Err, m.Damaged)
		}
		if d.chain == nil || !d.MD5Verified() {
			t.Fatalf("%d min: not measured in sections with the MD5 checked", minutes)
		}
		c := d.chain
		c.mu.Lock()
		defer c.mu.Unlock()
		return use{heap: most.Load(), chain: uint64(c.chunksMost * chunkBytes), section: uint64(c.sectionMost)}
	}
	short, long := peak(5), peak(25)
	// measure's sections: at most MaxSectionFrames, plus the pre-roll
	// before each (measure/split.go).
	largest := uint64(maxSectionBytes + loudness.PreRollSeconds*rate*frameBytes)
	bound := uint64(chainMemoryBound(2, int(long.section)))
	t.Logf("5 min: heap %d B, chain %d B; 25 min: heap %d B, chain %d B; bound %d B (sections of up to %d B)",
		short.heap, short.chain, long.heap, long.chain, bound, long.section)
	for _, u := range []use{short, long} {
		if u.section > largest {
			t.Errorf("a section of %d MD5 bytes, more than the %d B of maxSectionBytes and its pre-roll", u.section, largest)
		}
		if b := uint64(chainMemoryBound(2, int(u.section))); u.chain > b {
			t.Errorf("the MD5 chain held %d B of chunks, more than its bound of %d B", u.chain, b)
		}
	}
	if long.heap > short.heap+bound {
		t.Errorf("peak heap grew from %d B (5 min) to %d B (25 min), more than the %d B bound", short.heap, long.heap, bound)
	}
}

// TestChainHashesAfterWaiting is the hand-over the chain must not miss: a
// section waits for the hash (busy, chunks in use at maxHeldBytes), and
// while it waits the hash goes idle having reached the section's bytes.
// The section must then see them hashed (by itself or by drain), not
// leave them waiting with nobody hashing, where every later section's
// bytes would pile up behind them.
func TestChainHashesAfterWaiting(t *testing.T) {
	const frameBytes = 2
	c := newMD5Chain(frameBytes)
	// Earlier sections own the chain: it is busy and full, the hash at 0.
	c.mu.Lock()
	c.busy = true
	c.inUse = maxHeldBytes / chunkBytes
	c.mu.Unlock()

	var p md5Part
	data := make([]byte, 4096*frameBytes)
	fed := make(chan struct{})
	go func() {
		defer close(fed)
		c.feed(&p, 1000, data) // samples 1000–5095, past the hash
	}()
	// Wait (on the chain's own count, not on time) until the section is
	// waiting in feed.
	deadline := time.Now().Add(time.Minute)
	for {
		c.mu.Lock()
		w := c.waits
		c.mu.Unlock()
		if w > 0 {
			break
		}
		if time.Now().After(deadline) {
			t.Fatal("the section never waited for the hash")
		}
		runtime.Gosched()
	}
	// The earlier sections' hashing ends past sample 1000 and frees its
	// chunks, as drain does.
	c.mu.Lock()
	c.next, c.inUse, c.busy = 2000, 0, false
	c.cond.Broadcast()
	c.mu.Unlock()
	select {
	case <-fed:
	case <-time.After(time.Minute):
		t.Fatal("feed did not return once the hash went idle")
	}
	c.mu.Lock()
	c.wait()
	defer c.mu.Unlock()
	if len(c.waiting) != 0 || c.next != 5096 {
		t.Fatalf("after the wait: %d parts left waiting, hash at sample %d, want none and 5096", len(c.waiting), c.next)
	}
}
