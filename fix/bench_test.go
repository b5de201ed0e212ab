package fix

import (
	"context"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// BenchmarkFix48kStereo24 times the whole fix of a 20 s 48 kHz stereo
// 24-bit WAV that needs gain and about 3 dB of true-peak limiting (podcast
// spec): the first measurement, the passes, the write and the measurements
// of the output. README "kweigh fix" quotes it.
func BenchmarkFix48kStereo24(b *testing.B) {
	const secs = 20
	dir := b.TempDir()
	x := programme(b, 21, secs, 2, 48000, -23, -5)
	in := writeWAV(b, dir, "bench.wav", wavSpec{rate: 48000, ch: 2, bits: 24}, x)
	o := options(spec(b, "podcast"))
	o.Force = true
	r := File(context.Background(), in, o)
	if r.Action != GainAndLimiting {
		b.Fatalf("action %s: %s", r.Action, r.Reason)
	}
	b.Logf("gain %.2f dB, limiting %.2f dB, %d passes", *r.GainDB, *r.LimitingDB, r.Passes)
	rt := audiotest.StartRealtime(b)
	for range b.N {
		if r := File(context.Background(), in, o); r.Action != GainAndLimiting {
			b.Fatal(r.Reason)
		}
	}
	rt.Report(secs)
}
