package loudness

import (
	"fmt"
	"math"
	"testing"
)

// The fill and split kernels (TruePeak.fill, Meter.splitFast, Meter.split6)
// write, in the pass that de-interleaves the samples, each channel's
// float64 input, its float32 copy and the per-block maxima the true-peak
// skip test reads. These tests check them against the definitions, and the
// detector and meter built on them against an interpolator that skips
// nothing.

// edgeSamples are values the fill kernels must copy, convert and rank
// exactly: halfway cases of the float32 rounding, float32 overflow and
// underflow (to subnormals and to zero), float64 subnormals, ±full scale
// of 24-bit PCM, −0, NaN and ±Inf.
var edgeSamples = []float64{
	1 + 0x1p-24, 1 + 3*0x1p-24, -(1 + 0x1p-24 + 0x1p-40), 0x1p-130, -0x1p-150, 0x1p-160,
	1e39, -math.MaxFloat64, 5e-324, -2.2e-308, 1, -1, 8388607.0 / 8388608, math.Copysign(0, -1),
	math.NaN(), math.Inf(1), math.Inf(-1),
}

// fillLengths are the chunk lengths the fill tests run at: every remainder
// of the 32-sample block up to 70, then around whole chunks.
var fillLengths = func() []int {
	var n []int
	for i := range 71 {
		n = append(n, i)
	}
	return append(n, 95, 96, 97, 1000, 1023, 1024)
}()

// checkFilled reports the first difference between detector tp's filled
// state for n samples and its definition from x, the samples as filled
// (input sample i is x[i]): the float64 input, the float32 copy (Go's
// conversion), and for each 32-sample block the largest bit pattern of |x|
// over it and over its last 12 samples (of those it has). Where the
// interpolators are float64 (the sse2 set) the float32 copy is not made
// and not checked.
func checkFilled(tp *TruePeak, x []float64, n int) error {
	in, in32 := tp.input(n), tp.input32(n)
	for i := range n {
		if math.Float64bits(in[i]) != math.Float64bits(x[i]) {
			return fmt.Errorf("sample %d is %v, want %v", i, in[i], x[i])
		}
		if !tp.narrow32() {
			continue // the float64 interpolators read no float32 copy
		}
		if g, w := in32[i], float32(x[i]); math.Float32bits(g) != math.Float32bits(w) && !(g != g && w != w) {
			return fmt.Errorf("float32 sample %d (%v) is %v, want %v", i, x[i], g, w)
		}
	}
	for k := 0; k*skipRun < n; k++ {
		lo, hi := k*skipRun, min((k+1)*skipRun, n)
		top := maxAbsBitsGo(x[lo:hi])
		tail := maxAbsBitsGo(x[min(lo+skipRun-tailLen, hi):hi])
		if got := tp.blocks[k]; got != [2]uint64{top, tail} {
			return fmt.Errorf("block %d: maxima %#x, %#x; want %#x, %#x", k, got[0], got[1], top, tail)
		}
	}
	return nil
}

// spoil fills a detector's input, float32 copy and block maxima with
// values no fill produces, so that a kernel that skips a store shows.
func spoil(tp *TruePeak) {
	for i := range tp.buf[history:] {
		tp.buf[history+i] = 12345.678
		tp.w32[history+i] = -9876.5
	}
	for k := range tp.blocks {
		tp.blocks[k] = [2]uint64{0xdead, 0xbeef}
	}
}

