package aiff

import "math"

// extendedToFloat converts an 80-bit IEEE 754 extended-precision number, as
// AIFF stores the sample rate (AIFF 1.3, "extended"; Apple SANE), to
// float64. Layout, big-endian: 1 sign bit, 15 exponent bits (bias 16383),
// 64 mantissa bits with an explicit integer bit, so value = mantissa ×
// 2^(exponent − 16383 − 63). The mantissa is rounded to float64's 53 bits,
// which is exact for every sample rate in use. Infinities and NaNs (exponent
// 0x7FFF) come back as such.
func extendedToFloat(b [10]byte) float64 {
	sign := b[0] & 0x80
	exp := int(b[0]&0x7F)<<8 | int(b[1])
	var mant uint64
	for _, x := range b[2:] {
		mant = mant<<8 | uint64(x)
	}
	var v float64
	switch {
	case exp == 0x7FFF && mant<<1 == 0:
		v = math.Inf(1)
	case exp == 0x7FFF:
		v = math.NaN()
	case mant == 0:
		v = 0
	default:
		v = math.Ldexp(float64(mant), exp-16383-63)
	}
	if sign != 0 {
		v = -v
	}
	return v
}
