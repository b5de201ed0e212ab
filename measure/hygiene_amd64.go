//go:build !purego

package measure

import (
	"golang.org/x/sys/cpu"

	"github.com/kweigh/kweigh/loudness"
)

// hygieneAVX2 says whether the probes run their AVX2 kernels: where the
// CPU has AVX2 and the engine runs its avx2 or avx512 set, so KWEIGH_KERNELS
// (loudness.KernelEnv) caps these kernels as it caps the engine's. Tests
// switch it to run both paths.
var hygieneAVX2 = cpu.X86.HasAVX2 && loudness.KernelsAtLeastAVX2()

// haveHygieneAVX2 says whether this build and CPU can run the kernels.
var haveHygieneAVX2 = cpu.X86.HasAVX2

// hygieneAVX512 says whether the probes that have AVX-512 kernels (stereo,
// and 5.1 with its fold-down) run them; hygieneAVX2 must be set too. It is set where the
// engine runs its avx512 set, which it chooses only on CPUs with AVX-512
// F, DQ, BW and VL, so KWEIGH_KERNELS=avx2 turns it off as well. Tests
// switch it.
var hygieneAVX512 = haveHygieneAVX512 && loudness.Kernels() == "avx512"

// haveHygieneAVX512 says whether this build and CPU can run the AVX-512
// kernels (the subsets the engine's avx512 set asks for).
var haveHygieneAVX512 = cpu.X86.HasAVX2 && cpu.X86.HasAVX512F && cpu.X86.HasAVX512DQ && cpu.X86.HasAVX512BW && cpu.X86.HasAVX512VL

// stereoStretch is stereoStretchGo, on AVX-512 or AVX2 where they run.
func stereoStretch(seg []float64, s *pairSums, full uint64) bool {
	switch {
	case hygieneAVX2 && hygieneAVX512:
		return stereoStretchAVX512(seg[:len(seg)&^1], s, full)
	case hygieneAVX2:
		return stereoStretchAVX2(seg[:len(seg)&^1], s, full)
	}
	return stereoStretchGo(seg, s, full)
}

// anyStretch runs the AVX2 kernel on the state block st (channels at most
// maxKernelChannels; see hygiene.stretch), or for 5.1 with L, R first and
// the fold-down, where hygieneAVX512 is set, the AVX-512 one.
func anyStretch(buf, out []float64, st *frameState) bool {
	frames := len(buf) / int(st.channels)
	if out != nil {
		out = out[:2*frames] // the kernel writes two samples per frame
	}
	if hygieneAVX512 && out != nil && st.channels == 6 && st.left == 0 && st.right == 1 && frames >= 4 {
		// 5.1 with its fold-down: four frames per step on AVX-512, the
		// last one to three on AVX2, which go on from the sums in st.
		n := frames &^ 3
		hit := anyStretch51AVX512(buf[:6*n], out[:2*n], n, st)
		return anyStretchAVX2(buf[6*n:6*frames], out[2*n:], frames-n, st) || hit
	}
	return anyStretchAVX2(buf[:frames*int(st.channels)], out, frames, st)
}

// stereoStretchAVX2 is stereoStretchGo (hygiene_avx2_amd64.s); len(seg)
// is even.
//
//go:noescape
func stereoStretchAVX2(seg []float64, s *pairSums, full uint64) bool

// anyStretchAVX2 is anyStretchGo over frames frames (len(buf) =
// frames·st.channels, out nil or 2·frames long; hygiene_avx2_amd64.s).
//
//go:noescape
func anyStretchAVX2(buf, out []float64, frames int, st *frameState) bool

// stereoStretchAVX512 is stereoStretchGo (hygiene_avx512_amd64.s, AVX-512
// F, DQ and VL on Y registers); len(seg) is even.
//
//go:noescape
func stereoStretchAVX512(seg []float64, s *pairSums, full uint64) bool

// anyStretch51AVX512 is anyStretchGo for 5.1 with L, R first and the
// fold-down (st.channels 6, st.left 0, st.right 1) over frames frames, a
// positive multiple of 4 (len(buf) = 6·frames, len(out) = 2·frames;
// hygiene_avx512_amd64.s).
//
//go:noescape
func anyStretch51AVX512(buf, out []float64, frames int, st *frameState) bool
