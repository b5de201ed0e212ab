package loudness

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// Tests of the fused K-weighting (Energy) against the form it replaced
// (energyUnfused, still the sse2 set's): the per-sample bound derived in
// kweighting.go, the meter's figures on every supported rate and on the
// EBU Tech 3341/3342 signals, and the kernels' bits on edge inputs.

// impulseL1 returns Σ|h[n]| of the biquad (b0 + b1·z⁻¹ + b2·z⁻²) /
// (1 + a1·z⁻¹ + a2·z⁻²), summed until the response has decayed below
// 1e-22 of its peak (the tail left out is smaller than the last term
// times the decay's time constant: far below the 1 % slack the bound
// carries).
func impulseL1(b0, b1, b2, a1, a2 float64) float64 {
	var x1, x2, y1, y2, sum, peak float64
	for n := 0; n < 100_000_000; n++ {
		x := 0.0
		if n == 0 {
			x = 1
		}
		y := b0*x + b1*x1 + b2*x2 - a1*y1 - a2*y2
		x2, x1 = x1, x
		y2, y1 = y1, y
		sum += math.Abs(y)
		peak = max(peak, math.Abs(y))
		if n > 100 && math.Abs(y) < 1e-22*peak && math.Abs(y2) < 1e-22*peak {
			break
		}
	}
	return sum
}

// fmaSampleBound returns β: |v_fused − v_unfused| ≤ β·M for every
// high-pass output of the K-weighting k, M the largest |x| of the input
// so far (kweighting.go, "The bound between the two forms", derives it).
func fmaSampleBound(k KWeighting) float64 {
	s, h := k.Shelf, k.HighPass
	gs := impulseL1(1, 0, 0, s.A1, s.A2)          // noise gain of the shelf's recursion
	ss := impulseL1(s.B0, s.B1, s.B2, s.A1, s.A2) // max|u| / M
	gh := impulseL1(1, 0, 0, h.A1, h.A2)          // noise gain of the high-pass's recursion
	hh := impulseL1(h.B0, h.B1, h.B2, h.A1, h.A2) // how far a shelf error spreads
	sk := ss * hh                                 // max|v| / M (≥ the exact ℓ1 norm of the cascade)
	ts := math.Abs(s.B0) + math.Abs(s.B1) + math.Abs(s.B2) + (math.Abs(s.A1)+math.Abs(s.A2))*ss
	th := 4*ss + (math.Abs(h.A1)+math.Abs(h.A2))*sk
	const gamma5 = 5 * 0x1p-53 / (1 - 5*0x1p-53)
	// Both forms are within γ₅·(…)·M of exact arithmetic; 1 % covers the
	// second-order terms (the computed histories instead of the exact ones).
	return 2 * gamma5 * (hh*gs*ts + gh*th) * 1.01
}

// fmaTestSignals returns the one-channel inputs of the bound tests at
// rate: programme-like, dense full-scale noise, spikes, a 20 Hz sine at
// full scale (where the high-pass works hardest), a ±full-scale square
// wave, programme with a DC offset, and programme that stops dead (the
// filters' tails decaying into denormals).
func fmaTestSignals(rate, n int) map[string][]float64 {
	sine := make([]float64, n)
	square := make([]float64, n)
	offset := musicLike(5, n, rate)
	stop := musicLike(6, n, rate)
	spikes := make([]float64, n)
	r := rand.New(rand.NewPCG(uint64(rate), 9))
	for i := range n {
		sine[i] = math.Sin(2 * math.Pi * 20 * float64(i) / float64(rate))
		square[i] = 1
		if (i/(rate/200))%2 == 1 {
			square[i] = -1
		}
		offset[i] += 0.25
		if i > n/3 {
			stop[i] = 0
		}
		if r.IntN(500) == 0 {
			spikes[i] = 2*r.Float64() - 1
		}
	}
	return map[string][]float64{
		"programme":        musicLike(4, n, rate),
		"dense-full-scale": denseFullScale(7, n),
		"spikes":           spikes,
		"20Hz-full-scale":  sine,
		"square":           square,
		"dc-offset":        offset,
		"stops":            stop,
	}
}

