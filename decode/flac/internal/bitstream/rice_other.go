//go:build purego || !amd64

package bitstream

// hasBMI is false: this build has no assembly kernel.
const hasBMI = false

// riceRun is riceRunGo where there is no assembly kernel.
func riceRun(dst []int32, data []byte, acc uint64, n uint, pos int, k uint) (int, uint64, uint, int) {
	return riceRunGo(dst, data, acc, n, pos, k)
}

// riceRunBMI2 stands in for the assembly kernel so the tests build; it is
// never selected.
func riceRunBMI2(dst []int32, data []byte, acc uint64, n uint, pos int, k uint) (int, uint64, uint, int) {
	return riceRunGo(dst, data, acc, n, pos, k)
}
