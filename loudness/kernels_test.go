package loudness

import (
	"fmt"
	"math"
	"testing"
)

// The SIMD kernels (truepeak_amd64.s, kweighting_amd64.s) claim to perform
// the very floating-point operations of the Go loops they replace, in the
// same order, so these tests demand bit-for-bit equal results. On platforms
// without them the kernels are the Go loops and the tests pass trivially.

// kweightingTwin returns the Go loop the K-weighting kernels of the set in
// use are twins of: Energy (fused multiply-adds) on the go, avx2 and
// avx512 sets, energyUnfused on the sse2 set, whose CPUs may lack FMA.
func kweightingTwin() func(k *KWeighting, x []float64) float64 {
	if kernels == sse2Kernels {
		return (*KWeighting).energyUnfused
	}
	return (*KWeighting).Energy
}

// kernelLengths are the input lengths (new samples after the 11-sample
// history) the kernel cross-checks run at: none, one, around a tap count,
// around the skip run, around a chunk and around a 100 ms block at 48 kHz,
// odd and even so that both the two-lane loop and its one-window tail run.
var kernelLengths = []int{0, 1, 2, 11, 12, 13, 31, 32, 33, 1023, 1024, 1025, 4801}

// kernelSignals returns test inputs of n samples: programme-like, dense
// near full scale, and one with spikes, a NaN and infinities, which the
// kernels must pass through as the Go loops do.
func kernelSignals(n int) map[string][]float64 {
	spiky := musicLike(uint64(n)+3, n, 48000)
	for i := 0; i < n; i += 97 {
		spiky[i] *= 9
	}
	bad := musicLike(uint64(n)+4, n, 48000)
	for i, v := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		if j := (i + 1) * n / 4; j < n {
			bad[j] = v
		}
	}
	return map[string][]float64{
		"programme":        musicLike(uint64(n)+1, n, 48000),
		"dense-full-scale": denseFullScale(uint64(n)+2, n),
		"spikes":           spiky,
		"non-finite":       bad,
	}
}

// sameBits reports whether a and b are the same float64 bit for bit (+0
// unequal to −0), or both NaN: which of two NaN operands the hardware
// passes on depends on operand order, which the compiler may swap for a
// commutative operation, and no figure distinguishes one NaN from another.
func sameBits(a, b float64) bool {
	return math.Float64bits(a) == math.Float64bits(b) || a != a && b != b
}

// forEachKernelSet runs f once on every kernel set this build and CPU can
// run (go, then sse2, avx2 and avx512 where present), as a subtest named
// after it.
func forEachKernelSet(t *testing.T, f func(t *testing.T)) {
	t.Helper()
	for _, k := range availableKernels() {
		t.Run(k.String(), func(t *testing.T) {
			restore, err := useKernels(k)
			if err != nil {
				t.Fatal(err)
			}
			defer restore()
			f(t)
		})
	}
}

// TestKernelSetsAvailable checks the kernel choice: the Go loops always
// run, this amd64 build offers SSE2 unless built with -tags purego, and
// the environment cap never selects a set the CPU lacks.
func TestKernelSetsAvailable(t *testing.T) {
	sets := availableKernels()
	if len(sets) == 0 || sets[0] != goKernels {
		t.Fatalf("available kernel sets %v: want the Go loops first", sets)
	}
	for _, c := range []struct {
		best kernelSet
		env  string
		want kernelSet
	}{
		{avx2Kernels, "", avx2Kernels},
		{avx2Kernels, "sse2", sse2Kernels},
		{avx2Kernels, "go", goKernels},
		{sse2Kernels, "avx2", sse2Kernels},
		{goKernels, "avx2", goKernels},
		{avx2Kernels, "bogus", avx2Kernels},
		{avx512Kernels, "", avx512Kernels},
		{avx512Kernels, "avx2", avx2Kernels},
		{avx2Kernels, "avx512", avx2Kernels},
	} {
		if got := chooseKernels(c.best, c.env); got != c.want {
			t.Errorf("best %v, %s=%q: chose %v, want %v", c.best, KernelEnv, c.env, got, c.want)
		}
	}
	if _, err := useKernels(bestKernels() + 1); err == nil {
		t.Error("useKernels accepted a set beyond the best available")
	}
}

