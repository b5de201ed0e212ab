package wav

import "github.com/kweigh/kweigh/decode"

// Mapped reports whether d (a decoder of this package) converts its audio
// from a mapping of the file rather than through read calls.
func Mapped(d decode.Decoder) bool {
	w, ok := d.(*decoder)
	return ok && w.view != nil
}

// KernelSets returns the 24-bit conversion paths this machine runs, as
// values for UseAVX2: the Go loop, and the AVX2 kernel where the CPU has
// it and KWEIGH_KERNELS allows it.
func KernelSets() []bool {
	if useAVX2 {
		return []bool{false, true}
	}
	return []bool{false}
}

// UseAVX2 sets whether the AVX2 24-bit kernel runs and returns the
// previous setting.
func UseAVX2(on bool) bool {
	was := useAVX2
	useAVX2 = on
	return was
}
