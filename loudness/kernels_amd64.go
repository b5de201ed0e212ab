//go:build !purego

package loudness

import "golang.org/x/sys/cpu"

// bestKernels returns the best kernel set this CPU runs: AVX-512 (F, DQ,
// BW and VL, the subsets the eight-lane kernels use) or AVX2 where the CPU
// and the operating system support them (x/sys/cpu checks both) and the
// CPU has FMA, which the K-weighting kernels of both sets use (every CPU
// with AVX2 made so far has it, but the flags are separate), else SSE2,
// which every amd64 CPU has.
func bestKernels() kernelSet {
	return bestKernelsFor(cpu.X86.HasAVX2, cpu.X86.HasFMA,
		cpu.X86.HasAVX512F && cpu.X86.HasAVX512DQ && cpu.X86.HasAVX512BW && cpu.X86.HasAVX512VL)
}

// bestKernelsFor is bestKernels for a CPU with the given features.
func bestKernelsFor(avx2, fma, avx512 bool) kernelSet {
	switch {
	case avx2 && fma && avx512:
		return avx512Kernels
	case avx2 && fma:
		return avx2Kernels
	}
	return sse2Kernels
}
