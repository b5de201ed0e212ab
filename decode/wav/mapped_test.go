//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package wav_test

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime/debug"
	"strings"
	"sync"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// writeTemp writes data to a new file in t's folder and returns its path.
func writeTemp(t *testing.T, name string, data []byte) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}

// openMapped opens path and returns its decoder, which must map the audio
// (the point of the tests here); the file is closed with t.
func openMapped(t *testing.T, path string) (*os.File, decode.Decoder) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	st, err := f.Stat()
	if err != nil {
		t.Fatal(err)
	}
	d, err := wav.New(f, st.Size())
	if err != nil {
		t.Fatal(err)
	}
	if !wav.Mapped(d) {
		t.Fatalf("%s: the decoder reads instead of mapping the audio", path)
	}
	return f, d
}

// mappedFiles are files of every sample coding, each a few MiB (more than
// the least stretch worth mapping) and of a frame size that divides
// neither a page nor a mapping window; the 6-channel 24-bit one is longer
// than one 16 MiB window, and one is an RF64.
func mappedFiles() map[string][]byte {
	files := map[string][]byte{}
	for _, c := range []struct {
		channels, bits, mib int
	}{{1, 8, 2}, {2, 16, 3}, {3, 24, 3}, {6, 24, 17}, {2, 32, 3}} {
		frames := c.mib<<20/(c.channels*c.bits/8) + 7
		data := encodeInts(testInts(frames*c.channels, c.bits), c.bits, c.bits)
		files[fmt.Sprintf("%dch-int%d", c.channels, c.bits)] = wavFile("RIFF", fmtChunk(1, c.channels, 48000, c.bits), chunk("data", data))
	}
	f32 := make([]float32, 2*400001)
	f64 := make([]float64, 5*100003)
	for i := range f32 {
		f32[i] = float32(math.Sin(float64(i)*0.01)) * 1.5
	}
	f32[7], f32[8] = float32(math.NaN()), float32(math.Inf(1))
	f32[9] = math.Float32frombits(1) // the smallest denormal
	for i := range f64 {
		f64[i] = math.Cos(float64(i)*0.003) * 2
	}
	f64[9], f64[10] = math.Inf(-1), math.Float64frombits(1)
	files["2ch-float32"] = wavFile("RIFF", fmtChunk(3, 2, 48000, 32), chunk("data", encodeFloat32(f32)))
	files["5ch-float64"] = wavFile("RIFF", fmtChunk(3, 5, 48000, 64), chunk("data", encodeFloat64(f64)))
	// RF64 (EBU Tech 3306): the data size in ds64, the chunk's own 0xFFFFFFFF.
	rf := encodeInts(testInts(2*(3<<20/6+1), 24), 24, 24)
	files["rf64-2ch-int24"] = wavFile("RF64", ds64Chunk(0, uint64(len(rf)), uint64(len(rf)/6), nil), fmtChunk(1, 2, 48000, 24),
		chunk("data", rf).declaring(0xFFFFFFFF))
	return files
}

// TestMappedSameSamples checks that converting straight from a mapping of
// the file gives every coding the very samples (bit for bit) the read
// calls give, on every 24-bit kernel this machine runs, whatever mix of
// request sizes the caller makes, across mapping windows, and for
// sections of one file read at once on several goroutines.
func TestMappedSameSamples(t *testing.T) {
	kernels := wav.KernelSets()
	defer wav.UseAVX2(wav.UseAVX2(false))
	for name, file := range mappedFiles() {
		path := writeTemp(t, name+".wav", file)
		for _, avx2 := range kernels {
			wav.UseAVX2(avx2)
			want, wantErr := audiotest.ReadAll(t, open(t, file), 4096)
			if wantErr != nil {
				t.Fatalf("%s: %v", name, wantErr)
			}
			for _, sizes := range [][]int{{4096}, {1 << 20}, {5, 40000, 4096, 200000, 1}} {
				_, d := openMapped(t, path)
				got, err := readSizes(t, d, sizes)
				if err != nil {
					t.Fatalf("%s, AVX2 %v, sizes %v: %v", name, avx2, sizes, err)
				}
				if len(got) != len(want) {
					t.Fatalf("%s, AVX2 %v, sizes %v: %d samples, want %d", name, avx2, sizes, len(got), len(want))
				}
				for i := range want {
					if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
						t.Fatalf("%s, AVX2 %v, sizes %v: sample %d is %v, want %v", name, avx2, sizes, i, got[i], want[i])
					}
				}
				if wav.Mapped(d) {
					t.Errorf("%s: still mapped after its end", name)
				}
			}

			// Three sections at once, each with its own mapping.
			_, d := openMapped(t, path)
			sp, ok := decode.Splittable(d)
			if !ok {
				t.Fatal("not splittable")
			}
			total := sp.SplitFrames()
			cuts := []int64{0, total / 3, total/3 + 1, total}
			parts := make([][]float64, len(cuts)-1)
			errs := make([]error, len(parts))
			var wg sync.WaitGroup
			for i := range parts {
				s, err := sp.Section(cuts[i], cuts[i+1])
				if err != nil {
					t.Fatal(err)
				}
				info := d.Info()
				if bytes := (cuts[i+1] - cuts[i]) * int64(info.Channels*info.BitsPerSample/8); bytes >= 1<<20 && !wav.Mapped(s) {
					t.Errorf("%s: section %d reads instead of mapping", name, i)
				}
				wg.Go(func() {
					buf := make([]float64, 4096*d.Info().Channels)
					for {
						n, err := s.ReadFrames(buf)
						parts[i] = append(parts[i], buf[:n*d.Info().Channels]...)
						if err != nil {
							if err != io.EOF {
								errs[i] = err
							}
							return
						}
					}
				})
			}
			wg.Wait()
			var got []float64
			for i, p := range parts {
				if errs[i] != nil {
					t.Fatalf("%s: section %d: %v", name, i, errs[i])
				}
				got = append(got, p...)
			}
			sameBits(t, got, want)
		}
	}
}

