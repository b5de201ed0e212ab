package flac

import (
	"bytes"
	"crypto/md5"
	"encoding/binary"

	"github.com/kweigh/kweigh/decode/flac/internal/crc"
)

// A small FLAC encoder written from RFC 9639 for the tests, to build the
// streams the reference encoder never writes: variable block sizes, escaped
// residual partitions, 5-bit Rice parameters where 4 would do, every
// predictor order on 33-bit side channels, 4-, 12- and 20-bit samples. It
// writes bits one at a time and computes residuals in the plainest way.

type bitWriter struct {
	buf   []byte
	nbits int
}

func (w *bitWriter) put(v uint64, k uint) {
	for i := int(k) - 1; i >= 0; i-- {
		if w.nbits%8 == 0 {
			w.buf = append(w.buf, 0)
		}
		if v>>uint(i)&1 != 0 {
			w.buf[len(w.buf)-1] |= 0x80 >> (w.nbits % 8)
		}
		w.nbits++
	}
}

// putSigned writes v in k bits two's complement; it panics when v does not
// fit, which is a mistake in a test's spec.
func (w *bitWriter) putSigned(v int64, k uint) {
	if k == 0 && v != 0 || k > 0 && k < 64 && (v >= 1<<k>>1 || v < -(1<<k>>1)) {
		panic("test encoder: value does not fit the field")
	}
	w.put(uint64(v)&(1<<k-1), k)
}

func (w *bitWriter) unary(q uint64) {
	for range q {
		w.put(0, 1)
	}
	w.put(1, 1)
}

func (w *bitWriter) align() {
	for w.nbits%8 != 0 {
		w.put(0, 1)
	}
}

// subframeSpec says how to code one subframe.
type subframeSpec struct {
	kind      string // "constant", "verbatim", "fixed", "lpc"
	order     int
	coefs     []int32 // lpc
	precision uint    // lpc
	shift     uint    // lpc
	wasted    uint
	method    int    // residual coding method: 0 (4-bit parameters) or 1 (5-bit)
	porder    uint   // partition order
	params    []int  // Rice parameter per partition, -1 = escaped
	rawBits   []uint // bits per escaped sample, per partition
}

// writeSubframe codes x (sb bits per sample) as spec says.
func writeSubframe(w *bitWriter, x []int64, sb uint, spec subframeSpec) {
	w.put(0, 1)
	switch spec.kind {
	case "constant":
		w.put(0, 6)
	case "verbatim":
		w.put(1, 6)
	case "fixed":
		w.put(uint64(8+spec.order), 6)
	case "lpc":
		w.put(uint64(32+spec.order-1), 6)
	}
	if spec.wasted > 0 {
		w.put(1, 1)
		w.unary(uint64(spec.wasted - 1))
	} else {
		w.put(0, 1)
	}
	sb -= spec.wasted
	y := make([]int64, len(x))
	for i, v := range x {
		y[i] = v >> spec.wasted
	}
	switch spec.kind {
	case "constant":
		w.putSigned(y[0], sb)
		return
	case "verbatim":
		for _, v := range y {
			w.putSigned(v, sb)
		}
		return
	}
	coefs, shift := spec.coefs, spec.shift
	if spec.kind == "fixed" {
		c := fixedCoefficients[spec.order]
		coefs, shift = c[:spec.order], 0
	}
	for _, v := range y[:spec.order] {
		w.putSigned(v, sb)
	}
	if spec.kind == "lpc" {
		w.put(uint64(spec.precision-1), 4)
		w.putSigned(int64(shift), 5)
		for _, c := range coefs {
			w.putSigned(int64(c), spec.precision)
		}
	}
	res := make([]int64, len(y))
	for i := spec.order; i < len(y); i++ {
		var sum int64
		for j, c := range coefs {
			sum += int64(c) * y[i-1-j]
		}
		res[i] = y[i] - sum>>shift
	}
	w.put(uint64(spec.method), 2)
	w.put(uint64(spec.porder), 4)
	paramBits, escape := uint(4), uint64(15)
	if spec.method == 1 {
		paramBits, escape = 5, 31
	}
	per := len(y) >> spec.porder
	for p := range 1 << spec.porder {
		lo, hi := p*per, (p+1)*per
		if p == 0 {
			lo = spec.order
		}
		k := spec.params[p%len(spec.params)]
		if k < 0 {
			raw := spec.rawBits[p%len(spec.rawBits)]
			w.put(escape, paramBits)
			w.put(uint64(raw), 5)
			for _, r := range res[lo:hi] {
				w.putSigned(r, raw)
			}
			continue
		}
		w.put(uint64(k), paramBits)
		for _, r := range res[lo:hi] {
			u := uint64(r<<1) ^ uint64(r>>63)
			w.unary(u >> uint(k))
			w.put(u&(1<<uint(k)-1), uint(k))
		}
	}
}

