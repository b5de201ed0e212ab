package layer3

import (
	"errors"
	"fmt"
)

// maxReservoir is the most main data a frame can take from the frames
// before it: main_data_begin is 9 bits in MPEG-1 (511 bytes), 8 bits at
// the lower sampling frequencies (ISO/IEC 11172-3 §2.4.3.4.2).
const maxReservoir = 511

// MaxFrameLen is the longest Layer III frame with a bit-rate index: 320
// kbit/s at 32 kHz, padded, 144 × 320000 / 32000 + 1 = 1441 bytes [calc].
// Free-format frames are not decoded (ErrFreeFormat).
const MaxFrameLen = 1441

// ErrFreeFormat is returned for frames with bitrate_index 0 (free format):
// their length is not in the header, and this decoder does not decode them.
var ErrFreeFormat = errors.New("free-format frame (bitrate_index 0): not supported")

// Damage describes a frame that could not be decoded completely. Frame
// still writes a full frame of samples (silence where the data was
// missing) so that the timing of what follows is kept, and returns the
// Damage as its error; the caller decides how to report it.
type Damage struct {
	Problem string
}

func (e *Damage) Error() string { return e.Problem }

// Decoder decodes a Layer III stream frame by frame, keeping what spans
// frames: the bit reservoir, the overlap of the hybrid filter bank and
// the polyphase synthesis state. Its zero value is not ready: use
// NewDecoder. It allocates nothing per frame.
type Decoder struct {
	window *[512]float64

	res    [maxReservoir + MaxFrameLen]byte
	resLen int // bytes of main data kept from earlier frames (at the start of res)

	si      sideInfo
	sf      [2]scaleFactors
	is      [576]int
	xr      [2][576]float64
	nonzero [2]int
	overlap [2][32][18]float64
	sub     [18][32]float64
	synth   [2]synthesis
	gran    [2][576]float64 // one granule's output samples per channel

	// tap, when set (by tests), sees every block of 32 subband samples
	// before the synthesis, channel by channel.
	tap func(ch int, s *[32]float64)
}

// NewDecoder returns a Decoder that synthesises with window D (ISO/IEC
// 11172-3 Table 3-B.3).
func NewDecoder(window *[512]float64) *Decoder {
	return &Decoder{window: window}
}

// Reset forgets the reservoir and the filter states, as at the start of a
// stream or after a gap in it.
func (d *Decoder) Reset() {
	d.resLen = 0
	d.overlap = [2][32][18]float64{}
	d.synth = [2]synthesis{}
}

// Resume forgets the bit reservoir after a stretch of the stream was
// skipped: the frames after it cannot take main data from before it (a
// frame that reaches back is then damage, decoded as silence). The filter
// banks keep their state.
func (d *Decoder) Resume() {
	d.resLen = 0
}

// Frame decodes one whole frame (header, optional CRC, side information
// and main data, exactly FrameLen bytes) into out, channels interleaved:
// 576 samples per channel per granule, scaled so that full scale is ±1
// and not clamped. out must hold Granules()·576·Channels values. It
// returns the samples per channel written.
//
// A frame whose header cannot be decoded returns an error and writes
// nothing. A frame whose data is damaged (CRC mismatch, main data the
// reservoir does not hold, a granule that overruns its length) writes
// silence or what could be decoded and returns a *Damage.
func (d *Decoder) Frame(frame []byte, out []float64) (int, error) {
	h, err := ParseHeader(frame)
	if err != nil {
		return 0, err
	}
	if h.BitRate == 0 {
		return 0, ErrFreeFormat
	}
	if len(frame) != h.FrameLen() {
		return 0, fmt.Errorf("frame of %d bytes, its header says %d", len(frame), h.FrameLen())
	}
	n := 576 * h.Granules()
	if len(out) < n*h.Channels {
		return 0, fmt.Errorf("output buffer of %d values, the frame needs %d", len(out), n*h.Channels)
	}
	out = out[:n*h.Channels]
	if err := d.decodeFrame(frame, h, out); err != nil {
		return n, err
	}
	return n, nil
}

