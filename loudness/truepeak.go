package loudness

import (
	"fmt"
	"math"
)

// interpolatorTaps is the length of each polyphase branch of the BS.1770
// Annex 2 interpolator.
const interpolatorTaps = 12

// history is how many earlier input samples each interpolated output needs.
const history = interpolatorTaps - 1

// Phases 0 and 1 of the 4× interpolator of ITU-R BS.1770-4/5 Annex 2
// (48 taps, 4 phases of 12; SOURCES.md §2, recalled, every value a multiple
// of 2⁻¹³): h0tT is phase 0 tap T. Phases 2 and 3 are phase 1 and phase 0
// reversed, as for any linear-phase table. Output 4n+k is Σₜ hₖ[t]·x[n−t].
// They are constants so the hot loop multiplies by immediate memory operands
// instead of spilling 24 coefficient registers.
const (
	h0t0  = 0.0017089843750
	h0t1  = 0.0109863281250
	h0t2  = -0.0196533203125
	h0t3  = 0.0332031250000
	h0t4  = -0.0594482421875
	h0t5  = 0.1373291015625
	h0t6  = 0.9721679687500
	h0t7  = -0.1022949218750
	h0t8  = 0.0476074218750
	h0t9  = -0.0266113281250
	h0t10 = 0.0148925781250
	h0t11 = -0.0083007812500

	h1t0  = -0.0291748046875
	h1t1  = 0.0292968750000
	h1t2  = -0.0517578125000
	h1t3  = 0.0891113281250
	h1t4  = -0.1665039062500
	h1t5  = 0.4650878906250
	h1t6  = 0.7797851562500
	h1t7  = -0.2003173828125
	h1t8  = 0.1015625000000
	h1t9  = -0.0582275390625
	h1t10 = 0.0330810546875
	h1t11 = -0.0189208984375
)

// annex2Phase0 and annex2Phase1 are the same two phases as arrays.
var (
	annex2Phase0 = [interpolatorTaps]float64{
		h0t0, h0t1, h0t2, h0t3, h0t4, h0t5, h0t6, h0t7, h0t8, h0t9, h0t10, h0t11,
	}
	annex2Phase1 = [interpolatorTaps]float64{
		h1t0, h1t1, h1t2, h1t3, h1t4, h1t5, h1t6, h1t7, h1t8, h1t9, h1t10, h1t11,
	}
)

// annex2Phases returns the four phases of the Annex 2 interpolator.
func annex2Phases() [4][interpolatorTaps]float64 {
	var p [4][interpolatorTaps]float64
	p[0], p[1] = annex2Phase0, annex2Phase1
	for t := range interpolatorTaps {
		p[2][t] = annex2Phase1[interpolatorTaps-1-t]
		p[3][t] = annex2Phase0[interpolatorTaps-1-t]
	}
	return p
}

// OversamplingFactor returns the true-peak oversampling factor BS.1770
// Annex 2 asks for at sampleRate: 4 below 88.2 kHz, 2 at 88.2 and 96 kHz
// (and anything between 88.2 and 176.4 kHz), 1 from 176.4 kHz.
func OversamplingFactor(sampleRate int) int {
	switch {
	case sampleRate >= 176400:
		return 1
	case sampleRate >= 88200:
		return 2
	default:
		return 4
	}
}

// phasesFor returns the interpolator phases used at an oversampling factor.
// At 4× all four; at 2× phases 0 and 2 of the same table, which sample the
// very same interpolated waveform at half the density (outputs 4n and 4n+2
// of the 4× interpolator are outputs 2n and 2n+1 of a 2× one). At 1× the
// samples themselves.
func phasesFor(factor int) [][interpolatorTaps]float64 {
	p := annex2Phases()
	switch factor {
	case 4:
		return p[:]
	case 2:
		return [][interpolatorTaps]float64{p[0], p[2]}
	}
	var identity [interpolatorTaps]float64
	identity[0] = 1
	return [][interpolatorTaps]float64{identity}
}

// peakGain returns maxₖ Σₜ|hₖ[t]| over the phases of factor: no
// interpolated value can exceed this times the largest |x| among the 12
// inputs it is made of.
func peakGain(factor int) float64 {
	g := 0.0
	for _, h := range phasesFor(factor) {
		s := 0.0
		for _, c := range h {
			s += math.Abs(c)
		}
		g = max(g, s)
	}
	return g
}