// TestFMASampleBound runs the fused and the unfused K-weighting side by
// side, one sample per call, at every supported rate over the test
// signals and checks every high-pass output against the derived bound
// β·M (fmaSampleBound); it logs the largest difference seen as a fraction
// of the bound.
func TestFMASampleBound(t *testing.T) {
	for _, rate := range kweightingRates {
		beta := fmaSampleBound(NewKWeighting(rate))
		worst := 0.0
		for name, x := range fmaTestSignals(rate, rate/2) {
			fused, unfused := NewKWeighting(rate), NewKWeighting(rate)
			m := 0.0
			for i := range x {
				m = max(m, math.Abs(x[i]))
				fused.Energy(x[i : i+1])
				unfused.energyUnfused(x[i : i+1])
				d := math.Abs(fused.HighPass.y1 - unfused.HighPass.y1)
				if !(d <= beta*m) {
					t.Fatalf("%d Hz, %s, sample %d: fused %.17g, unfused %.17g: difference %.3g beyond the bound %.3g", rate, name, i, fused.HighPass.y1, unfused.HighPass.y1, d, beta*m)
				}
				if m > 0 {
					worst = max(worst, d/(beta*m))
				}
			}
		}
		t.Logf("%6d Hz: β = %.3g; largest difference %.2g of the bound", rate, beta, worst)
	}
}

// blockLog runs frames (interleaved) through a segment meter from block 0
// in writes of step frames and returns the weighted energy of every
// finished 100 ms block (Meter.log, one entry per block plus the peaks).
func blockLog(t *testing.T, rate int, weights, frames []float64, step int) []float64 {
	t.Helper()
	m, err := NewMeter(rate, weights)
	if err != nil {
		t.Fatal(err)
	}
	if err := m.StartAt(0); err != nil {
		t.Fatal(err)
	}
	nch := len(weights)
	for f := frames; len(f) > 0; {
		n := min(step*nch, len(f))
		m.Write(f[:n])
		f = f[n:]
	}
	stride := 1 + 2*nch
	var e []float64
	for i := 0; i < len(m.log); i += stride {
		e = append(e, m.log[i])
	}
	return e
}

// fmaFigureTolerance is the largest difference allowed between the fused
// and the unfused K-weighting in any figure (integrated, LRA, maximum
// momentary and short-term loudness): 1e-9 LU, the bound the file
// sections state for a joined measurement; far below any displayed digit
// (common practice, no published source).
const fmaFigureTolerance = 1e-9

// fmaCase is one signal of the figure test: interleaved frames with their
// channel weights at rate.
type fmaCase struct {
	name    string
	rate    int
	weights []float64
	frames  []float64
}

