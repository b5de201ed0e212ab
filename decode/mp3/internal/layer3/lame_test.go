package layer3

import (
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
)

// testSignal is seconds of speech-like and music-like material at rate
// Hz: tone chords whose level and pitch move, with bursts of noise, so
// that lame uses long, short and mixed blocks, every region and both
// count1 tables. Channels differ when channels is 2.
func testSignal(rate, channels int, seconds float64) []float64 {
	rng := rand.New(rand.NewPCG(7, uint64(rate)))
	n := int(seconds * float64(rate))
	out := make([]float64, n*channels)
	for i := range n {
		tt := float64(i) / float64(rate)
		env := 0.5 + 0.5*math.Sin(2*math.Pi*0.7*tt)
		burst := 0.0
		if math.Mod(tt, 0.9) < 0.08 { // transients: short blocks
			burst = 0.6 * (rng.Float64() - 0.5)
		}
		for c := range channels {
			f := 180.0 * (1 + 0.25*float64(c))
			v := math.Sin(2*math.Pi*f*tt+math.Sin(tt)) + 0.5*math.Sin(2*math.Pi*2.5*f*tt) + 0.2*math.Sin(2*math.Pi*7.3*f*tt)
			out[i*channels+c] = 0.25*env*v + burst + 0.01*(rng.Float64()-0.5)
		}
	}
	return out
}

func writeWAV(t *testing.T, path string, rate, channels int, samples []float64) {
	t.Helper()
	data := make([]byte, 0, 2*len(samples))
	for _, v := range samples {
		data = binary.LittleEndian.AppendUint16(data, uint16(int16(math.Round(max(-1, min(1, v))*32767))))
	}
	b := []byte("RIFF")
	b = binary.LittleEndian.AppendUint32(b, uint32(36+len(data)))
	b = append(b, "WAVEfmt "...)
	b = binary.LittleEndian.AppendUint32(b, 16)
	b = binary.LittleEndian.AppendUint16(b, 1)
	b = binary.LittleEndian.AppendUint16(b, uint16(channels))
	b = binary.LittleEndian.AppendUint32(b, uint32(rate))
	b = binary.LittleEndian.AppendUint32(b, uint32(rate*channels*2))
	b = binary.LittleEndian.AppendUint16(b, uint16(channels*2))
	b = binary.LittleEndian.AppendUint16(b, 16)
	b = append(b, "data"...)
	b = binary.LittleEndian.AppendUint32(b, uint32(len(data)))
	if err := os.WriteFile(path, append(b, data...), 0o644); err != nil {
		t.Fatal(err)
	}
}

