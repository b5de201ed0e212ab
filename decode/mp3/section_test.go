package mp3

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// TestSectionsBitIdentical cuts real lame encodes into sections at many
// places and requires every sample of every section to equal the one-pass
// decode's, bit for bit (section.go argues why the state is exact): CBR,
// VBR, low bit rates whose reservoir spans several frames (32 kbit/s at
// 44.1 kHz: 104-byte frames, 511 bytes back are 5 frames; 8 kbit/s at
// 8 kHz MPEG-2.5: 72-byte frames, 255 bytes back are 4), MPEG-2 at
// 22.05 kHz, mono, and untrimmed (no Info header, lame -t). Cuts at the
// first and last samples, around frame boundaries (with the gapless delay
// they fall inside frames), every few thousand samples, and the file as
// consecutive sections that must join to the whole.
func TestSectionsBitIdentical(t *testing.T) {
	dir := t.TempDir()
	for _, tt := range []struct {
		name           string
		rate, channels int
		opts           []string
	}{
		{"cbr128", 44100, 2, []string{"-b", "128"}},
		{"vbr-V2", 44100, 2, []string{"-V2"}},
		{"cbr32-reservoir", 44100, 2, []string{"-b", "32"}},
		{"mpeg2-22k-mono", 22050, 1, []string{"-b", "24", "-m", "m"}},
		{"mpeg25-8k", 8000, 2, []string{"-b", "8"}},
		{"untrimmed", 44100, 2, []string{"-b", "96", "-t"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			src := filepath.Join(dir, tt.name+".wav")
			writeWAV16(t, src, tt.rate, tt.channels, richSignal(tt.rate, tt.channels, 5, 23))
			b := lameEncode(t, src, tt.name+".mp3", tt.opts...)
			whole := decodeBytes(t, b)
			if whole.err != nil {
				t.Fatal(whole.err)
			}
			d, err := New(bytes.NewReader(b), int64(len(b)))
			if err != nil {
				t.Fatal(err)
			}
			sp, ok := decode.Splittable(d)
			total := int64(whole.frames())
			if !ok || sp.SplitFrames() != total {
				t.Fatalf("SplitFrames %d, one pass delivered %d", sp.SplitFrames(), total)
			}
			spf := int64(d.first.samplesPerFrame())
			ch := int64(tt.channels)
			check := func(from, to int64) {
				t.Helper()
				s, err := sp.Section(from, to)
				if err != nil {
					t.Fatalf("Section(%d, %d): %v", from, to, err)
				}
				got, err := audiotest.ReadAll(t, s, 777)
				if err != nil {
					t.Fatalf("Section(%d, %d): %v", from, to, err)
				}
				want := whole.samples[from*ch : to*ch]
				if len(got) != len(want) {
					t.Fatalf("Section(%d, %d): %d samples, want %d", from, to, len(got), len(want))
				}
				for i := range got {
					if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
						t.Fatalf("Section(%d, %d) sample %d (frame %d of the file): %g, one pass %g", from, to, i, from+int64(i)/ch, got[i], want[i])
					}
				}
			}
			check(0, total)
			check(0, 1)
			check(total-1, total)
			check(total, total)
			for f := int64(1); f*spf < total; f += 7 {
				for _, delta := range []int64{-1, 0, 1} {
					if from := f*spf + delta; from < total {
						check(from, min(from+3*spf+5, total))
					}
				}
			}
			// Consecutive sections: the whole file, joined.
			var joined []float64
			step := total/5 + 333
			for from := int64(0); from < total; from += step {
				s, err := sp.Section(from, min(from+step, total))
				if err != nil {
					t.Fatal(err)
				}
				part, err := audiotest.ReadAll(t, s, 1000)
				if err != nil {
					t.Fatal(err)
				}
				joined = append(joined, part...)
			}
			if !equalSamples(joined, whole.samples) {
				t.Errorf("the sections joined differ from the one-pass decode (%d and %d samples)", len(joined), len(whole.samples))
			}
		})
	}
}