// fmaFigureCases returns the signals of TestFMAFigures: stereo programme
// and dense full-scale noise at every supported rate, 5.1 programme (four
// channels in the quad kernel, the fifth alone) at 48 and 192 kHz, and the
// EBU Tech 3341 tests 1–6, 9 and 12 and Tech 3342 tests 1–4 (from memory
// per SOURCES.md §3, as in meter_test.go).
func fmaFigureCases() []fmaCase {
	var cases []fmaCase
	for _, rate := range kweightingRates {
		n := 12 * rate / 2 // 6 s: short-term windows and an LRA
		cases = append(cases,
			fmaCase{fmt.Sprintf("%d Hz programme", rate), rate, []float64{1, 1}, interleave(musicLike(11, n, rate), musicLike(12, n, rate))},
			fmaCase{fmt.Sprintf("%d Hz dense", rate), rate, []float64{1, 1}, interleave(denseFullScale(13, n), denseFullScale(14, n))})
	}
	for _, rate := range []int{48000, 192000} {
		n := 4 * rate
		ch := make([][]float64, 6)
		for c := range ch {
			ch[c] = musicLike(uint64(20+c), n, rate)
		}
		cases = append(cases, fmaCase{fmt.Sprintf("%d Hz 5.1 programme", rate), rate, []float64{1, 1, 1, 0, 1.41, 1.41}, interleave(ch...)})
	}
	stereo := []float64{1, 1}
	for _, c := range []struct {
		name string
		segs []segment
	}{
		{"Tech 3341 test 1", []segment{{-23, 20}}},
		{"Tech 3341 test 2", []segment{{-33, 20}}},
		{"Tech 3341 test 3", []segment{{-36, 10}, {-23, 60}, {-36, 10}}},
		{"Tech 3341 test 4", []segment{{-72, 10}, {-36, 10}, {-23, 60}, {-36, 10}, {-72, 10}}},
		{"Tech 3341 test 5", []segment{{-26, 20}, {-20, 20.1}, {-26, 20}}},
		{"Tech 3341 test 9", repeatSegs(20, segment{-20, 1.34}, segment{-30, 1.66})},
		{"Tech 3341 test 12", repeatSegs(20, segment{-20, 0.18}, segment{-30, 0.22})},
		{"Tech 3342 test 1", []segment{{-20, 20}, {-30, 20}}},
		{"Tech 3342 test 2", []segment{{-20, 20}, {-15, 20}}},
		{"Tech 3342 test 3", []segment{{-40, 20}, {-20, 20}}},
		{"Tech 3342 test 4", []segment{{-50, 20}, {-35, 20}, {-20, 20}, {-35, 20}, {-50, 20}}},
	} {
		cases = append(cases, fmaCase{c.name, 48000, stereo, stereoTone(c.segs...)})
	}
	cases = append(cases, fmaCase{"Tech 3341 test 6", 48000, []float64{1, 1, 1, 1.41, 1.41}, interleave(
		toneSegments(48000, 1000, segment{-28, 20}),
		toneSegments(48000, 1000, segment{-28, 20}),
		toneSegments(48000, 1000, segment{-24, 20}),
		toneSegments(48000, 1000, segment{-30, 20}),
		toneSegments(48000, 1000, segment{-30, 20}),
	)})
	return cases
}

