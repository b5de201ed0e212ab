package measure

import (
	"math"
)

// Defaults for the signal-hygiene probes. None of them has a published
// source: they are common practice in delivery QC.
const (
	// DefaultSilenceThresholdDBFS: audio whose sample peak stays below this
	// counts as silence (common practice, no published source).
	DefaultSilenceThresholdDBFS = -60.0
	// DefaultClipRunMinSamples: a run of this many consecutive full-scale
	// samples counts as clipping (common practice, no published source: a
	// single full-scale sample may be a legitimate peak).
	DefaultClipRunMinSamples = 3
	// DualMonoSideToMidDB: a two-channel file is dual mono when the energy
	// of L−R (side) is this far or further below that of L+R (mid) over the
	// whole file (common practice, no published source). Independent
	// dither on the two channels of one mono signal leaves the side at the
	// dither's own level, about −76 dB re the mid for a −20 dBFS tone made
	// 16-bit with TPDF dither and still below −50 dB for programme down to
	// about −45 dBFS RMS; a real stereo mix, even a narrow one, keeps its
	// side within 10 to 30 dB of its mid, and a 0.1 dB level difference
	// between two copies of one signal is already −45 dB. So −50 dB calls
	// "the same signal twice, up to dither" dual mono and nothing wider.
	DualMonoSideToMidDB = -50.0
	// correlationWindowS is the window for MinWindowCorrelation, the same 3 s
	// as short-term loudness so a phase problem is judged over a stretch a
	// listener would notice.
	correlationWindowS = 3
)

// hygiene accumulates the non-loudness QC figures over a stream in one pass.
// It keeps a fixed amount of state per channel, whatever the file's length.
type hygiene struct {
	channels     int
	clipLevel    float64 // |x| at or above this is a full-scale sample
	fullBits     uint64  // the bits of clipLevel (see pairSums)
	silenceLevel float64 // linear sample-peak threshold for silence
	lsb          float64 // one quantisation step, for the dual-mono test
	clipRunMin   int64

	frames       int64
	firstLoud    int64 // first frame with any channel ≥ silenceLevel, -1 if none
	lastLoud     int64 // last such frame
	sum          []float64
	run          []int64
	clipped      int64
	clipRuns     int64
	longestRun   int64
	left, right  int // indices of the front L/R pair, -1 if none
	pair         pairStats
	window       pairStats
	windowFrames int64
	minWindow    float64
	haveWindow   bool
	maxDiff      float64
	// windows counts the closed 3 s windows; onWindow, when set, hears
	// the correlation of each one with signal (for phase events).
	windows  int64
	onWindow func(k int64, c float64)
	// st is the any-channel kernel's state block, a value so that a copy
	// of the probes (a section's, see split.go) has its own.
	st frameState
}

// pairStats holds the running sums for a Pearson correlation of two
// channels.
type pairStats struct {
	n                     float64
	sl, sr, sll, srr, slr float64
}

func (p *pairStats) correlation() (float64, bool) {
	if p.n < 2 {
		return 0, false
	}
	cov := p.slr - p.sl*p.sr/p.n
	vl := p.sll - p.sl*p.sl/p.n
	vr := p.srr - p.sr*p.sr/p.n
	if vl <= 0 || vr <= 0 {
		return 0, false
	}
	c := cov / math.Sqrt(vl*vr)
	return math.Max(-1, math.Min(1, c)), true
}

func newHygiene(channels, sampleRate, bits int, float bool, layout []string, silenceDBFS float64, clipRunMin int) *hygiene {
	h := &hygiene{
		channels:     channels,
		silenceLevel: math.Pow(10, silenceDBFS/20),
		clipRunMin:   int64(clipRunMin),
		firstLoud:    -1,
		lastLoud:     -1,
		sum:          make([]float64, channels),
		run:          make([]int64, channels),
		left:         -1,
		right:        -1,
		windowFrames: int64(sampleRate) * correlationWindowS,
		minWindow:    1,
	}
	if float || bits <= 0 {
		h.clipLevel = 1.0
		h.lsb = 1.0 / (1 << 23) // a 24-bit step: float deliveries are mastered at ≤ 24 bits
	} else {
		full := math.Ldexp(1, bits-1)
		h.clipLevel = (full - 1) / full
		h.lsb = 1 / full
	}
	for i, l := range layout {
		switch l {
		case "L":
			h.left = i
		case "R":
			h.right = i
		}
	}
	if h.left < 0 || h.right < 0 {
		h.left, h.right = -1, -1
	}
	h.fullBits = math.Float64bits(h.clipLevel)
	h.st = newFrameState(channels, h.left, h.right, h.clipLevel)
	return h
}

// write takes interleaved frames.
func (h *hygiene) write(buf []float64) { h.writeFold(buf, nil, nil) }

