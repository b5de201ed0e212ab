//go:build !purego

package wav

import (
	"os"

	"golang.org/x/sys/cpu"
)

// useAVX2 says whether convertInt24 runs its AVX2 kernel: where the CPU has
// AVX2, unless KWEIGH_KERNELS (the variable package loudness reads for its
// kernels, for testing every path on one machine) is "go" or "sse2".
var useAVX2 = cpu.X86.HasAVX2 && os.Getenv("KWEIGH_KERNELS") != "go" && os.Getenv("KWEIGH_KERNELS") != "sse2"

// convertInt24Fast converts what the AVX2 kernel can (four samples from
// each 16-byte load) and returns how many samples it did.
func convertInt24Fast(dst []float64, raw []byte) int {
	if !useAVX2 {
		return 0
	}
	return convertInt24AVX2(dst, raw)
}

// convertInt24AVX2 is convertInt24 on groups of four samples while 16
// bytes of raw remain (convert24_avx2_amd64.s).
//
//go:noescape
func convertInt24AVX2(dst []float64, raw []byte) int
