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
// At sample rates where 100 ms is not a whole number of samples (11 025 Hz:
// 1102.5), block k ends at sample round(k·rate/10), halves rounded up, so
// the blocks alternate in length and never drift. A final block shorter
// than 100 ms appears in no series; its peaks still count in the Result.
// Interpolated true-peak values are attributed to the block of the newest
// input sample they use (a lag of about 5.5 input samples).
type Series struct {
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
}

// DB converts a linear magnitude to decibels (20·log10); 0 gives -Inf.
func DB(linear float64) float64 { return 20 * math.Log10(linear) }

// Meter accumulates one stream. Build it once per stream with NewMeter, feed
// it with Write, read it with Result.
//
// It keeps, per 100 ms block, the weighted K-filtered energy and the peaks
// (24 bytes), and per channel a few kilobytes of working buffer: memory grows
// with duration by about 1 MB per hour and not at all with sample rate or
// channel count beyond that.
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

	blocks []block // finished 100 ms blocks
}

// block is what the meter keeps of one finished 100 ms block.
type block struct {
	energy     float64 // Σ weight·Σy² over channels (not yet a mean)
	truePeak   float64 // linear, highest over channels
	samplePeak float64
}

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
func (m *Meter) boundary(k int64) int64 { return (k*int64(m.rate) + 5) / 10 }

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
	m.nextBoundary = m.boundary(1)
	clear(m.blockTrue)
	clear(m.blockPeak)
	clear(m.streamTrue)
	clear(m.streamPeak)
	m.blocks = m.blocks[:0]
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
// the K-weighting reads it too), then weighs and peaks every channel.
func (m *Meter) process(frames []float64, n int) {
	nch := m.channels
	for c := range nch {
		in := m.peaks[c].input(n)
		var peak uint64 // bits of max|v|: see maxAbs
		j := c
		for i := range in {
			v := frames[j]
			j += nch
			// The bits of |v| order like |v|, and NaN and ±Inf order above
			// every finite value: one integer comparison rejects all three.
			a := math.Float64bits(v) &^ signBit
			if a > maxMagnitudeBits {
				v, a = 0, 0
				m.rejected++
			}
			in[i] = v
			if a > peak {
				peak = a
			}
		}
		m.blockPeak[c] = max(m.blockPeak[c], math.Float64frombits(peak))
	}
	m.addEnergy(n)
	for c, tp := range m.peaks {
		m.blockTrue[c] = tp.peakBuffered(n, m.blockTrue[c])
	}
}

// addEnergy adds the weighted K-filtered energy of the n samples waiting in
// each channel's input. The filter is latency-bound, so channels go through
// it two at a time (energyPair); an odd one out goes alone. Channels of
// weight 0 are skipped, and the sum is taken in channel order either way.
func (m *Meter) addEnergy(n int) {
	waiting := -1 // a weighted channel not yet filtered
	for c, w := range m.weights {
		if !(w > 0) {
			continue
		}
		if waiting < 0 {
			waiting = c
			continue
		}
		ea, eb := energyPair(&m.filters[waiting], &m.filters[c], m.peaks[waiting].input(n), m.peaks[c].input(n))
		m.energy += m.weights[waiting] * ea
		m.energy += w * eb
		waiting = -1
	}
	if waiting >= 0 {
		m.energy += m.weights[waiting] * m.filters[waiting].Energy(m.peaks[waiting].input(n))
	}
}

// finishBlock closes the current 100 ms block.
func (m *Meter) finishBlock() {
	b := block{energy: m.energy}
	for c := range m.channels {
		b.truePeak = max(b.truePeak, m.blockTrue[c])
		b.samplePeak = max(b.samplePeak, m.blockPeak[c])
		m.streamTrue[c] = max(m.streamTrue[c], m.blockTrue[c])
		m.streamPeak[c] = max(m.streamPeak[c], m.blockPeak[c])
	}
	m.blocks = append(m.blocks, b)
	m.energy = 0
	clear(m.blockTrue)
	clear(m.blockPeak)
	m.nextBoundary = m.boundary(int64(len(m.blocks)) + 1)
}

// Window lengths in 100 ms blocks.
const (
	momentaryBlocks = 4  // 400 ms
	shortTermBlocks = 30 // 3 s
)

// windowEnergies returns, for every window of size consecutive finished
// 100 ms blocks, the weighted mean square Σ weight·zᵢ of the window.
func (m *Meter) windowEnergies(size int) []float64 {
	if len(m.blocks) < size {
		return nil
	}
	z := make([]float64, len(m.blocks)-size+1)
	for j := range z {
		sum := 0.0
		for _, b := range m.blocks[j : j+size] {
			sum += b.energy
		}
		samples := m.boundary(int64(j+size)) - m.boundary(int64(j))
		z[j] = sum / float64(samples)
	}
	return z
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

	momentary := m.windowEnergies(momentaryBlocks)
	shortTerm := m.windowEnergies(shortTermBlocks)
	r.Integrated = gatedLoudness(momentary)
	r.LoudnessRange = loudnessRange(shortTerm)
	r.MaxMomentary = maxLoudness(momentary, whyTooShortBlock, whySilentBlocks)
	r.MaxShortTerm = maxLoudness(shortTerm, whyTooShortShort, whySilentWindows)

	n := len(m.blocks)
	s := Series{
		Momentary:  seriesOf(momentary, n),
		ShortTerm:  seriesOf(shortTerm, n),
		TruePeak:   make([]float32, n),
		SamplePeak: make([]float32, n),
	}
	for i, b := range m.blocks {
		s.TruePeak[i] = float32(DB(b.truePeak))
		s.SamplePeak[i] = float32(DB(b.samplePeak))
	}
	r.Series = s
	return r
}

// seriesOf turns the energies of windows ending at blocks n−len(z)…n−1 into
// n loudness values, NaN before the first full window.
func seriesOf(z []float64, n int) []float32 {
	out := make([]float32, n)
	lead := n - len(z)
	for i := range lead {
		out[i] = float32(math.NaN())
	}
	for j, v := range z {
		out[lead+j] = float32(loudnessOf(v))
	}
	return out
}
