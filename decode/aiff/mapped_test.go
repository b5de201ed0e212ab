//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package aiff

import (
	"errors"
	"io"
	"math"
	"math/rand"
	"os"
	"path/filepath"
	"runtime/debug"
	"strings"
	"sync"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/internal/audiotest"
)

// mappedAIFF is a file of the given coding, 3 MiB of sound data and a few
// frames more (more than the least stretch worth mapping; a frame size
// that divides no page).
func mappedAIFF(spec aiffSpec) []byte {
	r := rand.New(rand.NewSource(7))
	spec.rate, spec.commFrames, spec.formSize = 48000, -1, -1
	frames := 3<<20/(spec.channels*((spec.bits+7)/8)) + 5
	if spec.floats != nil {
		spec.floats = make([]float64, frames*spec.channels)
		for i := range spec.floats {
			spec.floats[i] = r.NormFloat64()
		}
		spec.floats[3], spec.floats[4], spec.floats[5] = math.NaN(), math.Inf(-1), 5e-324
		return buildAIFF(spec)
	}
	spec.ints = make([]int32, frames*spec.channels)
	lo := int32(-1) << (spec.bits - 1)
	for i := range spec.ints {
		spec.ints[i] = lo + int32(r.Int63n(1<<spec.bits))
	}
	spec.ints[0], spec.ints[1] = lo, -lo-1
	return buildAIFF(spec)
}

// openMapped opens the file at path and returns its decoder, which must
// map the sound data; the file is closed with t.
func openMapped(t *testing.T, path string) (*os.File, *Decoder) {
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
	d, err := NewDecoder(f, st.Size())
	if err != nil {
		t.Fatal(err)
	}
	if d.view == nil {
		t.Fatalf("%s: the decoder reads instead of mapping the sound data", path)
	}
	return f, d
}

// sameSamples fails unless got and want are identical bit for bit.
func sameSamples(t *testing.T, what string, got, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d samples, want %d", what, len(got), len(want))
	}
	for i := range want {
		if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
			t.Fatalf("%s: sample %d is %v, want %v", what, i, got[i], want[i])
		}
	}
}

// TestMappedSameSamples checks that converting straight from a mapping of
// the file gives every coding the very samples the read calls give, for
// requests of any size, and for three sections read at once.
func TestMappedSameSamples(t *testing.T) {
	for name, spec := range map[string]aiffSpec{
		"aiff-8":      {channels: 1, bits: 8},
		"aiff-16":     {channels: 2, bits: 16},
		"aiff-24":     {channels: 6, bits: 24},
		"aiff-20":     {channels: 3, bits: 20},
		"aiff-32":     {channels: 2, bits: 32},
		"aifc-sowt24": {aifc: true, compression: "sowt", channels: 2, bits: 24},
		"aifc-fl32":   {aifc: true, compression: "fl32", channels: 2, bits: 32, floats: []float64{}},
		"aifc-fl64":   {aifc: true, compression: "fl64", channels: 2, bits: 64, floats: []float64{}},
	} {
		file := mappedAIFF(spec)
		path := filepath.Join(t.TempDir(), name+".aif")
		if err := os.WriteFile(path, file, 0o600); err != nil {
			t.Fatal(err)
		}
		want, err, _ := decodeAll(t, file, 4096)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		for _, block := range []int{4096, 1 << 20, 333} {
			_, d := openMapped(t, path)
			got, err := audiotest.ReadAll(t, d, block)
			if err != nil {
				t.Fatalf("%s, %d-frame requests: %v", name, block, err)
			}
			sameSamples(t, name, got, want)
			if d.view != nil {
				t.Errorf("%s: still mapped after its end", name)
			}
		}
		_, d := openMapped(t, path)
		total := d.SplitFrames()
		cuts := []int64{0, total / 3, total/3 + 1, total}
		parts := make([][]float64, len(cuts)-1)
		errs := make([]error, len(parts))
		var wg sync.WaitGroup
		for i := range parts {
			s, err := d.Section(cuts[i], cuts[i+1])
			if err != nil {
				t.Fatal(err)
			}
			if (cuts[i+1]-cuts[i])*d.frameBytes >= 1<<20 && s.(*Decoder).view == nil {
				t.Errorf("%s: section %d reads instead of mapping", name, i)
			}
			wg.Go(func() { parts[i], errs[i] = audiotest.ReadAll(t, s, 4096) })
		}
		wg.Wait()
		var got []float64
		for i, p := range parts {
			if errs[i] != nil {
				t.Fatalf("%s: section %d: %v", name, i, errs[i])
			}
			got = append(got, p...)
		}
		sameSamples(t, name+" in sections", got, want)
	}
}

