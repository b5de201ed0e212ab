package measure

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"unsafe"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// The probes' kernels claim the very floating-point operations of the Go
// loops in the same order (hygiene_kernel.go), and the probes built on them
// claim the figures of the loops they replaced (referenceWrite below, the
// probes as they were before the kernels): these tests demand both bit for
// bit, clipping counts, runs, extremes and window minima included.

// TestFrameStateLayout checks the offsets hygiene_avx2_amd64.s uses.
func TestFrameStateLayout(t *testing.T) {
	var st frameState
	for _, c := range []struct {
		name      string
		got, want uintptr
	}{
		{"sums", unsafe.Offsetof(st.sums), 0},
		{"pair", unsafe.Offsetof(st.pair), 64},
		{"pair.slr", unsafe.Offsetof(st.pair) + unsafe.Offsetof(st.pair.slr), 96},
		{"pair.maxDiff", unsafe.Offsetof(st.pair) + unsafe.Offsetof(st.pair.maxDiff), 104},
		{"gains", unsafe.Offsetof(st.gains), 112},
		{"channels", unsafe.Offsetof(st.channels), 240},
		{"left", unsafe.Offsetof(st.left), 248},
		{"right", unsafe.Offsetof(st.right), 256},
		{"full", unsafe.Offsetof(st.full), 264},
		{"lanes", unsafe.Offsetof(st.lanes), 272},
		{"gains2", unsafe.Offsetof(st.gains2), 336},
	} {
		if c.got != c.want {
			t.Errorf("frameState.%s at offset %d, the assembly expects %d", c.name, c.got, c.want)
		}
	}
}

// hygienePath is one way of running the probes' kernels: the Go loops,
// the AVX2 kernels, or the AVX-512 ones where a kernel has them (the AVX2
// ones elsewhere).
type hygienePath int

const (
	goPath hygienePath = iota
	avx2Path
	avx512Path
)

func (p hygienePath) String() string { return [...]string{"go", "avx2", "avx512"}[p] }

// kernelPaths are the probe paths this build and CPU run: Go, and AVX2
// and AVX-512 where present.
func kernelPaths() []hygienePath {
	paths := []hygienePath{goPath}
	if haveHygieneAVX2 {
		paths = append(paths, avx2Path)
	}
	if haveHygieneAVX512 {
		paths = append(paths, avx512Path)
	}
	return paths
}

// simdPaths are kernelPaths without the Go loops: the kernels to check
// against them.
func simdPaths() []hygienePath { return kernelPaths()[1:] }

// useHygienePath switches the probes' kernels to path p for a test (until
// its cleanup).
func useHygienePath(t testing.TB, p hygienePath) {
	oldAVX2, oldAVX512 := hygieneAVX2, hygieneAVX512
	hygieneAVX2, hygieneAVX512 = p >= avx2Path, p >= avx512Path
	t.Cleanup(func() { hygieneAVX2, hygieneAVX512 = oldAVX2, oldAVX512 })
}

// probeSignal returns frames of nc channels: noise at programme level with
// stretches at and beyond full scale (clipping runs of every length,
// also across the frames the tests cut blocks at), signed zeros, one
// channel copying another (dual mono) and, when bad is set, a NaN and
// infinities (which only the kernels see: the engine stops the probes
// before them).
func probeSignal(frames, nc int, seed uint64, bad bool) []float64 {
	rng := rand.New(rand.NewPCG(seed, 5))
	buf := make([]float64, frames*nc)
	for i := range buf {
		buf[i] = 0.15 * rng.NormFloat64()
	}
	for k := 0; k < 12 && frames > 0; k++ {
		at, c := rng.IntN(frames), rng.IntN(nc)
		n := 1 + rng.IntN(9)
		for f := at; f < min(frames, at+n); f++ {
			buf[f*nc+c] = []float64{1, -1, 0.99999988079071044921875, 1.5}[rng.IntN(4)]
		}
	}
	for f := 0; f < frames; f += 11 {
		buf[f*nc] = math.Copysign(0, -1)
		if nc > 1 {
			buf[f*nc+nc-1] = buf[f*nc]
		}
	}
	if bad && frames > 3 {
		buf[(frames/3)*nc] = math.NaN()
		buf[(frames/2)*nc+nc-1] = math.Inf(-1)
	}
	return buf
}

// probeLengths are the frame counts the kernel tests run: around the two-
// and four-frame steps (every remainder of four from 4 frames on) and a
// block.
var probeLengths = []int{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 64, 4095, 4096, 4097}

func sameFloat(a, b float64) bool {
	return math.Float64bits(a) == math.Float64bits(b) || a != a && b != b
}

func samePair(a, b pairSums) bool {
	return sameFloat(a.sl, b.sl) && sameFloat(a.sr, b.sr) && sameFloat(a.sll, b.sll) &&
		sameFloat(a.srr, b.srr) && sameFloat(a.slr, b.slr) && sameFloat(a.maxDiff, b.maxDiff)
}

