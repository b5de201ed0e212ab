//go:build purego || !amd64

package flac

// lpcKernel is the Go loop of lpc_orders.go where there is no assembly
// kernel.
func lpcKernel(x []int32, c []int32, shift uint) bool {
	return restoreLPCUnrolled(x, c, shift)
}

// hasLPCAsm says that this build has no assembly LPC loop.
const hasLPCAsm = false

// lpcAsmWide stands in for the assembly loop so the tests build; it is
// never called.
func lpcAsmWide(x []int32, c []int32, shift uint) { restoreLPCPlain(x, c, shift) }

// lpcRegsWide stands in for the assembly loop so the tests build; it is
// never called.
func lpcRegsWide(x []int32, c []int32, shift uint) { restoreLPCPlain(x, c, shift) }