// TestFMAFigures measures every case on the sse2 set (the unfused form,
// energyPairSSE2 and energyUnfused) and on every other set (the fused
// form), demands the fused sets' block energies and figures bit for bit
// those of the go set, and demands the integrated loudness, the loudness range and the
// maximum momentary and short-term loudness within fmaFigureTolerance,
// and every block energy within the bound that follows from the
// per-sample one (kweighting.go): |ΔE| ≤ 2β·M·√(N·W·E) + N·W·(β·M)² +
// 2γ₁₀₂₅·E, N the block's samples per channel, W the sum of the weights,
// M the largest |x| so far. It needs the sse2 set, so it runs on amd64
// builds without purego; TestFMASampleBound holds the arithmetic
// everywhere.
func TestFMAFigures(t *testing.T) {
	sets := availableKernels()
	if len(sets) < 3 || sets[1] != sse2Kernels {
		t.Skip("needs the sse2 set (unfused) beside a fused one: amd64 without purego")
	}
	const gamma1025 = 1025 * 0x1p-53 / (1 - 1025*0x1p-53)
	worstLU, worstBlock := 0.0, 0.0
	for _, c := range fmaFigureCases() {
		run := func(set kernelSet) (Result, []float64) {
			restore, err := useKernels(set)
			if err != nil {
				t.Fatal(err)
			}
			defer restore()
			return measure(t, c.rate, c.weights, c.frames, 4096), blockLog(t, c.rate, c.weights, c.frames, 4096)
		}
		want, wantBlocks := run(sse2Kernels)
		beta := fmaSampleBound(NewKWeighting(c.rate))
		w := 0.0
		for _, x := range c.weights {
			w += max(x, 0)
		}
		nch := len(c.weights)
		goResult, goBlocks := run(goKernels)
		for _, set := range append([]kernelSet{goKernels}, sets[2:]...) {
			got, gotBlocks := goResult, goBlocks
			if set != goKernels {
				got, gotBlocks = run(set)
			}
			// The fused sets are twins: the same block energies and
			// figures to the bit.
			for b := range gotBlocks {
				if b >= len(goBlocks) || !sameBits(gotBlocks[b], goBlocks[b]) {
					t.Fatalf("%s, %v set, block %d: energy differs from the go set's", c.name, set, b)
				}
			}
			for _, v := range [][2]Reading{{got.Integrated, goResult.Integrated}, {got.LoudnessRange, goResult.LoudnessRange}, {got.MaxMomentary, goResult.MaxMomentary}, {got.MaxShortTerm, goResult.MaxShortTerm}} {
				if v[0].Defined != v[1].Defined || !sameBits(v[0].Value, v[1].Value) {
					t.Fatalf("%s, %v set: figure %+v, go set %+v", c.name, set, v[0], v[1])
				}
			}
			for _, f := range []struct {
				name      string
				got, want Reading
			}{
				{"integrated", got.Integrated, want.Integrated},
				{"loudness range", got.LoudnessRange, want.LoudnessRange},
				{"max momentary", got.MaxMomentary, want.MaxMomentary},
				{"max short-term", got.MaxShortTerm, want.MaxShortTerm},
			} {
				if !sameReading(f.got, f.want, fmaFigureTolerance) {
					t.Errorf("%s, %v set: %s %+v, unfused %+v", c.name, set, f.name, f.got, f.want)
				}
				if f.got.Defined {
					worstLU = max(worstLU, math.Abs(f.got.Value-f.want.Value))
				}
			}
			if len(gotBlocks) != len(wantBlocks) {
				t.Fatalf("%s, %v set: %d blocks, unfused %d", c.name, set, len(gotBlocks), len(wantBlocks))
			}
			m := 0.0
			for b := range gotBlocks {
				// Block b ends at frame round((b+1)·rate/10); one frame more
				// covers any rounding of the boundary.
				lo, hi := (b*c.rate+5)/10, min(((b+1)*c.rate+5)/10+1, len(c.frames)/nch)
				for _, x := range c.frames[lo*nch : hi*nch] {
					m = max(m, math.Abs(x))
				}
				n := float64(hi - lo + 1)
				e := wantBlocks[b]
				bound := 2*beta*m*math.Sqrt(n*w*e) + n*w*beta*beta*m*m + 2*gamma1025*e
				d := math.Abs(gotBlocks[b] - e)
				if !(d <= bound) {
					t.Fatalf("%s, %v set, block %d: energy %.17g, unfused %.17g, beyond the bound %.3g", c.name, set, b, gotBlocks[b], e, bound)
				}
				if bound > 0 {
					worstBlock = max(worstBlock, d/bound)
				}
			}
		}
	}
	t.Logf("largest figure difference %.2g LU (tolerance %g); largest block difference %.2g of its bound", worstLU, fmaFigureTolerance, worstBlock)
}

// kweightingEdgeSignals returns K-weighting kernel inputs of n samples
// beyond those of kernelSignals: denormals (alone and after programme),
// ±full scale (a square wave and alternating samples), the largest
// magnitude the meter measures (MaxMagnitude, as the kernels must survive
// what the meter feeds them), signed zeros, and NaN and ±Inf together.
func kweightingEdgeSignals(n int) map[string][]float64 {
	r := rand.New(rand.NewPCG(uint64(n), 5))
	sig := func(f func(i int) float64) []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = f(i)
		}
		return x
	}
	prog := musicLike(uint64(n)+8, n, 48000)
	return map[string][]float64{
		"denormal":     sig(func(int) float64 { return (2*r.Float64() - 1) * 0x1p-1060 }),
		"to-denormal":  sig(func(i int) float64 { return []float64{prog[i], 0x1p-1070 * prog[i]}[min(i*2/max(n, 1), 1)] }),
		"square":       sig(func(i int) float64 { return []float64{1, -1}[(i/5)%2] }),
		"alternating":  sig(func(i int) float64 { return []float64{1, -1}[i%2] }),
		"max":          sig(func(i int) float64 { return []float64{MaxMagnitude, -MaxMagnitude, MaxMagnitude * r.Float64()}[i%3] }),
		"signed-zeros": sig(func(i int) float64 { return []float64{0, math.Copysign(0, -1)}[r.IntN(2)] }),
		"nan-inf":      sig(func(i int) float64 { return []float64{prog[i], math.NaN(), math.Inf(1), math.Inf(-1)}[min(i%11, 3)] }),
	}
}