// TestFillMatchesDefinition checks TruePeak.fill (fillAVX2 for whole
// blocks with fillGo for the rest, or fillGo alone) against its definition
// on every kernel set: every length remainder, strides 1 (Peak, mono) to 8
// (the meter's any-channel path), start offsets within 32 bytes,
// programme, dense full scale, and the
// edge samples placed in every position of a block in turn; and the
// maximum it returns.
func TestFillMatchesDefinition(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		tp, _ := NewTruePeak(48000)
		for _, stride := range []int{1, 2, 3, 6, 8} {
			for _, n := range fillLengths {
				for name, x := range map[string][]float64{
					"programme": musicLike(uint64(n)+70, n*stride, 48000),
					"dense":     denseFullScale(uint64(n)+71, n*stride),
				} {
					for at := 0; at < max(1, n); at += 1 + n/9 {
						offset := at % 4 // the kernels' loads are unaligned
						src := append(make([]float64, offset), x...)[offset:]
						if n > 0 {
							for i, v := range edgeSamples {
								src[((at+i*5)%n)*stride] = v
							}
						}
						want := make([]float64, n)
						for i := range want {
							want[i] = src[i*stride]
						}
						spoil(tp)
						peak := tp.fill(src, stride, n)
						if err := checkFilled(tp, want, n); err != nil {
							t.Fatalf("%s, stride %d, %d samples, edge values from %d: %v", name, stride, n, at, err)
						}
						if w := maxAbsBitsGo(want); peak != w {
							t.Fatalf("%s, stride %d, %d samples: maximum %#x, want %#x", name, stride, n, peak, w)
						}
					}
				}
			}
		}
	})
}

// TestRunMaximaCoverRuns checks the maxima the skip test derives from the
// blocks (runMaxima) over chunks fed one after another, so that run 0
// reads the history the chunk before left: run r's value is exactly
// max|x| over its window w[32r : 32r+43] and, for r ≥ 1, the one sample
// before it (never less than the window's, so the skip stays exact); NaN
// and ±Inf rank above everything, so a run holding one is never skipped.
func TestRunMaximaCoverRuns(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, n := range []int{1, 2, 11, 31, 32, 33, 63, 64, 65, 1023, 1024} {
			for name, x := range kernelSignals(4 * n) {
				for spike := 0; spike < 4*n; spike += 1 + n/3 {
					x := append([]float64(nil), x...)
					x[spike] = []float64{-7, math.NaN(), math.Inf(1), 5e-324}[spike%4]
					tp, _ := NewTruePeak(48000)
					for c := range 4 {
						chunk := x[c*n : (c+1)*n]
						tp.fill(chunk, 1, n)
						w := tp.buf[:history+n]
						runs := (n + skipRun - 1) / skipRun
						var got [chunkFrames / skipRun]float64
						best, bestRun := tp.runMaxima(runs, &got)
						var wantBest uint64
						wantRun := 0
						for r := range runs {
							lo := max(0, r*skipRun-1)
							want := maxAbsBitsGo(w[lo : min(r*skipRun+skipRun, n)+history])
							if math.Float64bits(got[r]) != want {
								t.Fatalf("%s, chunks of %d, chunk %d, spike at %d, run %d: %v, want %v", name, n, c, spike, r, got[r], math.Float64frombits(want))
							}
							if want > wantBest {
								wantBest, wantRun = want, r
							}
						}
						if best != wantBest || bestRun != wantRun {
							t.Fatalf("%s, chunks of %d, chunk %d: best %#x in run %d, want %#x in run %d", name, n, c, best, bestRun, wantBest, wantRun)
						}
						tp.peakBuffered(n, 0)
					}
				}
			}
		}
	})
}