// TruePeak is the oversampling true-peak detector of BS.1770 Annex 2 for
// one channel. Build it once per sample rate with NewTruePeak; Reset makes
// it ready for a new stream. It keeps the last 11 input samples between
// calls and allocates nothing per call.
type TruePeak struct {
	factor int
	gain   float64 // peakGain(factor)
	// buf holds the 11 previous input samples followed by room for up to
	// chunkFrames new ones: the interpolator reads one linear window.
	buf []float64
	// w32 is buf's float32 copy for the float32 interpolators
	// (truepeak32.go), converted afresh for every stretch that needs it.
	w32 []float32
	// wide makes the 4× interpolator float64 on every kernel set: for the
	// tests that bound the float32 one against it.
	wide bool
}

// chunkFrames is how many frames the meter and TruePeak process at a time:
// small enough that a channel's block stays in L1 cache.
const chunkFrames = 1024

// NewTruePeak returns a true-peak detector for sampleRate Hz (8 000 to
// 384 000).
func NewTruePeak(sampleRate int) (*TruePeak, error) {
	if err := checkRate(sampleRate); err != nil {
		return nil, err
	}
	f := OversamplingFactor(sampleRate)
	return &TruePeak{factor: f, gain: peakGain(f), buf: make([]float64, history+chunkFrames), w32: make([]float32, history+chunkFrames)}, nil
}

// Factor returns the oversampling factor in use (4, 2 or 1).
func (t *TruePeak) Factor() int { return t.factor }

// Reset forgets the stream so far.
func (t *TruePeak) Reset() { clear(t.buf[:history]) }

// Peak feeds the samples x and returns the largest magnitude among the
// interpolated values they produce, or floor if that is larger. The
// interpolator's last outputs, which need samples after the end of the
// stream, come from Flush.
//
// Passing the highest value seen so far as floor lets Peak skip, exactly,
// every run of input whose interpolated values provably cannot exceed it.
func (t *TruePeak) Peak(x []float64, floor float64) float64 {
	for len(x) > 0 {
		n := min(len(x), chunkFrames)
		copy(t.buf[history:], x[:n])
		floor = t.peakBuffered(n, floor)
		x = x[n:]
	}
	return floor
}

// input returns the slot for the next n ≤ chunkFrames samples; fill it and
// call peakBuffered(n, …).
func (t *TruePeak) input(n int) []float64 { return t.buf[history : history+n] }

// peakBuffered runs the interpolator over the n samples already placed by
// input and keeps the last 11 as history.
func (t *TruePeak) peakBuffered(n int, floor float64) float64 {
	w := t.buf[:history+n]
	switch t.factor {
	case 4:
		if t.narrow32() {
			floor = peakRuns(w, floor, t.gain*skipSlack, peak4, peak4Narrow, t.scratch32())
		} else {
			floor = peakRuns(w, floor, t.gain, peak4, nil, nil)
		}
	case 2:
		if t.narrow32() {
			floor = peakRuns(w, floor, t.gain*skipSlack, peak2, peak2Narrow, t.scratch32())
		} else {
			floor = peakRuns(w, floor, t.gain, peak2, nil, nil)
		}
	default:
		for _, v := range w[history:] {
			floor = max(floor, math.Abs(v))
		}
	}
	copy(t.buf[:history], w[n:])
	return floor
}

// Flush returns the largest magnitude among the interpolated values that
// fall after the last sample written (the filter's tail, computed as if the
// stream continued with silence), or floor if that is larger. It does not
// change the detector's state.
func (t *TruePeak) Flush(floor float64) float64 {
	if t.factor == 1 {
		return floor
	}
	var w [2 * history]float64
	copy(w[:], t.buf[:history])
	if t.narrow32() && narrowable(maxAbs(w[:])) {
		var w32 [2 * history]float32
		narrowGo(w32[:], w[:])
		if t.factor == 4 {
			return peak4Narrow(w32[:], floor)
		}
		return peak2Narrow(w32[:], floor)
	}
	if t.factor == 4 {
		return peak4(w[:], floor)
	}
	return peak2(w[:], floor)
}

// skipRun is the run length over which peakRuns decides to skip.
const skipRun = 32

