//go:build !purego

package crc

import (
	"math/rand/v2"
	"testing"
)

// TestFoldMatchesTables holds the carry-less folding kernel to the tables
// and to the bit-at-a-time CRC: for every length from 32 to 600 bytes (and
// some long ones) and random starting CRCs, the 16 bytes fold16 leaves
// must have the CRC of the input, and Update16 (which folds from foldMin
// bytes on) must equal Update16Plain.
func TestFoldMatchesTables(t *testing.T) {
	if !hasFold {
		t.Skip("no PCLMULQDQ/SSSE3 on this CPU")
	}
	rng := rand.New(rand.NewPCG(16, 5))
	p := make([]byte, 70000)
	for i := range p {
		p[i] = byte(rng.Uint32())
	}
	lengths := []int{65536, 65551, 69999}
	for n := 32; n <= 600; n++ {
		lengths = append(lengths, n)
	}
	for _, n := range lengths {
		seed := uint16(rng.Uint32())
		if n%16 == 0 {
			var out [16]byte
			fold16(p[:n], seed, &foldKeys, &out)
			if got, want := update16Table(0, out[:]), update16Table(seed, p[:n]); got != want {
				t.Fatalf("len %d: folded to CRC %#04x, tables %#04x", n, got, want)
			}
		}
		if got, want := Update16(seed, p[:n]), Update16Plain(seed, p[:n]); got != want {
			t.Fatalf("len %d, seed %#04x: Update16 %#04x, plain %#04x", n, seed, got, want)
		}
	}
}
