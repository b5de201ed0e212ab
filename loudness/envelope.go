package loudness

import "math"

// Annex2Phases returns the four 12-tap phases of the BS.1770 Annex 2
// interpolator, phase k tap t as [k][t]: output 4n+k of the 4× interpolator
// is Σₜ h[k][t]·x[n−t]. At 2× the phases used are 0 and 2. It is exported
// for kernels outside this package that must see the same inter-sample
// values as the true-peak meter (the true-peak limiter and its reference).
func Annex2Phases() [4][12]float64 { return annex2Phases() }

// NewTruePeak4x returns a detector that interpolates 4× at every sample
// rate, where NewTruePeak follows Annex 2 (2× at 88.2 and 96 kHz, the
// samples themselves from 176.4 kHz). Its values include those of the
// Annex 2 detector at the same rate (the 2× phases are two of the four,
// and the samples are compared too by callers that need them), so a
// limiter built on it never reads a peak lower than the meter will.
func NewTruePeak4x(sampleRate int) (*TruePeak, error) {
	if err := checkRate(sampleRate); err != nil {
		return nil, err
	}
	return &TruePeak{factor: 4, gain: peakGain(4), buf: make([]float64, history+chunkFrames), w32: make([]float32, history+chunkFrames)}, nil
}

// Envelope writes to dst[i] the largest magnitude among the interpolated
// values (4, 2 or 1 per input sample, per Factor) computed from the window of
// 12 inputs that ends at x[i], the detector's history supplying the samples
// before x[0]. It is the per-sample form of Peak, for a limiter that must
// know where the inter-sample peaks are, not only how high the highest is;
// the window ending at x[i] describes the signal between x[i−6] and x[i−5].
// It keeps the last 11 samples as history, like Peak, so calls may alternate
// with Peak on one stream. len(dst) must be at least len(x); Envelope panics
// otherwise. It allocates nothing.
func (t *TruePeak) Envelope(dst, x []float64) { t.EnvelopeOver(dst, x, -1) }

// EnvelopeOver is Envelope for a caller that only needs the values above
// floor: where no interpolated value of a run of windows can exceed floor
// (the interpolator's gain bound times the largest input magnitude they
// read is at most floor), dst gets that bound, which is at most floor,
// instead of the exact values, and the interpolator is not run. A limiter
// passes its threshold as floor: on most programme almost every window is
// then skipped. A negative floor gives Envelope's exact values.
func (t *TruePeak) EnvelopeOver(dst, x []float64, floor float64) {
	if len(dst) < len(x) {
		panic("loudness: Envelope destination shorter than input")
	}
	for len(x) > 0 {
		n := min(len(x), chunkFrames)
		w := t.buf[:history+n]
		copy(w[history:], x[:n])
		if t.factor == 1 {
			for i, v := range w[history:] {
				dst[i] = math.Abs(v)
			}
		} else {
			for lo := 0; lo < n; lo += skipRun {
				hi := min(lo+skipRun, n)
				if floor >= 0 {
					if b := maxAbs(w[lo:hi+history]) * t.gain; b <= floor {
						for i := lo; i < hi; i++ {
							dst[i] = b
						}
						continue
					}
				}
				if t.factor == 4 {
					envelope4(dst[lo:hi], w[lo:hi+history])
				} else {
					envelope2(dst[lo:hi], w[lo:hi+history])
				}
			}
		}
		copy(t.buf[:history], w[n:])
		dst, x = dst[n:], x[n:]
	}
}

// envelope4 writes, for each window of w, the largest |y| of its four
// interpolated values, with the symmetric folding of peak4SquaresGo.
func envelope4(dst, w []float64) {
	for i := range dst {
		x := (*[interpolatorTaps]float64)(w[i : i+interpolatorTaps])
		s, d := x[11]+x[0], x[11]-x[0]
		p := (h0t0 + h0t11) / 2 * s
		r := (h1t0 + h1t11) / 2 * s
		q := (h0t0 - h0t11) / 2 * d
		u := (h1t0 - h1t11) / 2 * d
		s, d = x[10]+x[1], x[10]-x[1]
		p += (h0t1 + h0t10) / 2 * s
		r += (h1t1 + h1t10) / 2 * s
		q += (h0t1 - h0t10) / 2 * d
		u += (h1t1 - h1t10) / 2 * d
		s, d = x[9]+x[2], x[9]-x[2]
		p += (h0t2 + h0t9) / 2 * s
		r += (h1t2 + h1t9) / 2 * s
		q += (h0t2 - h0t9) / 2 * d
		u += (h1t2 - h1t9) / 2 * d
		s, d = x[8]+x[3], x[8]-x[3]
		p += (h0t3 + h0t8) / 2 * s
		r += (h1t3 + h1t8) / 2 * s
		q += (h0t3 - h0t8) / 2 * d
		u += (h1t3 - h1t8) / 2 * d
		s, d = x[7]+x[4], x[7]-x[4]
		p += (h0t4 + h0t7) / 2 * s
		r += (h1t4 + h1t7) / 2 * s
		q += (h0t4 - h0t7) / 2 * d
		u += (h1t4 - h1t7) / 2 * d
		s, d = x[6]+x[5], x[6]-x[5]
		p += (h0t5 + h0t6) / 2 * s
		r += (h1t5 + h1t6) / 2 * s
		q += (h0t5 - h0t6) / 2 * d
		u += (h1t5 - h1t6) / 2 * d
		dst[i] = max(math.Abs(p+q), math.Abs(p-q), math.Abs(r+u), math.Abs(r-u))
	}
}

// envelope2 is envelope4 for 2× oversampling: phases 0 and 2.
func envelope2(dst, w []float64) {
	h0, h2 := annex2Phase0, annex2Phase1
	for i := range dst {
		x := (*[interpolatorTaps]float64)(w[i : i+interpolatorTaps])
		var y0, y2 float64
		for t := range interpolatorTaps {
			y0 += h0[t] * x[interpolatorTaps-1-t]
			y2 += h2[t] * x[t]
		}
		dst[i] = max(math.Abs(y0), math.Abs(y2))
	}
}
