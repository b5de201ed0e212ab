package wav

import (
	"encoding/binary"
	"math"
)

// A converter turns len(dst) little-endian samples in raw into float64.
// len(raw) is len(dst) times the sample size.
type converter func(dst []float64, raw []byte)

// Scale factors: integer full scale maps to ±1.0 with the most negative code
// exactly -1.0 (value / 2^(bits-1)). Multiplying by a power of two is exact.
const (
	scale8  = 1.0 / (1 << 7)
	scale16 = 1.0 / (1 << 15)
	scale32 = 1.0 / (1 << 31)
)

// converterFor picks the conversion for a sample layout checked by parseFmt.
func converterFor(l sampleLayout) converter {
	switch {
	case l.float && l.containerBits == 32:
		return convertFloat32
	case l.float:
		return convertFloat64
	case l.containerBits == 8:
		return convertUint8
	case l.containerBits == 16:
		return convertInt16
	case l.containerBits == 24:
		return convertInt24
	default:
		return convertInt32
	}
}

// convertInPlace is conv(dst, raw) where raw is the last len(raw) bytes
// of dst's own memory (ReadFrames reads large requests there). Every
// converter is safe for it: it reads the bytes of each sample, or of each
// group of up to four, before it writes their float64s, and a sample of
// at most 8 bytes placed at the end never lies below where its value goes,
// so no write reaches a byte not yet read (TestReadInPlace).
func convertInPlace(conv converter, dst []float64, raw []byte) { conv(dst, raw) }

// The kernels below walk dst and raw by reslicing, which lets the compiler
// drop bounds checks from the loop bodies, and take four samples per step
// from one or two wide loads where the sample size allows.

// convertUint8 reads 8-bit PCM, which is unsigned with 128 as zero.
func convertUint8(dst []float64, raw []byte) {
	raw = raw[:len(dst)]
	for i, b := range raw {
		dst[i] = float64(int(b)-128) * scale8
	}
}

func convertInt16(dst []float64, raw []byte) {
	le := binary.LittleEndian
	for len(dst) >= 4 && len(raw) >= 8 {
		u := le.Uint64(raw)
		dst[0] = float64(int16(u)) * scale16
		dst[1] = float64(int16(u>>16)) * scale16
		dst[2] = float64(int16(u>>32)) * scale16
		dst[3] = float64(int16(u>>48)) * scale16
		dst, raw = dst[4:], raw[8:]
	}
	for len(dst) >= 1 && len(raw) >= 2 {
		dst[0] = float64(int16(le.Uint16(raw))) * scale16
		dst, raw = dst[1:], raw[2:]
	}
}

// convertInt24 places each 3-byte sample in the top of an int32, which
// sign-extends it and scales all containers alike by 2^31. Four samples
// are twelve bytes: one 8-byte and one 4-byte load.
//
// With AVX2 a kernel does groups of four samples first, with the same
// values (convertInt24Fast).
func convertInt24(dst []float64, raw []byte) {
	done := convertInt24Fast(dst, raw)
	dst, raw = dst[done:], raw[3*done:]
	le := binary.LittleEndian
	for len(dst) >= 4 && len(raw) >= 12 {
		a, b := le.Uint64(raw), le.Uint32(raw[8:])
		dst[0] = float64(int32(uint32(a)<<8)) * scale32
		dst[1] = float64(int32(uint32(a>>24)<<8)) * scale32
		dst[2] = float64(int32(uint32(a>>48)<<8|b<<24)) * scale32
		dst[3] = float64(int32(b&^0xFF)) * scale32
		dst, raw = dst[4:], raw[12:]
	}
	for len(dst) >= 1 && len(raw) >= 3 {
		v := int32(uint32(raw[0])<<8 | uint32(raw[1])<<16 | uint32(raw[2])<<24)
		dst[0] = float64(v) * scale32
		dst, raw = dst[1:], raw[3:]
	}
}

func convertInt32(dst []float64, raw []byte) {
	le := binary.LittleEndian
	for len(dst) >= 1 && len(raw) >= 4 {
		dst[0] = float64(int32(le.Uint32(raw))) * scale32
		dst, raw = dst[1:], raw[4:]
	}
}

// convertFloat32 widens IEEE single to double, which is exact; NaN and ±Inf
// pass through.
func convertFloat32(dst []float64, raw []byte) {
	le := binary.LittleEndian
	for len(dst) >= 2 && len(raw) >= 8 {
		u := le.Uint64(raw)
		dst[0] = float64(math.Float32frombits(uint32(u)))
		dst[1] = float64(math.Float32frombits(uint32(u >> 32)))
		dst, raw = dst[2:], raw[8:]
	}
	for len(dst) >= 1 && len(raw) >= 4 {
		dst[0] = float64(math.Float32frombits(le.Uint32(raw)))
		dst, raw = dst[1:], raw[4:]
	}
}

func convertFloat64(dst []float64, raw []byte) {
	le := binary.LittleEndian
	for len(dst) >= 1 && len(raw) >= 8 {
		dst[0] = math.Float64frombits(le.Uint64(raw))
		dst, raw = dst[1:], raw[8:]
	}
}
