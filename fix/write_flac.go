package fix

import (
	"bufio"
	"bytes"
	"crypto/md5"
	"errors"
	"fmt"
	"io"
	"math"
	"os"

	"github.com/mewkiz/flac"
	"github.com/mewkiz/flac/frame"
	"github.com/mewkiz/flac/meta"
)

// flacBlockFrames is the block size of the frames written (the FLAC
// reference encoder's default for 44.1/48 kHz audio).
const flacBlockFrames = 4096

// flacChannels maps a channel count to FLAC's channel assignment (the
// samples keep the stream order the decoder delivered).
var flacChannels = [...]frame.Channels{
	1: frame.ChannelsMono, 2: frame.ChannelsLR, 3: frame.ChannelsLRC, 4: frame.ChannelsLRLsRs,
	5: frame.ChannelsLRCLsRs, 6: frame.ChannelsLRCLfeLsRs, 7: frame.ChannelsLRCLfeCsSlSr, 8: frame.ChannelsLRCLfeLsRsSlSr,
}

// flacMetadata returns the input's metadata blocks that stay true after the
// audio changed (tags, pictures, cue sheet, application data, padding). The
// seek table is dropped: its byte offsets no longer hold.
func flacMetadata(path string) (blocks []*meta.Block, dropped []string, err error) {
	s, err := flac.ParseFile(path)
	if err != nil {
		return nil, nil, fmt.Errorf("reading the FLAC metadata: %w", err)
	}
	defer s.Close()
	for _, b := range s.Blocks {
		switch b.Body.(type) {
		case *meta.VorbisComment, *meta.Picture, *meta.CueSheet, *meta.Application:
			blocks = append(blocks, b)
		default:
			if b.Type == meta.TypePadding {
				blocks = append(blocks, b)
			} else {
				dropped = append(dropped, b.Type.String())
			}
		}
	}
	return blocks, dropped, nil
}

// seekBuffer is a buffered file the FLAC encoder can seek back in (to write
// the final STREAMINFO); Close only flushes, the caller owns the file.
type seekBuffer struct {
	*bufio.Writer
	f *os.File
}

func (s *seekBuffer) Seek(off int64, whence int) (int64, error) {
	if err := s.Flush(); err != nil {
		return 0, err
	}
	return s.f.Seek(off, whence)
}

func (s *seekBuffer) Close() error { return s.Flush() }

// writeFLAC encodes the chain's samples as FLAC into f with the input's
// rate, channels and bit depth and the given metadata blocks, and returns
// the MD5 of the samples encoded (computed here, independently of the
// encoder's own).
func writeFLAC(f *os.File, c *chain, blocks []*meta.Block) (sum [16]byte, err error) {
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("FLAC encoder failed: %v", p)
		}
	}()
	info := c.info
	ch, bps := info.Channels, info.BitsPerSample
	if ch < 1 || ch >= len(flacChannels) || bps < 4 || bps > 24 {
		return sum, fmt.Errorf("cannot write FLAC with %d channels of %d bits", ch, bps)
	}
	si := &meta.StreamInfo{
		BlockSizeMin: flacBlockFrames, BlockSizeMax: flacBlockFrames,
		SampleRate: uint32(info.SampleRate), NChannels: uint8(ch), BitsPerSample: uint8(bps),
	}
	sb := &seekBuffer{Writer: bufio.NewWriterSize(f, 1<<16), f: f}
	enc, err := flac.NewEncoder(sb, si, blocks...)
	if err != nil {
		return sum, err
	}
	h := md5.New()
	scale := math.Ldexp(1, bps-1)
	sub := make([]*frame.Subframe, ch)
	for k := range sub {
		sub[k] = &frame.Subframe{SubHeader: frame.SubHeader{Pred: frame.PredVerbatim}, Samples: make([]int32, flacBlockFrames)}
	}
	buf := make([]float64, flacBlockFrames*ch)
	raw := make([]byte, 0, flacBlockFrames*ch*3)
	coded := [2][]int32{make([]int32, flacBlockFrames), make([]int32, flacBlockFrames)}
	nbytes := (bps + 7) / 8
	for {
		n, rerr := readFull(c, buf)
		if n > 0 {
			raw = raw[:0]
			for i := range n {
				for k := range ch {
					v := int32(buf[i*ch+k] * scale) // exact: the chain quantized to bps
					sub[k].Samples = sub[k].Samples[:n]
					sub[k].Samples[i] = v
					sub[k].NSamples = n
					for b := range nbytes {
						raw = append(raw, byte(v>>(8*b)))
					}
				}
			}
			h.Write(raw)
			for k := range sub {
				sub[k].Pred = frame.PredVerbatim
			}
			assign := flacChannels[ch]
			if ch == 2 {
				assign = stereoAssignment(sub[0].Samples, sub[1].Samples)
			}
			analyse(sub, assign, bps, coded[:])
			fr := &frame.Frame{
				Header: frame.Header{
					HasFixedBlockSize: true, BlockSize: uint16(n), SampleRate: uint32(info.SampleRate),
					Channels: assign, BitsPerSample: uint8(bps),
				},
				Subframes: sub,
			}
			if err := enc.WriteFrame(fr); err != nil {
				return sum, err
			}
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return sum, rerr
		}
	}
	if err := enc.Close(); err != nil {
		return sum, err
	}
	copy(sum[:], h.Sum(nil))
	return sum, nil
}

