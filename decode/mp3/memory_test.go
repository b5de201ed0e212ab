package mp3

import (
	"bytes"
	"io"
	"path/filepath"
	"runtime"
	"testing"
)

// TestMemoryFlat: a 2-hour MP3 holds no more live heap while it is decoded
// than a 1-minute one, beyond its sparse frame index (80 KB for two hours).
// The streams are copies of one 10 s lame encoding (-t: no Info frame, so
// the concatenation is one valid stream, ISO/IEC 11172-3 §2.4.2.3: audio is
// a sequence of self-contained frame headers, and lame's first frame does
// not reach back into a reservoir); each is opened (New walks every frame
// header and builds the index) and decoded for its first minute.
func TestMemoryFlat(t *testing.T) {
	if testing.Short() {
		t.Skip("walks two hours of MP3")
	}
	src := filepath.Join(t.TempDir(), "tone.wav")
	writeWAV16(t, src, 48000, 2, twoLevelSignal(10))
	unit := lameEncode(t, src, "tone.mp3", "-t", "-b", "64")
	live := func(copies int) uint64 {
		data := bytes.Repeat(unit, copies)
		var ms runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&ms)
		before := ms.HeapAlloc
		d, err := New(bytes.NewReader(data), int64(len(data)))
		if err != nil {
			t.Fatal(err)
		}
		if got := d.SplitFrames(); got <= 0 {
			t.Fatalf("%d copies: %d splittable frames (the index was not built)", copies, got)
		}
		buf := make([]float64, 4096)
		var most uint64
		for read := 0; read < 48000*60; {
			n, err := d.ReadFrames(buf)
			read += n
			if read/4096%100 == 0 {
				runtime.GC()
				runtime.ReadMemStats(&ms)
				most = max(most, ms.HeapAlloc-before)
			}
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
		}
		runtime.GC()
		runtime.ReadMemStats(&ms)
		most = max(most, ms.HeapAlloc-before)
		runtime.KeepAlive(d)
		runtime.KeepAlive(data)
		return most
	}
	short, long := live(6), live(720)
	t.Logf("live heap beyond the input: 1 min %d B, 2 h %d B", short, long)
	if long > short+128<<10 {
		t.Errorf("live heap grew from %d B (1 min) to %d B (2 h)", short, long)
	}
}
