//go:build !purego

package bitstream

import "golang.org/x/sys/cpu"

// hasBMI is true when the CPU has LZCNT and BMI2's flag-free shifts, which
// the assembly Rice loop uses (x86-64-v3 CPUs all have both).
var hasBMI = cpu.X86.HasLZCNT && cpu.X86.HasBMI2

// riceRun is riceRunBMI2 where the CPU has its instructions, else
// riceRunGo; the two give the same result (TestRiceKernelsAgree).
func riceRun(dst []int32, data []byte, acc uint64, n uint, pos int, k uint) (int, uint64, uint, int) {
	if hasBMI {
		return riceRunBMI2(dst, data, acc, n, pos, k)
	}
	return riceRunGo(dst, data, acc, n, pos, k)
}

// riceRunBMI2 is riceRunGo in assembly with LZCNT, SHLX and SHRX: a
// leading-zero count of one instruction (not BSR with a fix-up for zero)
// and shifts that need neither CX nor the flags.
//
//go:noescape
func riceRunBMI2(dst []int32, data []byte, acc uint64, n uint, pos int, k uint) (int, uint64, uint, int)
