package flac

import "fmt"

// The side channel of a 32-bit stream needs 33 bits, and mid + side of a
// 31-bit one overflows 32 bits, so for streams of 31 and 32 bits the
// stereo-coded channel pair is decoded through 64-bit samples. These
// streams are rare; the code is the plain form of the 32-bit path.

// subframeWide decodes a subframe of sb bits per sample (up to 33) into
// dst; res is scratch space of the same length for the residual.
func (f *frameDecoder) subframeWide(dst []int64, res []int32, sb uint) error {
	typ, wasted, coded, err := f.subframeHeader(sb)
	if err != nil {
		return err
	}
	switch {
	case typ == typeConstant:
		v := f.br.Signed(coded)
		for i := range dst {
			dst[i] = v
		}
	case typ == typeVerbatim:
		for i := range dst {
			dst[i] = f.br.Signed(coded)
		}
	case typ >= 8 && typ <= 12:
		order := int(typ - 8)
		if order > len(dst) {
			return fmt.Errorf("fixed predictor of order %d for a block of %d samples", order, len(dst))
		}
		for i := range order {
			dst[i] = f.br.Signed(coded)
		}
		if err := f.residual(res, order); err != nil {
			return err
		}
		c := fixedCoefficients[order]
		predictWide(dst, res, c[:order], 0)
	case typ >= 32:
		order := int(typ-32) + 1
		if order > len(dst) {
			return fmt.Errorf("LPC of order %d for a block of %d samples", order, len(dst))
		}
		for i := range order {
			dst[i] = f.br.Signed(coded)
		}
		shift, err := f.lpcCoefficients(order)
		if err != nil {
			return err
		}
		if err := f.residual(res, order); err != nil {
			return err
		}
		predictWide(dst, res, f.coefs[:order], shift)
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

// fixedCoefficients are the fixed predictors of orders 0 to 4 written as
// LPC coefficients with shift 0 (RFC 9639, section 9.2.5).
var fixedCoefficients = [5][4]int32{
	{},
	{1},
	{2, -1},
	{3, -3, 1},
	{4, -6, 4, -1},
}

// predictWide restores dst[order:] from the residual res[order:] and the
// warm-up samples dst[:order].
func predictWide(dst []int64, res []int32, coefs []int32, shift uint) {
	order := len(coefs)
	for i := order; i < len(dst); i++ {
		var sum int64
		for j, c := range coefs {
			sum += int64(c) * dst[i-1-j]
		}
		dst[i] = int64(res[i]) + sum>>shift
	}
}

// decorrelateWide rebuilds left and right from the 64-bit side channel in
// f.wide and the other channel in f.samples, storing both as 32 bits.
func (f *frameDecoder) decorrelateWide(assignment int) {
	a, b, side := f.samples[0], f.samples[1], f.wide
	switch assignment {
	case leftSide:
		for i, l := range a {
			b[i] = int32(int64(l) - side[i])
		}
	case sideRight:
		for i, r := range b {
			a[i] = int32(side[i] + int64(r))
		}
	case midSide:
		for i, m := range a {
			s := side[i]
			mid := int64(m)<<1 | s&1
			a[i] = int32((mid + s) >> 1)
			b[i] = int32((mid - s) >> 1)
		}
	}
}