// shrinkFile is 4 MiB of 48 kHz stereo 24-bit audio after the 44-byte
// header: 6-byte frames.
func shrinkFile() []byte {
	const frames = 4 << 20 / 6
	return wavFile("RIFF", fmtChunk(1, 2, 48000, 24), chunk("data", encodeInts(testInts(2*frames, 24), 24, 24)))
}

// readShrinking reads d with 4 096-frame requests; after the first
// `before` requests it truncates the file at path to size bytes. It
// returns the samples and the first error other than io.EOF.
func readShrinking(t *testing.T, d decode.Decoder, path string, before int, size int64) ([]float64, error) {
	t.Helper()
	var out []float64
	buf := make([]float64, 4096*2)
	for k := 0; ; k++ {
		if k == before {
			if err := os.Truncate(path, size); err != nil {
				t.Fatal(err)
			}
		}
		n, err := d.ReadFrames(buf)
		out = append(out, buf[:n*2]...)
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return out, err
		}
		if k > 10000 {
			t.Fatal("never reached the end")
		}
	}
}

// TestMappedFileShrinks truncates a file while its audio is mapped, as a
// hot folder's writer or a careless user may: touching the pages past the
// new end raises SIGBUS, which must come back as a *decode.IntegrityError
// naming the file and the byte, after the whole frames the file still
// holds (the same samples as before), never as a crash; the process goes
// on, and the fault setting of the goroutine is left as it was. On every
// 24-bit kernel (the fault then strikes inside the AVX2 assembly or the
// Go loop).
func TestMappedFileShrinks(t *testing.T) {
	kernels := wav.KernelSets()
	defer wav.UseAVX2(wav.UseAVX2(false))
	file := shrinkFile()
	const header = 44
	whole := int64(len(file))
	for _, avx2 := range kernels {
		wav.UseAVX2(avx2)
		want, err := audiotest.ReadAll(t, open(t, file), 4096)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range []struct {
			name   string
			before int   // requests of 24 576 bytes read before the cut
			size   int64 // the file's size after it
			// frames delivered, the error's offset, and a word it must say
			frames int64
			offset int64
			says   string
		}{
			// Ahead of the reader, inside a page: the frames up to the cut
			// are the file's, the fault comes on the next page.
			{"ahead", 10, header + 1<<20 + 100, (1<<20 + 100) / 6, header + (1<<20+100)/6*6, "audio truncated at byte"},
			// Ahead, on a page boundary.
			{"ahead-page", 10, 2 << 20, (2<<20 - header) / 6, header + (2<<20-header)/6*6, "audio truncated at byte"},
			// Behind the reader: what was delivered is gone from the file.
			{"behind", 60, 512 << 10, 60 * 4096, 512 << 10, "no longer holds"},
			// Inside the last page (4 MiB on), near the end: no fault (the
			// rest of the page reads as zeros); the size at the end tells.
			{"last-page", 170, whole - 20, (whole - header) / 6, whole - 20, "no longer holds"},
			// Ahead, before the last page: the fault comes on it.
			{"before-last-page", 170, whole - 100, (whole - 100 - header) / 6, header + (whole-100-header)/6*6, "audio truncated at byte"},
		} {
			path := writeTemp(t, "cut-"+c.name+".wav", file)
			f, d := openMapped(t, path)
			got, err := readShrinking(t, d, path, c.before, c.size)
			var ie *decode.IntegrityError
			if !errors.As(err, &ie) {
				t.Fatalf("%s, AVX2 %v: error %v, want a *decode.IntegrityError", c.name, avx2, err)
			}
			if ie.Offset != c.offset || !strings.Contains(err.Error(), path) || !strings.Contains(err.Error(), c.says) {
				t.Errorf("%s, AVX2 %v: %v; want byte %d, the file's name and %q", c.name, avx2, err, c.offset, c.says)
			}
			if int64(len(got)/2) != c.frames {
				t.Fatalf("%s, AVX2 %v: %d frames, want %d", c.name, avx2, len(got)/2, c.frames)
			}
			if c.says == "audio truncated at byte" {
				sameBits(t, got, want[:len(got)])
			}
			if n, again := d.ReadFrames(make([]float64, 2)); n != 0 || again != io.EOF {
				t.Errorf("%s, AVX2 %v: after the damage ReadFrames = %d, %v; want 0, EOF", c.name, avx2, n, again)
			}
			if debug.SetPanicOnFault(false) {
				t.Errorf("%s, AVX2 %v: the goroutine was left panicking on faults", c.name, avx2)
			}
			f.Close()
		}
	}
}

