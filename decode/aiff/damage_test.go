package aiff

import (
	"encoding/binary"
	"fmt"
	"runtime"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/internal/audiotest"
)

func TestBadHeaders(t *testing.T) {
	st := audiotest.FixtureWAV(t, "stereo16-44k.wav")
	good := func() aiffSpec {
		return aiffSpec{aifc: true, channels: 2, bits: 16, rate: 44100, ints: st.Samples[:200], commFrames: -1, formSize: -1}
	}
	file := func(edit func(*aiffSpec)) []byte {
		s := good()
		edit(&s)
		return buildAIFF(s)
	}
	ok := file(func(*aiffSpec) {})
	// Offsets in ok: FORM header 12, FVER chunk 12 (ends at 24), COMM
	// header at 24, its body at 32 (channels 32, frames 34, sampleSize 38,
	// rate 40, compression type 50).
	patch := func(off int, b ...byte) []byte {
		out := append([]byte(nil), ok...)
		copy(out[off:], b)
		return out
	}
	noSSND := append([]byte(nil), ok[:32+22+1+len("kweigh test NONE")+1]...)
	binary.BigEndian.PutUint32(noSSND[4:], uint32(len(noSSND)-8))

	tests := []struct {
		name string
		data []byte
		kind string // errorKind of NewDecoder's error
		says string // the message must contain this
	}{
		{"empty", nil, "format", "shorter than"},
		{"not FORM", patch(0, 'R', 'I', 'F', 'F'), "format", `"RIFF"`},
		{"other form type", patch(8, '8', 'S', 'V', 'X'), "format", `"8SVX"`},
		{"header only", ok[:12], "format", "no COMM"},
		{"no SSND with frames", noSSND, "format", "no SSND"},
		{"COMM too short", patch(28, 0, 0, 0, 10), "format", "COMM chunk is 10 bytes"},
		{"0 channels", patch(32, 0, 0), "format", "0 channels"},
		{"negative channels", patch(32, 0xFF, 0xFE), "format", "-2 channels"},
		{"65 channels", patch(32, 0, 65), "format", "65 channels"},
		{"0 bits", patch(38, 0, 0), "format", "0-bit"},
		{"33 bits", patch(38, 0, 33), "format", "33-bit"},
		{"rate 0", patch(40, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0), "format", "sample rate of 0"},
		{"rate NaN", patch(40, 0x7F, 0xFF, 0xC0), "format", "NaN"},
		{"rate infinite", patch(40, 0x7F, 0xFF, 0, 0, 0, 0, 0, 0, 0, 0), "format", "+Inf"},
		{"rate negative", patch(40, 0xC0, 0x0E), "format", "-44100"},
		{"cut inside COMM", ok[:40], "format", "ends inside the COMM"},
		{"µ-law", patch(50, 'u', 'l', 'a', 'w'), "unsupported", `"ulaw" (µ-law)`},
		{"A-law", patch(50, 'a', 'l', 'a', 'w'), "unsupported", `"alaw" (A-law)`},
		{"IMA ADPCM", patch(50, 'i', 'm', 'a', '4'), "unsupported", `"ima4" (IMA 4:1 ADPCM)`},
		{"unknown type named", patch(50, 'q', 'w', 'r', 't'), "unsupported", `"qwrt" (kweigh test NONE)`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err, _ := decodeAll(t, tc.data, 64)
			if errorKind(err) != tc.kind || !strings.Contains(fmt.Sprint(err), tc.says) {
				t.Errorf("err = %v (%s), want %s error saying %q", err, errorKind(err), tc.kind, tc.says)
			}
		})
	}
}

func TestTruncatedSSND(t *testing.T) {
	st := audiotest.FixtureWAV(t, "stereo16-44k.wav")
	full := buildAIFF(aiffSpec{channels: 2, bits: 16, rate: 44100, ints: st.Samples, commFrames: -1, formSize: -1})
	dataStart := len(full) - len(st.Samples)*2 // 16-bit samples end the file
	want := st.Scaled()
	for _, cut := range []int{dataStart - 8, dataStart - 1, dataStart, dataStart + 1, dataStart + 3, dataStart + 4, dataStart + 4001, len(full) - 1} {
		t.Run(fmt.Sprint(cut), func(t *testing.T) {
			got, err, d := decodeAll(t, full[:cut], 1000)
			if cut < dataStart-8+8 && err != nil && errorKind(err) == "format" {
				return // cut inside the SSND header itself
			}
			if errorKind(err) != "integrity" {
				t.Fatalf("err = %v, want an IntegrityError", err)
			}
			wholeFrames := max(0, cut-dataStart) / 4
			if len(got) != wholeFrames*2 {
				t.Errorf("delivered %d frames, want the %d whole frames present", len(got)/2, wholeFrames)
			}
			if fmt.Sprint(got) != fmt.Sprint(want[:len(got)]) {
				t.Error("delivered samples differ from the source")
			}
			if d.Info().Frames != 8820 {
				t.Errorf("Frames = %d, want the declared 8820", d.Info().Frames)
			}
			if !strings.Contains(err.Error(), "past the end of the file") {
				t.Errorf("error %q does not say the chunk runs past the end", err)
			}
		})
	}
}

func TestAbsurdSizesAllocateLittle(t *testing.T) {
	// A 60-byte file declaring 2^32−1 frames of 64 channels of 64-bit
	// floats and a 4 GiB SSND chunk: the reader must fail or stop without
	// allocating anything near the declared size.
	s := aiffSpec{aifc: true, compression: "fl64", channels: 64, bits: 64, rate: 48000, floats: make([]float64, 64), commFrames: 0xFFFFFFFF, formSize: 0xFFFFFFFF}
	data := buildAIFF(s)
	binary.BigEndian.PutUint32(data[len(data)-64*8-16+4:], 0xFFFFFFFF) // SSND size
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	got, err, _ := decodeAll(t, data, 4096)
	runtime.ReadMemStats(&m1)
	if errorKind(err) != "integrity" || len(got) != 64 {
		t.Errorf("err = %v, %d samples; want IntegrityError after the 64 present", err, len(got))
	}
	// decodeAll's own buffer is 4096 frames × 64 channels × 8 bytes = 2 MiB;
	// allow that plus the decoder's 64 KiB read buffer and change.
	if delta := m1.TotalAlloc - m0.TotalAlloc; delta > 3<<20 {
		t.Errorf("allocated %d bytes", delta)
	}
}
