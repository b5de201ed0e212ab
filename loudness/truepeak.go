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
	// (truepeak32.go): the new samples' part is written by whoever fills
	// the input (fill, the meter's split passes), the history's part by
	// peakRuns when it runs a float32 kernel.
	w32 []float32
	// blocks holds, for each skipRun-sample block k of the new samples
	// (buf[history+32k:]), the largest bit pattern of |x| over the block
	// ([0]) and over its last tailLen samples ([1]; for a block cut short
	// by the chunk's end, over whatever of them it has). They are written
	// in the same pass that fills the input, so that peakRuns's skip test
	// needs no second pass over the samples: run r's maximum is that of
	// block r and of block r−1's tail (the history's for run 0).
	blocks [chunkFrames / skipRun][2]uint64
	// wide makes the 4× interpolator float64 on every kernel set: for the
	// tests that bound the float32 one against it.
	wide bool
}

// tailLen is how many samples of a block the next run reads besides its own
// block: history, rounded up to a whole four-sample AVX2 register (a sample
// more only makes the skip test more cautious).
const tailLen = 12

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
		t.fill(x, 1, n)
		floor = t.peakBuffered(n, floor)
		x = x[n:]
	}
	return floor
}

// input returns the slot for the next n ≤ chunkFrames samples. Whoever
// fills it also fills input32 and the blocks' maxima, as fill does (the
// meter's split passes), then calls peakBuffered(n, …).
func (t *TruePeak) input(n int) []float64 { return t.buf[history : history+n] }

// input32 returns the float32 slot beside input(n).
func (t *TruePeak) input32(n int) []float32 { return t.w32[history : history+n] }

// fillGo sets input sample i to src[i·stride], input32 sample i to its
// float32 value and the blocks' maxima for i in [from, to) (from a multiple
// of skipRun, to ≤ chunkFrames), and returns the largest bit pattern of |x|
// over those samples: the reference for the AVX2 fill and split kernels,
// and the tail they leave. It copies whatever it is given (NaN included);
// the meter rejects samples before or after, as splitChannel does. Where
// the interpolator is float64 (narrow32 false: the sse2 set) nothing reads
// the float32 copy, and fillGo does not make it.
func (t *TruePeak) fillGo(src []float64, stride, from, to int) uint64 {
	if from >= to {
		return 0
	}
	_ = src[(to-1)*stride]
	in, in32 := t.buf[history:history+to], t.w32[history:history+to]
	if !t.narrow32() {
		in32 = nil
	}
	var peak uint64
	for lo := from; lo < to; lo += skipRun {
		hi := min(lo+skipRun, to)
		mid := min(lo+skipRun-tailLen, hi) // the block's tail: mid … hi−1
		head := fillRange(in[lo:mid], in32, lo, src[min(lo*stride, len(src)):], stride)
		tail := fillRange(in[mid:hi], in32, mid, src[min(mid*stride, len(src)):], stride)
		top := max(head, tail)
		t.blocks[lo/skipRun] = [2]uint64{top, tail}
		peak = max(peak, top)
	}
	return peak
}

// fillRange sets dst[i] = src[i·stride] and, unless dst32 is nil,
// dst32[at+i] to its float32 value, and returns the largest bit pattern of
// |x| over them.
func fillRange(dst []float64, dst32 []float32, at int, src []float64, stride int) uint64 {
	var m uint64
	j := 0
	if dst32 == nil {
		for i := range dst {
			v := src[j]
			j += stride
			dst[i] = v
			m = max(m, math.Float64bits(v)&^signBit)
		}
		return m
	}
	dst32 = dst32[at : at+len(dst)]
	for i := range dst {
		v := src[j]
		j += stride
		dst[i], dst32[i] = v, float32(v)
		m = max(m, math.Float64bits(v)&^signBit)
	}
	return m
}

// peakBuffered runs the interpolator over the n samples already placed by
// input (with input32 and the blocks' maxima) and keeps the last 11 as
// history.
func (t *TruePeak) peakBuffered(n int, floor float64) float64 {
	w := t.buf[:history+n]
	if t.factor == 1 {
		for _, v := range w[history:] {
			floor = max(floor, math.Abs(v))
		}
	} else {
		floor = t.peakRuns(n, floor)
	}
	t.keepHistory(n)
	return floor
}

// keepHistory moves the last history samples of the n just measured to
// the front of the buffer, as the history of the next chunk.
func (t *TruePeak) keepHistory(n int) { copy(t.buf[:history], t.buf[n:n+history]) }

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

// peakRuns runs the interpolator (4× or 2×) over the n new samples of the
// window buf[:history+n] run by run, skipping a run when gain × max|x| over
// the run and its 11 predecessors (at most 12 more samples: the maximum of
// block r and of the tail of block r−1, or of the history for run 0, from
// t.blocks) is at most floor: no interpolated value in it can then exceed
// floor, so the result is exactly what the unskipped kernel would give.
// The run holding the largest sample goes first so that floor rises early;
// then each stretch of consecutive runs that cannot be skipped goes to the
// kernel in one call (its runs are judged by the floor before the stretch,
// which is never higher than the floor a run-by-run pass would use, so
// nothing is skipped that could matter, and the maximum does not depend on
// the order the windows are visited in).
//
// The maxima are compared as bit patterns of |x|, which order like the
// magnitudes and put NaN and ±Inf above every finite value: a run holding
// one is never skipped, and its chunk goes to the float64 kernel.
//
// With the float32 interpolators (narrow32) each stretch runs on the
// float32 copy w32, whose new samples fill wrote, unless the chunk's
// largest |x| is not narrowable; the skip bound then includes skipSlack.
func (t *TruePeak) peakRuns(n int, floor float64) float64 {
	if n <= 0 {
		return floor
	}
	runs := (n + skipRun - 1) / skipRun
	var runMax [chunkFrames / skipRun]float64
	best, bestRun := t.runMaxima(runs, &runMax)
	top := math.Float64frombits(best)
	narrow := t.narrow32() && narrowable(top)
	gain := t.gain
	if t.narrow32() {
		gain *= skipSlack
	}
	if top*gain <= floor {
		return floor
	}
	w, w32 := t.buf[:history+n], t.w32[:history+n]
	kernel, kernel32 := peak4, peak4Narrow
	if t.factor == 2 {
		kernel, kernel32 = peak2, peak2Narrow
	}
	if narrow {
		narrowGo(w32[:history], w[:history])
	}
	span := func(from, to int) { // runs from … to−1
		lo, hi := from*skipRun, min(to*skipRun, n)+history
		if narrow {
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

// runMaxima sets runMax[r] for r < runs to max|x| over run r's window
// w[32r : 32r+43] and the sample before it (for r ≥ 1: the maximum of block
// r and of the tail of block r−1; for run 0, exactly its window: the
// history's maximum and block 0's), and returns the largest of them as
// bits (NaN and ±Inf above every finite value) and the first run that
// holds it.
func (t *TruePeak) runMaxima(runs int, runMax *[chunkFrames / skipRun]float64) (best uint64, bestRun int) {
	prev := maxAbsBitsGo(t.buf[:history])
	for r, b := range t.blocks[:runs] {
		m := max(prev, b[0])
		prev = b[1]
		runMax[r] = math.Float64frombits(m)
		if m > best {
			best, bestRun = m, r
		}
	}
	return best, bestRun
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
