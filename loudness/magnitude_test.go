package loudness

import (
	"math"
	"testing"
)

// TestKWeightingGainBound checks the premise of MaxMagnitude's argument: the
// sum of the magnitudes of the K-weighting impulse response (the largest
// factor by which the filter can raise any input's peak) is below 10 at
// every rate the meter accepts.
func TestKWeightingGainBound(t *testing.T) {
	for _, rate := range []int{8000, 11025, 22050, 44100, 48000, 96000, 192000, 384000} {
		k := NewKWeighting(rate)
		// 20 s of response: the 38 Hz high-pass has decayed by far more
		// than float64 resolution long before.
		x := make([]float64, 20*rate)
		x[0] = 1
		y := k.Filter(nil, x)
		sum := 0.0
		for _, v := range y {
			sum += math.Abs(v)
		}
		if !(sum < 10) {
			t.Errorf("%d Hz: Σ|h| = %v, want < 10", rate, sum)
		}
	}
}

// TestMaxMagnitude: samples up to ±MaxMagnitude give finite figures,
// however they are placed; larger ones, like NaN, are rejected and counted.
func TestMaxMagnitude(t *testing.T) {
	const rate = 384000 // the longest blocks: the largest sums
	n := 4 * rate       // 4 s: full short-term windows
	x := make([]float64, 2*n)
	for i := range x {
		x[i] = MaxMagnitude
		if (i/7)%2 == 1 {
			x[i] = -MaxMagnitude // a square wave of the largest accepted magnitude
		}
	}
	r := measure(t, rate, []float64{1.41, 1.41}, x, 4096)
	if r.Rejected != 0 {
		t.Fatalf("Rejected = %d, want 0 at ±MaxMagnitude", r.Rejected)
	}
	for name, rd := range map[string]Reading{"integrated": r.Integrated, "range": r.LoudnessRange,
		"momentary": r.MaxMomentary, "short-term": r.MaxShortTerm} {
		if !rd.Defined || math.IsNaN(rd.Value) || math.IsInf(rd.Value, 0) {
			t.Errorf("%s = %+v, want a finite value", name, rd)
		}
	}
	for c := range 2 {
		if v := DB(r.TruePeak[c]); math.IsNaN(v) || math.IsInf(v, 0) {
			t.Errorf("channel %d true peak %v dB", c, v)
		}
	}

	for _, bad := range []float64{math.Nextafter(MaxMagnitude, math.Inf(1)), -1e155, 1e300, 1e308, -math.MaxFloat64} {
		y := stereoTone(segment{-23, 5})
		y[1000], y[2001] = bad, -bad
		r := measure(t, 48000, []float64{1, 1}, y, 0)
		if r.Rejected != 2 {
			t.Errorf("%g: Rejected = %d, want 2", bad, r.Rejected)
		}
		if !r.Integrated.Defined || math.Abs(r.Integrated.Value+23) > 0.05 {
			t.Errorf("%g: integrated %+v, want the tone's -23 LUFS", bad, r.Integrated)
		}
	}
}
