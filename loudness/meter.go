package loudness

import (
	"fmt"
	"math"
)

// Reading is a figure the standard may leave undefined (a file shorter than
// one gating block has no integrated loudness; all-silent audio is below the
// absolute gate). When Defined is false, Value is meaningless and Why says
// why in plain words.
type Reading struct {
	Value   float64
	Defined bool
	Why     string
}

// Result is everything the engine measured on one stream.
type Result struct {
	SampleRate int
	Channels   int
	Frames     int64

	Integrated    Reading // LUFS, gated (BS.1770)
	LoudnessRange Reading // LU (EBU Tech 3342)
	MaxMomentary  Reading // LUFS, highest 400 ms window
	MaxShortTerm  Reading // LUFS, highest 3 s window

	// TruePeak and SamplePeak are linear magnitudes (1.0 = full scale) per
	// channel in stream order, LFE included. Convert with DB.
	TruePeak   []float64
	SamplePeak []float64

	// Oversampling is the true-peak oversampling factor used (4, 2 or 1).
	Oversampling int

	// Rejected counts the samples written that the meter cannot measure:
	// NaN, ±Inf and finite values beyond ±MaxMagnitude. The meter measured
	// each of them as 0 (silence) so that one bad sample cannot poison the
	// filter state for the rest of the stream; when Rejected is not zero the
	// figures describe damaged audio and a caller should say so.
	Rejected int64

	// Series holds the 10 Hz time series behind the figures above.
	Series Series
}

// MaxTruePeak returns the highest true peak over all channels (linear).
func (r Result) MaxTruePeak() float64 { return maxOf(r.TruePeak) }

// MaxSamplePeak returns the highest sample peak over all channels (linear).
func (r Result) MaxSamplePeak() float64 { return maxOf(r.SamplePeak) }

func maxOf(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		if x > m {
			m = x
		}
	}
	return m
}

// Series are per-100 ms values. Element i describes the window or block that
// ends at (i+1)·100 ms. A value is NaN where the window is not yet full (the
// first 3 momentary and 29 short-term updates) and -Inf where the window is
// digital silence.
//
// That holds while Step is 1: for streams up to 2¹⁶ blocks (1 h 49 min).
// Longer streams are decimated to keep memory bounded: each element then
// stands for Step consecutive blocks (a power of two), and each pair of
// elements 2k, 2k+1 holds the lowest and highest value of its 2·Step blocks
// in the order they occurred, so every extreme survives. A decimated series
// has between 2¹⁵ and 2¹⁶ elements whatever the length.
//
// At sample rates where 100 ms is not a whole number of samples (11 025 Hz:
// 1102.5), block k ends at sample round(k·rate/10), halves rounded up, so
// the blocks alternate in length and never drift. A final block shorter
// than 100 ms appears in no series; its peaks still count in the Result.
// Interpolated true-peak values are attributed to the block of the newest
// input sample they use (a lag of about 5.5 input samples).
type Series struct {
	// Step is how many 100 ms blocks each element stands for: 1, or a
	// power of two for a decimated series.
	Step int
	// Momentary is the 400 ms loudness in LUFS at each 100 ms step.
	Momentary []float32
	// ShortTerm is the 3 s loudness in LUFS at each 100 ms step.
	ShortTerm []float32
	// TruePeak is the highest true peak over all channels inside the 100 ms
	// block, in dBTP.
	TruePeak []float32
	// SamplePeak is the highest |sample| over all channels inside the 100 ms
	// block, in dBFS.
	SamplePeak []float32

	// ShortTermLevels is the distribution of every short-term value above
	// the −70 LUFS absolute gate, never decimated: element i counts the
	// values from −70 + i·LevelStep up to −70 + (i+1)·LevelStep LUFS. A
	// histogram of short-term loudness drawn from it stays true for a
	// stream of any length.
	ShortTermLevels []int64
}

// LevelStep is the bin width of Series.ShortTermLevels in LU.
const LevelStep = 0.1

// DB converts a linear magnitude to decibels (20·log10); 0 gives -Inf.
func DB(linear float64) float64 { return 20 * math.Log10(linear) }