// TestSplitKernelsMatchSplitChannel checks the one-pass stereo and 5.1
// de-interleaves (splitFast, split6) against splitChannel channel by
// channel, on every kernel set, for every chunk length remainder: inputs,
// float32 copies, block maxima and the block's sample peaks bit for bit,
// with an edge sample in every channel position, and a refusal (false)
// exactly when the chunk holds a sample the meter cannot measure (NaN,
// ±Inf, beyond MaxMagnitude), which splitChannel then counts and zeroes.
func TestSplitKernelsMatchSplitChannel(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, weights := range [][]float64{{1, 1}, {1, 1, 1, 0, 1.41, 1.41}} {
			nch := len(weights)
			split := (*Meter).split6
			if nch == 2 {
				split = (*Meter).splitFast
			}
			chans := make([][]float64, nch)
			for c := range chans {
				chans[c] = musicLike(uint64(80+c), 1024, 48000)
			}
			base := interleave(chans...)
			bad := append(append([]float64(nil), edgeSamples...), 2*MaxMagnitude, -MaxMagnitude, 0x1p-70, 0x1p70)
			for _, n := range fillLengths {
				for _, v := range bad {
					for at := 0; at < max(1, nch*n); at += 1 + nch*n/7 {
						frames := append([]float64(nil), base[:nch*n]...)
						if n > 0 {
							frames[at] = v
						}
						got, _ := NewMeter(48000, weights)
						want, _ := NewMeter(48000, weights)
						for c := range nch {
							got.blockPeak[c], want.blockPeak[c] = 0.01*float64(c), 0.01*float64(c)
							spoil(got.peaks[c])
						}
						ok := split(got, frames, n)
						for c := range nch {
							want.splitChannel(frames, n, c)
						}
						measurable := want.rejected == 0
						if ok && !measurable {
							t.Fatalf("%d channels, %d frames, %v at %d: accepted a chunk with an unmeasurable sample", nch, n, v, at)
						}
						if !ok {
							if measurable && (nch == 6 || kernels >= avx2Kernels) && n > 0 {
								t.Fatalf("%d channels, %d frames, %v at %d: refused a measurable chunk", nch, n, v, at)
							}
							continue
						}
						for c := range nch {
							x := make([]float64, n)
							for i := range x {
								x[i] = frames[i*nch+c]
							}
							if err := checkFilled(got.peaks[c], x, n); err != nil {
								t.Fatalf("%d channels, %d frames, %v at %d, channel %d: %v", nch, n, v, at, c, err)
							}
							if err := checkFilled(want.peaks[c], x, n); err != nil {
								t.Fatalf("splitChannel, %d channels, %d frames, %v at %d, channel %d: %v", nch, n, v, at, c, err)
							}
							if !sameBits(got.blockPeak[c], want.blockPeak[c]) {
								t.Fatalf("%d channels, %d frames, %v at %d: channel %d peak %v, want %v", nch, n, v, at, c, got.blockPeak[c], want.blockPeak[c])
							}
						}
					}
				}
			}
		}
	})
}

// TestSplitChannelRejects checks the reference path's handling of samples
// the meter cannot measure on every kernel set and for every channel count
// the meter has a path for: each is counted and becomes 0 in the float64
// input, the float32 copy and the block maxima, and the sample peak is that
// of the rest.
func TestSplitChannelRejects(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, nch := range []int{1, 2, 3, 6, 8} {
			for _, n := range []int{1, 31, 32, 33, 100, 1024} {
				frames := interleave(func() [][]float64 {
					c := make([][]float64, nch)
					for i := range c {
						c[i] = musicLike(uint64(90+i), n, 48000)
					}
					return c
				}()...)
				bad := 0
				for i, v := range []float64{math.NaN(), math.Inf(-1), 2 * MaxMagnitude} {
					if j := (i*37 + 5) % len(frames); !math.IsNaN(frames[j]) && frames[j] < MaxMagnitude {
						frames[j] = v
						bad++
					}
				}
				m, _ := NewMeter(48000, make([]float64, nch))
				for c := range nch {
					m.splitChannel(frames, n, c)
				}
				if m.rejected != int64(bad) {
					t.Fatalf("%d channels, %d frames: rejected %d, want %d", nch, n, m.rejected, bad)
				}
				for c := range nch {
					x := make([]float64, n)
					for i := range x {
						if v := frames[i*nch+c]; math.Float64bits(v)&^signBit <= maxMagnitudeBits {
							x[i] = v
						}
					}
					if err := checkFilled(m.peaks[c], x, n); err != nil {
						t.Fatalf("%d channels, %d frames, channel %d: %v", nch, n, c, err)
					}
					if want := maxAbsGo(x); !sameBits(m.blockPeak[c], want) {
						t.Fatalf("%d channels, %d frames, channel %d: sample peak %v, want %v", nch, n, c, m.blockPeak[c], want)
					}
				}
			}
		}
	})
}

