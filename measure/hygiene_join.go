package measure

import "math"

// join appends the findings of s, the hygiene of the stretch that follows
// the frames written here (same configuration, starting at a multiple of
// the correlation window, so that both cut the stream into the same 3 s
// windows), as if its frames had been written here. lead[c] is how many
// full-scale samples channel c of that stretch starts with (all its frames
// if it never leaves full scale): a clipping run that crosses the cut is
// one run, not two. s is spent.
//
// Counts, extremes and window minima join exactly; the whole-file sums
// (DC offset, correlation) are added in another order than one pass adds
// them, a difference in the last bits.
func (h *hygiene) join(s *hygiene, lead []int64) {
	if s.frames == 0 {
		return
	}
	for c := range h.run {
		r, l := h.run[c], lead[c]
		switch {
		case r > 0 && l == s.frames:
			// s is full scale throughout on c: the run goes on.
			s.run[c] = r + l
		case r > 0 && l > 0:
			// The run ends inside s, which counted its part as a run of
			// its own; count the whole instead. (The longest run needs no
			// correction: r+l exceeds the part.)
			if l >= s.clipRunMin {
				s.clipRuns--
			}
			h.endRun(r + l)
		case r > 0:
			h.endRun(r)
		}
		h.run[c] = s.run[c]
		h.sum[c] += s.sum[c]
	}
	h.clipped += s.clipped
	h.clipRuns += s.clipRuns
	h.longestRun = max(h.longestRun, s.longestRun)

	if h.firstLoud < 0 && s.firstLoud >= 0 {
		h.firstLoud = h.frames + s.firstLoud
	}
	if s.lastLoud >= 0 {
		h.lastLoud = h.frames + s.lastLoud
	}

	p, q := &h.pair, &s.pair
	p.n += q.n
	p.sl += q.sl
	p.sr += q.sr
	p.sll += q.sll
	p.srr += q.srr
	p.slr += q.slr
	h.window = s.window
	if s.haveWindow && (!h.haveWindow || s.minWindow < h.minWindow) {
		h.minWindow = s.minWindow
	}
	h.haveWindow = h.haveWindow || s.haveWindow
	h.windows += s.windows
	h.maxDiff = max(h.maxDiff, s.maxDiff)
	h.frames += s.frames
}

// leadingClip advances the count of full-scale samples each channel of a
// stretch starts with (see join) over one block of interleaved frames;
// open[c] stays true while channel c has not yet left full scale.
func (h *hygiene) leadingClip(buf []float64, lead []int64, open []bool) {
	nc := h.channels
	for c := range nc {
		if !open[c] {
			continue
		}
		k := int64(0)
		for i := c; i < len(buf); i += nc {
			// Full scale exactly as clipStep decides it.
			if !(math.Abs(buf[i]) >= h.clipLevel) {
				open[c] = false
				break
			}
			k++
		}
		lead[c] += k
	}
}