// decodeFrame does Frame's work once the header is known.
func (d *Decoder) decodeFrame(frame []byte, h Header, out []float64) error {
	var damage error
	if h.Protected {
		if got, want := crc16(frame[2:4], frame[6:h.MainDataOffset()]), uint16(frame[4])<<8|uint16(frame[5]); got != want {
			damage = &Damage{fmt.Sprintf("CRC-16 of the header and side information is %04x, the frame says %04x", got, want)}
		}
	}
	if damage == nil {
		if err := parseSideInfo(frame[h.MainDataOffset()-h.SideInfoLen():], h, &d.si); err != nil {
			damage = &Damage{err.Error()}
		}
	}
	main := frame[h.MainDataOffset():]
	if damage != nil {
		// Damaged side information: the frame's main data may still
		// belong to the next frames' reservoir, but nothing of this
		// frame can be trusted.
		d.keep(main)
		d.silence(h, out)
		return damage
	}
	begin := d.si.mainDataBegin
	if begin > d.resLen {
		// The data this frame starts with was in frames that are not
		// here (the start of a cut stream, or after lost frames).
		have := d.resLen
		d.keep(main)
		d.silence(h, out)
		return &Damage{fmt.Sprintf("main_data_begin reaches %d bytes back, only %d bytes of earlier frames are at hand", begin, have)}
	}
	start := d.resLen - begin
	copy(d.res[d.resLen:], main)
	data := d.res[start : d.resLen+len(main)]
	bit := 0
	for gr := range h.Granules() {
		for ch := range h.Channels {
			g := &d.si.gr[gr][ch]
			end := bit + g.part23Len
			if damage == nil && end > 8*len(data) {
				damage = &Damage{fmt.Sprintf("granule %d channel %d: %d bits of main data, the frame holds %d", gr, ch, g.part23Len, 8*len(data)-bit)}
			}
			if damage != nil {
				d.xr[ch] = [576]float64{}
				d.nonzero[ch] = 0
				bit = min(end, 8*len(data))
				continue
			}
			if err := d.granule(data, bit, end, h, gr, ch); err != nil {
				damage = &Damage{fmt.Sprintf("granule %d channel %d: %v", gr, ch, err)}
				d.xr[ch] = [576]float64{}
				d.nonzero[ch] = 0
			}
			bit = end
		}
		if h.Channels == 2 && h.Joint {
			d.stereo(h, gr)
		}
		for ch := range h.Channels {
			g := &d.si.gr[gr][ch]
			// Lines from top on are zero: the requantised spectrum ends
			// at the last non-zero line, joint stereo spreads neither
			// channel beyond the longer one, and short blocks are
			// reordered over the whole granule.
			top := d.nonzero[ch]
			if h.Channels == 2 && h.Joint {
				top = max(d.nonzero[0], d.nonzero[1])
			}
			if g.windowSwitching && g.blockType == 2 {
				top = 576
			}
			reorder(&d.xr[ch], g, h.RateIndex)
			top = aliasReduceBelow(&d.xr[ch], g, top)
			hybridBelow(&d.xr[ch], g, &d.overlap[ch], &d.sub, top)
			d.synthesise(ch)
		}
		d.interleave(h.Channels, out[gr*576*h.Channels:])
	}
	d.resLen += len(main)
	d.trim()
	return damage
}

// synthesise runs the 18 blocks of subband samples in d.sub through
// channel ch's synthesis filter bank into d.gran[ch].
func (d *Decoder) synthesise(ch int) {
	for t := range 18 {
		if d.tap != nil {
			d.tap(ch, &d.sub[t])
		}
		d.synth[ch].run(&d.sub[t], d.window, d.gran[ch][32*t:32*t+32])
	}
}

// interleave writes the granule's samples of each channel (d.gran) into
// out, channels interleaved.
func (d *Decoder) interleave(channels int, out []float64) {
	if channels == 1 {
		copy(out[:576], d.gran[0][:])
		return
	}
	o := (*[1152]float64)(out[:1152])
	l, r := &d.gran[0], &d.gran[1]
	for i := range 576 {
		o[2*i] = l[i]
		o[2*i+1] = r[i]
	}
}

// granule reads the scale factors and Huffman data of one granule and
// channel from data (bits bit to end) and requantises them into d.xr[ch].
func (d *Decoder) granule(data []byte, bit, end int, h Header, gr, ch int) error {
	g := &d.si.gr[gr][ch]
	var r bitReader
	r.reset(data[bit/8 : (end+7)/8])
	r.skip(uint(bit % 8))
	rel := end - 8*(bit/8)
	sf := &d.sf[ch]
	if h.LSF {
		if _, err := readLSF(&r, g, ch == 1 && h.Joint && h.ModeExt&1 != 0, sf); err != nil {
			return err
		}
	} else {
		readMPEG1(&r, g, d.si.scfsi[ch], gr, sf)
	}
	if r.bitPos() > rel {
		return fmt.Errorf("scale factors overrun part2_3_length (%d bits) by %d", g.part23Len, r.bitPos()-rel)
	}
	nz, err := readSpectrum(&r, g, h, rel, &d.is)
	if err != nil {
		return err
	}
	d.nonzero[ch] = nz
	requantise(&d.is, nz, g, sf, h.RateIndex, &d.xr[ch])
	return nil
}

// keep appends main data to the reservoir without decoding from it.
func (d *Decoder) keep(main []byte) {
	copy(d.res[d.resLen:], main)
	d.resLen += len(main)
	d.trim()
}

// trim keeps the last maxReservoir bytes of main data.
func (d *Decoder) trim() {
	if d.resLen > maxReservoir {
		copy(d.res[:], d.res[d.resLen-maxReservoir:d.resLen])
		d.resLen = maxReservoir
	}
}

// silence writes a frame of zeros and lets the filter banks decay into it
// (overlap and synthesis state are fed zeros, so the next good frame joins
// without a step).
func (d *Decoder) silence(h Header, out []float64) {
	var zero granule
	for gr := range h.Granules() {
		for ch := range h.Channels {
			d.xr[ch] = [576]float64{}
			hybrid(&d.xr[ch], &zero, &d.overlap[ch], &d.sub)
			d.synthesise(ch)
		}
		d.interleave(h.Channels, out[gr*576*h.Channels:])
	}
}

// crc16 is the CRC of Layer III frames (ISO/IEC 11172-3 §2.4.3.1:
// generator x¹⁶ + x¹⁵ + x² + 1, register preset to all ones) over the
// last two header bytes and the side information.
func crc16(parts ...[]byte) uint16 {
	c := uint16(0xFFFF)
	for _, p := range parts {
		for _, b := range p {
			c = c<<8 ^ crcTable[byte(c>>8)^b]
		}
	}
	return c
}

var crcTable = func() (t [256]uint16) {
	for i := range t {
		c := uint16(i) << 8
		for range 8 {
			if c&0x8000 != 0 {
				c = c<<1 ^ 0x8005
			} else {
				c <<= 1
			}
		}
		t[i] = c
	}
	return t
}()