// TestKWeightingKernelsEdgeInputs checks every K-weighting kernel path
// (energyPair, energyQuad, energyOne) against its Go twin (kweightingTwin)
// on the edge signals, at every length up to 40 (every remainder of the
// staged kernel's twelve-sample loop and its three-sample lag) and in
// writes of 1, 5 and all: energies and filter state bit for bit, on every
// kernel set.
func TestKWeightingKernelsEdgeInputs(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		twin := kweightingTwin()
		for n := range 41 {
			sigs := kweightingEdgeSignals(n)
			names := []string{"denormal", "to-denormal", "square", "alternating", "max", "signed-zeros", "nan-inf"}
			for i, name := range names {
				x := [4][]float64{sigs[name], sigs[names[(i+1)%len(names)]], sigs[names[(i+2)%len(names)]], sigs[names[(i+3)%len(names)]]}
				rates := [4]int{48000, 8000, 384000, 44100}
				for _, step := range []int{1, 5, max(n, 1)} {
					var f, ref [4]KWeighting
					for c := range f {
						f[c] = NewKWeighting(rates[c])
						ref[c] = f[c]
					}
					label := fmt.Sprintf("%s…, %d samples in writes of %d", name, n, step)
					for lo := 0; lo < n; lo += step {
						hi := min(lo+step, n)
						var got [4]float64
						got[0], got[1] = energyPair(&f[0], &f[1], x[0][lo:hi], x[1][lo:hi])
						g := energyQuad([4]*KWeighting{&f[0], &f[1], &f[2], &f[3]}, [4][]float64{x[2][lo:hi], x[3][lo:hi], x[0][lo:hi], x[1][lo:hi]})
						got[2] = energyOne(&f[2], x[1][lo:hi])
						var want [4]float64
						want[0], want[1] = twin(&ref[0], x[0][lo:hi]), twin(&ref[1], x[1][lo:hi])
						w := [4]float64{twin(&ref[0], x[2][lo:hi]), twin(&ref[1], x[3][lo:hi]), twin(&ref[2], x[0][lo:hi]), twin(&ref[3], x[1][lo:hi])}
						want[2] = twin(&ref[2], x[1][lo:hi])
						for c := range 4 {
							if !sameBits(g[c], w[c]) {
								t.Fatalf("%s, samples %d–%d: quad lane %d %.17g, twin %.17g", label, lo, hi, c, g[c], w[c])
							}
						}
						for c := range 3 {
							if !sameBits(got[c], want[c]) {
								t.Fatalf("%s, samples %d–%d: channel %d %.17g, twin %.17g", label, lo, hi, c, got[c], want[c])
							}
						}
						for c := range 4 {
							if !sameState(&f[c], &ref[c]) {
								t.Fatalf("%s, samples %d–%d: filter %d state differs from the twin's", label, lo, hi, c)
							}
						}
					}
				}
			}
		}
	})
}

// TestEnergyFusedDiffersFromUnfused makes sure the two forms are really
// different computations (the sse2 set's carve-out is not vacuous) and
// that Energy is the fused one: on programme at 48 kHz their energies
// differ in the last bits, and Energy's equals the plain loop with
// math.FMA written out here.
func TestEnergyFusedDiffersFromUnfused(t *testing.T) {
	x := musicLike(3, 48000, 48000)
	fused, unfused := NewKWeighting(48000), NewKWeighting(48000)
	k := NewKWeighting(48000)
	ef, eu := fused.Energy(x), unfused.energyUnfused(x)
	if ef == eu {
		t.Errorf("fused and unfused energies are the same bits (%.17g): the forms do not differ", ef)
	}
	s, h := k.Shelf, k.HighPass
	var x1, x2, u1, u2, v1, v2, e float64
	for _, x0 := range x {
		u := math.FMA(-s.A1, u1, math.FMA(-s.A2, u2, math.FMA(s.B0, x0, math.FMA(s.B1, x1, float64(s.B2*x2)))))
		v := math.FMA(-h.A1, v1, math.FMA(-h.A2, v2, u+math.FMA(-2, u1, u2)))
		x2, x1, u2, u1, v2, v1 = x1, x0, u1, u, v1, v
		e = math.FMA(v, v, e)
	}
	if !sameBits(ef, e) {
		t.Errorf("Energy %.17g, the fused loop written out %.17g", ef, e)
	}
}

