//go:build !purego

package flac

// lpcKernel restores x[len(c):] with the Go loops of lpc_orders.go up to
// maxUnrolled, and above it with the assembly loop of lpc_amd64.s, which
// uses only base amd64 instructions (64-bit IMUL, no CPU feature to
// detect). The assembly has a loop for every order 1 to 32, but up to
// order 12 the Go loops, which keep the whole history in registers, are as
// fast or faster (measured side by side, order 8: 4.3 against 8 ns per
// sample); above 12 the Go code falls back to the plain double loop and
// the assembly is 3.7 times faster (BenchmarkRestoreLPC/32). The Go loops
// are its twins (TestLPCKernelMatchesGo, every order).
func lpcKernel(x []int32, c []int32, shift uint) bool {
	if restoreLPCUnrolled(x, c, shift) {
		return true
	}
	if len(c) == 0 || len(c) > 32 {
		return false
	}
	lpcAsmWide(x, c, shift)
	return true
}

// lpcAsmWide runs lpcAsm with the coefficients sign-extended to 64 bits.
func lpcAsmWide(x []int32, c []int32, shift uint) {
	var wide [32]int64
	for j, v := range c {
		wide[j] = int64(v)
	}
	lpcAsm(x, &wide, len(c), shift)
}

// hasLPCAsm says that lpcKernel is the assembly loop in this build.
const hasLPCAsm = true

// lpcAsm restores x[order:] in place from the residual it holds with the
// coefficients c[:order] sign-extended to 64 bits (see restoreLPCPlain).
//
//go:noescape
func lpcAsm(x []int32, c *[32]int64, order int, shift uint)
