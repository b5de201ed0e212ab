package aiff

import (
	"encoding/binary"
	"math"
)

// converter turns len(dst) packed sample points in src into float64.
type converter func(dst []float64, src []byte)

// converterFor returns the conversion for a coding and sample width. Integer
// samples are scaled by 2^(8·width−1), their container's full scale: AIFF
// stores a sample size that is not a multiple of 8 left-justified (AIFF
// 1.3, "Sample Points"), so this is also the declared size's full scale.
func converterFor(c coding, width int) converter {
	switch {
	case c == bigEndianFloat && width == 4:
		return func(dst []float64, src []byte) {
			for i := range dst {
				dst[i] = float64(math.Float32frombits(binary.BigEndian.Uint32(src[4*i:])))
			}
		}
	case c == bigEndianFloat:
		return func(dst []float64, src []byte) {
			for i := range dst {
				dst[i] = math.Float64frombits(binary.BigEndian.Uint64(src[8*i:]))
			}
		}
	case width == 1: // 8-bit: byte order does not apply
		return func(dst []float64, src []byte) {
			for i := range dst {
				dst[i] = float64(int8(src[i])) / (1 << 7)
			}
		}
	case c == bigEndianInt && width == 2:
		return func(dst []float64, src []byte) {
			for i := range dst {
				dst[i] = float64(int16(binary.BigEndian.Uint16(src[2*i:]))) / (1 << 15)
			}
		}
	case c == littleEndianInt && width == 2:
		return func(dst []float64, src []byte) {
			for i := range dst {
				dst[i] = float64(int16(binary.LittleEndian.Uint16(src[2*i:]))) / (1 << 15)
			}
		}
	case c == bigEndianInt && width == 3:
		return func(dst []float64, src []byte) {
			for i := range dst {
				p := src[3*i : 3*i+3]
				dst[i] = float64(int32(uint32(p[0])<<24|uint32(p[1])<<16|uint32(p[2])<<8)>>8) / (1 << 23)
			}
		}
	case c == littleEndianInt && width == 3:
		return func(dst []float64, src []byte) {
			for i := range dst {
				p := src[3*i : 3*i+3]
				dst[i] = float64(int32(uint32(p[2])<<24|uint32(p[1])<<16|uint32(p[0])<<8)>>8) / (1 << 23)
			}
		}
	case c == bigEndianInt:
		return func(dst []float64, src []byte) {
			for i := range dst {
				dst[i] = float64(int32(binary.BigEndian.Uint32(src[4*i:]))) / (1 << 31)
			}
		}
	default: // little-endian, 4 bytes
		return func(dst []float64, src []byte) {
			for i := range dst {
				dst[i] = float64(int32(binary.LittleEndian.Uint32(src[4*i:]))) / (1 << 31)
			}
		}
	}
}
