package loudness

import (
	"fmt"
	"math"
	"testing"
)

// TestTruePeakTable checks the properties SOURCES.md §2 states of the
// Annex 2 table: every coefficient a multiple of 2⁻¹³, and the 4 phases
// summing (DC gain of the 48-tap prototype) to about 4.
func TestTruePeakTable(t *testing.T) {
	sum := 0.0
	for _, h := range annex2Phases() {
		for _, c := range h {
			if q := c * 8192; q != math.Trunc(q) {
				t.Errorf("coefficient %v is not a multiple of 2⁻¹³", c)
			}
			sum += c
		}
	}
	// An interpolator by 4 has DC gain 4; the table's quantisation leaves
	// it at 3.949 (calc from SOURCES.md §2), within 1.5 %.
	if math.Abs(sum-4) > 0.06 {
		t.Errorf("prototype DC gain %v, want ≈ 4", sum)
	}
}

func TestOversamplingFactor(t *testing.T) {
	for _, tc := range []struct{ rate, want int }{
		// BS.1770 Annex 2 (SOURCES.md §2, from memory): 4× below 96 kHz,
		// 2× at 88.2/96 kHz, 1× at 176.4 kHz and above.
		{8000, 4}, {44100, 4}, {48000, 4}, {88200, 2}, {96000, 2}, {176400, 1}, {192000, 1}, {384000, 1},
	} {
		if got := OversamplingFactor(tc.rate); got != tc.want {
			t.Errorf("OversamplingFactor(%d) = %d, want %d", tc.rate, got, tc.want)
		}
	}
}

// awkwardLengths are the signal lengths the cross-checks run at: empty, one
// sample, around the kernel's history and skip run, around one chunk and
// around one 100 ms block at 48 kHz.
var awkwardLengths = []int{0, 1, 2, 10, 11, 12, 31, 32, 33, 43, 1023, 1024, 1025, 4799, 4800, 4801, 19201, 30011}

// truePeakTolerance is how far the detector may read from
// referenceTruePeak's want on x at rate: 1e-14 of it for the float64
// interpolators (summation order), plus peak32Error of max|x| for the
// float32 ones (4× and 2×).
func truePeakTolerance(x []float64, rate int, want float64) float64 {
	tol := 1e-14 * max(1, want)
	if f := OversamplingFactor(rate); f > 1 {
		tol += peak32Error(f, maxAbsGo(x))
	}
	return tol
}

// TestTruePeakCrossCheck compares the streaming, skipping, symmetry-folded
// detector with the plain convolution, for several write sizes and floors.
func TestTruePeakCrossCheck(t *testing.T) {
	for _, rate := range []int{48000, 96000, 192000} {
		for _, n := range awkwardLengths {
			x := musicLike(uint64(n)+5, n, rate)
			for i := 0; i < n; i += 997 { // a few isolated spikes
				x[i] *= 7
			}
			want := referenceTruePeak(x, OversamplingFactor(rate))
			for _, step := range []int{1, 7, 1024, 4801} {
				tp, err := NewTruePeak(rate)
				if err != nil {
					t.Fatal(err)
				}
				got := 0.0
				for f := x; len(f) > 0; {
					k := min(step, len(f))
					// A fresh floor each write, as the meter's 100 ms blocks.
					got = max(got, tp.Peak(f[:k], 0))
					f = f[k:]
				}
				got = tp.Flush(got)
				if math.Abs(got-want) > truePeakTolerance(x, rate, want) {
					t.Errorf("%d Hz, %d samples, writes of %d: fast %.17g, reference %.17g", rate, n, step, got, want)
				}
			}
		}
	}
}

// fade applies raised-cosine fades of n samples at both ends of x. A tone
// switched on or off abruptly rings in the interpolator (Gibbs overshoot of
// up to ~1 dB), which is a true property of the signal, not of the tone.
func fade(x []float64, n int) {
	n = min(n, len(x)/2)
	for i := range n {
		g := 0.5 - 0.5*math.Cos(math.Pi*float64(i)/float64(n))
		x[i] *= g
		x[len(x)-1-i] *= g
	}
}