// TestSectionRefusals: damage the walk of the stream found makes the file
// unsplittable (0 frames), and sections outside the stream are errors.
func TestSectionRefusals(t *testing.T) {
	b := append([]byte(nil), audiotest.Fixture(t, "music-s48-128.mp3")...)
	d, err := New(bytes.NewReader(b), int64(len(b)))
	if err != nil {
		t.Fatal(err)
	}
	n := d.SplitFrames()
	if n != 192000 {
		t.Fatalf("SplitFrames %d, want the fixture's 192000", n)
	}
	for _, r := range [][2]int64{{-1, 10}, {10, 5}, {0, n + 1}} {
		if _, err := d.Section(r[0], r[1]); err == nil {
			t.Errorf("Section(%d, %d) accepted", r[0], r[1])
		}
	}
	clear(b[20000:21000]) // damage between frames (TestGarbageMidStream)
	d, err = New(bytes.NewReader(b), int64(len(b)))
	if err != nil {
		t.Fatal(err)
	}
	if n := d.SplitFrames(); n != 0 {
		t.Errorf("damaged stream: SplitFrames %d, want 0 (one pass reports the damage)", n)
	}
}

func ExampleDecoder_Section() {
	b, err := os.ReadFile(filepath.Join("testdata", "mpeg2-22k.mp3"))
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := New(bytes.NewReader(b), int64(len(b)))
	if err != nil {
		fmt.Println(err)
		return
	}
	// The second half of the stream, decoded on its own: the same samples
	// one pass gives there.
	n := d.SplitFrames()
	s, err := d.Section(n/2, n)
	if err != nil {
		fmt.Println(err)
		return
	}
	buf := make([]float64, 4096*s.Info().Channels)
	var got int64
	for {
		k, err := s.ReadFrames(buf)
		got += int64(k)
		if err != nil {
			break
		}
	}
	fmt.Println(got == n-n/2)
	// Output: true
}

// FuzzSections: whatever the bytes, a stream New accepts and calls
// splittable must give in three sections exactly the samples one pass
// gives (when one pass delivers every frame SplitFrames promised), and
// neither may panic. Seeds: three small whole fixtures (MPEG-2, MPEG-2.5,
// no Info header), splittable as they are.
func FuzzSections(f *testing.F) {
	for _, name := range []string{"mpeg2-22k.mp3", "no-info-header.mp3", "mpeg25-8k.mp3"} {
		f.Add(audiotest.Fixture(f, name))
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		d, err := New(bytes.NewReader(b), int64(len(b)))
		if err != nil {
			return
		}
		n := d.SplitFrames()
		if n == 0 {
			return
		}
		ch := int64(d.Info().Channels)
		read := func(dec decode.Decoder) []float64 {
			var out []float64
			buf := make([]float64, 1000*ch)
			for {
				k, err := dec.ReadFrames(buf)
				out = append(out, buf[:k*int(ch)]...)
				if err == io.EOF {
					return out
				}
				// Any other error is the one damage report, which comes
				// after the last frame and before io.EOF.
			}
		}
		whole := read(d)
		if int64(len(whole)) != n*ch {
			return // a decoder limit cut the pass short: nothing to compare
		}
		var joined []float64
		for _, r := range [][2]int64{{0, n / 3}, {n / 3, 2 * n / 3}, {2 * n / 3, n}} {
			s, err := d.Section(r[0], r[1])
			if err != nil {
				t.Fatalf("Section(%d, %d) of %d: %v", r[0], r[1], n, err)
			}
			joined = append(joined, read(s)...)
		}
		if len(joined) != len(whole) {
			t.Fatalf("sections gave %d samples, one pass %d", len(joined), len(whole))
		}
		for i := range whole {
			if math.Float64bits(joined[i]) != math.Float64bits(whole[i]) {
				t.Fatalf("sample %d: sections %g, one pass %g", i, joined[i], whole[i])
			}
		}
	})
}

// TestFrameIndexSparse: the index keeps every indexStride-th frame's
// offset only, so a 2-hour 48 kHz stream (300 000 frames of 1 152 samples)
// costs 8 bytes per 32 frames (80 KB in chunks), not 8 bytes a frame (2.4 MB):
// memory stays flat in practice whatever the length.
func TestFrameIndexSparse(t *testing.T) {
	const frames = 2 * 3600 * 48000 / 1152
	var x frameIndex
	for i := int64(0); i < frames; i++ {
		x.add(417 * i)
	}
	entries := 0
	for _, c := range x.chunks {
		entries += len(c)
	}
	if want := (frames + indexStride - 1) / indexStride; entries != want {
		t.Errorf("%d entries for %d frames, want %d", entries, frames, want)
	}
	if bytes := 8 * cap(x.chunks[0]) * len(x.chunks); bytes > 90_000 {
		t.Errorf("index of a 2-hour stream holds %d bytes", bytes)
	}
	for _, i := range []int64{0, indexStride, 1000 * indexStride, (frames - 1) / indexStride * indexStride} {
		if got := x.at(i); got != 417*i {
			t.Errorf("frame %d at %d, want %d", i, got, 417*i)
		}
	}
}