// writeFold is write that also folds every frame down to Lo/Ro into out
// (two samples per frame) with gains (gain into Lo, gain into Ro, per
// channel; see downmixer), in the same pass over buf. out is nil for no
// fold-down.
//
// The sums go through the kernels of hygiene_kernel.go a window segment at
// a time; the clipping runs are walked sample by sample only in segments
// where the kernel saw a full-scale sample or a run is still open.
func (h *hygiene) writeFold(buf, out, gains []float64) {
	nc := h.channels
	frames := len(buf) / nc
	if nc == 2 && h.left == 0 && h.right == 1 && out == nil {
		h.writeStereo(buf, frames)
	} else {
		h.writeAny(buf, out, gains, frames)
	}
	h.trackLoudness(buf, frames)
	h.frames += int64(frames)
}

// writeStereo is write for the common L/R file, where the channel sums
// are made from the window sums (Σ over a segment of the window sum's
// growth), so the samples are loaded once.
func (h *hygiene) writeStereo(buf []float64, frames int) {
	for f := 0; f < frames; {
		w := &h.window
		k := min(frames-f, int(h.windowFrames-int64(w.n)))
		seg := buf[2*f : 2*(f+k)]
		s := pairSums{w.sl, w.sr, w.sll, w.srr, w.slr, h.maxDiff}
		full := stereoStretch(seg, &s, h.fullBits)
		h.sum[0] += s.sl - w.sl
		h.sum[1] += s.sr - w.sr
		w.sl, w.sr, w.sll, w.srr, w.slr, h.maxDiff = s.sl, s.sr, s.sll, s.srr, s.slr, s.maxDiff
		if full || h.run[0] > 0 || h.run[1] > 0 {
			h.clipStereo(seg)
		}
		w.n += float64(k)
		f += k
		if int64(w.n) == h.windowFrames {
			h.closeWindow()
		}
	}
}

// clipStereo walks the clipping runs of a stereo segment.
func (h *hygiene) clipStereo(seg []float64) {
	lvl := h.clipLevel
	runL, runR := h.run[0], h.run[1]
	for i := 0; i+1 < len(seg); i += 2 {
		l, r := seg[i], seg[i+1]
		if math.Abs(l) >= lvl || math.Abs(r) >= lvl || runL > 0 || runR > 0 {
			runL = h.clipStep(l, runL)
			runR = h.clipStep(r, runR)
		}
	}
	h.run[0], h.run[1] = runL, runR
}

// writeAny is writeFold for any channel count and layout: per-channel
// sums, the L/R pair's window sums where the layout has the pair, and the
// fold-down when out is set.
func (h *hygiene) writeAny(buf, out, gains []float64, frames int) {
	nc := h.channels
	for f := 0; f < frames; {
		k := frames - f
		var p pairSums
		w := &h.window
		if h.left >= 0 {
			k = min(k, int(h.windowFrames-int64(w.n)))
			p = pairSums{w.sl, w.sr, w.sll, w.srr, w.slr, h.maxDiff}
		}
		seg := buf[f*nc : (f+k)*nc]
		var o []float64
		if out != nil {
			o = out[2*f : 2*(f+k)]
		}
		full := h.stretch(seg, o, gains, &p)
		if full || h.runOpen() {
			h.clipAny(seg)
		}
		f += k
		if h.left >= 0 {
			w.sl, w.sr, w.sll, w.srr, w.slr, h.maxDiff = p.sl, p.sr, p.sll, p.srr, p.slr, p.maxDiff
			w.n += float64(k)
			if int64(w.n) == h.windowFrames {
				h.closeWindow()
			}
		}
	}
}

// stretch runs the any-channel kernel over seg: on AVX2 through the
// kernel's state block, which the sums are copied into and back out of.
func (h *hygiene) stretch(seg, out, gains []float64, p *pairSums) bool {
	nc := h.channels
	if !hygieneAVX2 || nc > maxKernelChannels {
		return anyStretchGo(seg, out, h.sum, gains, p, h.left, h.right, h.fullBits)
	}
	st := &h.st
	copy(st.sums[:], h.sum)
	st.setGains(gains)
	st.pair = *p
	full := anyStretch(seg, out, st)
	copy(h.sum, st.sums[:nc])
	*p = st.pair
	return full
}

// runOpen reports whether a channel is inside a clipping run.
func (h *hygiene) runOpen() bool {
	for _, r := range h.run {
		if r > 0 {
			return true
		}
	}
	return false
}

// clipAny walks the clipping runs of a segment of any channel count.
func (h *hygiene) clipAny(seg []float64) {
	nc, lvl := h.channels, h.clipLevel
	for c := 0; c < nc; c++ {
		run := h.run[c]
		for i := c; i < len(seg); i += nc {
			if x := seg[i]; math.Abs(x) >= lvl || run > 0 {
				run = h.clipStep(x, run)
			}
		}
		h.run[c] = run
	}
}