// windowPeaks returns, for every input sample i of x (and the 11 after the
// end, as Flush computes them), the largest interpolated magnitude of the
// window of 12 inputs that ends there, zeros before the start and after
// the end: in float32 (peak4Max32Go, peak2Max32Go) where narrow holds,
// else in float64 (peak4SquaresGo, peak2SquaresGo), nothing skipped.
func windowPeaks(x []float64, factor int, narrow func(i int) bool) []float64 {
	w := append(append(make([]float64, history), x...), make([]float64, history)...)
	w32 := narrowed(w)
	out := make([]float64, len(x)+history)
	for i := range out {
		switch {
		case narrow(i) && factor == 4:
			out[i] = float64(peak4Max32Go(w32[i : i+interpolatorTaps]))
		case narrow(i):
			out[i] = float64(peak2Max32Go(w32[i : i+interpolatorTaps]))
		case factor == 4:
			out[i] = math.Sqrt(peak4SquaresGo(w[i:i+interpolatorTaps], 0))
		default:
			out[i] = math.Sqrt(peak2SquaresGo(w[i:i+interpolatorTaps], 0))
		}
	}
	return out
}

// TestMeterTruePeakExact runs the whole meter (split kernels, skip test on
// the block maxima, float32 interpolators on the float32 copies, history
// carried between chunks, flush) as a segment meter that logs every 100 ms
// block, and demands of every block and channel the true peak of an
// interpolator that skips nothing, bit for bit: the float32 kernels on the
// go, avx2 and avx512 sets where every chunk is narrowable, the float64 kernels on
// the sse2 set and for programme at −420 dBFS or +420 dBFS (outside
// [2⁻⁶⁰, 2⁶⁰], where peakRuns falls back to float64). Also the sample peaks
// and the rejection count. Channel counts 1, 2, 3 (the any-channel path),
// 6 (5.1) and 8; 44.1 kHz (blocks of 4 410 frames, so chunks of every
// remainder), 48 kHz and 96 kHz (2×); writes of 4 096 frames and of 777.
// Signals: programme with a NaN, an infinity and a sample beyond
// MaxMagnitude (measured as 0), dense full-scale noise, and the quiet and
// loud programme.
func TestMeterTruePeakExact(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, rate := range []int{44100, 48000, 96000} {
			for _, nch := range []int{1, 2, 3, 6, 8} {
				testMeterTruePeakExact(t, rate, nch)
			}
		}
	})
}