// peakRuns applies kernel to w (history samples, then new ones) run by run,
// skipping a run when gain × max|x| over the run and its 11 predecessors
// (runMaxBits; a few samples more do no harm) is at most floor: no interpolated value in it can then exceed floor, so the
// result is exactly what the unskipped kernel would give. The run holding
// the largest sample goes first so that floor rises early; then each
// stretch of consecutive runs that cannot be skipped goes to the kernel in
// one call (its runs are judged by the floor before the stretch, which is
// never higher than the floor a run-by-run pass would use, so nothing is
// skipped that could matter, and the maximum does not depend on the order
// the windows are visited in).
//
// With kernel32 (and w32, room for len(w) float32 values) each stretch is
// converted to float32 and kernel32 does the work instead, unless the
// chunk's largest |x| is not narrowable; gain must then include skipSlack.
func peakRuns(w []float64, floor, gain float64, kernel func(w []float64, floor float64) float64,
	kernel32 func(w []float32, floor float64) float64, w32 []float32) float64 {
	n := len(w) - history
	if n <= 0 {
		return floor
	}
	var runMax [chunkFrames/skipRun + 1]float64
	runs := (n + skipRun - 1) / skipRun
	runMaxBits(w, runMax[:], runs)
	best, bestRun := -1.0, 0
	for r, m := range runMax[:runs] {
		if m > best {
			best, bestRun = m, r
		}
	}
	if best*gain <= floor {
		return floor
	}
	if kernel32 != nil && !narrowable(best) {
		kernel32 = nil
	}
	span := func(from, to int) { // runs from … to−1
		lo, hi := from*skipRun, min(to*skipRun, n)+history
		if kernel32 != nil {
			narrow(w32[lo:hi], w[lo:hi]) // only what the kernel reads
			floor = kernel32(w32[lo:hi], floor)
			return
		}
		floor = kernel(w[lo:hi], floor)
	}
	if !(runMax[bestRun]*gain <= floor) {
		span(bestRun, bestRun+1)
	}
	start := -1 // first run of the stretch being gathered
	for r := range runs {
		if r != bestRun && !(runMax[r]*gain <= floor) {
			if start < 0 {
				start = r
			}
			continue
		}
		if start >= 0 {
			span(start, r)
			start = -1
		}
	}
	if start >= 0 {
		span(start, runs)
	}
	return floor
}

// maxAbsGo returns max|x| (0 for an empty slice): the reference for the
// SIMD maxAbs.
func maxAbsGo(x []float64) float64 { return float64frombits(maxAbsBitsGo(x)) }

// float64frombits is math.Float64frombits (a short name for the kernels'
// files).
func float64frombits(b uint64) float64 { return math.Float64frombits(b) }

// maxAbsBitsGo returns the largest bit pattern of |x[i]|. It compares the
// bit patterns of |x| as integers, which order like the magnitudes for
// non-negative floats and let the compiler use a conditional move: on audio
// the branch of a float comparison mispredicts too often.
func maxAbsBitsGo(x []float64) uint64 {
	var m0, m1 uint64
	for len(x) >= 2 {
		a := math.Float64bits(x[0]) &^ signBit
		b := math.Float64bits(x[1]) &^ signBit
		if a > m0 {
			m0 = a
		}
		if b > m1 {
			m1 = b
		}
		x = x[2:]
	}
	if len(x) == 1 {
		if a := math.Float64bits(x[0]) &^ signBit; a > m0 {
			m0 = a
		}
	}
	return max(m0, m1)
}

const signBit = 1 << 63

// peak4 returns max(floor, |y|) over the 4× interpolated values y of the
// inputs w[11:], w[:11] being their history. peak4Squares does the work:
// peak4SquaresGo, or a two-lane SIMD version of it where there is one.
func peak4(w []float64, floor float64) float64 {
	sq := peak4Squares(w, floor*floor)
	if sq > floor*floor {
		return math.Sqrt(sq)
	}
	return floor
}

