//go:build !purego

package measure

import (
	"golang.org/x/sys/cpu"

	"github.com/kweigh/kweigh/loudness"
)

// hygieneAVX2 says whether the probes run their AVX2 kernels: where the
// CPU has AVX2 and the engine runs its AVX2 set, so KWEIGH_KERNELS
// (loudness.KernelEnv) caps these kernels as it caps the engine's. Tests
// switch it to run both paths.
var hygieneAVX2 = cpu.X86.HasAVX2 && loudness.KernelsAtLeastAVX2()

// haveHygieneAVX2 says whether this build and CPU can run the kernels.
var haveHygieneAVX2 = cpu.X86.HasAVX2

// stereoStretch is stereoStretchGo, on AVX2 where it runs.
func stereoStretch(seg []float64, s *pairSums, full uint64) bool {
	if hygieneAVX2 {
		return stereoStretchAVX2(seg[:len(seg)&^1], s, full)
	}
	return stereoStretchGo(seg, s, full)
}

// anyStretch runs the AVX2 kernel on the state block st (channels at most
// maxKernelChannels; see hygiene.stretch).
func anyStretch(buf, out []float64, st *frameState) bool {
	frames := len(buf) / int(st.channels)
	if out != nil {
		out = out[:2*frames] // the kernel writes two samples per frame
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
