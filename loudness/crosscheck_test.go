package loudness

import (
	"fmt"
	"math"
	"testing"
)

// sameReading reports whether two readings agree: both undefined, or both
// defined within tol.
func sameReading(a, b Reading, tol float64) bool {
	if a.Defined != b.Defined {
		return false
	}
	return !a.Defined || math.Abs(a.Value-b.Value) <= tol
}

// TestMeterCrossCheck runs the streaming meter and the plain reference
// (reference_test.go) over awkward lengths and write sizes, at a rate with
// a whole number of samples per 100 ms and at 11 025 Hz, where 100 ms is
// 1102.5 samples.
func TestMeterCrossCheck(t *testing.T) {
	for _, rate := range []int{48000, 11025, 44100} {
		hop := (rate + 5) / 10 // first 100 ms block
		lengths := []int{0, 1, hop - 1, hop, hop + 1, 4*hop - 1, 4*hop + 1, 3*rate + 1, 5*rate + 17}
		for _, n := range lengths {
			left := musicLike(uint64(n)+1, n, rate)
			right := musicLike(uint64(n)+2, n, rate)
			// A quiet stretch and a loud burst so both gates have work.
			for i := range left {
				if i > n/3 && i < n/2 {
					left[i] *= 0.001
					right[i] *= 0.001
				}
			}
			weights := []float64{1, 1.41}
			wantI, wantLRA, wantM, wantS := referenceLoudness([][]float64{left, right}, weights, rate)
			frames := interleave(left, right)
			for _, step := range []int{1, 7, 4801, 0} {
				if step == 1 && n > rate {
					continue // slow and adds nothing over 7
				}
				name := fmt.Sprintf("%d Hz/%d frames/writes of %d", rate, n, step)
				r := measure(t, rate, weights, frames, step)
				for _, c := range []struct {
					what      string
					got, want Reading
				}{
					{"integrated", r.Integrated, wantI},
					{"loudness range", r.LoudnessRange, wantLRA},
					{"max momentary", r.MaxMomentary, wantM},
					{"max short-term", r.MaxShortTerm, wantS},
				} {
					if !sameReading(c.got, c.want, 1e-9) {
						t.Errorf("%s: %s %+v, reference %+v", name, c.what, c.got, c.want)
					}
				}
				for ch, x := range [][]float64{left, right} {
					if want := referenceTruePeak(x, OversamplingFactor(rate)); math.Abs(r.TruePeak[ch]-want) > truePeakTolerance(x, rate, want) {
						t.Errorf("%s: channel %d true peak %v, reference %v", name, ch, r.TruePeak[ch], want)
					}
					if want := maxAbs(x); r.SamplePeak[ch] != want {
						t.Errorf("%s: channel %d sample peak %v, want %v", name, ch, r.SamplePeak[ch], want)
					}
				}
				if blocks := int(int64(n) * 10 / int64(rate)); len(r.Series.Momentary) != blocks && len(r.Series.Momentary) != blocks+1 {
					t.Errorf("%s: %d series values", name, len(r.Series.Momentary))
				}
			}
		}
	}
}

// TestSeriesPeaks checks the 10 Hz peak series against the per-channel
// figures: the loudest block holds the stream's peaks.
func TestSeriesPeaks(t *testing.T) {
	x := musicLike(9, 48000*4, 48000)
	x[48000*2+123] = 0.95 // a spike in block 20
	r := measure(t, 48000, []float64{1}, x, 1000)
	if len(r.Series.SamplePeak) != 40 || len(r.Series.TruePeak) != 40 {
		t.Fatalf("series lengths %d %d, want 40", len(r.Series.SamplePeak), len(r.Series.TruePeak))
	}
	hi, hiTP := -1, float32(math.Inf(-1))
	for i, v := range r.Series.SamplePeak {
		if hi < 0 || v > r.Series.SamplePeak[hi] {
			hi = i
		}
		hiTP = max(hiTP, r.Series.TruePeak[i])
	}
	if hi != 20 || r.Series.SamplePeak[hi] != float32(DB(0.95)) {
		t.Errorf("loudest sample-peak block %d at %v dBFS, want block 20 at %v", hi, r.Series.SamplePeak[hi], DB(0.95))
	}
	if math.Abs(float64(hiTP)-DB(r.TruePeak[0])) > 1e-4 {
		t.Errorf("series true-peak maximum %v, stream %v", hiTP, DB(r.TruePeak[0]))
	}
}