// peak4SquaresGo returns the largest of sq and y² over the 4× interpolated
// values y of the inputs w[11:], w[:11] being their history; a NaN y is
// ignored. It is the portable kernel and the reference for the SIMD ones.
//
// With sₜ = x[n−t] + x[n−11+t] and dₜ = x[n−t] − x[n−11+t] (t = 0…5) the
// linear-phase symmetry gives (y₀+y₃)/2 = Σ ½(h0[t]+h0[11−t])·sₜ and
// (y₀−y₃)/2 = Σ ½(h0[t]−h0[11−t])·dₜ, and likewise for phases 1 and 2: 24
// multiplications per input sample instead of 48. The four outputs are
// compared squared, so that no absolute value is needed.
//
// The float64 conversions round every product before it is added, which
// forbids the compiler to fuse the two into one FMA instruction (as it does
// on arm64 or with GOAMD64=v3): results are then the same bits on every
// platform and equal to those of the SIMD kernels, which do not fuse.
func peak4SquaresGo(w []float64, sq float64) float64 {
	for i := 0; i+interpolatorTaps <= len(w); i++ {
		x := (*[interpolatorTaps]float64)(w[i : i+interpolatorTaps])
		// x[11] is the newest sample x[n], x[0] is x[n−11].
		s, d := x[11]+x[0], x[11]-x[0]
		p := float64((h0t0 + h0t11) / 2 * s)
		r := float64((h1t0 + h1t11) / 2 * s)
		q := float64((h0t0 - h0t11) / 2 * d)
		u := float64((h1t0 - h1t11) / 2 * d)
		s, d = x[10]+x[1], x[10]-x[1]
		p += float64((h0t1 + h0t10) / 2 * s)
		r += float64((h1t1 + h1t10) / 2 * s)
		q += float64((h0t1 - h0t10) / 2 * d)
		u += float64((h1t1 - h1t10) / 2 * d)
		s, d = x[9]+x[2], x[9]-x[2]
		p += float64((h0t2 + h0t9) / 2 * s)
		r += float64((h1t2 + h1t9) / 2 * s)
		q += float64((h0t2 - h0t9) / 2 * d)
		u += float64((h1t2 - h1t9) / 2 * d)
		s, d = x[8]+x[3], x[8]-x[3]
		p += float64((h0t3 + h0t8) / 2 * s)
		r += float64((h1t3 + h1t8) / 2 * s)
		q += float64((h0t3 - h0t8) / 2 * d)
		u += float64((h1t3 - h1t8) / 2 * d)
		s, d = x[7]+x[4], x[7]-x[4]
		p += float64((h0t4 + h0t7) / 2 * s)
		r += float64((h1t4 + h1t7) / 2 * s)
		q += float64((h0t4 - h0t7) / 2 * d)
		u += float64((h1t4 - h1t7) / 2 * d)
		s, d = x[6]+x[5], x[6]-x[5]
		p += float64((h0t5 + h0t6) / 2 * s)
		r += float64((h1t5 + h1t6) / 2 * s)
		q += float64((h0t5 - h0t6) / 2 * d)
		u += float64((h1t5 - h1t6) / 2 * d)
		y0, y3, y1, y2 := p+q, p-q, r+u, r-u
		if v := y0 * y0; v > sq {
			sq = v
		}
		if v := y3 * y3; v > sq {
			sq = v
		}
		if v := y1 * y1; v > sq {
			sq = v
		}
		if v := y2 * y2; v > sq {
			sq = v
		}
	}
	return sq
}

// peak2 is peak4 for 2× oversampling: phases 0 and 2 only. peak2Squares
// does the work: peak2SquaresGo, or a SIMD version of it.
func peak2(w []float64, floor float64) float64 {
	sq := peak2Squares(w, floor*floor)
	if sq > floor*floor {
		return math.Sqrt(sq)
	}
	return floor
}

// peak2SquaresGo returns the largest of sq and y² over the 2× interpolated
// values y of the inputs w[11:], w[:11] being their history: the portable
// kernel and the reference for the SIMD ones. Each output is the plain
// 12-tap sum, tap 0 first; the float64 conversions forbid fused
// multiply-adds, as in peak4SquaresGo.
func peak2SquaresGo(w []float64, sq float64) float64 {
	h0, h2 := &annex2Phase0, &annex2Phase1
	for i := 0; i+interpolatorTaps <= len(w); i++ {
		x := (*[interpolatorTaps]float64)(w[i : i+interpolatorTaps])
		var y0, y2 float64
		for t := range interpolatorTaps {
			y0 += float64(h0[t] * x[interpolatorTaps-1-t])
			y2 += float64(h2[t] * x[t]) // phase 2 = phase 1 reversed
		}
		if v := y0 * y0; v > sq {
			sq = v
		}
		if v := y2 * y2; v > sq {
			sq = v
		}
	}
	return sq
}

// checkRate reports whether sampleRate is one the engine supports.
func checkRate(sampleRate int) error {
	if sampleRate < MinSampleRate || sampleRate > MaxSampleRate {
		return fmt.Errorf("loudness: sample rate %d Hz outside the supported %d to %d Hz", sampleRate, MinSampleRate, MaxSampleRate)
	}
	return nil
}

// MinSampleRate and MaxSampleRate bound the sample rates the engine accepts.
const (
	MinSampleRate = 8000
	MaxSampleRate = 384000
)