// TestMappedFileShrinks truncates a file while its sound data is mapped:
// the SIGBUS of touching a page past the new end must come back as a
// *decode.IntegrityError naming the file and the byte, after the whole
// frames the file still holds, never as a crash.
func TestMappedFileShrinks(t *testing.T) {
	file := mappedAIFF(aiffSpec{channels: 2, bits: 24})
	want, err, d0 := decodeAll(t, file, 4096)
	if err != nil {
		t.Fatal(err)
	}
	data, whole := d0.h.dataOff, int64(len(file))
	page := int64(os.Getpagesize())
	last := (whole - 1) &^ (page - 1) // the start of the last page
	for _, c := range []struct {
		name   string
		before int   // 4 096-frame requests before the cut
		size   int64 // the file's size after it
		frames int64 // frames delivered
		offset int64 // the damage's byte
		says   string
	}{
		{"ahead", 10, data + 1<<20 + 100, (1<<20 + 100) / 6, data + (1<<20+100)/6*6, "shrank to"},
		{"behind", 60, 512 << 10, 60 * 4096, data + 60*4096*6, "no longer holds"},
		{"last-page", int((last - data) / 6 / 4096), last + 1, (whole - data) / 6, whole, "no longer holds"},
	} {
		path := filepath.Join(t.TempDir(), c.name+".aif")
		if err := os.WriteFile(path, file, 0o600); err != nil {
			t.Fatal(err)
		}
		_, d := openMapped(t, path)
		var got []float64
		buf := make([]float64, 4096*2)
		for k := 0; k <= 10000; k++ {
			if k == c.before {
				if err := os.Truncate(path, c.size); err != nil {
					t.Fatal(err)
				}
			}
			var n int
			n, err = d.ReadFrames(buf)
			got = append(got, buf[:n*2]...)
			if err != nil {
				break
			}
		}
		var ie *decode.IntegrityError
		if !errors.As(err, &ie) {
			t.Fatalf("%s: error %v, want a *decode.IntegrityError", c.name, err)
		}
		if ie.Offset != c.offset || !strings.Contains(err.Error(), path) || !strings.Contains(err.Error(), c.says) {
			t.Errorf("%s: %v; want byte %d, the file's name and %q", c.name, err, c.offset, c.says)
		}
		if int64(len(got)/2) != c.frames {
			t.Fatalf("%s: %d frames, want %d", c.name, len(got)/2, c.frames)
		}
		if c.name == "ahead" {
			sameSamples(t, c.name, got, want[:len(got)])
		}
		if n, again := d.ReadFrames(buf); n != 0 || again != io.EOF {
			t.Errorf("%s: after the damage ReadFrames = %d, %v; want 0, EOF", c.name, n, again)
		}
		if debug.SetPanicOnFault(false) {
			t.Errorf("%s: the goroutine was left panicking on faults", c.name)
		}
		err = nil
	}
}

// TestMappedFallsBackToReads: when a window cannot be mapped (the file was
// closed under the decoder), the read calls take over and report the
// failure as the damage, naming its cause; nothing panics.
func TestMappedFallsBackToReads(t *testing.T) {
	path := filepath.Join(t.TempDir(), "closed.aif")
	if err := os.WriteFile(path, mappedAIFF(aiffSpec{channels: 2, bits: 16}), 0o600); err != nil {
		t.Fatal(err)
	}
	f, d := openMapped(t, path)
	f.Close()
	n, err := d.ReadFrames(make([]float64, 4096*2))
	var ie *decode.IntegrityError
	if n != 0 || !errors.As(err, &ie) || !strings.Contains(err.Error(), "file already closed") {
		t.Fatalf("ReadFrames on a closed file = %d, %v; want 0 and the damage with the read error", n, err)
	}
	if d.view != nil {
		t.Error("still mapped after the mapping failed")
	}
}
