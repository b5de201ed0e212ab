package loudness

import (
	"fmt"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

// benchSeconds is the length of the benchmark signal.
const benchSeconds = 10

// benchSignals are the 48 kHz stereo inputs the benchmarks run on: a
// programme-like signal at realistic levels, and dense near-full-scale noise
// on which the true-peak skip almost never applies (the honest worst case).
func benchSignals() []struct {
	name   string
	frames []float64
} {
	const rate = 48000
	n := benchSeconds * rate
	return []struct {
		name   string
		frames []float64
	}{
		{"programme", interleave(musicLike(1, n, rate), musicLike(2, n, rate))},
		{"dense-full-scale", interleave(denseFullScale(3, n), denseFullScale(4, n))},
	}
}

// The benchmarks report how many seconds of audio one second of work
// measures: against wall time ("x-realtime") and against the CPU time of the
// benchmark's own thread ("x-realtime-cpu"; Linux only), which on a shared
// machine is the fair one-core figure (audiotest.StartRealtimeThread).

// BenchmarkMeter48kStereo is the whole measurement (K-weighting, gating,
// momentary, short-term, loudness range, 4× true peak, sample peak) of
// 48 kHz stereo, written in blocks of 4096 frames as a decoder would.
func BenchmarkMeter48kStereo(b *testing.B) {
	for _, sig := range benchSignals() {
		b.Run(sig.name, func(b *testing.B) {
			m, err := NewMeter(48000, []float64{1, 1})
			if err != nil {
				b.Fatal(err)
			}
			b.SetBytes(int64(len(sig.frames) * 3)) // as 24-bit PCM
			clock := audiotest.StartRealtimeThread(b)
			for range b.N {
				m.Reset()
				for f := sig.frames; len(f) > 0; {
					n := min(len(f), 2*4096)
					m.Write(f[:n])
					f = f[n:]
				}
				r := m.Result()
				if !r.Integrated.Defined {
					b.Fatal("no integrated loudness")
				}
			}
			clock.Report(benchSeconds)
		})
	}
}

// BenchmarkKWeighting48k is the K-weighting energy kernel alone on one
// channel.
func BenchmarkKWeighting48k(b *testing.B) {
	x := musicLike(1, benchSeconds*48000, 48000)
	k := NewKWeighting(48000)
	b.SetBytes(int64(len(x) * 8))
	clock := audiotest.StartRealtimeThread(b)
	var sink float64
	for range b.N {
		for f := x; len(f) > 0; {
			n := min(len(f), chunkFrames)
			sink += k.Energy(f[:n])
			f = f[n:]
		}
	}
	_ = sink
	clock.Report(benchSeconds) // per channel
}

// BenchmarkKWeighting48kStereo is the K-weighting energy of a stereo pair
// as the meter runs it, both channels at once (energyPair), against one
// channel after the other (Energy).
func BenchmarkKWeighting48kStereo(b *testing.B) {
	x := musicLike(1, benchSeconds*48000, 48000)
	y := musicLike(2, benchSeconds*48000, 48000)
	for _, mode := range []string{"pair", "one-by-one"} {
		b.Run(mode, func(b *testing.B) {
			k, l := NewKWeighting(48000), NewKWeighting(48000)
			b.SetBytes(int64(len(x) * 16))
			clock := audiotest.StartRealtimeThread(b)
			var sink float64
			for range b.N {
				for i := 0; i < len(x); i += chunkFrames {
					j := min(i+chunkFrames, len(x))
					if mode == "pair" {
						ea, eb := energyPair(&k, &l, x[i:j], y[i:j])
						sink += ea + eb
					} else {
						sink += k.Energy(x[i:j]) + l.Energy(y[i:j])
					}
				}
			}
			_ = sink
			clock.Report(benchSeconds) // per stereo pair
		})
	}
}

// BenchmarkTruePeak is the true-peak detector alone on one channel, at 4×
// (48 kHz) and 2× (96 kHz), on both signals.
func BenchmarkTruePeak(b *testing.B) {
	for _, rate := range []int{48000, 96000} {
		for _, sig := range []struct {
			name string
			x    []float64
		}{
			{"programme", musicLike(1, benchSeconds*rate, rate)},
			{"dense-full-scale", denseFullScale(3, benchSeconds*rate)},
		} {
			b.Run(fmt.Sprintf("%dHz/%s", rate, sig.name), func(b *testing.B) {
				tp, err := NewTruePeak(rate)
				if err != nil {
					b.Fatal(err)
				}
				b.SetBytes(int64(len(sig.x) * 8))
				clock := audiotest.StartRealtimeThread(b)
				for range b.N {
					tp.Reset()
					// A fresh floor per 100 ms, as the meter does.
					peak := 0.0
					for f := sig.x; len(f) > 0; {
						n := min(len(f), rate/10)
						peak = max(peak, tp.Peak(f[:n], 0))
						f = f[n:]
					}
					if peak == 0 {
						b.Fatal("no peak")
					}
				}
				clock.Report(benchSeconds) // per channel
			})
		}
	}
}

// BenchmarkTruePeakKernel is the interpolator alone (4× and 2×) on one
// chunk of dense noise (every window computed, nothing skipped), on every
// kernel set this machine runs: go is the reference loop, sse2 two lanes,
// avx2 four (avx512 runs the avx2 ones); and the float32 interpolators
// (4x-float32, 2x-float32: avx2 eight lanes, avx512 sixteen; the float32
// copy is made by the fill pass, not timed here). Compare the sets' x-realtime-cpu within one run.
func BenchmarkTruePeakKernel(b *testing.B) {
	w := denseFullScale(5, history+chunkFrames)
	for _, k := range truePeakKernels {
		for _, set := range availableKernels() {
			b.Run(k.name+"/"+set.String(), func(b *testing.B) {
				restore, err := useKernels(set)
				if err != nil {
					b.Fatal(err)
				}
				defer restore()
				b.SetBytes(chunkFrames * 8)
				clock := audiotest.StartRealtimeThread(b)
				var sink float64
				for range b.N {
					sink += k.kernel(w, 0)
				}
				_ = sink
				clock.Report(chunkFrames / 48000.0) // per channel, as at 48 kHz
			})
		}
	}
	// The float32 interpolators on the sets that run them (go, avx2 and
	// avx512; the conversion to float32 is made in the pass that fills the
	// detector's input): compare 4x-float32 with 4x on the same set.
	w32 := narrowed(w)
	for _, k := range []struct {
		name   string
		kernel func(w []float32, floor float64) float64
	}{{"4x-float32", peak4Narrow}, {"2x-float32", peak2Narrow}} {
		for _, set := range availableKernels() {
			if set == sse2Kernels {
				continue
			}
			b.Run(k.name+"/"+set.String(), func(b *testing.B) {
				restore, err := useKernels(set)
				if err != nil {
					b.Fatal(err)
				}
				defer restore()
				b.SetBytes(chunkFrames * 8)
				clock := audiotest.StartRealtimeThread(b)
				var sink float64
				for range b.N {
					sink += k.kernel(w32, 0)
				}
				_ = sink
				clock.Report(chunkFrames / 48000.0)
			})
		}
	}
}

// BenchmarkSplit is the meter's first pass alone on one 1024-frame chunk
// of programme: de-interleave, sample peak, rejection scan, float32 copy
// and the true-peak skip test's block maxima (splitFast, split6, or
// splitChannel for three channels), on every kernel set this machine runs.
// Compare the sets' x-realtime-cpu within one run (figures as at 48 kHz,
// per chunk of all channels).
func BenchmarkSplit(b *testing.B) {
	for _, nch := range []int{2, 3, 6} {
		chans := make([][]float64, nch)
		for c := range chans {
			chans[c] = musicLike(uint64(7+c), chunkFrames, 48000)
		}
		frames := interleave(chans...)
		for _, set := range availableKernels() {
			b.Run(fmt.Sprintf("%dch/%v", nch, set), func(b *testing.B) {
				restore, err := useKernels(set)
				if err != nil {
					b.Fatal(err)
				}
				defer restore()
				m, _ := NewMeter(48000, make([]float64, nch))
				b.SetBytes(int64(len(frames) * 8))
				clock := audiotest.StartRealtimeThread(b)
				for range b.N {
					if !m.splitFast(frames, chunkFrames) && !m.split6(frames, chunkFrames) {
						for c := range nch {
							m.splitChannel(frames, chunkFrames, c)
						}
					}
				}
				clock.Report(chunkFrames / 48000.0)
			})
		}
	}
}

// BenchmarkTruePeak32Kernel is the float32 interpolators alone (4× and 2×,
// no conversion) on one chunk of dense noise (every window computed), on
// the sets with float32 kernels: go the reference loop, avx2 eight lanes,
// avx512 sixteen. Compare the sets' ns/op or x-realtime-cpu within one run:
//
//	go test -run '^$' -bench TruePeak32Kernel -benchtime 20000x -count 5 -cpu 1 ./loudness
func BenchmarkTruePeak32Kernel(b *testing.B) {
	w := make([]float32, history+chunkFrames)
	narrowGo(w, denseFullScale(5, history+chunkFrames))
	for _, k := range float32Kernels {
		for _, set := range availableKernels() {
			if set == sse2Kernels {
				continue
			}
			b.Run(k.name+"/"+set.String(), func(b *testing.B) {
				restore, err := useKernels(set)
				if err != nil {
					b.Fatal(err)
				}
				defer restore()
				b.SetBytes(chunkFrames * 4)
				clock := audiotest.StartRealtimeThread(b)
				var sink float32
				for range b.N {
					sink += k.kernel(w)
				}
				if sink == 0 {
					b.Fatal("no peak")
				}
				clock.Report(chunkFrames / 48000.0) // per channel, as at 48 kHz
			})
		}
	}
}