// TestStereoKernelMatchesGo checks stereoStretchAVX2 and
// stereoStretchAVX512 against their Go twin (through stereoStretch, each
// path switched on): every frame count up to 70 (both sides of the
// two-frame steps) and longer stretches, with and
// without NaN and infinities; subnormals; values whose squares overflow,
// with ±full scale and signed zeros; a NaN running maximum of |L−R|; and
// clipping levels from 0 (every sample flagged, unless there is none) to
// the bits just above +Inf (only NaN flagged). Every level the probes pass
// is the bit pattern of a non-negative float64 (hygiene.fullBits), the
// range the kernel's signed comparison with full−1 is exact in.
func TestStereoKernelMatchesGo(t *testing.T) {
	if len(simdPaths()) == 0 {
		t.Skip("no SIMD kernels in this build or on this CPU")
	}
	for _, p := range simdPaths() {
		t.Run(p.String(), func(t *testing.T) {
			useHygienePath(t, p)
			testStereoKernelMatchesGo(t)
		})
	}
}

func testStereoKernelMatchesGo(t *testing.T) {
	check := func(what string, buf []float64, start pairSums, full uint64) {
		t.Helper()
		a, b := start, start
		ha := stereoStretchGo(buf, &a, full)
		hb := stereoStretch(buf, &b, full)
		if ha != hb || !samePair(a, b) {
			t.Errorf("%s, %d frames: Go %v %+v, kernel %v %+v", what, len(buf)/2, ha, a, hb, b)
		}
	}
	full := math.Float64bits((math.Ldexp(1, 23) - 1) / math.Ldexp(1, 23))
	lengths := append([]int{4095, 4096, 4097}, make([]int, 71)...)
	for i := range 71 {
		lengths[3+i] = i
	}
	for _, n := range lengths {
		for _, bad := range []bool{false, true} {
			buf := probeSignal(n, 2, uint64(n), bad)
			check(fmt.Sprintf("bad %v", bad), buf, pairSums{0.25, -0.5, 3, 4, -1, 0.125}, full)
		}
	}
	sub, big := make([]float64, 2*70), make([]float64, 2*70)
	for i := range sub {
		sub[i] = math.Ldexp(float64(i%13)-6, -1070) // subnormals, both signs
		big[i] = []float64{1e200, -1e300, 1, -1, 0, math.Copysign(0, -1)}[i%6]
	}
	x := probeSignal(70, 2, 7, true)
	for n := range 71 {
		check("subnormal", sub[:2*n], pairSums{}, full)
		check("squares overflow", big[:2*n], pairSums{}, full)
		check("NaN maximum", x[:2*n], pairSums{1, 2, 3, 4, 5, math.NaN()}, full)
		for _, level := range []uint64{0, 1, math.Float64bits(0.3), math.Float64bits(math.Inf(1)), math.Float64bits(math.Inf(1)) + 1} {
			check(fmt.Sprintf("level %#x", level), x[:2*n], pairSums{}, level)
		}
	}
	// Nothing at full scale: no flag.
	quiet := []float64{0.5, -0.5, 0.99, -0.99}
	var s pairSums
	if stereoStretch(quiet, &s, full) || stereoStretchGo(quiet, &s, full) {
		t.Error("a stretch below full scale was flagged")
	}
}

// TestAnyKernelMatchesGo checks anyStretchAVX2 (through anyStretch, on
// every SIMD path: the avx512 path runs the AVX2 kernel) against its Go
// twin for every channel count it takes, with and without the pair and
// the fold-down.
func TestAnyKernelMatchesGo(t *testing.T) {
	if len(simdPaths()) == 0 {
		t.Skip("no SIMD kernels in this build or on this CPU")
	}
	for _, p := range simdPaths() {
		t.Run(p.String(), func(t *testing.T) {
			useHygienePath(t, p)
			testAnyKernelMatchesGo(t)
		})
	}
}