// Meter accumulates one stream. Build it once per stream with NewMeter, feed
// it with Write, read it with Result.
//
// Its memory is bounded whatever the stream's length: per channel a few
// kilobytes of working buffer, the energies of the last 30 blocks (for the
// 3 s window), the gating statistics (exact up to 1 h 49 min, then a
// histogram: see histogram.go) and the decimated 10 Hz series (see Series):
// at most a few megabytes in all.
type Meter struct {
	rate     int
	channels int
	weights  []float64
	filters  []KWeighting
	peaks    []*TruePeak

	frames       int64 // frames written
	nextBoundary int64 // frame index where the current 100 ms block ends
	rejected     int64 // samples beyond MaxMagnitude, NaN included

	// The current, unfinished 100 ms block.
	energy     float64   // Σ weight·Σy² over channels
	blockTrue  []float64 // per channel true peak (linear)
	blockPeak  []float64 // per channel sample peak (linear)
	streamTrue []float64 // per channel, finished blocks only
	streamPeak []float64

	// Finished 100 ms blocks: how many, and the weighted energies
	// (Σ weight·Σy² over channels, not yet means) of the last 30, at index
	// block number mod 30.
	blocks int64
	recent [shortTermBlocks]float64

	momentary gatedValues // every 400 ms block: gating, maximum
	shortTerm gatedValues // every 3 s window: loudness range, maximum

	// The 10 Hz series.
	seriesM, seriesS, seriesTP, seriesSP seriesRecorder

	// A segment meter (StartAt, segment.go) measures the stretch from
	// block origin (frame originFrame) on and logs its finished blocks:
	// energy, per-channel true peaks, per-channel sample peaks.
	origin, originFrame int64
	logging             bool
	log                 []float64

	// streamPeakOnly: only the stream's highest true peak is wanted
	// (StreamTruePeakOnly), so the search may skip what cannot beat it.
	streamPeakOnly bool
}

// StreamTruePeakOnly tells the meter that of the true peak only the
// stream's highest, per channel (Result.TruePeak), is wanted, not each
// 100 ms block's: the true-peak search then skips every stretch that
// cannot beat the highest peak found so far in the stream, not only the
// block's so far, which on programme skips most of the interpolation
// once the loudest passage is behind. Result.TruePeak and
// Result.MaxTruePeak are the same bits as without it (the skip test is
// exact, TestStreamTruePeakOnlySameResult); the true-peak series
// (Result.Series.TruePeak) then holds the running maximum instead of each
// block's peak. A surround file's stereo fold-down, of which only the
// highest true peak is reported, is metered so. It is configuration, kept
// by Reset; set it before writing.
func (m *Meter) StreamTruePeakOnly() { m.streamPeakOnly = true }

// NewMeter returns a meter for interleaved frames of len(weights) channels at
// sampleRate Hz (8 000 to 384 000). weights are the BS.1770 channel weights
// in stream order (see Weights); a weight of 0 excludes the channel from
// loudness (LFE) but not from true and sample peak.
func NewMeter(sampleRate int, weights []float64) (*Meter, error) {
	if err := checkRate(sampleRate); err != nil {
		return nil, err
	}
	if len(weights) == 0 {
		return nil, fmt.Errorf("loudness: no channels")
	}
	for i, w := range weights {
		if !(w >= 0) || math.IsInf(w, 0) {
			return nil, fmt.Errorf("loudness: channel %d: weight %v is not a finite non-negative number", i+1, w)
		}
	}
	n := len(weights)
	m := &Meter{
		rate:       sampleRate,
		channels:   n,
		weights:    append([]float64(nil), weights...),
		filters:    make([]KWeighting, n),
		peaks:      make([]*TruePeak, n),
		blockTrue:  make([]float64, n),
		blockPeak:  make([]float64, n),
		streamTrue: make([]float64, n),
		streamPeak: make([]float64, n),
		momentary:  newGatedValues(),
		shortTerm:  newGatedValues(),
		seriesM:    newSeriesRecorder(),
		seriesS:    newSeriesRecorder(),
		seriesTP:   newSeriesRecorder(),
		seriesSP:   newSeriesRecorder(),
	}
	k := NewKWeighting(sampleRate)
	for c := range n {
		m.filters[c] = k
		m.peaks[c], _ = NewTruePeak(sampleRate) // rate checked above
	}
	m.Reset()
	return m, nil
}

