package layer3

import (
	"errors"
	"math"
	"testing"
)

// FuzzGranules feeds arbitrary bytes to the frame-level parsing: a header,
// the side information, then each granule's scale factors and Huffman data
// read from the bytes after the side information as if they were the
// main data. Nothing may panic, read past the granule by more than one
// count1 quadruple's worth of bits, or produce a line index beyond 576.
// The seed corpus (testdata/fuzz/FuzzGranules) holds first frames of lame
// streams at MPEG-1, MPEG-2 and MPEG-2.5 rates.
func FuzzGranules(f *testing.F) {
	f.Add([]byte{0xFF, 0xFB, 0x90, 0x64, 0, 0, 0, 0})
	f.Fuzz(func(t *testing.T, b []byte) {
		h, err := ParseHeader(b)
		if err != nil {
			return
		}
		off := h.MainDataOffset() - h.SideInfoLen()
		if off > len(b) {
			return
		}
		var si sideInfo
		if err := parseSideInfo(b[off:], h, &si); err != nil {
			return
		}
		main := b[min(len(b), h.MainDataOffset()):]
		var r bitReader
		r.reset(main)
		var sf scaleFactors
		var is [576]int
		var xr [576]float64
		bit := 0
		for gr := range h.Granules() {
			for ch := range h.Channels {
				g := &si.gr[gr][ch]
				end := bit + g.part23Len
				r.reset(main)
				for skip := bit; skip > 0; skip -= min(skip, 32) {
					r.skip(uint(min(skip, 32)))
				}
				if h.LSF {
					if _, err := readLSF(&r, g, ch == 1 && h.Joint && h.ModeExt&1 != 0, &sf); err != nil {
						t.Fatalf("readLSF: %v", err)
					}
				} else {
					readMPEG1(&r, g, si.scfsi[ch], gr, &sf)
				}
				nonzero, err := readSpectrum(&r, g, h, end, &is)
				var missing errTableMissing
				if err != nil && !errors.As(err, &missing) {
					bit = end
					continue
				}
				if err == nil {
					if nonzero < 0 || nonzero > 576 {
						t.Fatalf("%d non-zero lines", nonzero)
					}
					// At most one count1 quadruple (6-bit code and 4
					// sign bits) runs past the granule's end.
					if r.bitPos() > end+10 {
						t.Fatalf("read to bit %d, granule ends at %d", r.bitPos(), end)
					}
					requantise(&is, nonzero, g, &sf, h.RateIndex, &xr)
				}
				bit = end
			}
		}
	})
}

// FuzzFrames feeds arbitrary bytes, cut into frames where their headers
// say, to one Decoder: nothing may panic, every frame it decodes yields
// finite samples, and a frame is either decoded, reported as damaged, or
// refused with an error — never silently half-read. The seed corpus
// (testdata/fuzz/FuzzFrames) holds the start of lame streams at MPEG-1,
// MPEG-2 and MPEG-2.5 rates, one with a flipped byte.
func FuzzFrames(f *testing.F) {
	f.Fuzz(func(t *testing.T, b []byte) {
		d := NewDecoder(&Window)
		out := make([]float64, 2*576*2)
		for off := 0; off+4 <= len(b); {
			h, err := ParseHeader(b[off:])
			if err != nil || h.FrameLen() == 0 || off+h.FrameLen() > len(b) {
				off++
				continue
			}
			frame := b[off : off+h.FrameLen()]
			n, err := d.Frame(frame, out)
			var damage *Damage
			if err != nil && !errors.As(err, &damage) {
				t.Fatalf("byte %d: a frame whose header parsed was refused: %v", off, err)
			}
			if n != 576*h.Granules() {
				t.Fatalf("byte %d: %d samples, want %d", off, n, 576*h.Granules())
			}
			for _, v := range out[:n*h.Channels] {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("byte %d: non-finite sample", off)
				}
			}
			off += h.FrameLen()
		}
	})
}