// truePeakKernels are the interpolator kernels and their Go references.
var truePeakKernels = []struct {
	name        string
	kernel, ref func(w []float64, sq float64) float64
}{
	{"4x", peak4Squares, peak4SquaresGo},
	{"2x", peak2Squares, peak2SquaresGo},
}

// TestPeakSquaresMatchGo checks the true-peak kernels in use (4× and 2×)
// against the Go loops on whole windows, at every start offset within 32
// bytes (the kernels' loads are unaligned) and from several running
// maxima, on every kernel set.
func TestPeakSquaresMatchGo(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, k := range truePeakKernels {
			for _, n := range kernelLengths {
				for name, x := range kernelSignals(n + history + 4) {
					for offset := range 4 {
						w := x[offset : offset+n+history]
						for _, sq := range []float64{0, 0.01, 0.25, 4, math.Inf(1), math.NaN()} {
							got, want := k.kernel(w, sq), k.ref(w, sq)
							if !sameBits(got, want) {
								t.Errorf("%s %s, %d samples, offset %d, sq %v: kernel %.17g, Go %.17g", k.name, name, n, offset, sq, got, want)
							}
						}
					}
				}
			}
			// Window by window (and in groups up to four, every lane), so
			// that no difference hides behind a larger maximum.
			for name, x := range kernelSignals(4801) {
				for i := 0; i+interpolatorTaps+3 <= len(x); i++ {
					for extra := range 4 {
						w := x[i : i+interpolatorTaps+extra]
						if got, want := k.kernel(w, 0), k.ref(w, 0); !sameBits(got, want) {
							t.Fatalf("%s %s, %d samples at %d: kernel %.17g, Go %.17g", k.name, name, len(w), i, got, want)
						}
					}
				}
			}
			// Fewer samples than one window: nothing to compute.
			for n := range interpolatorTaps {
				w := denseFullScale(uint64(n), n)
				if got := k.kernel(w, 0.5); got != 0.5 {
					t.Errorf("%s, %d samples: %v, want the running maximum 0.5 unchanged", k.name, n, got)
				}
			}
		}
	})
}

// TestMaxAbsMatchesGo checks the sample-peak scan in use against the Go
// loop for every length up to 70 and every start offset, with the largest
// magnitude in every position and with NaN and ±Inf present (which order
// above every finite value, as the rejection scan relies on).
func TestMaxAbsMatchesGo(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		base := musicLike(9, 80, 48000)
		for n := range 71 {
			for offset := range 4 {
				x := append([]float64(nil), base[offset:offset+n]...)
				if got, want := maxAbs(x), maxAbsGo(x); !sameBits(got, want) {
					t.Fatalf("%d samples, offset %d: %v, Go %v", n, offset, got, want)
				}
				for i := range x {
					for _, v := range []float64{-3, 2.5, math.Inf(-1), math.NaN(), -0.0} {
						y := append([]float64(nil), x...)
						y[i] = v
						if got, want := maxAbs(y), maxAbsGo(y); !sameBits(got, want) {
							t.Fatalf("%d samples, %v at %d: %v, Go %v", n, v, i, got, want)
						}
					}
				}
			}
		}
	})
}

// sameState reports whether two K-weighting filters hold the same state
// (sameBits for every value).
func sameState(k, l *KWeighting) bool {
	a := [...]float64{k.Shelf.x1, k.Shelf.x2, k.Shelf.y1, k.Shelf.y2, k.HighPass.x1, k.HighPass.x2, k.HighPass.y1, k.HighPass.y2}
	b := [...]float64{l.Shelf.x1, l.Shelf.x2, l.Shelf.y1, l.Shelf.y2, l.HighPass.x1, l.HighPass.x2, l.HighPass.y1, l.HighPass.y2}
	for i := range a {
		if !sameBits(a[i], b[i]) {
			return false
		}
	}
	return true
}

// TestEnergyPairMatchesEnergy checks the two-channel K-weighting kernel
// against its Go twin (kweightingTwin: Energy, or energyUnfused on the
// sse2 set) on each channel: every returned energy and the filter state
// after every call bit for bit, for the same and for different
// coefficients in the two lanes, over writes of several sizes.
func TestEnergyPairMatchesEnergy(t *testing.T) {
	forEachKernelSet(t, testEnergyPairMatchesEnergy)
}