// boundary returns the frame index where 100 ms block k starts:
// round(k·rate/10), halves up.
// A segment meter counts its blocks and frames from its own start.
func (m *Meter) boundary(k int64) int64 {
	return ((m.origin+k)*int64(m.rate)+5)/10 - m.originFrame
}

// Rejected returns how many samples the meter could not measure (NaN, ±Inf,
// or beyond ±MaxMagnitude) since it was built or reset. Unlike Result it
// costs nothing, so a caller can ask after every Write.
func (m *Meter) Rejected() int64 { return m.rejected }

// Reset makes the meter ready for a new stream with the same configuration.
func (m *Meter) Reset() {
	for c := range m.channels {
		m.filters[c].Reset()
		m.peaks[c].Reset()
	}
	m.frames, m.rejected, m.energy = 0, 0, 0
	m.origin, m.originFrame, m.logging, m.log = 0, 0, false, m.log[:0]
	m.nextBoundary = m.boundary(1)
	clear(m.blockTrue)
	clear(m.blockPeak)
	clear(m.streamTrue)
	clear(m.streamPeak)
	m.blocks = 0
	m.momentary.reset()
	m.shortTerm.reset()
	for _, r := range []*seriesRecorder{&m.seriesM, &m.seriesS, &m.seriesTP, &m.seriesSP} {
		r.reset()
	}
}

// Write feeds interleaved frames. len(frames) must be a multiple of the
// channel count; Write panics otherwise. NaN, ±Inf and samples beyond
// ±MaxMagnitude are measured as 0 and counted in Result.Rejected.
func (m *Meter) Write(frames []float64) {
	nch := m.channels
	if len(frames)%nch != 0 {
		panic(fmt.Sprintf("loudness: Meter.Write: %d samples is not a whole number of %d-channel frames", len(frames), nch))
	}
	for len(frames) > 0 {
		n := min(int64(len(frames)/nch), chunkFrames, m.nextBoundary-m.frames)
		m.process(frames[:int(n)*nch], int(n))
		frames = frames[int(n)*nch:]
		m.frames += n
		if m.frames == m.nextBoundary {
			m.finishBlock()
		}
	}
}

// process measures n ≤ chunkFrames frames that lie inside one 100 ms
// block: it copies each channel into its true-peak detector's input (where
// the K-weighting reads it too), with the float32 copy and the per-block
// maxima the detector's skip test makes its run maxima from (TruePeak.blocks)
// in the same pass, then weighs and peaks every channel.
func (m *Meter) process(frames []float64, n int) {
	m.split(frames, n)
	m.addEnergy(n)
	m.peakAll(n)
}

// split copies each channel of the n frames into its true-peak detector's
// input (process's first step).
func (m *Meter) split(frames []float64, n int) {
	if !m.splitFast(frames, n) && !m.split6(frames, n) {
		for c := range m.channels {
			m.splitChannel(frames, n, c)
		}
	}
}

// peakAll raises each channel's block true peak by the n samples waiting
// in its detector (process's last step).
func (m *Meter) peakAll(n int) {
	for c, tp := range m.peaks {
		floor := m.blockTrue[c]
		if m.streamPeakOnly {
			floor = max(floor, m.streamTrue[c])
		}
		if tp.factor == 1 {
			// Without oversampling (176.4 kHz and up) the true peak is
			// the sample peak, which the split has just raised over the
			// same samples: no second pass over them.
			m.blockTrue[c] = max(floor, m.blockPeak[c])
			tp.keepHistory(n)
			continue
		}
		m.blockTrue[c] = tp.peakBuffered(n, floor)
	}
}

