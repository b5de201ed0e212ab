package fix

import (
	"context"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/measure"
)

// BenchmarkFix48kStereo24 times the whole fix of a 20 s 48 kHz stereo
// 24-bit WAV that needs gain and about 5 dB of true-peak limiting (podcast
// spec): the first measurement, the passes, the write and the measurement
// of the output ("fix"), beside its peer in the same run, one measurement
// of the same file ("measure"). README "kweigh fix" quotes both.
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
	b.Run("measure", func(b *testing.B) {
		rt := audiotest.StartRealtime(b)
		for range b.N {
			if m := measure.File(context.Background(), in, o.Measure); m.Error != "" {
				b.Fatal(m.Error)
			}
		}
		rt.Report(secs)
	})
	b.Run("fix", func(b *testing.B) {
		rt := audiotest.StartRealtime(b)
		for range b.N {
			if r := File(context.Background(), in, o); r.Action != GainAndLimiting {
				b.Fatal(r.Reason)
			}
		}
		rt.Report(secs)
	})
}
