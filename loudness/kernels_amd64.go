//go:build !purego

package loudness

import "golang.org/x/sys/cpu"

// bestKernels returns the best kernel set this CPU runs: AVX2 where the
// CPU and the operating system support it (x/sys/cpu checks both), else
// SSE2, which every amd64 CPU has.
func bestKernels() kernelSet {
	if cpu.X86.HasAVX2 {
		return avx2Kernels
	}
	return sse2Kernels
}
