//go:build linux && !purego

package loudness

import (
	"math"
	"syscall"
	"testing"
	"unsafe"
)

// The amd64 kernels' tests and benchmarks that need Linux (mmap) or call
// the assembly directly.

// guardedFloat32s returns a slice of n float32 values that ends exactly
// where an inaccessible page begins, so that a kernel reading one byte past
// its input faults (the test process dies with SIGSEGV), and a function
// that unmaps both pages.
func guardedFloat32s(t *testing.T, n int) ([]float32, func()) {
	t.Helper()
	page := syscall.Getpagesize()
	mem, err := syscall.Mmap(-1, 0, 2*page, syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_ANON|syscall.MAP_PRIVATE)
	if err != nil {
		t.Skipf("mmap: %v", err)
	}
	if err := syscall.Mprotect(mem[page:], syscall.PROT_NONE); err != nil {
		syscall.Munmap(mem)
		t.Skipf("mprotect: %v", err)
	}
	end := unsafe.Pointer(&mem[page])
	w := unsafe.Slice((*float32)(unsafe.Add(end, -4*n)), n)
	return w, func() { syscall.Munmap(mem) }
}

// TestPeakMax32StaysInBounds runs the float32 interpolators in use on
// inputs that end at an inaccessible page, for every window count up to
// 80: the AVX-512 kernels' masked last group (and every other kernel) must
// load nothing past the slice, and still match the Go twins bit for bit.
func TestPeakMax32StaysInBounds(t *testing.T) {
	const most = 80 + interpolatorTaps
	src := narrowed(kernelSignals(most)["dense-full-scale"])
	forEachKernelSet(t, func(t *testing.T) {
		for _, k := range float32Kernels {
			for n := range most + 1 {
				w, free := guardedFloat32s(t, n)
				copy(w, src[most-n:])
				got, want := k.kernel(w), k.ref(w)
				free()
				if math.Float32bits(got) != math.Float32bits(want) {
					t.Fatalf("%s, %d samples before a guard page: kernel %v, Go %v", k.name, n, got, want)
				}
			}
		}
	})
}

// BenchmarkNextTo512 times AVX2 code next to 512-bit arithmetic: the
// float64 AVX2 interpolator (peak4QuadsAVX2) on a chunk alone, then each
// call followed by the float32 one on AVX2 and on AVX-512. Where the
// AVX-512 pair takes longer than the AVX-512 kernel alone
// (BenchmarkTruePeak32Kernel) plus the AVX2 code alone, the difference is
// what the AVX2 code loses next to 512-bit arithmetic. Compare ns/op
// within one run:
//
//	go test -run '^$' -bench 'NextTo512|TruePeak32Kernel/4x' -benchtime 20000x -count 3 -cpu 1 ./loudness
func BenchmarkNextTo512(b *testing.B) {
	if bestKernels() < avx512Kernels {
		b.Skip("no AVX-512 here")
	}
	w := denseFullScale(5, history+chunkFrames)
	w32 := make([]float32, len(w))
	narrowGo(w32, w)
	var sink float64
	b.Run("avx2-float64-alone", func(b *testing.B) {
		for range b.N {
			sink += peak4QuadsAVX2(w, 0)
		}
	})
	b.Run("avx2-float64+avx2-float32", func(b *testing.B) {
		for range b.N {
			sink += peak4QuadsAVX2(w, 0) + float64(peak4Max32AVX2(w32))
		}
	})
	b.Run("avx2-float64+avx512-float32", func(b *testing.B) {
		for range b.N {
			sink += peak4QuadsAVX2(w, 0) + float64(peak4Max32AVX512(w32))
		}
	})
	if sink == 0 {
		b.Fatal("no peak")
	}
}
