package bitstream

import (
	"math/rand/v2"
	"testing"
)

// TestRiceKernelsAgree runs the assembly Rice loop and its Go twin from
// the same reader states over the same Rice-coded data, for every
// parameter the fast loop takes (1 to 26) and every start alignment, and
// requires the same codes and the same state after them. Both stop at
// the same codes (too long for the accumulator, the end of data), so the
// data includes long quotients and ends abruptly.
func TestRiceKernelsAgree(t *testing.T) {
	if !hasBMI {
		t.Skip("no LZCNT/BMI2 on this CPU, or a purego build: only the Go loop exists")
	}
	rng := rand.New(rand.NewPCG(13, 14))
	for k := uint(1); k <= 26; k++ {
		var w writer
		for i := range 3000 {
			v := int32(rng.NormFloat64() * float64(int64(1)<<k))
			if i%97 == 0 {
				v <<= 5 // a quotient longer than the accumulator now and then
			}
			w.rice(v, k)
		}
		for skip := range uint(8) {
			for _, cut := range []int{len(w.buf), len(w.buf) - 3, 11} {
				data := w.buf[:cut]
				var a, b Reader
				a.Reset(data)
				b.Reset(data)
				a.Bits(skip)
				b.Bits(skip)
				gotA := make([]int32, 3000)
				gotB := make([]int32, 3000)
				ia, ib := 0, 0
				for round := 0; round < 200 && ia < len(gotA); round++ {
					var m, m2 int
					m, a.acc, a.n, a.pos = riceRunBMI2(gotA[ia:], a.data, a.acc, a.n, a.pos, k)
					m2, b.acc, b.n, b.pos = riceRunGo(gotB[ib:], b.data, b.acc, b.n, b.pos, k)
					ia, ib = ia+m, ib+m2
					if ia != ib || a.acc != b.acc || a.n != b.n || a.pos != b.pos || a.pad != b.pad {
						t.Fatalf("k %d skip %d cut %d: kernels part at code %d/%d: asm state %x %d %d, Go %x %d %d", k, skip, cut, ia, ib, a.acc, a.n, a.pos, b.acc, b.n, b.pos)
					}
					if ia == len(gotA) || a.Overrun() {
						break
					}
					// Step over the code the kernels stopped at, as Rice does.
					va, vb := a.riceSlow(k), b.riceSlow(k)
					gotA[ia], gotB[ib] = int32(va), int32(vb)
					ia, ib = ia+1, ib+1
				}
				for i := range ia {
					if gotA[i] != gotB[i] {
						t.Fatalf("k %d skip %d cut %d: code %d asm %d, Go %d", k, skip, cut, i, gotA[i], gotB[i])
					}
				}
			}
		}
	}
}
