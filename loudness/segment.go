package loudness

import (
	"fmt"
	"math"
)

// Segments: one stream measured on several cores.
//
// A long stream can be cut at 100 ms block boundaries into stretches that
// separate meters measure at the same time, then joined in order into one
// meter whose Result is that of the whole stream. What each part of the
// meter needs at a cut:
//
//   - Block energies, block and stream peaks split exactly at a block
//     boundary: a segment meter logs every finished block (weighted energy,
//     per-channel true and sample peak) instead of gating it, and Join
//     replays the log through the same code the whole-stream meter runs, so
//     gating, loudness range, the momentary and short-term maxima and the
//     series see the very blocks of the whole stream, in order.
//   - The true-peak interpolator needs the 11 samples before the cut and the
//     K-weighting filters their state at the cut. Warm feeds a segment meter
//     the audio just before its stretch: the interpolator's history is then
//     exact, and the filters start from silence early enough that their state
//     has converged to the whole-stream one (the slowest pole of the
//     K-weighting, the 38 Hz high-pass, decays by e⁻¹ in about 200 samples at
//     48 kHz, so one second of pre-roll leaves a difference far below one
//     unit in the last place; segment_test.go checks every figure against the
//     whole-stream meter).
//
// A block's energy is a sum over the chunks it was written in; where the
// writes fall differently the sum can differ in its last bits, which is why
// the figures of a joined meter agree with the whole-stream ones to within
// 1e-9 LU rather than bit for bit.

// PreRollSeconds is how much audio before its stretch a segment meter
// should be warmed with (Warm): enough for the K-weighting state to
// converge, and far more than the interpolator's 11 samples.
const PreRollSeconds = 1

// StartAt makes a new or freshly Reset meter measure the stretch of a
// longer stream that starts at 100 ms block number block (frame
// round(block·rate/10)), to be joined into a whole-stream meter with Join.
// Such a meter logs its blocks instead of gating them; its own Result is
// not meaningful. Call it before Warm and Write.
func (m *Meter) StartAt(block int64) error {
	if m.frames != 0 || m.blocks != 0 {
		return fmt.Errorf("loudness: StartAt on a meter that has measured %d frames", m.frames)
	}
	if block < 0 {
		return fmt.Errorf("loudness: StartAt block %d", block)
	}
	m.origin, m.originFrame = 0, 0
	start := m.boundary(block)
	m.origin, m.originFrame, m.logging = block, start, true
	m.nextBoundary = m.boundary(1)
	return nil
}

// Warm runs frames (interleaved, the audio just before this meter's
// stretch) through the K-weighting filters and the true-peak history
// without measuring them. Unmeasurable samples count as 0, as in Write.
func (m *Meter) Warm(frames []float64) {
	nch := m.channels
	if len(frames)%nch != 0 {
		panic(fmt.Sprintf("loudness: Meter.Warm: %d samples is not a whole number of %d-channel frames", len(frames), nch))
	}
	for len(frames) > 0 {
		n := min(len(frames)/nch, chunkFrames)
		for c := range nch {
			tp := m.peaks[c]
			in := tp.input(n)
			for i, j := 0, c; i < n; i, j = i+1, j+nch {
				v := frames[j]
				if math.Float64bits(v)&^signBit > maxMagnitudeBits {
					v = 0
				}
				in[i] = v
			}
			m.filters[c].Energy(in)
			copy(tp.buf[:history], tp.buf[n:n+history])
		}
		frames = frames[n*nch:]
	}
}

// logBlock is finishBlock for a segment meter: it records the block for
// Join and starts the next one.
func (m *Meter) logBlock() {
	for c := range m.channels {
		m.streamTrue[c] = max(m.streamTrue[c], m.blockTrue[c])
		m.streamPeak[c] = max(m.streamPeak[c], m.blockPeak[c])
	}
	m.log = append(m.log, m.energy)
	m.log = append(m.log, m.blockTrue...)
	m.log = append(m.log, m.blockPeak...)
	m.blocks++
	m.energy = 0
	clear(m.blockTrue)
	clear(m.blockPeak)
	m.nextBoundary = m.boundary(m.blocks + 1)
}

// Join appends the stretch measured by seg, a meter started with StartAt
// at this meter's next block, as if its frames had been written here. This
// meter must stand at a block boundary (only the last segment of a stream
// may end inside a block); seg must have the same rate and weights. seg is
// not changed and may be dropped afterwards.
func (m *Meter) Join(seg *Meter) error {
	switch {
	case !seg.logging:
		return fmt.Errorf("loudness: Join of a meter not started with StartAt")
	case seg.rate != m.rate || seg.channels != m.channels:
		return fmt.Errorf("loudness: Join of a %d Hz %d-channel meter into a %d Hz %d-channel one", seg.rate, seg.channels, m.rate, m.channels)
	case seg.origin != m.origin+m.blocks:
		return fmt.Errorf("loudness: Join of a stretch from block %d at block %d", seg.origin, m.origin+m.blocks)
	case m.frames != m.boundary(m.blocks):
		return fmt.Errorf("loudness: Join after a stretch that ended inside a block")
	}
	for i := range m.weights {
		if math.Float64bits(m.weights[i]) != math.Float64bits(seg.weights[i]) {
			return fmt.Errorf("loudness: Join of a meter with other channel weights")
		}
	}
	nch := m.channels
	for rec := seg.log; len(rec) > 0; rec = rec[1+2*nch:] {
		m.energy = rec[0]
		copy(m.blockTrue, rec[1:1+nch])
		copy(m.blockPeak, rec[1+nch:1+2*nch])
		m.frames = m.boundary(m.blocks + 1)
		m.finishBlock()
	}
	// The unfinished block at the end (the stream's last, shorter one).
	m.energy = seg.energy
	copy(m.blockTrue, seg.blockTrue)
	copy(m.blockPeak, seg.blockPeak)
	m.frames = seg.originFrame + seg.frames - m.originFrame
	m.rejected += seg.rejected
	for c := range nch {
		m.filters[c] = seg.filters[c]
		copy(m.peaks[c].buf[:history], seg.peaks[c].buf[:history])
	}
	m.nextBoundary = m.boundary(m.blocks + 1)
	return nil
}