func testMeterTruePeakExact(t *testing.T, rate, nch int) {
	n := rate*7/10 + 123
	factor := OversamplingFactor(rate)
	scale := func(x []float64, g float64) []float64 {
		for i := range x {
			x[i] *= g
		}
		return x
	}
	signals := map[string]func(c int) []float64{
		"programme-damaged": func(c int) []float64 {
			x := musicLike(uint64(100+c), n, rate)
			x[n/3+c], x[n/2+7*c], x[2*n/3] = math.NaN(), math.Inf(1-2*(c%2)), -2*MaxMagnitude
			return x
		},
		"dense":           func(c int) []float64 { return denseFullScale(uint64(110+c), n) },
		"programme-420dB": func(c int) []float64 { return scale(musicLike(uint64(120+c), n, rate), 0x1p-70*amplitude(0)) },
		"programme+420dB": func(c int) []float64 { return scale(musicLike(uint64(130+c), n, rate), 0x1p70) },
	}
	for name, signal := range signals {
		chans := make([][]float64, nch)
		for c := range chans {
			chans[c] = signal(c)
		}
		frames := interleave(chans...)
		var wantRejected int64
		for c, x := range chans { // what the meter measures
			for i, v := range x {
				if math.Float64bits(v)&^signBit > maxMagnitudeBits {
					chans[c][i] = 0
					wantRejected++
				}
			}
		}
		narrow := kernels != sse2Kernels && name != "programme-420dB" && name != "programme+420dB"
		for _, step := range []int{4096, 777} {
			label := fmt.Sprintf("%d Hz, %d channels, %s, writes of %d", rate, nch, name, step)
			m, err := NewMeter(rate, make([]float64, nch))
			if err != nil {
				t.Fatal(err)
			}
			if err := m.StartAt(0); err != nil {
				t.Fatal(err)
			}
			for f := frames; len(f) > 0; {
				k := min(len(f), step*nch)
				m.Write(f[:k])
				f = f[k:]
			}
			if m.rejected != wantRejected {
				t.Fatalf("%s: rejected %d, want %d", label, m.rejected, wantRejected)
			}
			r := m.Result()
			for c, x := range chans {
				peaks := windowPeaks(x, factor, func(int) bool { return narrow })
				blocks := int64(0)
				for rec := m.log; len(rec) > 0; rec = rec[1+2*nch:] {
					lo, hi := m.boundary(blocks), m.boundary(blocks+1)
					wantTP, wantSP := 0.0, 0.0
					for i := lo; i < hi; i++ {
						wantTP = max(wantTP, peaks[i])
						wantSP = max(wantSP, math.Abs(x[i]))
					}
					if got := rec[1+c]; !sameBits(got, wantTP) {
						t.Fatalf("%s, block %d, channel %d: true peak %.17g, every window %.17g", label, blocks, c, got, wantTP)
					}
					if got := rec[1+nch+c]; !sameBits(got, wantSP) {
						t.Fatalf("%s, block %d, channel %d: sample peak %.17g, want %.17g", label, blocks, c, got, wantSP)
					}
					blocks++
				}
				all := 0.0
				for _, p := range peaks {
					all = max(all, p)
				}
				if !sameBits(r.TruePeak[c], all) {
					t.Fatalf("%s, channel %d: stream true peak %.17g (flush included), every window %.17g", label, c, r.TruePeak[c], all)
				}
			}
		}
	}
}

// TestPeakNeverSkipsPastNaN checks the public TruePeak.Peak on input with
// a NaN (which the meter never passes: it measures such samples as 0): the
// skip test ranks NaN above every magnitude, so the run holding it is
// never skipped and the chunk goes to the float64 interpolator, whose NaN
// outputs are ignored; a peak beside the NaN still counts. The result is
// the float64 interpolator's over every window, on every kernel set.
func TestPeakNeverSkipsPastNaN(t *testing.T) {
	forEachKernelSet(t, func(t *testing.T) {
		for _, rate := range []int{48000, 96000} {
			x := scaleTo(musicLike(140, 4000, rate), 0.01)
			x[1000], x[1010] = math.NaN(), 0.9
			tp, _ := NewTruePeak(rate)
			got := tp.Peak(x, 0.5)
			w := append(make([]float64, history), x...)
			want := peak4(w[:history+chunkFrames], 0.5)
			if rate == 96000 {
				want = peak2(w[:history+chunkFrames], 0.5)
			}
			// want > 0.85: the planted 0.9 sample, not the 0.5 floor, must
			// set the peak, or the test proves nothing (a margin below
			// 0.9 for the interpolator's gain at that sample; common
			// practice, no published source).
			if !(want > 0.85) || !sameBits(got, want) {
				t.Fatalf("%d Hz: %v, float64 interpolator over every window %v", rate, got, want)
			}
		}
	})
}

// scaleTo scales x so that its largest magnitude is peak.
func scaleTo(x []float64, peak float64) []float64 {
	g := peak / maxAbsGo(x)
	for i := range x {
		x[i] *= g
	}
	return x
}