// TestMappedSectionsShrink cuts a file opened with decode.Open while two
// sections of it are being read, each through its own mapping (as package
// measure reads a long file on two cores): the section the cut falls in
// ends there with the damage, the one wholly past the cut delivers nothing
// more and says which delivered audio the file no longer holds; both
// report instead of crashing, and Close unmaps.
func TestMappedSectionsShrink(t *testing.T) {
	const header = 44
	path := writeTemp(t, "sections.wav", shrinkFile())
	f, err := decode.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sp, ok := decode.Splittable(f)
	if !ok {
		t.Fatal("not splittable")
	}
	half := sp.SplitFrames() / 2
	var sections []decode.Decoder
	for _, r := range [][2]int64{{0, half}, {half, sp.SplitFrames()}} {
		s, err := sp.Section(r[0], r[1])
		if err != nil {
			t.Fatal(err)
		}
		if !wav.Mapped(s) {
			t.Fatal("a section reads instead of mapping")
		}
		sections = append(sections, s)
	}
	buf := make([]float64, 4096*2)
	for _, s := range sections {
		for range 10 {
			if _, err := s.ReadFrames(buf); err != nil {
				t.Fatal(err)
			}
		}
	}
	const cut = 1 << 20
	if err := os.Truncate(path, cut); err != nil {
		t.Fatal(err)
	}
	for i, s := range sections {
		frames := int64(10 * 4096)
		var err error
		for err == nil {
			var n int
			n, err = s.ReadFrames(buf)
			frames += int64(n)
		}
		var ie *decode.IntegrityError
		if !errors.As(err, &ie) || !strings.Contains(err.Error(), path) {
			t.Fatalf("section %d: error %v, want a *decode.IntegrityError naming the file", i, err)
		}
		switch i {
		case 0: // the cut is inside it: its frames up to the cut
			if want := int64(cut-header) / 6; frames != want || ie.Offset != header+want*6 {
				t.Errorf("section 0: %d frames, damage at byte %d; want %d frames, byte %d", frames, ie.Offset, want, header+want*6)
			}
		case 1: // wholly past the cut: nothing after what it had delivered
			if frames != 10*4096 || ie.Offset != cut || !strings.Contains(err.Error(), "no longer holds") {
				t.Errorf("section 1: %d frames, %v; want %d frames and the audio it no longer holds", frames, err, 10*4096)
			}
		}
	}
}

// TestMappedFallsBackToReads: when a window cannot be mapped (here the
// file was closed under the decoder, so mmap has no descriptor), the
// decoder hands over to the read calls, which report the failure with
// its byte; nothing panics and no wrong sample is delivered.
func TestMappedFallsBackToReads(t *testing.T) {
	path := writeTemp(t, "closed.wav", shrinkFile())
	f, d := openMapped(t, path)
	f.Close()
	n, err := d.ReadFrames(make([]float64, 4096*2))
	if n != 0 || err == nil || !strings.Contains(err.Error(), "reading audio at byte 44") || !errors.Is(err, os.ErrClosed) {
		t.Fatalf("ReadFrames on a closed file = %d, %v; want 0 and the read error at byte 44", n, err)
	}
	if wav.Mapped(d) {
		t.Error("still mapped after the mapping failed")
	}
}