// TestEnergyOctMatchesEnergy checks the eight-lane K-weighting path
// (energyOct: energyOctAVX512 on the avx512 set, groups of four, two and
// one elsewhere) against the Go twin (kweightingTwin) for every channel
// count from 1 to 8, with a different rate in every lane, on programme,
// full-scale, spiky, non-finite and edge signals, at lengths around its
// three-sample loop and in writes of several sizes: every energy and the
// filter state after every call bit for bit, on every kernel set.
func TestEnergyOctMatchesEnergy(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		twin := kweightingTwin()
		rates := [8]int{48000, 44100, 96000, 8000, 384000, 22050, 192000, 32000}
		for _, n := range []int{0, 1, 2, 3, 4, 5, 7, 23, 24, 25, 31, 47, 48, 49, 1024, 4801} {
			sigs := kernelSignals(n)
			for k, v := range kweightingEdgeSignals(n) {
				sigs[k] = v
			}
			names := []string{"programme", "dense-full-scale", "spikes", "non-finite", "denormal", "square", "max", "signed-zeros", "nan-inf", "to-denormal"}
			for channels := 1; channels <= 8; channels++ {
				for _, step := range []int{1, 3, 1024} {
					f := make([]KWeighting, channels)
					ref := make([]KWeighting, channels)
					fp := make([]*KWeighting, channels)
					for c := range f {
						f[c] = NewKWeighting(rates[c])
						ref[c] = f[c]
						fp[c] = &f[c]
					}
					for lo := 0; lo < n; lo += step {
						hi := min(lo+step, n)
						x := make([][]float64, channels)
						for c := range x {
							x[c] = sigs[names[(c+channels)%len(names)]][lo:hi]
						}
						e := energyOct(fp, x)
						for c := range channels {
							if w := twin(&ref[c], x[c]); !sameBits(e[c], w) {
								t.Fatalf("%d channels, %d samples in writes of %d, samples %d–%d, lane %d: kernel %.17g, twin %.17g", channels, n, step, lo, hi, c, e[c], w)
							}
							if !sameState(&f[c], &ref[c]) {
								t.Fatalf("%d channels, %d samples in writes of %d, lane %d: filter state differs from the twin's", channels, n, step, c)
							}
						}
					}
				}
			}
		}
	})
}

// BenchmarkKWeighting48k5ch is the K-weighting energy of the five weighted
// channels of 5.1 (L R C Ls Rs) as the meter runs them: in one eight-lane
// call where the set has it ("eight-lane", energyOct), and four plus one
// (energyQuad, energyOne: "four-plus-one") in the same run. Reported per
// five channels.
func BenchmarkKWeighting48k5ch(b *testing.B) {
	const rate = 48000
	x := make([][]float64, 5)
	for c := range x {
		x[c] = musicLike(uint64(c)+1, benchSeconds*rate, rate)
	}
	for _, mode := range []string{"eight-lane", "four-plus-one"} {
		b.Run(mode, func(b *testing.B) {
			if mode == "eight-lane" && !octEnergy() {
				b.Skip("no eight-lane kernel on this set")
			}
			f := make([]KWeighting, 5)
			fp := make([]*KWeighting, 5)
			for c := range f {
				f[c] = NewKWeighting(rate)
				fp[c] = &f[c]
			}
			b.SetBytes(int64(5 * len(x[0]) * 8))
			clock := audiotest.StartRealtimeThread(b)
			var sink float64
			in := make([][]float64, 5)
			for range b.N {
				for i := 0; i < len(x[0]); i += chunkFrames {
					j := min(i+chunkFrames, len(x[0]))
					for c := range in {
						in[c] = x[c][i:j]
					}
					var e [8]float64
					if mode == "eight-lane" {
						e = energyOct(fp, in)
					} else {
						e = energyGroups(fp, in)
					}
					sink += e[0] + e[4]
				}
			}
			_ = sink
			clock.Report(benchSeconds)
		})
	}
}
