package flac

import (
	"errors"
	"fmt"

	"github.com/kweigh/kweigh/decode/flac/internal/bitstream"
	"github.com/kweigh/kweigh/decode/flac/internal/crc"
)

// errShort is returned by frameDecoder.decode when the frame runs past the
// bytes it was given: the caller reads more and tries again, or calls the
// frame truncated at the end of the file.
var errShort = errors.New("the frame runs past the end of the data")

// frameDecoder decodes frames into per-channel integer samples. Its
// buffers grow to the largest block seen and are reused for every frame,
// so decoding allocates nothing per frame.
type frameDecoder struct {
	br      bitstream.Reader
	samples [8][]int32 // the samples of each channel of the current frame
	wide    []int64    // the 33-bit side channel of a 32-bit stream
	coefs   [32]int32  // LPC coefficients of the current subframe

	// assignment is the stereo decorrelation decode leaves undone for
	// finish (independent when there is none or it is done).
	assignment int
}

// finish completes the frame decode left: the stereo decorrelation, in
// the same pass as the MD5 layout of the samples (hash.pack) or, without
// MD5, as the range check. It returns the OR of the folded samples (see
// fold).
func (f *frameDecoder) finish(hash *sampleHash, channels, n int) uint32 {
	samples := f.samples[:channels]
	a := f.assignment
	f.assignment = independent
	if a != independent {
		if hash != nil {
			return hash.packStereo(a, samples[0][:n], samples[1][:n])
		}
		return decorrelateSpread(a, samples[0][:n], samples[1][:n])
	}
	if hash != nil {
		return hash.pack(samples, n)
	}
	return spreadOf(samples, n)
}

// grow makes room for blockSize samples in the first channels buffers.
func (f *frameDecoder) grow(channels, blockSize int) {
	for c := range channels {
		if cap(f.samples[c]) < blockSize {
			f.samples[c] = make([]int32, blockSize)
		}
		f.samples[c] = f.samples[c][:blockSize]
	}
}

// decode decodes the frame whose header h starts data, with bits bits per
// sample, and returns the length of the frame in bytes. Its samples are in
// f.samples[:h.channels], each channel h.blockSize long. Errors other than
// errShort describe the damage.
func (f *frameDecoder) decode(data []byte, h *frameHeader, bits int) (int, error) {
	f.grow(h.channels, h.blockSize)
	f.br.Reset(data[h.size:])
	wideSide := bits >= 31 && h.assignment != independent
	for c := range h.channels {
		sb := bits
		side := (h.assignment == leftSide || h.assignment == midSide) && c == 1 ||
			h.assignment == sideRight && c == 0
		if side {
			sb++
		}
		var err error
		if side && wideSide {
			if cap(f.wide) < h.blockSize {
				f.wide = make([]int64, h.blockSize)
			}
			f.wide = f.wide[:h.blockSize]
			err = f.subframeWide(f.wide, f.samples[c], uint(sb))
		} else {
			err = f.subframe(f.samples[c], uint(sb))
		}
		if f.br.Overrun() {
			return 0, errShort
		}
		if err != nil {
			return 0, fmt.Errorf("subframe %d: %w", c, err)
		}
	}
	f.br.AlignByte()
	want := uint16(f.br.Bits(16))
	if f.br.Overrun() {
		return 0, errShort
	}
	n := h.size + f.br.Consumed()/8
	if got := crc.Update16(0, data[:n-2]); got != want {
		return 0, fmt.Errorf("frame CRC-16 is %#04x, computed %#04x", want, got)
	}
	f.assignment = independent
	if wideSide {
		f.decorrelateWide(h.assignment)
	} else {
		// Left to finish, which fuses it with the MD5 layout or the
		// range check.
		f.assignment = h.assignment
	}
	return n, nil
}

// Subframe types (RFC 9639, section 9.2.1).
const (
	typeConstant = iota
	typeVerbatim
)

// subframeHeader reads the subframe header and returns its type code, its
// wasted bits and the bits per sample left for the coded samples.
func (f *frameDecoder) subframeHeader(sb uint) (typ, wasted, coded uint, err error) {
	if f.br.Bit() {
		return 0, 0, 0, errors.New("the subframe's padding bit is set")
	}
	typ = uint(f.br.Bits(6))
	if f.br.Bit() {
		k := f.br.Unary() + 1
		if k >= uint64(sb) {
			return 0, 0, 0, fmt.Errorf("%d wasted bits in a %d-bit subframe", k, sb)
		}
		wasted = uint(k)
	}
	return typ, wasted, sb - wasted, nil
}