// WriteBeside is m.Write(frames) and g.Write(gframes) for a meter g of a
// signal derived frame by frame from m's (a surround file's stereo
// fold-down beside the surround mix): the same number of frames, the same
// rate, g at m's position on the same block grid. Where the kernel set
// has the eight-lane K-weighting and the two meters weigh eight channels
// or fewer in all, both meters' channels go through it in one call
// instead of one call each: the K-weighting is latency-bound, so g's
// channels then cost almost nothing. Each channel's filter performs the
// same operations as alone and each meter adds its channels' energies in
// its own channel order, so both meters' results are the same bits as
// with two Writes (TestWriteBesideSameBits); elsewhere it is two Writes.
// It panics as Write does.
func (m *Meter) WriteBeside(frames []float64, g *Meter, gframes []float64) {
	nch, gch := m.channels, g.channels
	if len(frames)%nch != 0 || len(gframes)%gch != 0 || len(frames)/nch != len(gframes)/gch ||
		g.rate != m.rate || g.frames != m.frames || g.nextBoundary != m.nextBoundary ||
		!octEnergy() || m.weighted()+g.weighted() > 8 {
		m.Write(frames)
		g.Write(gframes)
		return
	}
	for len(frames) > 0 {
		if g.nextBoundary != m.nextBoundary || g.frames != m.frames {
			m.Write(frames)
			g.Write(gframes)
			return
		}
		n := min(int64(len(frames)/nch), chunkFrames, m.nextBoundary-m.frames)
		k := int(n)
		m.split(frames[:k*nch], k)
		g.split(gframes[:k*gch], k)
		addEnergyBeside(m, g, k)
		m.peakAll(k)
		g.peakAll(k)
		frames, gframes = frames[k*nch:], gframes[k*gch:]
		m.frames += n
		g.frames += n
		if m.frames == m.nextBoundary {
			m.finishBlock()
		}
		if g.frames == g.nextBoundary {
			g.finishBlock()
		}
	}
}

// weighted returns how many channels have a weight above 0.
func (m *Meter) weighted() int {
	k := 0
	for _, w := range m.weights {
		if w > 0 {
			k++
		}
	}
	return k
}

// addEnergyBeside is addEnergy for m and g at once, their weighted
// channels (eight at most in all) in one energyUpTo8 call (one eight-lane
// kernel call from five on), each meter's energies then added in its own
// channel order as addChannelEnergy does.
func addEnergyBeside(m, g *Meter, n int) {
	var f [8]*KWeighting
	var x [8][]float64
	k := 0
	for _, mm := range [2]*Meter{m, g} {
		for c, w := range mm.weights {
			if w > 0 {
				f[k], x[k] = &mm.filters[c], mm.peaks[c].input(n)
				k++
			}
		}
	}
	e := energyUpTo8(f[:k], x[:k])
	i := 0
	for _, mm := range [2]*Meter{m, g} {
		for c, w := range mm.weights {
			if w > 0 {
				mm.energy += mm.weights[c] * e[i]
				i++
			}
		}
	}
}

// raisePeak raises channel c's sample peak of the block to the magnitude
// whose bits are a.
func (m *Meter) raisePeak(c int, a uint64) {
	m.blockPeak[c] = max(m.blockPeak[c], math.Float64frombits(a))
}

// splitChannel copies channel c of the n frames into its true-peak
// detector's input (TruePeak.fill: with the float32 copy and block maxima)
// and raises the block's sample peak: the path for every channel count
// without a faster one (splitFast, split6), the reference those are tested
// against, and the one path that counts and zeroes samples the meter cannot
// measure. The bits of |v| order like |v|, and NaN and ±Inf order above
// every finite value: one integer comparison of the channel's maximum
// finds all three, and only then does a second pass zero them (and fill
// the copies again from the zeroed input).
func (m *Meter) splitChannel(frames []float64, n, c int) {
	if n <= 0 {
		return
	}
	tp := m.peaks[c]
	peak := tp.fill(frames[c:], m.channels, n)
	if peak > maxMagnitudeBits {
		in := tp.input(n)
		for i, v := range in {
			if math.Float64bits(v)&^signBit > maxMagnitudeBits {
				in[i] = 0
				m.rejected++
			}
		}
		peak = tp.fill(in, 1, n)
	}
	m.raisePeak(c, peak)
}

// split6 is splitChannel for all six channels of 5.1 in one pass over the
// frames (one sequential read instead of six strided ones, and no test per
// sample but the running maxima), and reports true. A chunk holding a
// sample the meter cannot measure (its magnitude bits exceed
// maxMagnitudeBits) makes it report false, having changed nothing that
// splitChannel does not overwrite; it also reports false for other channel
// counts. Copies, exact conversions and integer maxima: splitChannel's
// result bit for bit. With AVX2 split6AVX2 (split6AVX512 on the avx512
// set) does the whole 32-frame blocks (split6Fast), split6Go the rest.
func (m *Meter) split6(frames []float64, n int) bool {
	if m.channels != 6 {
		return false
	}
	frames = frames[:6*n]
	done := m.split6Fast(frames, n)
	var p [6]uint64
	if done < n {
		p = m.split6Go(frames, done, n)
	}
	for c, tp := range m.peaks {
		for _, b := range tp.blocks[:done/skipRun] {
			p[c] = max(p[c], b[0])
		}
	}
	for _, a := range p {
		if a > maxMagnitudeBits {
			return false
		}
	}
	for c, a := range p {
		m.raisePeak(c, a)
	}
	return true
}

