//go:build !purego

package loudness

import "testing"

// TestBestKernelsNeedFMA checks the choice of set by CPU features: the
// avx2 and avx512 sets' K-weighting kernels fuse their multiply-adds, so a
// CPU with AVX2 (or AVX-512) but without FMA gets the sse2 set.
func TestBestKernelsNeedFMA(t *testing.T) {
	for _, c := range []struct {
		avx2, fma, avx512 bool
		want              kernelSet
	}{
		{true, true, true, avx512Kernels},
		{true, true, false, avx2Kernels},
		{true, false, true, sse2Kernels},
		{true, false, false, sse2Kernels},
		{false, true, false, sse2Kernels},
		{false, false, false, sse2Kernels},
		{false, true, true, sse2Kernels},
	} {
		if got := bestKernelsFor(c.avx2, c.fma, c.avx512); got != c.want {
			t.Errorf("AVX2 %v, FMA %v, AVX-512 %v: %v, want %v", c.avx2, c.fma, c.avx512, got, c.want)
		}
	}
}
