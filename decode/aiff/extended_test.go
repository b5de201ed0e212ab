package aiff

import (
	"math"
	"math/rand"
	"testing"
)

// floatToExtended is the plain encoder the tests use to build files: the
// inverse of extendedToFloat for finite values (sign, exponent with bias
// 16383, 64-bit mantissa with explicit integer bit).
func floatToExtended(v float64) [10]byte {
	var b [10]byte
	if v == 0 {
		return b
	}
	if v < 0 {
		b[0] = 0x80
		v = -v
	}
	frac, exp := math.Frexp(v) // v = frac × 2^exp, frac in [0.5, 1)
	e := exp - 1 + 16383
	mant := uint64(math.Ldexp(frac, 64)) // frac × 2^64, top bit set
	b[0] |= byte(e >> 8)
	b[1] = byte(e)
	for i := 0; i < 8; i++ {
		b[2+i] = byte(mant >> (56 - 8*i))
	}
	return b
}

func TestExtendedToFloat(t *testing.T) {
	// Encodings worked out from the format (value = mantissa ×
	// 2^(exponent−16383−63)) [calc]; the 44100 Hz bytes are also the ones
	// sox writes (testdata/stereo16-44k.aiff: COMM chunk at byte 0x2E, rate
	// at 0x3E), and TestSoxFixtures reads that file as 44100 Hz.
	tests := []struct {
		bytes     [10]byte
		want      float64
		tolerance float64
	}{
		{[10]byte{0x40, 0x0E, 0xAC, 0x44}, 44100, 0}, // 0xAC44 = 44100, exponent 15
		{[10]byte{0x40, 0x0E, 0xBB, 0x80}, 48000, 0}, // 0xBB80 = 48000
		{[10]byte{0x40, 0x0D, 0xAC, 0x44}, 22050, 0},
		{[10]byte{0x40, 0x0C, 0xAC, 0x44}, 11025, 0},
		{[10]byte{0x40, 0x0B, 0xFA, 0x00}, 8000, 0}, // 0x1F40 << 3
		{[10]byte{0x40, 0x0F, 0xBB, 0x80}, 96000, 0},
		{[10]byte{0x40, 0x10, 0xBB, 0x80}, 192000, 0},
		{[10]byte{0x40, 0x0F, 0xAC, 0x44}, 88200, 0},
		{[10]byte{0x3F, 0xFF, 0x80}, 1, 0},
		{[10]byte{0x3F, 0xFE, 0x80}, 0.5, 0},
		{[10]byte{0xC0, 0x0E, 0xAC, 0x44}, -44100, 0},
		{[10]byte{0x40, 0x0E, 0xAC, 0x44, 0x80}, 44100.5, 0}, // one more bit below the point
		{[10]byte{}, 0, 0},
		// 1/3 needs more than 53 bits; rounding keeps it within float64
		// precision.
		{[10]byte{0x3F, 0xFD, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA, 0xAA, 0xAB}, 1.0 / 3, 1e-16},
	}
	for _, tc := range tests {
		got := extendedToFloat(tc.bytes)
		if math.Abs(got-tc.want) > tc.tolerance {
			t.Errorf("% X = %v, want %v (±%v)", tc.bytes, got, tc.want, tc.tolerance)
		}
	}
	if v := extendedToFloat([10]byte{0x7F, 0xFF}); !math.IsInf(v, 1) {
		t.Errorf("exponent 0x7FFF, mantissa 0 = %v, want +Inf", v)
	}
	if v := extendedToFloat([10]byte{0x7F, 0xFF, 0xC0}); !math.IsNaN(v) {
		t.Errorf("exponent 0x7FFF, mantissa ≠ 0 = %v, want NaN", v)
	}
}

func TestExtendedRoundTrip(t *testing.T) {
	r := rand.New(rand.NewSource(1))
	for i := 0; i < 10000; i++ {
		v := math.Ldexp(r.Float64()+0.5, r.Intn(200)-100)
		if r.Intn(2) == 0 {
			v = float64(r.Intn(400000))
		}
		if got := extendedToFloat(floatToExtended(v)); got != v {
			t.Fatalf("%v → % X → %v", v, floatToExtended(v), got)
		}
	}
	if b := floatToExtended(44100); b != [10]byte{0x40, 0x0E, 0xAC, 0x44} {
		t.Errorf("floatToExtended(44100) = % X", b)
	}
}
