package loudness

import (
	"fmt"
	"math"
	"testing"
)

// narrowed returns float32(x[i]) for every sample (narrowGo).
func narrowed(x []float64) []float32 {
	w := make([]float32, len(x))
	narrowGo(w, x)
	return w
}

// float32Kernels are the float32 interpolators in use and their Go twins.
var float32Kernels = []struct {
	name        string
	factor      int
	kernel, ref func(w []float32) float32
}{
	{"4x", 4, peak4Max32, peak4Max32Go},
	{"2x", 2, peak2Max32, peak2Max32Go},
}

// TestPeakMax32MatchesGo checks the float32 interpolators in use
// (peak4Max32, peak2Max32: the AVX2 kernels with the Go loop for the
// windows left over, or the AVX-512 ones with their masked last group)
// against their Go twins bit for bit, on every kernel set: whole signals
// at every start offset within 32 bytes, then window by window in groups
// of up to 48 (every lane of both groups of sixteen, of a group of sixteen
// alone and of every masked tail; for AVX2 of both groups of eight and the
// leftovers), so that no difference hides behind a larger maximum.
func TestPeakMax32MatchesGo(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, k := range float32Kernels {
			for _, n := range kernelLengths {
				for name, x := range kernelSignals(n + history + 8) {
					w := narrowed(x)
					for offset := range 8 {
						v := w[offset : offset+n+history]
						if got, want := k.kernel(v), k.ref(v); math.Float32bits(got) != math.Float32bits(want) {
							t.Errorf("%s %s, %d samples, offset %d: kernel %.9g, Go %.9g", k.name, name, n, offset, got, want)
						}
					}
				}
			}
			for name, x := range kernelSignals(2400) {
				w := narrowed(x)
				for i := 0; i+interpolatorTaps+48 <= len(w); i++ {
					for extra := range 49 {
						v := w[i : i+interpolatorTaps+extra]
						if got, want := k.kernel(v), k.ref(v); math.Float32bits(got) != math.Float32bits(want) {
							t.Fatalf("%s %s, %d samples at %d: kernel %.9g, Go %.9g", k.name, name, len(v), i, got, want)
						}
					}
				}
			}
			// Fewer samples than one window: nothing to compute.
			for n := range interpolatorTaps {
				if got := k.kernel(narrowed(denseFullScale(uint64(n), n))); got != 0 {
					t.Errorf("%s, %d samples: %v, want 0", k.name, n, got)
				}
			}
		}
	})
}

// TestPeakMax32EdgeInputs checks the float32 interpolators in use
// against their Go twins bit for bit on the inputs where SIMD and scalar
// arithmetic could part: float32 subnormals alone (every product and sum
// subnormal or zero, no flush to zero allowed), ±full scale (±1, and the
// alternating ±1 of a Nyquist square, the largest interpolated values),
// values near the float32 maximum (sums that overflow to ±Inf and
// differences Inf − Inf = NaN, which the maximum must skip), signed zeros,
// and NaN and ±Inf among programme; every length up to 80 windows (every
// remainder of 8, 16 and 32) at every start offset within 64 bytes, on
// every kernel set.
func TestPeakMax32EdgeInputs(t *testing.T) {
	const n = 80 + interpolatorTaps + 16
	sub, full, square, huge, zeros, bad := make([]float32, n), make([]float32, n), make([]float32, n), make([]float32, n), make([]float32, n), narrowed(kernelSignals(n)["programme"])
	for i := range n {
		// Subnormals: multiples of 2⁻¹⁴⁹ up to about 2⁻¹²⁷, both signs.
		sub[i] = float32(math.Ldexp(float64((i*7919)%(1<<22)-(1<<21)), -149))
		full[i] = float32([]float64{1, -1, 1, 1, -1, -1, 0.5}[i%7])
		square[i] = float32(1 - 2*(i%2))
		huge[i] = float32([]float64{math.MaxFloat32, -math.MaxFloat32, math.MaxFloat32 / 3, 1}[(i/3)%4])
		zeros[i] = float32(math.Copysign(0, float64(1-2*(i%3%2))))
	}
	for i, v := range []float32{float32(math.NaN()), float32(math.Inf(1)), float32(math.Inf(-1)), float32(math.Copysign(0, -1))} {
		bad[17*i+5] = v
	}
	sigs := map[string][]float32{"subnormal": sub, "full-scale": full, "nyquist-square": square, "near-max": huge, "signed-zeros": zeros, "non-finite": bad}
	forEachKernelSet(t, func(t *testing.T) {
		for _, k := range float32Kernels {
			for name, w := range sigs {
				for offset := range 16 {
					for windows := range 81 {
						v := w[offset : offset+windows+history]
						if got, want := k.kernel(v), k.ref(v); math.Float32bits(got) != math.Float32bits(want) {
							t.Fatalf("%s %s, %d windows at offset %d: kernel %v (%#x), Go %v (%#x)", k.name, name, windows, offset, got, math.Float32bits(got), want, math.Float32bits(want))
						}
					}
				}
			}
			// The subnormal signal's peak is subnormal, not flushed.
			if p := k.kernel(sub); !(p > 0 && p < 0x1p-126) {
				t.Errorf("%s subnormal: peak %v, want a subnormal above 0", k.name, p)
			}
		}
	})
}

