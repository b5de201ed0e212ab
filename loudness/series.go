package loudness

import "math"

// seriesLimit is the most elements a recorded series holds: 2¹⁶, 1 h 49 min
// at one element per 100 ms block. Past it the series is decimated (see
// seriesRecorder), so its memory (256 KB per series) does not grow with
// the length of the stream.
const seriesLimit = 1 << 16

// seriesRecorder records one 10 Hz series in bounded memory. Until it holds
// seriesLimit elements it keeps every block's value (step 1: the series is
// exact). Then it decimates: it groups the blocks into buckets of 2·step
// blocks and keeps, of each bucket, two elements, its lowest and its
// highest value in the order they occurred (NaN only when the bucket holds
// nothing else; −Inf, digital silence, counts as the lowest value). Each
// time the series reaches seriesLimit elements again, neighbouring buckets
// merge and step doubles: a decimated series has between seriesLimit/2 and
// seriesLimit elements and still holds every extreme a plot must show (the
// loudest moment, the highest true peak of every stretch).
type seriesRecorder struct {
	vals  []float32 // finished buckets, two elements each
	step  int       // blocks per element
	limit int       // seriesLimit; lowered by tests

	// The unfinished bucket: how many blocks it holds, and its extremes.
	pending  int
	lo, hi   float32
	loAt     int // block index within the bucket of lo (-1: none yet)
	hiAt     int
	anyValue bool
}

func newSeriesRecorder() seriesRecorder {
	return seriesRecorder{step: 1, limit: seriesLimit, loAt: -1, hiAt: -1}
}

func (s *seriesRecorder) reset() {
	*s = seriesRecorder{vals: s.vals[:0], step: 1, limit: s.limit, loAt: -1, hiAt: -1}
}

// add records the value of the next 100 ms block.
func (s *seriesRecorder) add(v float32) {
	if s.step == 1 { // not yet decimated: every block's own value
		s.vals = append(s.vals, v)
		if len(s.vals) >= s.limit {
			s.merge()
		}
		return
	}
	if !math.IsNaN(float64(v)) {
		if !s.anyValue || v < s.lo {
			s.lo, s.loAt = v, s.pending
		}
		if !s.anyValue || v > s.hi {
			s.hi, s.hiAt = v, s.pending
		}
		s.anyValue = true
	}
	s.pending++
	if s.pending == 2*s.step {
		a, b := s.pair()
		s.vals = append(s.vals, a, b)
		s.pending, s.loAt, s.hiAt, s.anyValue = 0, -1, -1, false
		if len(s.vals) >= s.limit {
			s.merge()
		}
	}
}

// pair returns the unfinished bucket's two elements in time order.
func (s *seriesRecorder) pair() (float32, float32) {
	if !s.anyValue {
		nan := float32(math.NaN())
		return nan, nan
	}
	if s.hiAt < s.loAt {
		return s.hi, s.lo
	}
	return s.lo, s.hi
}

// merge joins neighbouring buckets: each four elements, in time order,
// become the lowest and highest of them, in time order.
func (s *seriesRecorder) merge() {
	out := s.vals[:0]
	for i := 0; i+4 <= len(s.vals); i += 4 {
		a, b := extremes(s.vals[i : i+4])
		out = append(out, a, b)
	}
	// len(vals) is a multiple of 4: limit is, and buckets add two at a time.
	s.vals = out
	s.step *= 2
}

// extremes returns the lowest and highest non-NaN values of v in the order
// they occur (both NaN when all are NaN).
func extremes(v []float32) (float32, float32) {
	loAt, hiAt := -1, -1
	for i, x := range v {
		if math.IsNaN(float64(x)) {
			continue
		}
		if loAt < 0 || x < v[loAt] {
			loAt = i
		}
		if hiAt < 0 || x > v[hiAt] {
			hiAt = i
		}
	}
	if loAt < 0 {
		nan := float32(math.NaN())
		return nan, nan
	}
	if hiAt < loAt {
		return v[hiAt], v[loAt]
	}
	return v[loAt], v[hiAt]
}

// series returns a copy of the recorded elements, the unfinished bucket
// included (as one element when it holds a single block, as its two
// extremes otherwise).
func (s *seriesRecorder) series() []float32 {
	out := make([]float32, len(s.vals), len(s.vals)+2)
	copy(out, s.vals)
	switch {
	case s.pending == 1:
		v := float32(math.NaN())
		if s.anyValue {
			v = s.lo
		}
		out = append(out, v)
	case s.pending > 1:
		a, b := s.pair()
		out = append(out, a, b)
	}
	return out
}
