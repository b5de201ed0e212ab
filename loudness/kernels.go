package loudness

import (
	"fmt"
	"os"
)

// kernelSet names one family of inner loops: the portable Go loops (the
// reference), the two-lane SSE2 kernels every amd64 CPU has, the
// four-lane AVX2 kernels of newer ones, or the AVX-512 set (the AVX2
// kernels, with eight-lane ones where a kernel has them) of CPUs with
// AVX-512 F, DQ, BW and VL. Every kernel performs the very
// floating-point operations of its Go twin in the same order, so a kernel
// gives its twin's bits; kernels_test.go checks that on every set this
// machine can run. Two twins differ between sets, each within a stated
// and tested bound: the K-weighting fuses its multiply-adds on the go,
// avx2 and avx512 sets and not on the sse2 set (kweighting.go), and the
// true-peak interpolator is float32 on go, avx2 and avx512, float64 on sse2
// (truepeak32.go).
type kernelSet int

const (
	goKernels kernelSet = iota
	sse2Kernels
	avx2Kernels
	avx512Kernels
)

func (k kernelSet) String() string {
	switch k {
	case sse2Kernels:
		return "sse2"
	case avx2Kernels:
		return "avx2"
	case avx512Kernels:
		return "avx512"
	}
	return "go"
}

// KernelEnv is the environment variable that caps the kernel set, for
// testing every path on one machine: "go", "sse2", "avx2" or "avx512". A set the CPU
// or the build (-tags purego) lacks is never chosen; unset means the best
// available.
const KernelEnv = "KWEIGH_KERNELS"

// kernels is the set in use. It is chosen once at start-up; tests change it
// through useKernels only.
var kernels = chooseKernels(bestKernels(), os.Getenv(KernelEnv))

// chooseKernels returns the best set not above best and not above the one
// named by env ("" for no cap).
func chooseKernels(best kernelSet, env string) kernelSet {
	for _, k := range []kernelSet{goKernels, sse2Kernels, avx2Kernels, avx512Kernels} {
		if env == k.String() {
			return min(k, best)
		}
	}
	return best
}

// Kernels says which family of inner loops the engine runs on this CPU
// ("go", "sse2", "avx2" or "avx512"): for benchmarks and diagnostics. The results are
// the same on all of them, or within the bounds stated for the sse2 set.
func Kernels() string { return kernels.String() }

// KernelsAtLeastAVX2 reports whether the set in use includes the AVX2
// kernels (avx2 or avx512): for packages with AVX2 kernels of their own,
// which KernelEnv caps as it caps the engine's.
func KernelsAtLeastAVX2() bool { return kernels >= avx2Kernels }

// availableKernels lists the sets this build can run on this CPU, the
// reference first.
func availableKernels() []kernelSet {
	var s []kernelSet
	for k := goKernels; k <= bestKernels(); k++ {
		s = append(s, k)
	}
	return s
}

// useKernels switches to set k for a test and returns a function that
// switches back. It fails if k is not available.
func useKernels(k kernelSet) (restore func(), err error) {
	if k > bestKernels() {
		return nil, fmt.Errorf("kernel set %v not available here (best: %v)", k, bestKernels())
	}
	old := kernels
	kernels = k
	return func() { kernels = old }, nil
}