func testAnyKernelMatchesGo(t *testing.T) {
	full := math.Float64bits(1)
	for nc := 1; nc <= maxKernelChannels; nc++ {
		// {0, 1} with the fold-down at six channels is the 5.1 loop that
		// takes two frames per step.
		for _, pair := range [][2]int{{-1, -1}, {0, nc - 1}, {nc - 1, 0}, {0, 1}} {
			if pair[0] >= 0 && nc < 2 {
				continue
			}
			for _, fold := range []bool{false, true} {
				gains := make([]float64, 2*nc)
				for i := range gains {
					gains[i] = []float64{1, 0, 1 / math.Sqrt2, -0.5}[(i*7+nc)%4]
				}
				for _, n := range probeLengths {
					buf := probeSignal(n, nc, uint64(n*nc), n%2 == 1)
					name := fmt.Sprintf("%dch pair %v fold %v %d frames", nc, pair, fold, n)
					st := newFrameState(nc, pair[0], pair[1], 1)
					st.setGains(gains)
					for c := range nc {
						st.sums[c] = float64(c) - 2.5
					}
					st.pair = pairSums{1, 2, 3, 4, 5, 0.5}
					sums := append([]float64(nil), st.sums[:nc]...)
					p := st.pair
					var outA, outB []float64
					if fold {
						outA, outB = make([]float64, 2*n), make([]float64, 2*n)
					}
					ha := anyStretchGo(buf, outA, sums, gains, &p, pair[0], pair[1], full)
					hb := anyStretch(buf, outB, &st)
					if ha != hb {
						t.Errorf("%s: full-scale flag Go %v, kernel %v", name, ha, hb)
					}
					for c := range nc {
						if !sameFloat(sums[c], st.sums[c]) {
							t.Errorf("%s: channel %d sum Go %v, kernel %v", name, c, sums[c], st.sums[c])
						}
					}
					if pair[0] >= 0 && !samePair(p, st.pair) {
						t.Errorf("%s: pair Go %+v, kernel %+v", name, p, st.pair)
					}
					for i := range outA {
						if !sameFloat(outA[i], outB[i]) {
							t.Fatalf("%s: fold-down sample %d Go %v, kernel %v", name, i, outA[i], outB[i])
						}
					}
				}
			}
		}
	}
}

// BenchmarkProbes runs the probes alone over one second of 48 kHz
// programme in 4 096-frame blocks (stereo; 5.1 with its fold-down made in
// the same pass), on every kernel path (avx512: the stereo kernel on
// AVX-512, 5.1 on AVX2). Metric x-realtime: seconds of
// audio per second.
//
//	go test -run '^$' -bench Probes -benchtime 20x -cpu 1 ./measure
func BenchmarkProbes(b *testing.B) {
	for _, c := range []struct {
		name   string
		layout []string
	}{
		{"stereo", []string{"L", "R"}},
		{"5.1", []string{"L", "R", "C", "LFE", "Ls", "Rs"}},
	} {
		for _, p := range kernelPaths() {
			b.Run(c.name+"/"+p.String(), func(b *testing.B) {
				useHygienePath(b, p)
				nc := len(c.layout)
				buf := probeSignal(48000, nc, 1, false)
				for i := range buf {
					buf[i] *= 0.5 // no clipping: the common case
				}
				h := newHygiene(nc, 48000, 24, false, c.layout, DefaultSilenceThresholdDBFS, DefaultClipRunMinSamples)
				d := newDownmixer(c.layout, 48000)
				out := make([]float64, 2*blockFrames)
				b.ResetTimer()
				for b.Loop() {
					for i := 0; i < len(buf); i += blockFrames * nc {
						block := buf[i:min(len(buf), i+blockFrames*nc)]
						if d != nil {
							h.writeFold(block, out[:2*len(block)/nc], d.gains)
						} else {
							h.write(block)
						}
					}
				}
				b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "x-realtime")
			})
		}
	}
}

// BenchmarkProbeKernels runs the probes' kernels alone on one 4 096-frame
// block of programme-level noise (no clipping): the stereo kernel
// (stereoStretch) and the 5.1 pass with its fold-down (anyStretch), on
// every path (avx512: stereoStretchAVX512, anyStretch51AVX512 with AVX2
// for the last frames). Compare the paths' x-realtime-cpu (the thread's
// CPU time, fair on a busy machine) within one run:
//
//	go test -run '^$' -bench ProbeKernels -benchtime 20000x -count 5 -cpu 1 ./measure
func BenchmarkProbeKernels(b *testing.B) {
	const frames = 4096
	stereo := probeSignal(frames, 2, 1, false)
	surround := probeSignal(frames, 6, 2, false)
	for _, x := range [][]float64{stereo, surround} {
		for i := range x {
			x[i] *= 0.5 // no clipping: the common case
		}
	}
	full := math.Float64bits(1)
	gains := newDownmixer([]string{"L", "R", "C", "LFE", "Ls", "Rs"}, 48000).gains
	out := make([]float64, 2*frames)
	for _, p := range kernelPaths() {
		b.Run("stereo/"+p.String(), func(b *testing.B) {
			useHygienePath(b, p)
			var s pairSums
			clock := audiotest.StartRealtimeThread(b)
			for range b.N {
				stereoStretch(stereo, &s, full)
			}
			clock.Report(frames / 48000.0)
		})
		b.Run("5.1-fold/"+p.String(), func(b *testing.B) {
			useHygienePath(b, p)
			st := newFrameState(6, 0, 1, 1)
			st.setGains(gains)
			sums := make([]float64, 6)
			clock := audiotest.StartRealtimeThread(b)
			for range b.N {
				if p == goPath {
					anyStretchGo(surround, out, sums, gains, &st.pair, 0, 1, full)
				} else {
					anyStretch(surround, out, &st)
				}
			}
			clock.Report(frames / 48000.0)
		})
	}
}