func testEnergyPairMatchesEnergy(t *testing.T) {
	twin := kweightingTwin()
	for _, rates := range [][2]int{{48000, 48000}, {44100, 96000}} {
		for _, n := range kernelLengths {
			sigs := kernelSignals(n)
			for _, names := range [][2]string{{"programme", "dense-full-scale"}, {"spikes", "programme"}, {"non-finite", "spikes"}} {
				a, b := sigs[names[0]], sigs[names[1]]
				for _, step := range []int{1, 7, 1024, 4801} {
					label := fmt.Sprintf("%d/%d Hz, %s/%s, %d samples in writes of %d", rates[0], rates[1], names[0], names[1], n, step)
					k, l := NewKWeighting(rates[0]), NewKWeighting(rates[1])
					refK, refL := k, l
					for i := 0; i < n; i += step {
						j := min(i+step, n)
						ea, eb := energyPair(&k, &l, a[i:j], b[i:j])
						wa, wb := twin(&refK, a[i:j]), twin(&refL, b[i:j])
						if !sameBits(ea, wa) || !sameBits(eb, wb) {
							t.Fatalf("%s, samples %d–%d: kernel %.17g, %.17g; Energy %.17g, %.17g", label, i, j, ea, eb, wa, wb)
						}
						if !sameState(&k, &refK) || !sameState(&l, &refL) {
							t.Fatalf("%s, samples %d–%d: filter state differs from Energy's", label, i, j)
						}
					}
				}
			}
		}
	}
}

// TestMeterChannelPairing checks that the meter, which K-weights weighted
// channels two at a time, gives every channel count the same figures as
// the plain reference: odd counts leave one channel to Energy, and a zero
// weight (LFE) shifts the pairing.
func TestMeterChannelPairing(t *testing.T) {
	const rate = 48000
	n := 2*rate + 123
	for _, weights := range [][]float64{
		{1}, {1, 1}, {1, 1, 1}, {1, 1, 1, 0, 1.41, 1.41}, {0, 1, 1.41}, {1.41, 0, 1, 1, 0},
	} {
		channels := make([][]float64, len(weights))
		for c := range channels {
			channels[c] = musicLike(uint64(c)+40, n, rate)
		}
		wantI, _, wantM, _ := referenceLoudness(channels, weights, rate)
		r := measure(t, rate, weights, interleave(channels...), 1000)
		// Reference and meter sum the same energies in different orders:
		// 1e-9 LU is far below any displayed digit (common practice, no
		// published source).
		if !sameReading(r.Integrated, wantI, 1e-9) || !sameReading(r.MaxMomentary, wantM, 1e-9) {
			t.Errorf("weights %v: integrated %+v, max momentary %+v; reference %+v, %+v", weights, r.Integrated, r.MaxMomentary, wantI, wantM)
		}
	}
}

// TestSplitFastMatchesGo checks the fused stereo de-interleave and
// sample-peak pass (splitFast) against the plain loop for every chunk
// length up to 70 frames and on every kernel set: the two channels' inputs
// and the block peaks bit for bit, and a refusal (false) whenever the chunk
// holds a sample the meter cannot measure, which the Go loop then counts.
func TestSplitFastMatchesGo(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		base := interleave(musicLike(21, 80, 48000), denseFullScale(22, 80))
		for n := range 71 {
			for _, bad := range []float64{0, math.NaN(), math.Inf(-1), 2 * MaxMagnitude, -3, -0.0} {
				frames := append([]float64(nil), base[:2*n]...)
				if n > 0 && bad != 0 {
					frames[(7*n)%(2*n)] = bad
				}
				m, _ := NewMeter(48000, []float64{1, 1})
				m.blockPeak[0], m.blockPeak[1] = 0.01, 0.02
				ok := m.splitFast(frames, n)
				var want [2]uint64
				rejected := false
				for i := range n {
					for c := range 2 {
						a := math.Float64bits(frames[2*i+c]) &^ signBit
						want[c] = max(want[c], a)
						rejected = rejected || a > maxMagnitudeBits
					}
				}
				if !ok {
					if kernels >= avx2Kernels && n >= 4 && !rejected {
						t.Fatalf("%d frames, %v: refused a measurable chunk", n, bad)
					}
					continue
				}
				if rejected {
					t.Fatalf("%d frames, %v: accepted a chunk with an unmeasurable sample", n, bad)
				}
				for c := range 2 {
					in := m.peaks[c].input(n)
					for i := range n {
						if !sameBits(in[i], frames[2*i+c]) {
							t.Fatalf("%d frames: channel %d sample %d is %v, want %v", n, c, i, in[i], frames[2*i+c])
						}
					}
					if w := max([]float64{0.01, 0.02}[c], math.Float64frombits(want[c])); !sameBits(m.blockPeak[c], w) {
						t.Fatalf("%d frames: channel %d peak %v, want %v", n, c, m.blockPeak[c], w)
					}
				}
			}
		}
	})
}

