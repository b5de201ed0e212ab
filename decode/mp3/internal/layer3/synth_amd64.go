//go:build !purego

package layer3

import (
	"os"

	"golang.org/x/sys/cpu"
)

// useAVX2 says whether the synthesis sums, its DCT and the long-block
// IMDCT run on their AVX2 kernels: where the
// CPU has it, unless KWEIGH_KERNELS (the variable package loudness reads
// for its kernels, for testing every path on one machine) is "go" or
// "sse2".
var useAVX2 = cpu.X86.HasAVX2 && os.Getenv("KWEIGH_KERNELS") != "go" && os.Getenv("KWEIGH_KERNELS") != "sse2"

// synthSumFast runs synthSum's sums on the AVX2 kernel and reports whether
// it did (false: the CPU lacks AVX2 or the Go loop was asked for).
func synthSumFast(v *[16][64]float64, newest int, d *[512]float64, o *[32]float64) bool {
	if !useAVX2 {
		return false
	}
	synthSumAVX2(v, newest, d, o)
	return true
}

// synthSumAVX2 is synthSum on four outputs per instruction, with the same
// products and the same order of additions (synth_avx2_amd64.s).
//
//go:noescape
func synthSumAVX2(v *[16][64]float64, newest int, d *[512]float64, o *[32]float64)

// imdctLongFast runs imdctLong on the AVX2 kernel and reports whether it
// did.
func imdctLongFast(in *[18]float64, m *[18][36]float64, out *[36]float64) bool {
	if !useAVX2 {
		return false
	}
	imdctLongAVX2(in, m, out)
	return true
}

// imdctLongAVX2 is imdctLong on four outputs per instruction, with the same
// products and the same order of additions (imdct_avx2_amd64.s).
//
//go:noescape
func imdctLongAVX2(in *[18]float64, m *[18][36]float64, out *[36]float64)

// matrixFast runs matrixGo on the AVX2 kernel (the DCT and the V layout
// in one) and reports whether it did; n ≥ 1.
func matrixFast(s *[32]float64, n int, v *[64]float64) bool {
	if !useAVX2 {
		return false
	}
	matrixAVX2(s, n, v)
	return true
}

// matrixAVX2 is matrixGo on four outputs per instruction, with the same
// products, the same order of additions and the same sign flips
// (dct32_avx2_amd64.s).
//
//go:noescape
func matrixAVX2(s *[32]float64, n int, v *[64]float64)