// clipStep advances one channel's clipping run by one sample.
func (h *hygiene) clipStep(x float64, run int64) int64 {
	if math.Abs(x) >= h.clipLevel {
		h.clipped++
		return run + 1
	}
	if run > 0 {
		h.endRun(run)
	}
	return 0
}

func (h *hygiene) endRun(run int64) {
	if run >= h.clipRunMin {
		h.clipRuns++
	}
	if run > h.longestRun {
		h.longestRun = run
	}
}

// trackLoudness finds the first and last frame whose sample peak reaches the
// silence threshold.
func (h *hygiene) trackLoudness(buf []float64, frames int) {
	nc := h.channels
	thr := h.silenceLevel
	if h.firstLoud < 0 {
		for f := 0; f < frames; f++ {
			if anyAbove(buf[f*nc:(f+1)*nc], thr) {
				h.firstLoud = h.frames + int64(f)
				break
			}
		}
		if h.firstLoud < 0 {
			return
		}
	}
	for f := frames - 1; f >= 0; f-- {
		if anyAbove(buf[f*nc:(f+1)*nc], thr) {
			if last := h.frames + int64(f); last > h.lastLoud {
				h.lastLoud = last
			}
			return
		}
	}
}

func anyAbove(frame []float64, thr float64) bool {
	for _, x := range frame {
		if x >= thr || x <= -thr {
			return true
		}
	}
	return false
}

// closeWindow folds the current window into the whole-file sums and, when
// both channels carry signal, into the minimum window correlation.
func (h *hygiene) closeWindow() {
	w := &h.window
	p := &h.pair
	p.n += w.n
	p.sl += w.sl
	p.sr += w.sr
	p.sll += w.sll
	p.srr += w.srr
	p.slr += w.slr
	// A window counts only when both channels reach the silence threshold
	// in RMS terms; a correlation of near-silence is noise.
	floor := h.silenceLevel * h.silenceLevel * w.n
	if w.sll > floor && w.srr > floor {
		if c, ok := w.correlation(); ok {
			if !h.haveWindow || c < h.minWindow {
				h.minWindow = c
			}
			h.haveWindow = true
			if h.onWindow != nil {
				h.onWindow(h.windows, c)
			}
		}
	}
	h.windows++
	*w = pairStats{}
}

// finish returns the findings. layout labels the silent channels;
// samplePeak is the engine's per-channel sample peak (linear), which the
// probes need and need not compute twice.
func (h *hygiene) finish(sampleRate int, layout []string, samplePeak []float64, silenceDBFS float64) Signal {
	for c := range h.run {
		if h.run[c] > 0 {
			h.endRun(h.run[c])
			h.run[c] = 0
		}
	}
	if h.window.n > 0 {
		h.closeWindow()
	}
	s := Signal{
		SilenceThresholdDBFS: silenceDBFS,
		ClippedSamples:       h.clipped,
		ClipRuns:             h.clipRuns,
		ClipRunMinSamples:    int(h.clipRunMin),
		LongestClipRun:       h.longestRun,
		DCOffset:             make([]float64, h.channels),
		SilentChannels:       []string{},
	}
	rate := float64(sampleRate)
	if h.firstLoud < 0 {
		s.LeadingSilenceS = float64(h.frames) / rate
		s.TrailingSilenceS = float64(h.frames) / rate
	} else {
		s.LeadingSilenceS = float64(h.firstLoud) / rate
		s.TrailingSilenceS = float64(h.frames-1-h.lastLoud) / rate
	}
	for c := 0; c < h.channels; c++ {
		if h.frames > 0 {
			s.DCOffset[c] = h.sum[c] / float64(h.frames)
		}
		if samplePeak[c] < h.silenceLevel {
			s.SilentChannels = append(s.SilentChannels, layout[c])
		}
	}
	if h.left >= 0 {
		if c, ok := h.pair.correlation(); ok {
			s.Correlation = &c
		}
		if h.haveWindow {
			m := h.minWindow
			s.MinWindowCorrelation = &m
		}
		// The same samples within one step, or the same signal up to
		// dither: side energy Σ(L−R)² = ΣL² + ΣR² − 2ΣLR at least
		// DualMonoSideToMidDB below mid energy Σ(L+R)², both from the
		// correlation's sums (their rounding error is some eight orders of
		// magnitude below the threshold).
		p := &h.pair
		side, mid := p.sll+p.srr-2*p.slr, p.sll+p.srr+2*p.slr
		sameSignal := h.maxDiff <= h.lsb ||
			(mid > 0 && side <= mid*math.Pow(10, DualMonoSideToMidDB/10))
		s.DualMono = h.channels == 2 && h.frames > 0 && sameSignal &&
			samplePeak[h.left] >= h.silenceLevel && samplePeak[h.right] >= h.silenceLevel
	}
	return s
}
