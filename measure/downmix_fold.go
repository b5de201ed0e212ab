package measure

// fold writes the Lo/Ro fold-down of the interleaved frames of buf into out
// (two samples per frame): Lo = Σ left[c]·x[c], Ro = Σ right[c]·x[c], each
// sum from 0 in channel order. 5.1, the common case, has a loop of its own
// with the twelve gains in registers (the general loop spends more on its
// inner loop than on the arithmetic); it performs the same operations in
// the same order, so the fold-down is the same bit for bit
// (TestFoldSixMatchesGeneral). The measuring pass folds in the hygiene
// probes' kernel instead (writeBeside); fold serves the pre-roll of a
// section (warm) and is the reference the probes' fold-down is checked
// against.
func (d *downmixer) fold(out, buf []float64) {
	if d.channels == 6 {
		d.fold6(out, buf)
		return
	}
	d.foldAny(out, buf)
}

// foldAny is fold for any channel count.
func (d *downmixer) foldAny(out, buf []float64) {
	frames := len(buf) / d.channels
	for f := 0; f < frames; f++ {
		frame := buf[f*d.channels : (f+1)*d.channels]
		var lo, ro float64
		for c, x := range frame {
			lo += float64(d.left[c] * x)
			ro += float64(d.right[c] * x)
		}
		out[2*f], out[2*f+1] = lo, ro
	}
}

// fold6 is fold for six channels. The float64 conversions round every
// product before it is added (no fused multiply-add on any platform).
func (d *downmixer) fold6(out, buf []float64) {
	l := (*[6]float64)(d.left)
	r := (*[6]float64)(d.right)
	l0, l1, l2, l3, l4, l5 := l[0], l[1], l[2], l[3], l[4], l[5]
	r0, r1, r2, r3, r4, r5 := r[0], r[1], r[2], r[3], r[4], r[5]
	for len(buf) >= 6 && len(out) >= 2 {
		x := (*[6]float64)(buf)
		var lo, ro float64
		lo += float64(l0 * x[0])
		ro += float64(r0 * x[0])
		lo += float64(l1 * x[1])
		ro += float64(r1 * x[1])
		lo += float64(l2 * x[2])
		ro += float64(r2 * x[2])
		lo += float64(l3 * x[3])
		ro += float64(r3 * x[3])
		lo += float64(l4 * x[4])
		ro += float64(r4 * x[4])
		lo += float64(l5 * x[5])
		ro += float64(r5 * x[5])
		out[0], out[1] = lo, ro
		buf, out = buf[6:], out[2:]
	}
}
