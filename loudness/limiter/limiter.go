package limiter

import (
	"fmt"
	"math"

	"github.com/kweigh/kweigh/loudness"
)

// Defaults for the zero values of Config's times, and the safety margin
// kweigh uses under a ceiling (common practice, no published source: a
// limiter that aims exactly at the ceiling leaves the next meter's rounding
// to decide the verdict).
const (
	DefaultLookAheadS = 0.002
	DefaultHoldS      = 0.004
	DefaultReleaseS   = 0.1
	DefaultMarginDB   = 0.1
)

// Config describes one stream and how it is to be limited.
type Config struct {
	SampleRate int // Hz, 8 000 to 384 000
	Channels   int // interleaved channels, all linked
	// CeilingDBTP is the highest true peak the output may have.
	CeilingDBTP float64
	// MarginDB is how far under the ceiling the limiter aims (≥ 0; kweigh
	// passes DefaultMarginDB unless told otherwise).
	MarginDB float64
	// LookAheadS is the look-ahead and attack time in seconds
	// (0: DefaultLookAheadS). The audio is delayed by it plus 10 frames.
	LookAheadS float64
	// HoldS keeps the gain down this much longer than the look-ahead after
	// a peak before the release starts (0: DefaultHoldS; negative: none).
	HoldS float64
	// ReleaseS is the release time constant in seconds (0: DefaultReleaseS).
	ReleaseS float64
}

// blockFrames is how many frames the detector handles at a time.
const blockFrames = 1024

// Limiter is a linked, look-ahead true-peak limiter for one stream (see the
// package comment for the signal path). It is not safe for concurrent use.
type Limiter struct {
	ch        int
	ceiling   float64 // linear, margin included
	lookAhead int     // A
	delay     int     // D = A + 10
	hold      int     // H ≥ D + 1
	release   float64 // a

	det []*loudness.TruePeak
	// Per-block scratch: one channel's samples, its envelope, and the
	// linked detector value per frame.
	chBuf, envBuf, need []float64

	// Sliding minimum of the needed gain over the last hold frames: a
	// monotonic queue in a ring (indices and values).
	qIdx  []int64
	qVal  []float64
	qHead int
	qLen  int

	env float64 // e[n]
	// box holds the last lookAhead values of env, sum their total.
	box    []float64
	boxPos int
	sum    float64

	// line is the delay line, delay frames of interleaved samples.
	line    []float64
	linePos int
	n       int64 // frames taken in

	zeros   []float64
	minGain float64
}

// New returns a limiter for c.
func New(c Config) (*Limiter, error) {
	if c.SampleRate < loudness.MinSampleRate || c.SampleRate > loudness.MaxSampleRate {
		return nil, fmt.Errorf("limiter: sample rate %d Hz outside %d to %d Hz", c.SampleRate, loudness.MinSampleRate, loudness.MaxSampleRate)
	}
	if c.Channels < 1 {
		return nil, fmt.Errorf("limiter: %d channels", c.Channels)
	}
	if c.MarginDB < 0 || math.IsNaN(c.MarginDB) || math.IsNaN(c.CeilingDBTP) || math.IsInf(c.CeilingDBTP, 0) {
		return nil, fmt.Errorf("limiter: ceiling %v dBTP with margin %v dB", c.CeilingDBTP, c.MarginDB)
	}
	la := orDefault(c.LookAheadS, DefaultLookAheadS)
	hold := orDefault(c.HoldS, DefaultHoldS)
	rel := orDefault(c.ReleaseS, DefaultReleaseS)
	if la > 0.05 || hold > 1 || rel > 10 || rel < 0 || la < 0 {
		return nil, fmt.Errorf("limiter: look-ahead %v s, hold %v s, release %v s out of range", la, hold, rel)
	}
	fs := float64(c.SampleRate)
	l := &Limiter{
		ch:        c.Channels,
		ceiling:   math.Pow(10, (c.CeilingDBTP-c.MarginDB)/20),
		lookAhead: max(1, int(math.Round(la*fs))),
		release:   math.Exp(-1 / (max(rel, 1e-6) * fs)),
	}
	l.delay = l.lookAhead + 10
	l.hold = l.delay + 1 + max(0, int(math.Round(hold*fs)))
	for range c.Channels {
		tp, err := loudness.NewTruePeak4x(c.SampleRate)
		if err != nil {
			return nil, err
		}
		l.det = append(l.det, tp)
	}
	l.chBuf = make([]float64, blockFrames)
	l.envBuf = make([]float64, blockFrames)
	l.need = make([]float64, blockFrames)
	l.qIdx = make([]int64, l.hold)
	l.qVal = make([]float64, l.hold)
	l.box = make([]float64, l.lookAhead)
	l.line = make([]float64, l.delay*l.ch)
	l.zeros = make([]float64, min(l.delay, blockFrames)*l.ch)
	l.Reset()
	return l, nil
}

func orDefault(v, d float64) float64 {
	switch {
	case v == 0:
		return d
	case v < 0:
		return 0
	}
	return v
}

// Reset makes the limiter ready for a new stream with the same settings.
func (l *Limiter) Reset() {
	for _, d := range l.det {
		d.Reset()
	}
	l.qHead, l.qLen = 0, 0
	l.env = 1
	for i := range l.box {
		l.box[i] = 1
	}
	l.boxPos, l.sum = 0, float64(l.lookAhead)
	clear(l.line)
	l.linePos, l.n = 0, 0
	l.minGain = 1
}

