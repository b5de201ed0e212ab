package flac

import (
	"math"
	"math/rand/v2"
	"testing"
)

// tone returns n samples of a sine of the given frequency (cycles per
// sample) at amplitude amp (fraction of full scale for bits) plus a little
// seeded noise, with the low wasted bits cleared.
func tone(seed uint64, n, bits int, freq, amp float64, wasted uint) []int64 {
	rng := rand.New(rand.NewPCG(seed, 11))
	full := math.Ldexp(1, bits-1)
	x := make([]int64, n)
	for i := range x {
		v := amp*math.Sin(2*math.Pi*freq*float64(i)) + 0.001*(rng.Float64()-0.5)
		s := int64(math.Round(v * full))
		s = max(min(s, int64(full)-1), -int64(full))
		x[i] = s &^ (1<<wasted - 1)
	}
	return x
}

// lpcSpec is an LPC subframe with textbook coefficients for a smooth
// signal: order 2 (2, -1) scaled to the precision, the rest zero.
func lpcSpec(order int, method int, params ...int) subframeSpec {
	c := make([]int32, order)
	c[0] = 2 << 10
	if order > 1 {
		c[1] = -1 << 10
	}
	return subframeSpec{kind: "lpc", order: order, coefs: c, precision: 13, shift: 10, method: method, params: params}
}

