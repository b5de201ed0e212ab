//go:build linux && amd64 && !purego

package loudness

import (
	"math"
	"syscall"
	"testing"
	"unsafe"
)

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