// Latency returns the delay in frames between input and output.
func (l *Limiter) Latency() int { return l.delay }

// LookAhead returns the look-ahead (and attack ramp) in frames.
func (l *Limiter) LookAhead() int { return l.lookAhead }

// MaxStep returns the bound on the change of gain from one sample to the
// next for a stream whose lowest gain is minGain: (1 − minGain)/LookAhead.
func (l *Limiter) MaxStep(minGain float64) float64 {
	return (1 - minGain) / float64(l.lookAhead)
}

// MinGain returns the lowest gain applied since Reset (1 when the limiter
// never acted).
func (l *Limiter) MinGain() float64 { return l.minGain }

// ReductionDB returns the deepest gain reduction since Reset, in dB (≥ 0).
func (l *Limiter) ReductionDB() float64 { return -20 * math.Log10(l.minGain) }

// Process limits the interleaved frames of src and writes the output that
// is ready into dst, returning the number of samples written: the output
// runs Latency frames behind the input, so the first calls write less than
// they take, and Flush writes the rest. len(src) must be a multiple of the
// channel count and len(dst) at least len(src); Process panics otherwise.
// dst and src may be the same slice.
func (l *Limiter) Process(dst, src []float64) int {
	if len(src)%l.ch != 0 {
		panic("limiter: input is not a whole number of frames")
	}
	if len(dst) < len(src) {
		panic("limiter: destination shorter than input")
	}
	out := 0
	for len(src) > 0 {
		n := min(len(src)/l.ch, blockFrames)
		out += l.block(dst[out:], src[:n*l.ch], n)
		src = src[n*l.ch:]
	}
	return out
}

// Flush writes the last Latency frames (the audio still in the delay line,
// followed for the detector by silence) into dst and returns the number of
// samples written. len(dst) must be at least Latency × channels. After
// Flush the limiter needs Reset before a new stream.
func (l *Limiter) Flush(dst []float64) int {
	if len(dst) < l.delay*l.ch {
		panic("limiter: Flush destination shorter than the latency")
	}
	out := 0
	for left := l.delay; left > 0; {
		n := min(left, len(l.zeros)/l.ch)
		out += l.block(dst[out:], l.zeros[:n*l.ch], n)
		left -= n
	}
	return out
}

// block handles n ≤ blockFrames frames.
func (l *Limiter) block(dst, src []float64, n int) int {
	need := l.need[:n]
	for i := range need {
		need[i] = 0
	}
	for c := range l.ch {
		x := l.chBuf[:n]
		for i := range x {
			x[i] = src[i*l.ch+c]
		}
		env := l.envBuf[:n]
		l.det[c].EnvelopeOver(env, x, l.ceiling)
		for i, e := range env {
			need[i] = max(need[i], e, math.Abs(x[i]))
		}
	}
	// The interleaved input must be read before dst (which may alias it)
	// is written: the delay line takes each frame before its slot's output
	// is placed, and output frame k goes to dst[k·ch] with k ≤ the input
	// frame being read.
	out := 0
	for i := range n {
		r := 1.0
		if d := need[i]; d > l.ceiling {
			r = l.ceiling / d
		}
		h := l.holdMin(r)
		if h <= l.env {
			l.env = h
		} else {
			l.env = h - (h-l.env)*l.release
		}
		l.sum += l.env - l.box[l.boxPos]
		l.box[l.boxPos] = l.env
		if l.boxPos++; l.boxPos == l.lookAhead {
			l.boxPos = 0
			s := 0.0 // recomputed once per lap: no drift in long streams
			for _, v := range l.box {
				s += v
			}
			l.sum = s
		}
		g := l.sum / float64(l.lookAhead)
		if g > 1 {
			g = 1
		}
		slot := l.line[l.linePos*l.ch : (l.linePos+1)*l.ch]
		in := src[i*l.ch : (i+1)*l.ch]
		if l.n >= int64(l.delay) {
			if g < l.minGain {
				l.minGain = g
			}
			o := dst[out : out+l.ch]
			for c := range l.ch {
				v := slot[c]
				slot[c] = in[c]
				o[c] = g * v
			}
			out += l.ch
		} else {
			copy(slot, in)
		}
		l.n++
		if l.linePos++; l.linePos == l.delay {
			l.linePos = 0
		}
	}
	return out
}

// holdMin pushes r into the sliding window of the last hold frames and
// returns the window's minimum.
func (l *Limiter) holdMin(r float64) float64 {
	size := len(l.qIdx)
	// Drop the queued values at or above r from the back: they can never
	// again be the minimum while r is in the window.
	for l.qLen > 0 {
		back := l.qHead + l.qLen - 1
		if back >= size {
			back -= size
		}
		if l.qVal[back] < r {
			break
		}
		l.qLen--
	}
	tail := l.qHead + l.qLen
	if tail >= size {
		tail -= size
	}
	l.qIdx[tail], l.qVal[tail] = l.n, r
	l.qLen++
	if l.qIdx[l.qHead] <= l.n-int64(l.hold) {
		if l.qHead++; l.qHead == size {
			l.qHead = 0
		}
		l.qLen--
	}
	return l.qVal[l.qHead]
}
