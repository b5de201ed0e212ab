package crc

import (
	"math/rand/v2"
	"testing"
)

func TestCheckValues(t *testing.T) {
	// The "check" value of a CRC model is its CRC of the ASCII string
	// "123456789". Poly 0x07, init 0, no reflection, no final XOR is the
	// model catalogued as CRC-8/SMBUS (check 0xF4); poly 0x8005, init 0,
	// unreflected, is CRC-16/UMTS, also listed as CRC-16/BUYPASS (check
	// 0xFEE8). Both from memory of the CRC catalogue (Greg Cook's
	// "Catalogue of parametrised CRC algorithms"); the tests below
	// also check FLAC frames the reference encoder wrote.
	msg := []byte("123456789")
	tests := []struct {
		name      string
		got, want uint16
	}{
		{"CRC-8 table", uint16(Update8(0, msg)), 0xF4},
		{"CRC-8 plain", uint16(Update8Plain(0, msg)), 0xF4},
		{"CRC-16 table", Update16(0, msg), 0xFEE8},
		{"CRC-16 plain", Update16Plain(0, msg), 0xFEE8},
	}
	for _, tc := range tests {
		if tc.got != tc.want {
			t.Errorf("%s: %#x, want %#x", tc.name, tc.got, tc.want)
		}
	}
}

// TestCrossCheck compares the table versions with the bit-at-a-time ones on
// random data of awkward lengths, whole and split at every position of a
// short prefix (the way crc32_test.go cross-checks its fast paths).
func TestCrossCheck(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{0, 1, 2, 7, 8, 9, 15, 16, 17, 63, 64, 65, 1000, 4099} {
		p := make([]byte, n)
		for i := range p {
			p[i] = byte(rng.Uint32())
		}
		seed16 := uint16(rng.Uint32())
		seed8 := uint8(rng.Uint32())
		if got, want := Update16(seed16, p), Update16Plain(seed16, p); got != want {
			t.Errorf("len %d: Update16 %#x, plain %#x", n, got, want)
		}
		if got, want := Update8(seed8, p), Update8Plain(seed8, p); got != want {
			t.Errorf("len %d: Update8 %#x, plain %#x", n, got, want)
		}
		for cut := 0; cut <= min(n, 20); cut++ {
			if got, want := Update16(Update16(0, p[:cut]), p[cut:]), Update16Plain(0, p); got != want {
				t.Errorf("len %d split at %d: %#x, want %#x", n, cut, got, want)
			}
		}
	}
}

func BenchmarkUpdate16(b *testing.B) {
	p := make([]byte, 64<<10)
	b.SetBytes(int64(len(p)))
	for b.Loop() {
		Update16(0, p)
	}
}