// subframe decodes one subframe of sb bits per sample (at most 32) into
// dst.
func (f *frameDecoder) subframe(dst []int32, sb uint) error {
	typ, wasted, coded, err := f.subframeHeader(sb)
	if err != nil {
		return err
	}
	switch {
	case typ == typeConstant:
		v := int32(f.br.Signed(coded))
		for i := range dst {
			dst[i] = v
		}
	case typ == typeVerbatim:
		for i := range dst {
			dst[i] = int32(f.br.Signed(coded))
		}
	case typ >= 8 && typ <= 12:
		order := int(typ - 8)
		if order > len(dst) {
			return fmt.Errorf("fixed predictor of order %d for a block of %d samples", order, len(dst))
		}
		for i := range order {
			dst[i] = int32(f.br.Signed(coded))
		}
		if err := f.residual(dst, order); err != nil {
			return err
		}
		restoreFixed(dst, order)
	case typ >= 32:
		order := int(typ-32) + 1
		if order > len(dst) {
			return fmt.Errorf("LPC of order %d for a block of %d samples", order, len(dst))
		}
		for i := range order {
			dst[i] = int32(f.br.Signed(coded))
		}
		shift, err := f.lpcCoefficients(order)
		if err != nil {
			return err
		}
		if err := f.residual(dst, order); err != nil {
			return err
		}
		restoreLPC(dst, f.coefs[:order], shift)
	default:
		return fmt.Errorf("reserved subframe type %d", typ)
	}
	if wasted > 0 {
		for i := range dst {
			dst[i] <<= wasted
		}
	}
	return nil
}

// lpcCoefficients reads the quantised coefficients of an LPC subframe into
// f.coefs and returns the prediction shift (RFC 9639, section 9.2.6).
func (f *frameDecoder) lpcCoefficients(order int) (uint, error) {
	precision := uint(f.br.Bits(4)) + 1
	if precision == 16 {
		return 0, errors.New("invalid LPC coefficient precision code 15")
	}
	shift := f.br.Signed(5)
	if shift < 0 {
		return 0, fmt.Errorf("negative LPC shift %d", shift)
	}
	for i := range order {
		f.coefs[i] = int32(f.br.Signed(precision))
	}
	return uint(shift), nil
}

// residual decodes the coded residual of a subframe into dst[order:]
// (RFC 9639, section 9.2.7): Rice partitions with 4-bit or 5-bit
// parameters, or escaped partitions of raw signed samples.
func (f *frameDecoder) residual(dst []int32, order int) error {
	method := f.br.Bits(2)
	if method > 1 {
		return fmt.Errorf("reserved residual coding method %d", method)
	}
	paramBits, escape := uint(4), uint(15)
	if method == 1 {
		paramBits, escape = 5, 31
	}
	po := uint(f.br.Bits(4))
	n := len(dst)
	parts := 1 << po
	if n%parts != 0 || n>>po < order {
		return fmt.Errorf("%d residual partitions do not fit a block of %d samples with a predictor of order %d", parts, n, order)
	}
	per := n >> po
	out := dst[order:]
	for p := range parts {
		m := per
		if p == 0 {
			m -= order
		}
		seg := out[:m]
		out = out[m:]
		k := uint(f.br.Bits(paramBits))
		if k == escape {
			raw := uint(f.br.Bits(5))
			for i := range seg {
				seg[i] = int32(f.br.Signed(raw))
			}
			continue
		}
		if !f.br.Rice(seg, k) {
			if f.br.Overrun() {
				return nil // the caller reports the short frame
			}
			return fmt.Errorf("residual partition %d holds a value wider than 32 bits", p)
		}
	}
	return nil
}

// decorrelateSpread decorrelates a and b in place (see decorrelate) and returns
// the OR of the folded samples.
func decorrelateSpread(assignment int, a, b []int32) uint32 {
	b = b[:len(a)]
	var sa, sb uint32
	switch assignment {
	case leftSide:
		for i, l := range a {
			r := l - b[i]
			b[i] = r
			sa |= fold(l)
			sb |= fold(r)
		}
	case sideRight:
		for i, r := range b {
			l := a[i] + r
			a[i] = l
			sa |= fold(l)
			sb |= fold(r)
		}
	case midSide:
		for i, m := range a {
			s := b[i]
			m = m<<1 | s&1
			l, r := (m+s)>>1, (m-s)>>1
			a[i], b[i] = l, r
			sa |= fold(l)
			sb |= fold(r)
		}
	default:
		return spreadOf([][]int32{a, b}, len(a))
	}
	return sa | sb
}

// decorrelate turns the channel pair of a stereo-coded frame back into left
// and right (RFC 9639, section 4.2), a loop per mode: the plain form the
// fused loops (decorrelateSpread, sampleHash.packStereo) are tested
// against.
func decorrelate(assignment int, a, b []int32) {
	switch assignment {
	case leftSide:
		b = b[:len(a)]
		for i, l := range a {
			b[i] = l - b[i]
		}
	case sideRight:
		b = b[:len(a)]
		for i, r := range b {
			a[i] += r
		}
	case midSide:
		b = b[:len(a)]
		for i, m := range a {
			s := b[i]
			m = m<<1 | s&1
			a[i] = (m + s) >> 1
			b[i] = (m - s) >> 1
		}
	}
}