func lame(t *testing.T, dir, src, name string, opts ...string) []byte {
	t.Helper()
	bin, err := exec.LookPath("lame")
	if err != nil {
		t.Fatalf("this test encodes with Debian's lame, which is not installed (run bash .ci/setup): %v", err)
	}
	out := filepath.Join(dir, name)
	args := append(append([]string{"--quiet", "--noreplaygain"}, opts...), src, out)
	if msg, err := exec.Command(bin, args...).CombinedOutput(); err != nil {
		t.Fatalf("lame %v: %v\n%s", opts, err, msg)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// granuleCounts is what walkGranules found.
type granuleCounts struct {
	frames, verified, skipped int
	shortBlocks, mixed        int
	tables                    [32]int
}

// walkGranules decodes the side information, scale factors and Huffman
// data of every granule of the Layer III stream b and checks the bit
// accounting the encoder did: each frame's main data starts where
// main_data_begin says, after the previous frame's data (no overlap) and
// within the bytes sent so far; each granule's scale factors and Huffman
// codes use exactly its part2_3_length bits. Granules that select a table
// this package lacks are skipped (counted) at their declared length.
func walkGranules(t *testing.T, name string, b []byte) granuleCounts {
	t.Helper()
	var c granuleCounts
	var stream []byte // the main data of every frame, concatenated
	prevEnd := 0      // bit offset in stream where the last granule ended
	var si sideInfo
	var sf [2]scaleFactors
	var is [576]int
	for off := 0; off+4 <= len(b); {
		h, err := ParseHeader(b[off:])
		if err != nil {
			t.Fatalf("%s byte %d: %v", name, off, err)
		}
		n := h.FrameLen()
		if off+n > len(b) {
			t.Fatalf("%s byte %d: frame of %d bytes cut short", name, off, n)
		}
		frame := b[off : off+n]
		if err := parseSideInfo(frame[h.MainDataOffset()-h.SideInfoLen():], h, &si); err != nil {
			t.Fatalf("%s byte %d: %v", name, off, err)
		}
		start := len(stream) - si.mainDataBegin
		if start < 0 || 8*start < prevEnd {
			t.Fatalf("%s frame %d: main_data_begin %d points to byte %d; the previous granule ended at bit %d",
				name, c.frames, si.mainDataBegin, start, prevEnd)
		}
		stream = append(stream, frame[h.MainDataOffset():]...)
		bit := 8 * start
		for gr := range h.Granules() {
			for ch := range h.Channels {
				g := &si.gr[gr][ch]
				end := bit + g.part23Len
				if end > 8*len(stream) {
					t.Fatalf("%s frame %d granule %d/%d: %d bits, past the main data sent so far", name, c.frames, gr, ch, g.part23Len)
				}
				var r bitReader
				r.reset(stream[bit/8:])
				r.skip(uint(bit % 8))
				rel := end - 8*(bit/8)
				if h.LSF {
					if _, err := readLSF(&r, g, ch == 1 && h.Joint && h.ModeExt&1 != 0, &sf[ch]); err != nil {
						t.Fatalf("%s frame %d: %v", name, c.frames, err)
					}
				} else {
					readMPEG1(&r, g, si.scfsi[ch], gr, &sf[ch])
				}
				_, err := readSpectrum(&r, g, h, rel, &is)
				var missing errTableMissing
				switch {
				case errors.As(err, &missing):
					c.skipped++
				case err != nil:
					t.Fatalf("%s frame %d granule %d/%d: %v", name, c.frames, gr, ch, err)
				case g.part23Len > 0 && r.bitPos() != rel:
					t.Fatalf("%s frame %d granule %d/%d: decoding used %d bits, part2_3_length is %d (tables %v, block type %d)",
						name, c.frames, gr, ch, r.bitPos()-(bit%8), g.part23Len, g.tableSelect, g.blockType)
				case g.part23Len > 0:
					c.verified++
					for region := range 3 {
						c.tables[g.tableSelect[region]]++
					}
					if g.windowSwitching && g.blockType == 2 {
						c.shortBlocks++
						if g.mixed {
							c.mixed++
						}
					}
				}
				bit = end
			}
		}
		prevEnd = bit
		off += n
		c.frames++
	}
	return c
}

func TestGranuleBitsFromLame(t *testing.T) {
	// Independent check of the side information, scale-factor and
	// Huffman decoding (and of the tables from memory): lame 3.100 wrote
	// each granule's length in part2_3_length, and decoding must end
	// exactly there, granule after granule, across the bit reservoir.
	// Low bit rates and rates make lame pick the small tables this
	// package has; every version and sampling-frequency family is
	// covered (MPEG-1, MPEG-2, MPEG-2.5).
	dir := t.TempDir()
	tests := []struct {
		name     string
		rate     int
		channels int
		opts     []string
	}{
		{"m44-32.mp3", 44100, 1, []string{"-b", "32"}},
		{"s44-64.mp3", 44100, 2, []string{"-b", "64", "-m", "s"}},
		{"j48-80.mp3", 48000, 2, []string{"-b", "80", "-m", "j"}},
		{"m32-v9.mp3", 32000, 1, []string{"-V", "9"}},
		{"m22-24.mp3", 22050, 1, []string{"-b", "24"}},
		{"j24-32.mp3", 24000, 2, []string{"-b", "32", "-m", "j"}},
		{"m16-16.mp3", 16000, 1, []string{"-b", "16"}},
		{"m11-8.mp3", 11025, 1, []string{"-b", "8"}},
		{"m12-16.mp3", 12000, 1, []string{"-b", "16"}},
		{"m8-8.mp3", 8000, 1, []string{"-b", "8"}},
		{"s44-320.mp3", 44100, 2, []string{"-b", "320", "-m", "s"}},
		{"j48-v0.mp3", 48000, 2, []string{"-V", "0"}},
		{"m48-hot.mp3", 48000, 1, []string{"-b", "256", "--scale", "3.5"}},
	}
	var all granuleCounts
	for _, tt := range tests {
		src := filepath.Join(dir, tt.name+".wav")
		writeWAV(t, src, tt.rate, tt.channels, testSignal(tt.rate, tt.channels, 6))
		b := lame(t, dir, src, tt.name, tt.opts...)
		c := walkGranules(t, tt.name, b)
		t.Logf("%s: %d frames, %d granules verified, %d skipped (missing tables), %d short (%d mixed)",
			tt.name, c.frames, c.verified, c.skipped, c.shortBlocks, c.mixed)
		if c.skipped > 0 || c.verified < c.frames/2 {
			t.Errorf("%s: %d granules checked, %d skipped; want every granule with data checked", tt.name, c.verified, c.skipped)
		}
		all.verified += c.verified
		all.shortBlocks += c.shortBlocks
		for i, n := range c.tables {
			all.tables[i] += n
		}
	}
	// The committed fixtures of package mp3 (lame 3.100, other signals).
	for _, name := range []string{"music-s48-128.mp3", "music-s48-192.mp3", "music-s48-v2.mp3", "speech-m44-v2.mp3", "hot-s44-128.mp3", "mpeg2-22k.mp3", "mpeg25-8k.mp3"} {
		b, err := os.ReadFile(filepath.Join("..", "..", "testdata", name))
		if err != nil {
			t.Fatal(err)
		}
		c := walkGranules(t, name, b)
		if c.skipped > 0 {
			t.Errorf("%s: %d granules skipped", name, c.skipped)
		}
		all.verified += c.verified
		for i, n := range c.tables {
			all.tables[i] += n
		}
	}
	// Every code table must have been exercised (16 and 24 through any of
	// their linbits variants).
	for n := range bigValueCodes {
		uses := all.tables[n]
		if n == 16 || n == 24 {
			for k := n + 1; k < n+8; k++ {
				uses += all.tables[k]
			}
		}
		if uses == 0 {
			t.Errorf("no verified granule used table %d", n)
		}
	}
	// lame never writes mixed blocks, so those paths are not checked
	// here.
	if all.shortBlocks == 0 {
		t.Error("no verified granule with short blocks")
	}
	t.Logf("%d granules verified; table use: %v", all.verified, all.tables)
}
