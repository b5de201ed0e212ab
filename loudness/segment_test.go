package loudness

import (
	"fmt"
	"math"
	"testing"
)

// segmentedResult measures frames (interleaved, channels of weights) cut
// at the given 100 ms block numbers: every stretch on its own meter, warmed
// with up to PreRollSeconds of the audio before it and written in writes
// of step frames, then joined in order.
func segmentedResult(t *testing.T, rate int, weights []float64, frames []float64, cuts []int64, step int) Result {
	t.Helper()
	nch := len(weights)
	whole, err := NewMeter(rate, weights)
	if err != nil {
		t.Fatal(err)
	}
	total := int64(len(frames) / nch)
	starts := append([]int64{0}, cuts...)
	for i, block := range starts {
		from := (block*int64(rate) + 5) / 10
		to := total
		if i+1 < len(starts) {
			to = (starts[i+1]*int64(rate) + 5) / 10
		}
		seg, err := NewMeter(rate, weights)
		if err != nil {
			t.Fatal(err)
		}
		if err := seg.StartAt(block); err != nil {
			t.Fatal(err)
		}
		pre := max(0, from-int64(PreRollSeconds*rate))
		seg.Warm(frames[pre*int64(nch) : from*int64(nch)])
		for f := from; f < to; {
			n := min(to-f, int64(step))
			seg.Write(frames[f*int64(nch) : (f+n)*int64(nch)])
			f += n
		}
		if err := whole.Join(seg); err != nil {
			t.Fatalf("segment %d from block %d: %v", i, block, err)
		}
	}
	return whole.Result()
}

// TestSegmentsJoinToWholeStream checks that a stream cut into segments,
// each measured by its own warmed meter and joined in order, gives the
// figures of the whole-stream meter: peaks and peak series bit for bit,
// loudness figures within 1e-9 LU (the bound issue 14 sets: a block's
// energy may be summed over other chunks; common practice, no published
// source), at 48 kHz, 44.1 kHz and 11.025 kHz (blocks of uneven length),
// stereo and 5.1 with LFE, with cuts at the first block, in the middle, at
// the last whole block and before a trailing partial block.
func TestSegmentsJoinToWholeStream(t *testing.T) {
	for _, c := range []struct {
		rate    int
		weights []float64
		seconds float64
		cuts    []int64
	}{
		{48000, []float64{1, 1}, 12.34, []int64{1, 37, 60, 123}},
		{48000, []float64{1, 1}, 9, []int64{30, 60}},
		{44100, []float64{1, 1, 1, 0, 1.41, 1.41}, 7.05, []int64{20, 21, 70}},
		{11025, []float64{1}, 6.66, []int64{3, 33, 66}},
		{96000, []float64{1, 1}, 4, []int64{10}},
	} {
		t.Run(fmt.Sprintf("%dHz-%dch-%v", c.rate, len(c.weights), c.cuts), func(t *testing.T) {
			n := int(c.seconds * float64(c.rate))
			chans := make([][]float64, len(c.weights))
			for i := range chans {
				chans[i] = musicLike(uint64(i)+70, n, c.rate)
			}
			frames := interleave(chans...)
			want := measure(t, c.rate, c.weights, frames, 4096)
			for _, step := range []int{4096, 1000} {
				got := segmentedResult(t, c.rate, c.weights, frames, c.cuts, step)
				for name, pair := range map[string][2]Reading{
					"integrated":    {got.Integrated, want.Integrated},
					"range":         {got.LoudnessRange, want.LoudnessRange},
					"max momentary": {got.MaxMomentary, want.MaxMomentary},
					"max short":     {got.MaxShortTerm, want.MaxShortTerm},
				} {
					if !sameReading(pair[0], pair[1], 1e-9) {
						t.Errorf("step %d: %s %+v, whole stream %+v", step, name, pair[0], pair[1])
					}
				}
				if got.Frames != want.Frames || got.Rejected != want.Rejected {
					t.Errorf("step %d: frames %d rejected %d, whole stream %d, %d", step, got.Frames, got.Rejected, want.Frames, want.Rejected)
				}
				for ch := range c.weights {
					if !sameBits(got.TruePeak[ch], want.TruePeak[ch]) || !sameBits(got.SamplePeak[ch], want.SamplePeak[ch]) {
						t.Errorf("step %d, channel %d: peaks %v/%v, whole stream %v/%v", step, ch, got.TruePeak[ch], got.SamplePeak[ch], want.TruePeak[ch], want.SamplePeak[ch])
					}
				}
				if len(got.Series.TruePeak) != len(want.Series.TruePeak) || len(got.Series.Momentary) != len(want.Series.Momentary) {
					t.Fatalf("step %d: series lengths differ", step)
				}
				for i := range want.Series.TruePeak {
					if got.Series.TruePeak[i] != want.Series.TruePeak[i] || got.Series.SamplePeak[i] != want.Series.SamplePeak[i] {
						t.Fatalf("step %d: peak series differ at block %d", step, i)
					}
					for _, s := range [][2][]float32{{got.Series.Momentary, want.Series.Momentary}, {got.Series.ShortTerm, want.Series.ShortTerm}} {
						a, b := float64(s[0][i]), float64(s[1][i])
						if !(math.Abs(a-b) <= 1e-4 || a == b || a != a && b != b) {
							t.Fatalf("step %d: loudness series differ at block %d: %v, %v", step, i, a, b)
						}
					}
				}
			}
		})
	}
}

// TestJoinRefusesMisfits checks that Join refuses what it cannot join
// exactly: a meter not started with StartAt, a stretch that does not start
// at the next block, other rates or weights, and a join after a stretch
// that ended inside a block.
func TestJoinRefusesMisfits(t *testing.T) {
	whole, _ := NewMeter(48000, []float64{1, 1})
	plain, _ := NewMeter(48000, []float64{1, 1})
	if whole.Join(plain) == nil {
		t.Error("joined a meter not started with StartAt")
	}
	late, _ := NewMeter(48000, []float64{1, 1})
	_ = late.StartAt(5)
	if whole.Join(late) == nil {
		t.Error("joined a stretch from block 5 at block 0")
	}
	other, _ := NewMeter(44100, []float64{1, 1})
	_ = other.StartAt(0)
	if whole.Join(other) == nil {
		t.Error("joined a 44.1 kHz stretch into a 48 kHz meter")
	}
	weights, _ := NewMeter(48000, []float64{1, 0})
	_ = weights.StartAt(0)
	if whole.Join(weights) == nil {
		t.Error("joined a stretch with other weights")
	}
	partial, _ := NewMeter(48000, []float64{1, 1})
	_ = partial.StartAt(0)
	partial.Write(make([]float64, 2*7000))
	if err := whole.Join(partial); err != nil {
		t.Fatal(err)
	}
	next, _ := NewMeter(48000, []float64{1, 1})
	_ = next.StartAt(1)
	if whole.Join(next) == nil {
		t.Error("joined after a stretch that ended inside a block")
	}
	used, _ := NewMeter(48000, []float64{1, 1})
	used.Write(make([]float64, 20))
	if used.StartAt(0) == nil {
		t.Error("StartAt on a meter that has measured frames")
	}
}