// TestPeak32Bound checks the bound the float32 interpolators claim, at
// 48 kHz (4×) and 96 kHz (2×): on every signal below, the detector's peak
// of every 100 ms write and of the flush lies within peak32Error of the
// float64 detector's
// (wide), and within 1e-4 dB of it; and the skip margin skipSlack covers
// the float32 values' excess over gain·max|x|. Signals: the package's
// programme-like and dense full-scale noise (also as 24-bit and 16-bit
// PCM values, which float32 holds exactly), spikes, sines near fs/4 with
// their crests between samples (EBU Tech 3341 tests 15–19 use such tones,
// SOURCES.md §3, from memory), the +3.01 dBTP inter-sample over of a
// 0 dBFS-sample fs/4 sine at 45°, a full-scale square wave (the Gibbs
// overshoot of the interpolator), and very quiet (−140 dBFS) and very loud
// (+60 dBFS) programme. The figures of the derivation: at 4× γ₉ with
// u = 2⁻²⁴ is 5.4·10⁻⁷ and foldedGain about 2.1, so the peak is off by at
// most 1.2·10⁻⁶·max|x| (1e-5 dB where the peak is near max|x|); at 2× γ₁₃
// is 7.7·10⁻⁷ and peakGain(2) about 2.0.
func TestPeak32Bound(t *testing.T) {
	for _, rate := range []int{48000, 96000} {
		testPeak32Bound(t, rate)
	}
}