// split6Go is TruePeak.fillGo for the six channels of frames [from, to)
// (from a multiple of skipRun) in one pass over them, and returns each
// channel's largest bit pattern of |x|: the Go twin of split6AVX2.
func (m *Meter) split6Go(frames []float64, from, to int) (p [6]uint64) {
	var dst [6][]float64
	var dst32 [6][]float32
	narrow := m.peaks[0].narrow32() // else, as fillGo, no float32 copy
	for c, tp := range m.peaks[:6] {
		dst[c] = tp.input(to)
		if narrow {
			dst32[c] = tp.input32(to)
		}
	}
	for lo := from; lo < to; lo += skipRun {
		hi := min(lo+skipRun, to)
		mid := min(lo+skipRun-tailLen, hi) // the block's tail: mid … hi−1
		var head, tail [6]uint64
		split6Range(frames, &dst, &dst32, lo, mid, &head)
		split6Range(frames, &dst, &dst32, mid, hi, &tail)
		for c, tp := range m.peaks[:6] {
			top := max(head[c], tail[c])
			tp.blocks[lo/skipRun] = [2]uint64{top, tail[c]}
			p[c] = max(p[c], top)
		}
	}
	return p
}

// split6Range de-interleaves six-channel frames [lo, hi) into dst and
// dst32 and raises peaks[c] to the largest bit pattern of |x| of channel c.
// With dst32 nil (no float32 copy wanted) it leaves dst32 alone. Each
// channel is a slice of its own so that the loop carries no bounds checks.
func split6Range(frames []float64, dst *[6][]float64, dst32 *[6][]float32, lo, hi int, peaks *[6]uint64) {
	if hi <= lo {
		return
	}
	f := frames[6*lo : 6*hi]
	c0, c1, c2, c3, c4, c5 := dst[0][lo:hi], dst[1][lo:hi], dst[2][lo:hi], dst[3][lo:hi], dst[4][lo:hi], dst[5][lo:hi]
	p0, p1, p2, p3, p4, p5 := peaks[0], peaks[1], peaks[2], peaks[3], peaks[4], peaks[5]
	for i := range c0 {
		x := (*[6]float64)(f[6*i:])
		c0[i], c1[i], c2[i], c3[i], c4[i], c5[i] = x[0], x[1], x[2], x[3], x[4], x[5]
		p0 = max(p0, math.Float64bits(x[0])&^signBit)
		p1 = max(p1, math.Float64bits(x[1])&^signBit)
		p2 = max(p2, math.Float64bits(x[2])&^signBit)
		p3 = max(p3, math.Float64bits(x[3])&^signBit)
		p4 = max(p4, math.Float64bits(x[4])&^signBit)
		p5 = max(p5, math.Float64bits(x[5])&^signBit)
	}
	*peaks = [6]uint64{p0, p1, p2, p3, p4, p5}
	if dst32[0] == nil {
		return
	}
	d0, d1, d2, d3, d4, d5 := dst32[0][lo:hi], dst32[1][lo:hi], dst32[2][lo:hi], dst32[3][lo:hi], dst32[4][lo:hi], dst32[5][lo:hi]
	for i := range d0 {
		x := (*[6]float64)(f[6*i:])
		d0[i], d1[i], d2[i], d3[i], d4[i], d5[i] = float32(x[0]), float32(x[1]), float32(x[2]), float32(x[3]), float32(x[4]), float32(x[5])
	}
}

