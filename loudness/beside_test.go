package loudness

import (
	"fmt"
	"math"
	"reflect"
	"testing"
)

// TestWriteBesideSameBits checks that WriteBeside gives both meters the
// very results of two Writes (every figure and series, bit for bit), on
// every kernel set: a 5.1 programme (weights of ITU-R BS.1770-5, Table 3:
// 1, 1, 1, 0 for the LFE, 1.41, 1.41) beside its Lo/Ro fold-down (the
// fold itself is this test's own sum; any derived signal will do), at 48
// and 44.1 kHz (a block grid that is not a whole number of chunks), in
// writes of several sizes, from the start and as stretches started with
// StartAt; and two meters not at the same position, which it must still
// measure as two Writes would.
func TestWriteBesideSameBits(t *testing.T) {
	weights := []float64{1, 1, 1, 0, 1.41, 1.41}
	forEachKernelSet(t, func(t *testing.T) {
		for _, rate := range []int{48000, 44100} {
			n := 3 * rate
			ch := make([][]float64, 6)
			for c := range ch {
				ch[c] = musicLike(uint64(40+c), n, rate)
			}
			frames := interleave(ch...)
			g := 1 / math.Sqrt2
			lo, ro := make([]float64, n), make([]float64, n)
			for i := range n {
				lo[i] = ch[0][i] + g*ch[2][i] + g*ch[4][i]
				ro[i] = ch[1][i] + g*ch[2][i] + g*ch[5][i]
			}
			fold := interleave(lo, ro)
			for _, step := range []int{4800, 1023, n} {
				for _, start := range []int64{-1, 7} {
					t.Run(fmt.Sprintf("%d/step%d/start%d", rate, step, start), func(t *testing.T) {
						a, _ := NewMeter(rate, weights)
						af, _ := NewMeter(rate, []float64{1, 1})
						b, _ := NewMeter(rate, weights)
						bf, _ := NewMeter(rate, []float64{1, 1})
						if start >= 0 {
							for _, m := range []*Meter{a, af, b, bf} {
								if err := m.StartAt(start); err != nil {
									t.Fatal(err)
								}
							}
						}
						for i := 0; i < n; i += step {
							j := min(i+step, n)
							a.Write(frames[6*i : 6*j])
							af.Write(fold[2*i : 2*j])
							b.WriteBeside(frames[6*i:6*j], bf, fold[2*i:2*j])
						}
						if start >= 0 {
							// Segment meters log their blocks: compare the
							// logs and the unfinished block.
							if !reflect.DeepEqual(bitsOf(a.log), bitsOf(b.log)) || !reflect.DeepEqual(bitsOf(af.log), bitsOf(bf.log)) ||
								math.Float64bits(a.energy) != math.Float64bits(b.energy) || math.Float64bits(af.energy) != math.Float64bits(bf.energy) {
								t.Fatal("segment logs differ")
							}
							return
						}
						for _, p := range [][2]*Meter{{a, b}, {af, bf}} {
							want, got := p[0].Result(), p[1].Result()
							if !reflect.DeepEqual(resultBits(got), resultBits(want)) {
								t.Fatalf("WriteBeside %+v\nWrite %+v", got, want)
							}
						}
					})
				}
			}
			// Meters at different positions: two Writes.
			a, _ := NewMeter(rate, weights)
			af, _ := NewMeter(rate, []float64{1, 1})
			af.Write(fold[:200])
			a.WriteBeside(frames[:6*1000], af, fold[200:2*600])
			if a.frames != 1000 || af.frames != 600 {
				t.Fatalf("meters at %d and %d frames, want 1000 and 600", a.frames, af.frames)
			}
		}
	})
}

// bitsOf returns the bit patterns of v (NaN compares equal to itself).
func bitsOf(v []float64) []uint64 {
	b := make([]uint64, len(v))
	for i, x := range v {
		b[i] = math.Float64bits(x)
	}
	return b
}

// resultBits is r with its float figures as bit patterns, for DeepEqual.
func resultBits(r Result) []any {
	var out []any
	for _, v := range append(append([]float64{}, r.TruePeak...), r.SamplePeak...) {
		out = append(out, math.Float64bits(v))
	}
	out = append(out, r.Integrated, r.LoudnessRange, r.MaxMomentary, r.MaxShortTerm, r.Rejected, r.Frames)
	for _, s := range [][]float32{r.Series.Momentary, r.Series.ShortTerm, r.Series.TruePeak, r.Series.SamplePeak} {
		b := make([]uint32, len(s))
		for i, x := range s {
			b[i] = math.Float32bits(x)
		}
		out = append(out, b)
	}
	return out
}
