//go:build !purego

package loudness

import "golang.org/x/sys/cpu"

// bestKernels returns the best kernel set this CPU runs: AVX-512 (F, DQ,
// BW and VL, the subsets the eight-lane kernels use) or AVX2 where the CPU
// and the operating system support them (x/sys/cpu checks both), else
// SSE2, which every amd64 CPU has.
func bestKernels() kernelSet {
	x := cpu.X86
	if x.HasAVX2 && x.HasAVX512F && x.HasAVX512DQ && x.HasAVX512BW && x.HasAVX512VL {
		return avx512Kernels
	}
	if x.HasAVX2 {
		return avx2Kernels
	}
	return sse2Kernels
}