// codedNumber codes n the UTF-8-like way of frame headers (RFC 9639,
// section 9.1.5), up to 36 bits.
func codedNumber(n uint64) []byte {
	if n < 0x80 {
		return []byte{byte(n)}
	}
	extra := 1
	for n>>(6*extra) >= 1<<(6-extra) {
		extra++
	}
	out := make([]byte, extra+1)
	for i := extra; i > 0; i-- {
		out[i] = 0x80 | byte(n&0x3F)
		n >>= 6
	}
	out[0] = byte(0xFF<<(7-extra)) | byte(n)
	return out
}

// testFrame is one frame to write: channel samples (already left/right),
// the channel assignment and the spec of each subframe.
type testFrame struct {
	samples    [][]int64
	assignment int
	specs      []subframeSpec
}

// writeStream writes a whole FLAC stream of the given format. With
// variable set, frames carry sample numbers; otherwise frame numbers.
func writeStream(rate, bits int, variable bool, frames []testFrame) (data []byte, interleaved []int64) {
	channels := len(frames[0].samples)
	var audio bytes.Buffer
	var sample uint64
	minBlock, maxBlock := 1<<16, 0
	for fi, f := range frames {
		n := len(f.samples[0])
		if fi < len(frames)-1 || len(frames) == 1 {
			minBlock = min(minBlock, n) // STREAMINFO's minimum leaves out the last block
		}
		maxBlock = max(maxBlock, n)
		for i := range n {
			for c := range channels {
				interleaved = append(interleaved, f.samples[c][i])
			}
		}
		h := []byte{0xFF, 0xF8, 0x70, 0}
		if variable {
			h[1] |= 1
		}
		chCode := channels - 1
		if f.assignment != independent {
			chCode = 7 + f.assignment
		}
		// The sample size code where there is one, else "as STREAMINFO".
		sizeCode := map[int]byte{8: 1, 12: 2, 16: 4, 20: 5, 24: 6, 32: 7}[bits]
		h[3] = byte(chCode<<4) | sizeCode<<1
		number := uint64(fi)
		if variable {
			number = sample
		}
		h = append(h, codedNumber(number)...)
		h = append(h, byte((n-1)>>8), byte(n-1))
		h = append(h, crc.Update8Plain(0, h))
		w := &bitWriter{buf: h, nbits: 8 * len(h)}
		coded := make([][]int64, channels)
		copy(coded, f.samples)
		if f.assignment != independent {
			l, r := f.samples[0], f.samples[1]
			side, mid := make([]int64, n), make([]int64, n)
			for i := range n {
				side[i] = l[i] - r[i]
				mid[i] = (l[i] + r[i]) >> 1
			}
			switch f.assignment {
			case leftSide:
				coded[1] = side
			case sideRight:
				coded[0] = side
			case midSide:
				coded[0], coded[1] = mid, side
			}
		}
		for c := range channels {
			sb := uint(bits)
			if f.assignment == leftSide && c == 1 || f.assignment == midSide && c == 1 || f.assignment == sideRight && c == 0 {
				sb++
			}
			writeSubframe(w, coded[c], sb, f.specs[c])
		}
		w.align()
		sum := crc.Update16Plain(0, w.buf)
		w.put(uint64(sum), 16)
		audio.Write(w.buf)
		sample += uint64(n)
	}
	pcm := make([]byte, 0, len(interleaved)*4)
	width := (bits + 7) / 8
	for _, v := range interleaved {
		for j := range width {
			pcm = append(pcm, byte(v>>(8*j)))
		}
	}
	sum := md5.Sum(pcm)
	var out bytes.Buffer
	out.WriteString("fLaC")
	out.Write([]byte{0x80, 0, 0, 34})
	binary.Write(&out, binary.BigEndian, uint16(minBlock))
	binary.Write(&out, binary.BigEndian, uint16(maxBlock))
	out.Write(make([]byte, 6))
	packed := uint64(rate)<<44 | uint64(channels-1)<<41 | uint64(bits-1)<<36 | sample
	binary.Write(&out, binary.BigEndian, packed)
	out.Write(sum[:])
	out.Write(audio.Bytes())
	return out.Bytes(), interleaved
}
