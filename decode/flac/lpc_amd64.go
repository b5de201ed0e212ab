//go:build !purego

package flac

// lpcKernel restores x[len(c):] with the fastest loop for the order,
// measured side by side (BenchmarkRestoreLPC and A/B runs): orders 1 to 8
// by the assembly of lpc_amd64.s with the whole history in registers
// (lpcRegs; order 8, the common one of flac -5: 3.7 against 5.3 ns per
// sample for the Go loop), 9 to 12 by the Go loops of lpc_orders.go (as
// fast as the assembly that reads the history from memory), 13 to 32 by
// that assembly (lpcAsm; 3.7 times the plain double loop the Go code has
// for them). The assembly uses only base amd64 instructions (64-bit
// IMUL, no CPU feature to detect). The Go loops are its twins
// (TestLPCKernelMatchesGo, every order of both kernels).
func lpcKernel(x []int32, c []int32, shift uint) bool {
	switch {
	case len(c) == 0 || len(c) > 32:
		return false
	case len(c) <= 8:
		lpcRegsWide(x, c, shift)
		return true
	case len(c) <= maxUnrolled:
		return restoreLPCUnrolled(x, c, shift)
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

// lpcRegs is lpcAsm for orders 1 to 8 with the whole history in
// registers.
//
//go:noescape
func lpcRegs(x []int32, c *[32]int64, order int, shift uint)

// lpcRegsWide runs lpcRegs with the coefficients sign-extended to 64 bits.
func lpcRegsWide(x []int32, c []int32, shift uint) {
	var wide [32]int64
	for j, v := range c {
		wide[j] = int64(v)
	}
	lpcRegs(x, &wide, len(c), shift)
}