// addEnergy adds the weighted K-filtered energy of the n samples waiting in
// each channel's input. The filter is latency-bound, so channels go through
// it several at a time (addChannelEnergy): up to eight in one register
// (energyOct) with AVX-512, four (energyQuad) where AVX2 runs them in one
// register, then two (energyPair); an odd one out goes alone (energyOne).
// Channels of weight 0 are skipped, and the sum is taken in channel order
// either way.
func (m *Meter) addEnergy(n int) {
	var wait [8]int // weighted channels not yet filtered
	k := 0
	group := 4
	if octEnergy() {
		group = 8
	}
	for c, w := range m.weights {
		if !(w > 0) {
			continue
		}
		wait[k] = c
		k++
		if k == group {
			m.addChannelEnergy(wait[:k], n)
			k = 0
		}
	}
	if k > 0 {
		m.addChannelEnergy(wait[:k], n)
	}
}

// finishBlock closes the current 100 ms block: it completes a momentary
// window (once there are 4 blocks) and a short-term window (once there are
// 30), feeds both to their statistics and the series, and forgets the
// block's samples.
func (m *Meter) finishBlock() {
	if m.logging {
		m.logBlock()
		return
	}
	var truePeak, samplePeak float64 // linear, highest over channels
	for c := range m.channels {
		truePeak = max(truePeak, m.blockTrue[c])
		samplePeak = max(samplePeak, m.blockPeak[c])
		m.streamTrue[c] = max(m.streamTrue[c], m.blockTrue[c])
		m.streamPeak[c] = max(m.streamPeak[c], m.blockPeak[c])
	}
	m.recent[m.blocks%shortTermBlocks] = m.energy
	m.blocks++
	mom, short := float32(math.NaN()), float32(math.NaN())
	if m.blocks >= momentaryBlocks {
		z := m.windowEnergy(momentaryBlocks)
		m.momentary.add(z)
		mom = float32(loudnessOf(z))
	}
	if m.blocks >= shortTermBlocks {
		z := m.windowEnergy(shortTermBlocks)
		m.shortTerm.add(z)
		short = float32(loudnessOf(z))
	}
	m.seriesM.add(mom)
	m.seriesS.add(short)
	m.seriesTP.add(float32(DB(truePeak)))
	m.seriesSP.add(float32(DB(samplePeak)))

	m.energy = 0
	clear(m.blockTrue)
	clear(m.blockPeak)
	m.nextBoundary = m.boundary(m.blocks + 1)
}

// Window lengths in 100 ms blocks.
const (
	momentaryBlocks = 4  // 400 ms
	shortTermBlocks = 30 // 3 s
)

// windowEnergy returns the weighted mean square Σ weight·zᵢ of the window
// of size consecutive blocks that ends with the last finished block (at
// most shortTermBlocks). The block energies are added oldest first.
func (m *Meter) windowEnergy(size int) float64 {
	sum := 0.0
	for k := m.blocks - int64(size); k < m.blocks; k++ {
		sum += m.recent[k%shortTermBlocks]
	}
	samples := m.boundary(m.blocks) - m.boundary(m.blocks-int64(size))
	return sum / float64(samples)
}

// Result returns the measurement of everything written so far. It may be
// called more than once.
func (m *Meter) Result() Result {
	r := Result{
		SampleRate:   m.rate,
		Channels:     m.channels,
		Frames:       m.frames,
		Oversampling: m.peaks[0].Factor(),
		Rejected:     m.rejected,
		TruePeak:     make([]float64, m.channels),
		SamplePeak:   make([]float64, m.channels),
	}
	for c := range m.channels {
		tp := max(m.streamTrue[c], m.blockTrue[c])
		r.TruePeak[c] = m.peaks[c].Flush(tp)
		r.SamplePeak[c] = max(m.streamPeak[c], m.blockPeak[c])
	}

	r.Integrated = m.momentary.integrated()
	r.LoudnessRange = m.shortTerm.loudnessRange()
	r.MaxMomentary = m.momentary.maximum(whyTooShortBlock, whySilentBlocks)
	r.MaxShortTerm = m.shortTerm.maximum(whyTooShortShort, whySilentWindows)
	r.Series = Series{
		Step:       m.seriesM.step,
		Momentary:  m.seriesM.series(),
		ShortTerm:  m.seriesS.series(),
		TruePeak:   m.seriesTP.series(),
		SamplePeak: m.seriesSP.series(),

		ShortTermLevels: m.shortTerm.levels(),
	}
	return r
}