// TestEnergyQuadMatchesEnergy checks the four-channel K-weighting kernel
// against its Go twin (kweightingTwin) on each channel: every energy and the filter state after
// every call bit for bit, with four different rates (so different
// coefficients) in the four lanes and signals including non-finite ones,
// over writes of several sizes, on every kernel set.
func TestEnergyQuadMatchesEnergy(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		rates := [4]int{48000, 44100, 96000, 8000}
		twin := kweightingTwin()
		for _, n := range kernelLengths {
			sigs := kernelSignals(n)
			x := [4][]float64{sigs["programme"], sigs["dense-full-scale"], sigs["spikes"], sigs["non-finite"]}
			for _, step := range []int{1, 7, 1024, 4801} {
				var f, ref [4]KWeighting
				for i := range f {
					f[i] = NewKWeighting(rates[i])
					ref[i] = f[i]
				}
				for i := 0; i < n; i += step {
					j := min(i+step, n)
					e := energyQuad([4]*KWeighting{&f[0], &f[1], &f[2], &f[3]}, [4][]float64{x[0][i:j], x[1][i:j], x[2][i:j], x[3][i:j]})
					for c := range 4 {
						if w := twin(&ref[c], x[c][i:j]); !sameBits(e[c], w) {
							t.Fatalf("%d samples in writes of %d, lane %d, samples %d–%d: kernel %.17g, Energy %.17g", n, step, c, i, j, e[c], w)
						}
						if !sameState(&f[c], &ref[c]) {
							t.Fatalf("%d samples in writes of %d, lane %d: filter state differs from Energy's", n, step, c)
						}
					}
				}
			}
		}
	})
}

// TestEnergyOneMatchesEnergy checks the single-channel path the meter
// takes for an odd weighted channel against its Go twin (kweightingTwin):
// energy and state bit for bit, every signal and write size, on every
// kernel set.
func TestEnergyOneMatchesEnergy(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		twin := kweightingTwin()
		for _, rate := range []int{8000, 48000, 192000} {
			for _, n := range kernelLengths {
				for name, x := range kernelSignals(n) {
					for _, step := range []int{1, 3, 4, 1024} {
						k := NewKWeighting(rate)
						ref := k
						for i := 0; i < n; i += step {
							j := min(i+step, n)
							if got, want := energyOne(&k, x[i:j]), twin(&ref, x[i:j]); !sameBits(got, want) {
								t.Fatalf("%d Hz, %s, %d samples in writes of %d, samples %d–%d: %.17g, Energy %.17g", rate, name, n, step, i, j, got, want)
							}
							if !sameState(&k, &ref) {
								t.Fatalf("%d Hz, %s, %d samples in writes of %d: state differs from Energy's", rate, name, n, step)
							}
						}
					}
				}
			}
		}
	})
}

// TestSplit6MatchesGo checks the one-pass 5.1 de-interleave (split6)
// against splitChannel, the reference, for every chunk length up to 40
// frames with a bad or extreme sample in every channel position: the six
// inputs and block peaks bit for bit, and a refusal (false) exactly when
// the chunk holds a sample the meter cannot measure; on every kernel set.
func TestSplit6MatchesGo(t *testing.T) {
	forEachKernelSet(t, testSplit6MatchesGo)
}