// TestTruePeakSines is the property behind EBU Tech 3341 tests 15–19
// (SOURCES.md §3, from memory): a sine of amplitude A whose peaks fall
// between samples reads 20·log10(A) dBTP within +0.2/−0.4 dB.
func TestTruePeakSines(t *testing.T) {
	for _, tc := range []struct {
		rate    int
		period  float64 // samples per cycle
		phase   float64 // radians: puts the crest midway between two samples
		dbfs    float64 // sine amplitude
		want    float64 // dBTP
		up, low float64 // tolerance, Tech 3341: +0.2 / −0.4 dB
	}{
		{48000, 4, math.Pi / 4, -6, -6, 0.2, 0.4},
		{48000, 6, math.Pi / 3, -6, -6, 0.2, 0.4},
		{48000, 8, 3 * math.Pi / 8, -6, -6, 0.2, 0.4},
		{44100, 4, math.Pi / 4, -6, -6, 0.2, 0.4},
		{96000, 4, math.Pi / 4, -6, -6, 0.2, 0.4},
		{96000, 6, math.Pi / 3, -6, -6, 0.2, 0.4},
		{96000, 8, 3 * math.Pi / 8, -6, -6, 0.2, 0.4},
		{192000, 8, 3 * math.Pi / 8, -6, -6, 0.2, 0.7}, // 1×: plain samples, 24 kHz is above the audio band; cos(π/8) → −0.69 dB (calc)
		// A 0 dBFS-sample fs/4 sine at 45°: samples ±1.0, crest √2 → +3.01
		// dBTP (SOURCES.md §3 [calc]).
		{48000, 4, math.Pi / 4, 20 * math.Log10(math.Sqrt2), 3.01, 0.2, 0.4},
	} {
		name := fmt.Sprintf("%dHz/fs÷%g/%.2fdBFS", tc.rate, tc.period, tc.dbfs)
		a := amplitude(tc.dbfs)
		x := make([]float64, tc.rate) // 1 s
		for i := range x {
			x[i] = a * math.Sin(2*math.Pi*float64(i)/tc.period+tc.phase)
		}
		fade(x, tc.rate/100)
		r := measure(t, tc.rate, []float64{1}, x, 0)
		got := DB(r.TruePeak[0])
		if got > tc.want+tc.up || got < tc.want-tc.low {
			t.Errorf("%s: true peak %.3f dBTP, want %.2f +%.1f/−%.1f", name, got, tc.want, tc.up, tc.low)
		}
		switch sp := DB(r.SamplePeak[0]); {
		case r.Oversampling == 1 && sp != got:
			t.Errorf("%s: at 1× true peak %.3f dBTP differs from sample peak %.3f dBFS", name, got, sp)
		case r.Oversampling > 1 && sp >= got:
			t.Errorf("%s: sample peak %.3f dBFS not below true peak %.3f", name, sp, got)
		}
	}
}

// TestTruePeak2xIsSubsetOf4x checks the 2× interpolator (phases 0 and 2)
// at 96 kHz: it reads the very same interpolated waveform as the 4× table at
// half the density, so it never reads above 4× and misses at most the
// sample-timing loss 20·log10(1/cos(π·f/(2·fs))) = 0.12 dB at 10 kHz, 96 kHz
// (SOURCES.md §2 [calc]) plus the table's own phase-to-phase ripple of
// ±0.22 dB (calc from the Annex 2 coefficients of SOURCES.md §2).
func TestTruePeak2xIsSubsetOf4x(t *testing.T) {
	const rate = 96000
	x := make([]float64, rate/2)
	for i := range x {
		tt := float64(i) / rate
		x[i] = 0.5*math.Sin(2*math.Pi*9000*tt+0.3) + 0.4*math.Sin(2*math.Pi*10000*tt+1.1)
	}
	fade(x, rate/100)
	two, four := referenceTruePeak(x, 2), referenceTruePeak(x, 4)
	tp, _ := NewTruePeak(rate)
	fast := tp.Flush(tp.Peak(x, 0))
	if math.Abs(fast-two) > truePeakTolerance(x, rate, two) {
		t.Errorf("fast 2× %v, reference 2× %v", fast, two)
	}
	if d := DB(four) - DB(two); d < 0 || d > 0.12+0.22 {
		t.Errorf("4× reads %.4f dB above 2×, want 0 … 0.34", d)
	}
}