// analyse chooses each subframe's prediction (predictSubframe) on the
// channel as the encoder will code it: for the stereo assignments with a
// side channel, the decorrelated signals, the side with one bit more.
// scratch holds two block-sized buffers.
func analyse(sub []*frame.Subframe, assign frame.Channels, bps int, scratch [][]int32) {
	if len(sub) != 2 || assign == frame.ChannelsLR {
		for _, sf := range sub {
			predictSubframe(sf, sf.Samples, bps)
		}
		return
	}
	l, r := sub[0].Samples, sub[1].Samples
	a, b := scratch[0][:len(l)], scratch[1][:len(l)]
	abits, bbits := bps, bps
	for i := range l {
		side := l[i] - r[i]
		switch assign {
		case frame.ChannelsLeftSide:
			a[i], b[i] = l[i], side
		case frame.ChannelsSideRight:
			a[i], b[i] = side, r[i]
		default: // mid/side
			a[i], b[i] = int32((int64(l[i])+int64(r[i]))>>1), side
		}
	}
	switch assign {
	case frame.ChannelsLeftSide, frame.ChannelsMidSide:
		bbits++
	case frame.ChannelsSideRight:
		abits++
	}
	predictSubframe(sub[0], a, abits)
	predictSubframe(sub[1], b, bbits)
}

// stereoAssignment picks, per frame, the FLAC stereo coding (left/right,
// left/side, side/right or mid/side; the encoder does the decorrelation)
// whose two channels are cheapest to code, estimated as the reference
// encoder does by the sum of |second-order fixed-predictor residual| of
// each candidate channel.
func stereoAssignment(l, r []int32) frame.Channels {
	cost := func(f func(i int) int64) int64 {
		var c int64
		for i := 2; i < len(l); i++ {
			d := f(i) - 2*f(i-1) + f(i-2)
			if d < 0 {
				d = -d
			}
			c += d
		}
		return c
	}
	cl := cost(func(i int) int64 { return int64(l[i]) })
	cr := cost(func(i int) int64 { return int64(r[i]) })
	cm := cost(func(i int) int64 { return (int64(l[i]) + int64(r[i])) >> 1 })
	cs := cost(func(i int) int64 { return int64(l[i]) - int64(r[i]) })
	best, assign := cl+cr, frame.ChannelsLR
	for _, c := range []struct {
		cost int64
		ch   frame.Channels
	}{{cl + cs, frame.ChannelsLeftSide}, {cs + cr, frame.ChannelsSideRight}, {cm + cs, frame.ChannelsMidSide}} {
		if c.cost < best {
			best, assign = c.cost, c.ch
		}
	}
	return assign
}

// readFull fills buf with whole frames from c until it is full or the
// stream ends; it returns the frames read and io.EOF at the end.
func readFull(c *chain, buf []float64) (int, error) {
	ch := c.info.Channels
	total := 0
	for total*ch < len(buf) {
		n, err := c.ReadFrames(buf[total*ch:])
		total += n
		if err != nil {
			return total, err
		}
	}
	return total, nil
}

// flacStreamMD5 reads the MD5 signature from a FLAC file's STREAMINFO
// (which must be the first metadata block: bytes 26 to 41 of the file).
func flacStreamMD5(path string) ([16]byte, error) {
	var sum [16]byte
	f, err := os.Open(path)
	if err != nil {
		return sum, err
	}
	defer f.Close()
	var head [42]byte
	if _, err := io.ReadFull(f, head[:]); err != nil {
		return sum, err
	}
	if !bytes.Equal(head[:4], []byte("fLaC")) || head[4]&0x7F != 0 {
		return sum, errors.New("the FLAC output does not start with STREAMINFO")
	}
	copy(sum[:], head[26:42])
	return sum, nil
}