func testSplit6MatchesGo(t *testing.T) {
	weights := []float64{1, 1, 1, 0, 1.41, 1.41}
	var chans [6][]float64
	for c := range chans {
		chans[c] = musicLike(uint64(30+c), 40, 48000)
	}
	base := interleave(chans[:]...)
	for n := range 41 {
		for _, bad := range []float64{0, math.NaN(), math.Inf(1), -2 * MaxMagnitude, -MaxMagnitude, -3, -0.0} {
			for at := 0; at < max(1, 6*n); at += 5 {
				frames := append([]float64(nil), base[:6*n]...)
				if n > 0 && bad != 0 {
					frames[at] = bad
				}
				got, _ := NewMeter(48000, weights)
				want, _ := NewMeter(48000, weights)
				for c := range 6 {
					got.blockPeak[c], want.blockPeak[c] = 0.01*float64(c), 0.01*float64(c)
				}
				ok := got.split6(frames, n)
				for c := range 6 {
					want.splitChannel(frames, n, c)
				}
				if ok != (want.rejected == 0) {
					t.Fatalf("%d frames, %v at %d: split6 %v, reference rejected %d", n, bad, at, ok, want.rejected)
				}
				if !ok {
					continue
				}
				for c := range 6 {
					g, w := got.peaks[c].input(n), want.peaks[c].input(n)
					for i := range n {
						if !sameBits(g[i], w[i]) {
							t.Fatalf("%d frames: channel %d sample %d is %v, want %v", n, c, i, g[i], w[i])
						}
					}
					if !sameBits(got.blockPeak[c], want.blockPeak[c]) {
						t.Fatalf("%d frames, %v at %d: channel %d peak %v, want %v", n, bad, at, c, got.blockPeak[c], want.blockPeak[c])
					}
				}
			}
		}
	}
}

// TestTruePeakSameOnEverySet runs the whole detector (pre-scan, skip,
// stretches of runs, kernels, tails, flush) over signals in 100 ms writes
// at 48 and 96 kHz on every kernel set and demands the go set's peak of
// every write bit for bit (the sse2 set, float64 where go, avx2 and
// avx512 are float32, within peak32Error): programme, dense noise, spikes, and a periodic
// signal whose every run peaks at about the same height (so that the skip
// test decides at the margin).
func TestTruePeakSameOnEverySet(t *testing.T) {
	for _, rate := range []int{48000, 96000} {
		n := 2 * rate
		periodic := make([]float64, n)
		for i := range periodic {
			periodic[i] = 0.7*math.Sin(2*math.Pi*float64(i)/32.0+0.4) + 0.2*math.Sin(2*math.Pi*float64(i)/7.3)
		}
		sigs := map[string][]float64{
			"programme": musicLike(61, n, rate),
			"dense":     denseFullScale(62, n),
			"spikes":    kernelSignals(n)["spikes"],
			"periodic":  periodic,
		}
		peaks := func() map[string][]float64 {
			out := map[string][]float64{}
			for name, x := range sigs {
				tp, _ := NewTruePeak(rate)
				for f := x; len(f) > 0; {
					k := min(len(f), rate/10)
					out[name] = append(out[name], tp.Peak(f[:k], 0))
					f = f[k:]
				}
				out[name] = append(out[name], tp.Flush(0))
			}
			return out
		}
		restore, _ := useKernels(goKernels)
		want := peaks()
		restore()
		forEachKernelSet(t, func(t *testing.T) {
			got := peaks()
			for name := range sigs {
				for i := range want[name] {
					if kernels == sse2Kernels {
						// The sse2 set's interpolators are float64: within
						// peak32Error of the go set's float32 ones.
						if d := math.Abs(got[name][i] - want[name][i]); !(d <= peak32Error(OversamplingFactor(rate), maxAbsGo(sigs[name]))) {
							t.Fatalf("%d Hz, %s, write %d: %.17g, go set %.17g, beyond the float32 bound", rate, name, i, got[name][i], want[name][i])
						}
						continue
					}
					if !sameBits(got[name][i], want[name][i]) {
						t.Fatalf("%d Hz, %s, write %d: %.17g, go set %.17g", rate, name, i, got[name][i], want[name][i])
					}
				}
			}
		})
	}
}