func TestHandMadeCodings(t *testing.T) {
	rice := func(order, method int, porder uint, params ...int) subframeSpec {
		return subframeSpec{kind: "fixed", order: order, method: method, porder: porder, params: params}
	}
	escaped := func(order int, porder uint, raw ...uint) subframeSpec {
		s := rice(order, 0, porder, -1, 9)
		s.rawBits = raw
		return s
	}
	stereo := func(n, bits int, a, b subframeSpec, assignment int, seed uint64) testFrame {
		return testFrame{
			samples:    [][]int64{tone(seed, n, bits, 0.01, 0.5, 0), tone(seed+1, n, bits, 0.017, 0.45, 0)},
			assignment: assignment,
			specs:      []subframeSpec{a, b},
		}
	}
	silence := func(n int, a, b subframeSpec) testFrame {
		return testFrame{samples: [][]int64{make([]int64, n), make([]int64, n)}, specs: []subframeSpec{a, b}}
	}
	tests := []struct {
		name     string
		rate     int
		bits     int
		variable bool
		frames   func(bits int) []testFrame
	}{
		{"variable block sizes, every fixed order, escapes", 48000, 16, true, func(bits int) []testFrame {
			return []testFrame{
				stereo(1152, bits, rice(0, 0, 0, 14), rice(1, 0, 2, 12), independent, 1),
				stereo(4096, bits, rice(2, 0, 4, 10), rice(3, 0, 3, 9), leftSide, 2),
				stereo(17, bits, rice(4, 0, 0, 8), subframeSpec{kind: "verbatim"}, sideRight, 3),
				stereo(576, bits, escaped(2, 3, 12, 16), escaped(4, 2, 17), midSide, 4),
				silence(64, escaped(0, 1, 0), escaped(2, 0, 0)),
				stereo(4608, bits, lpcSpec(32, 0, 9), lpcSpec(12, 0, 9), independent, 6),
				stereo(1, bits, subframeSpec{kind: "verbatim"}, subframeSpec{kind: "verbatim"}, midSide, 5),
			}
		}},
		{"5-bit Rice parameters, large ones too", 96000, 24, false, func(bits int) []testFrame {
			return []testFrame{
				stereo(4096, bits, rice(2, 1, 2, 17, 20), rice(1, 1, 0, 18), independent, 7),
				stereo(4096, bits, rice(2, 1, 5, 25, 30, 16), lpcSpec(8, 1, 19), midSide, 8),
				stereo(4096, bits, rice(0, 1, 0, 30), lpcSpec(3, 1, 22), leftSide, 9),
			}
		}},
		{"wasted bits", 44100, 16, false, func(bits int) []testFrame {
			f := stereo(2048, bits, rice(2, 0, 1, 9), rice(2, 0, 0, 8), independent, 10)
			f.samples[0] = tone(10, 2048, bits, 0.01, 0.5, 3)
			f.samples[1] = tone(11, 2048, bits, 0.02, 0.5, 5)
			f.specs[0].wasted, f.specs[1].wasted = 3, 5
			g := stereo(2048, bits, subframeSpec{kind: "constant", wasted: 4}, subframeSpec{kind: "verbatim", wasted: 2}, independent, 12)
			for i := range g.samples[0] {
				g.samples[0][i] = -16 * 100
			}
			g.samples[1] = tone(13, 2048, bits, 0.02, 0.5, 2)
			return []testFrame{f, g}
		}},
		{"32-bit stereo, 33-bit side in every coding", 48000, 32, false, func(bits int) []testFrame {
			// Opposite-sign loud channels: the side channel needs 33 bits.
			loud := func(seed uint64, n int, mode int, a, b subframeSpec) testFrame {
				f := stereo(n, bits, a, b, mode, seed)
				for i, v := range f.samples[0] {
					f.samples[1][i] = -v
				}
				return f
			}
			constant := func(n, mode int, l, r int64) testFrame {
				f := testFrame{samples: [][]int64{make([]int64, n), make([]int64, n)}, assignment: mode,
					specs: []subframeSpec{{kind: "constant"}, {kind: "constant"}}}
				for i := range n {
					f.samples[0][i], f.samples[1][i] = l, r
				}
				return f
			}
			wide := escaped(1, 0, 31)
			wide.method = 1
			return []testFrame{
				loud(21, 1024, independent, wide, rice(1, 1, 0, 28)),
				loud(14, 1024, leftSide, rice(2, 1, 0, 24), rice(2, 1, 0, 25)),
				loud(15, 1024, sideRight, lpcSpec(2, 1, 26), rice(4, 1, 1, 24)),
				loud(16, 1024, midSide, lpcSpec(12, 1, 25), lpcSpec(5, 1, 26)),
				loud(17, 1024, midSide, subframeSpec{kind: "verbatim"}, subframeSpec{kind: "verbatim"}),
				loud(18, 1024, leftSide, subframeSpec{kind: "verbatim", wasted: 0}, rice(3, 1, 0, 27)),
				loud(19, 1024, independent, rice(0, 1, 0, 30), subframeSpec{kind: "verbatim"}),
				constant(256, sideRight, 1<<31-1, -1<<31), // side = 2^32 - 1
			}
		}},
		{"31-bit mid/side", 48000, 31, false, func(bits int) []testFrame {
			f := stereo(1024, bits, lpcSpec(2, 1, 24), rice(2, 1, 0, 25), midSide, 21)
			for i, v := range f.samples[0] {
				f.samples[1][i] = -v
			}
			return []testFrame{f}
		}},
		{"20-bit", 48000, 20, false, func(bits int) []testFrame {
			return []testFrame{stereo(4096, bits, lpcSpec(4, 0, 10), rice(2, 0, 2, 11), midSide, 22)}
		}},
		{"12-bit", 8000, 12, false, func(bits int) []testFrame {
			return []testFrame{stereo(4096, bits, rice(2, 0, 2, 4), rice(1, 0, 1, 5), sideRight, 23)}
		}},
		{"4-bit mono", 8000, 4, false, func(bits int) []testFrame {
			return []testFrame{{samples: [][]int64{tone(24, 4096, bits, 0.01, 0.9, 0)}, specs: []subframeSpec{rice(1, 0, 0, 1)}}}
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			data, want := writeStream(tc.rate, tc.bits, tc.variable, tc.frames(tc.bits))
			got, d := ourSamples(t, data, tc.bits)
			if !d.MD5Verified() {
				t.Error("MD5 not verified")
			}
			if len(got) != len(want) {
				t.Fatalf("%d samples, want %d", len(got), len(want))
			}
			for i := range want {
				if int64(got[i]) != want[i] {
					t.Fatalf("sample %d = %d, want %d", i, got[i], want[i])
				}
			}
			// mewkiz/flac v1.0.14 reads 8 to 24 bits.
			if tc.bits >= 8 && tc.bits <= 24 {
				if i := firstDifference(got, oracleSamples(t, data)); i >= 0 {
					t.Fatalf("differs from mewkiz/flac at sample %d", i)
				}
			}
		})
	}
}
