package loudness

import (
	"fmt"
	"math"
	"testing"
)

// TestStreamTruePeakOnlySameResult checks that a meter told only the
// stream's highest true peak is wanted (StreamTruePeakOnly) reports the
// very same per-channel true peaks, maximum true peak and sample peaks as
// one that searches every block, on every kernel set, at 4× (48 kHz) and
// 2× (96 kHz): on programme whose loudest passage comes first (the case
// where the stream floor lets the search skip the most), last, and in
// the middle, in one pass and in two sections joined; and that it did
// skip: its true-peak series is the running maximum.
func TestStreamTruePeakOnlySameResult(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, rate := range []int{48000, 96000} {
			for _, shape := range []string{"loud-first", "loud-last", "loud-middle"} {
				t.Run(fmt.Sprintf("%d/%s", rate, shape), func(t *testing.T) {
					n := 4 * rate // 4 s
					l, r := musicLike(31, n, rate), musicLike(32, n, rate)
					for i := range n {
						var g float64
						switch shape {
						case "loud-first":
							g = 1 - 0.9*float64(i)/float64(n)
						case "loud-last":
							g = 0.1 + 0.9*float64(i)/float64(n)
						default:
							g = 1 - 0.9*math.Abs(2*float64(i)/float64(n)-1)
						}
						l[i] *= g
						r[i] *= 0.8 * g
					}
					frames := interleave(l, r)
					plain, _ := NewMeter(rate, []float64{1, 1})
					plain.Write(frames)
					want := plain.Result()
					only, _ := NewMeter(rate, []float64{1, 1})
					only.StreamTruePeakOnly()
					only.Reset() // configuration, kept by Reset
					only.Write(frames)
					got := only.Result()
					same := func(what string, got, want Result) {
						t.Helper()
						for c := range 2 {
							if math.Float64bits(got.TruePeak[c]) != math.Float64bits(want.TruePeak[c]) ||
								math.Float64bits(got.SamplePeak[c]) != math.Float64bits(want.SamplePeak[c]) {
								t.Fatalf("%s channel %d: true peak %v sample peak %v, every-block meter %v %v",
									what, c, got.TruePeak[c], got.SamplePeak[c], want.TruePeak[c], want.SamplePeak[c])
							}
						}
						if math.Float64bits(got.MaxTruePeak()) != math.Float64bits(want.MaxTruePeak()) {
							t.Fatalf("%s: max true peak %v, want %v", what, got.MaxTruePeak(), want.MaxTruePeak())
						}
						if got.Integrated != want.Integrated {
							t.Fatalf("%s: integrated %+v, want %+v", what, got.Integrated, want.Integrated)
						}
					}
					same("one pass", got, want)

					// Two sections of 2 s, the second warmed with the
					// second before it, joined into a third meter.
					half := n / 2
					whole, _ := NewMeter(rate, []float64{1, 1})
					whole.StreamTruePeakOnly()
					a, _ := NewMeter(rate, []float64{1, 1})
					a.StreamTruePeakOnly()
					b, _ := NewMeter(rate, []float64{1, 1})
					b.StreamTruePeakOnly()
					if err := a.StartAt(0); err != nil {
						t.Fatal(err)
					}
					if err := b.StartAt(20); err != nil {
						t.Fatal(err)
					}
					a.Write(frames[:2*half])
					b.Warm(frames[2*(half-rate) : 2*half])
					b.Write(frames[2*half:])
					if err := whole.Join(a); err != nil {
						t.Fatal(err)
					}
					if err := whole.Join(b); err != nil {
						t.Fatal(err)
					}
					joined := whole.Result()
					for c := range 2 {
						if math.Float64bits(joined.TruePeak[c]) != math.Float64bits(want.TruePeak[c]) {
							t.Fatalf("sections channel %d: true peak %v, one pass %v", c, joined.TruePeak[c], want.TruePeak[c])
						}
					}

					// The series shows what was skipped: never below the
					// running maximum of the every-block series.
					run := float32(math.Inf(-1))
					for i, v := range want.Series.TruePeak {
						run = max(run, v)
						if got.Series.TruePeak[i] != run {
							t.Fatalf("block %d: series %v, want the running maximum %v", i, got.Series.TruePeak[i], run)
						}
					}
				})
			}
		}
	})
}

// TestTruePeakWithoutOversamplingIsSamplePeak checks the meter at the
// rates where BS.1770-5 Annex 2 needs no oversampling (176.4 kHz and up:
// OversamplingFactor 1): every channel's true peak is its sample peak,
// bit for bit, and so is every 100 ms value of the two series, on every
// kernel set, with a rejected (NaN) sample measured as 0, in one pass and
// with only the stream's highest peak asked for.
func TestTruePeakWithoutOversamplingIsSamplePeak(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, rate := range []int{176400, 192000, 384000} {
			for _, only := range []bool{false, true} {
				n := rate * 2
				l, r := musicLike(51, n, rate), musicLike(52, n, rate)
				l[rate/3] = 0.97 // a lone peak
				r[rate/2] = math.NaN()
				m, _ := NewMeter(rate, []float64{1, 1})
				if only {
					m.StreamTruePeakOnly()
				}
				m.Write(interleave(l, r))
				res := m.Result()
				for c := range 2 {
					if math.Float64bits(res.TruePeak[c]) != math.Float64bits(res.SamplePeak[c]) {
						t.Fatalf("%d Hz channel %d: true peak %v, sample peak %v", rate, c, res.TruePeak[c], res.SamplePeak[c])
					}
				}
				if res.TruePeak[0] != 0.97 {
					t.Fatalf("%d Hz: left true peak %v, want the 0.97 sample", rate, res.TruePeak[0])
				}
				if !only {
					for i, v := range res.Series.TruePeak {
						if v != res.Series.SamplePeak[i] {
							t.Fatalf("%d Hz block %d: true-peak series %v, sample-peak series %v", rate, i, v, res.Series.SamplePeak[i])
						}
					}
				}
			}
		}
	})
}
