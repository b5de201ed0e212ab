package fix

import (
	"errors"
	"io"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/loudness/limiter"
)

// chainFrames is how many frames the chain reads from its source at a time.
const chainFrames = 4096

// chain is the correction as a stream: the input's decoder, then the gain,
// then (when set) the limiter, then (for integer outputs) the quantizer with
// dither. It is itself a decode.Decoder, so the very code that measures
// files (measure.Stream) measures a candidate correction before anything
// is written, and the writers read the same samples from it. The quantized
// samples it delivers are exact codes divided by a power of two, so a writer
// recovers each code exactly.
type chain struct {
	src  decode.Decoder
	info decode.Info
	gain float64
	lim  *limiter.Limiter
	q    *quantizer

	in      []float64
	out     []float64 // processed samples not yet delivered
	pending []float64 // the undelivered tail of out
	srcDone bool
	done    bool
	err     error // an integrity error from the source, delivered once
	clipped int64
}

// newChain builds the chain over src. lim and q may be nil.
func newChain(src decode.Decoder, gain float64, lim *limiter.Limiter, q *quantizer) *chain {
	info := src.Info()
	ch := info.Channels
	lat := 0
	if lim != nil {
		lat = lim.Latency()
	}
	return &chain{
		src: src, info: info, gain: gain, lim: lim, q: q,
		in:  make([]float64, chainFrames*ch),
		out: make([]float64, (chainFrames+lat)*ch),
	}
}

// Info returns the source's stream description.
func (c *chain) Info() decode.Info { return c.info }

// ReadFrames delivers processed frames (the decode.Decoder contract).
func (c *chain) ReadFrames(dst []float64) (int, error) {
	ch := c.info.Channels
	for len(c.pending) == 0 {
		if c.err != nil {
			err := c.err
			c.err = nil
			return 0, err
		}
		if c.done {
			return 0, io.EOF
		}
		if err := c.fill(); err != nil {
			return 0, err
		}
	}
	n := min(len(dst)/ch, len(c.pending)/ch)
	copy(dst, c.pending[:n*ch])
	c.pending = c.pending[n*ch:]
	return n, nil
}

// fill reads one block from the source and processes it into pending.
func (c *chain) fill() error {
	ch := c.info.Channels
	var got []float64
	if !c.srcDone {
		n, err := c.src.ReadFrames(c.in)
		var damage *decode.IntegrityError
		switch {
		case err == io.EOF:
			c.srcDone = true
		case errors.As(err, &damage):
			c.srcDone, c.err = true, err
		case err != nil:
			return err
		}
		got = c.in[:n*ch]
		for i := range got {
			got[i] *= c.gain
		}
	}
	var p []float64
	switch {
	case c.lim == nil:
		p = got
		if c.srcDone {
			c.done = true
		}
	default:
		k := c.lim.Process(c.out, got)
		if c.srcDone {
			k += c.lim.Flush(c.out[k:])
			c.done = true
		}
		p = c.out[:k]
	}
	if c.q != nil {
		for i, v := range p {
			code, clip := c.q.code(v)
			if clip {
				c.clipped++
			}
			p[i] = c.q.value(code)
		}
	}
	c.pending = p
	return nil
}