func testPeak32Bound(t *testing.T, rate int) {
	factor := OversamplingFactor(rate)
	n := float64(roundings32(factor))
	gamma := n * u32 / (1 - n*u32)
	if g, f := peakGain(factor), termGain32(factor); !(1+gamma*f/g < skipSlack) || f < g || f > 2.5 {
		t.Fatalf("%d×: skipSlack %v does not cover 1+γ·termGain32/gain = %v (gain %v, term gain %v)", factor, skipSlack, 1+gamma*f/g, g, f)
	}
	kernel := map[int]func([]float32) float32{4: peak4Max32Go, 2: peak2Max32Go}[factor]
	samples := rate / 2
	quantise := func(x []float64, bits int) []float64 {
		q := math.Ldexp(1, bits-1)
		y := make([]float64, len(x))
		for i, v := range x {
			y[i] = math.Max(-q, math.Min(q-1, math.Round(v*q))) / q
		}
		return y
	}
	scaled := func(x []float64, g float64) []float64 {
		y := make([]float64, len(x))
		for i, v := range x {
			y[i] = g * v
		}
		return y
	}
	sine := func(period, phase, amp float64) []float64 {
		x := make([]float64, samples)
		for i := range x {
			x[i] = amp * math.Sin(2*math.Pi*float64(i)/period+phase)
		}
		fade(x, rate/100)
		return x
	}
	square := make([]float64, samples)
	for i := range square {
		square[i] = 1
		if i/24%2 == 1 {
			square[i] = -1
		}
	}
	prog, dense := musicLike(31, samples, rate), denseFullScale(32, samples)
	sigs := map[string][]float64{
		"programme":       prog,
		"programme-24bit": quantise(prog, 24),
		"programme-16bit": quantise(prog, 16),
		"dense":           dense,
		"dense-24bit":     quantise(dense, 24),
		"spikes":          kernelSignals(samples)["spikes"],
		"sine-fs/4.1":     sine(4.1, 0.3, amplitude(-0.5)),
		"sine-fs/4-45°":   sine(4, math.Pi/4, math.Sqrt2), // samples ±1.0
		"sine-fs/3.9":     sine(3.9, 1.1, amplitude(-1)),
		"sine-fs/6-60°":   sine(6, math.Pi/3, amplitude(-6)),
		"square-1kHz":     square,
		"programme-140dB": scaled(prog, amplitude(-140)),
		"programme+60dB":  scaled(prog, amplitude(60)),
	}
	worst := 0.0
	for name, x := range sigs {
		m := maxAbsGo(x)
		bound := peak32Error(factor, m)
		narrowTP, _ := NewTruePeak(rate)
		wideTP, _ := NewTruePeak(rate)
		wideTP.wide = true
		check := func(what string, p32, p64 float64) {
			t.Helper()
			if d := math.Abs(p32 - p64); !(d <= bound) {
				t.Errorf("%d Hz %s, %s: float32 %.17g, float64 %.17g: off by %.3g, bound %.3g", rate, name, what, p32, p64, d, bound)
			}
			if p64 > 0 {
				db := math.Abs(DB(p32) - DB(p64))
				worst = max(worst, db)
				if !(db <= 1e-4) {
					t.Errorf("%d Hz %s, %s: float32 %.6f dBTP, float64 %.6f dBTP", rate, name, what, DB(p32), DB(p64))
				}
			}
		}
		f32, f64 := 0.0, 0.0
		for i := 0; i < len(x); i += rate / 10 {
			w := x[i:min(i+rate/10, len(x))]
			a, b := narrowTP.Peak(w, 0), wideTP.Peak(w, 0)
			check(fmt.Sprintf("write at %d", i), a, b)
			f32, f64 = max(f32, a), max(f64, b)
		}
		check("flush", narrowTP.Flush(f32), wideTP.Flush(f64))
		// No float32 value exceeds gain·max|x| by more than the slack.
		all := narrowed(append(append(make([]float64, history), x...), make([]float64, history)...))
		if p := float64(kernel(all)); !(p <= peakGain(factor)*m*skipSlack) {
			t.Errorf("%d Hz %s: float32 peak %v above gain·max|x|·skipSlack = %v", rate, name, p, peakGain(factor)*m*skipSlack)
		}
	}
	t.Logf("%d Hz: largest difference float32 − float64 on these signals: %.2g dB", rate, worst)
	// Outside [2⁻⁶⁰, 2⁶⁰] the float64 interpolator runs: the same bits as
	// the wide detector.
	for _, g := range []float64{amplitude(400), amplitude(-400)} {
		x := scaled(prog, g)
		a, _ := NewTruePeak(rate)
		b, _ := NewTruePeak(rate)
		b.wide = true
		if p, q := a.Flush(a.Peak(x, 0)), b.Flush(b.Peak(x, 0)); !sameBits(p, q) {
			t.Errorf("%d Hz programme × %g: %.17g, float64 detector %.17g", rate, g, p, q)
		}
	}
}

// TestTruePeak32SkipExact checks that skipping stays exact for the float32
// values: the streaming detector (pre-scan, skipped runs, stretches, fresh
// floors every 100 ms, flush) returns bit for bit the float32 kernel's
// maximum over every window of the whole stream, on a periodic signal
// whose every run peaks at about the same height (so the skip test
// decides at the margin), on dense noise and on programme, at 48 and
// 96 kHz.
func TestTruePeak32SkipExact(t *testing.T) {
	for _, rate := range []int{48000, 96000} {
		testTruePeak32SkipExact(t, rate)
	}
}

func testTruePeak32SkipExact(t *testing.T, rate int) {
	kernel := map[int]func([]float32) float32{4: peak4Max32Go, 2: peak2Max32Go}[OversamplingFactor(rate)]
	n := rate
	periodic := make([]float64, n)
	for i := range periodic {
		periodic[i] = 0.7*math.Sin(2*math.Pi*float64(i)/32.0+0.4) + 0.2*math.Sin(2*math.Pi*float64(i)/7.3)
	}
	for name, x := range map[string][]float64{"periodic": periodic, "dense": denseFullScale(41, n), "programme": musicLike(42, n, rate)} {
		forEachKernelSet(t, func(t *testing.T) {
			if kernels == sse2Kernels {
				t.Skip("the sse2 set's interpolators are float64")
			}
			tp, _ := NewTruePeak(rate)
			got := 0.0
			for i := 0; i < len(x); i += rate / 10 {
				got = max(got, tp.Peak(x[i:min(i+rate/10, len(x))], 0))
			}
			got = tp.Flush(got)
			all := narrowed(append(append(make([]float64, history), x...), make([]float64, history)...))
			if want := float64(kernel(all)); !sameBits(got, want) {
				t.Errorf("%d Hz %s: streaming %.17g, every window %.17g", rate, name, got, want)
			}
		})
	}
}
