package measure_test

import (
	"context"
	"encoding/binary"
	"math"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
)

// float64WAV builds a 64-bit IEEE float WAV (format tag 3) of interleaved
// frames at 48 kHz.
func float64WAV(channels int, mask uint32, frames []float64) []byte {
	data := make([]byte, 0, 8*len(frames))
	for _, v := range frames {
		data = binary.LittleEndian.AppendUint64(data, math.Float64bits(v))
	}
	le := binary.LittleEndian
	var fmtBody []byte
	fmtBody = le.AppendUint16(fmtBody, 3)
	if mask != 0 {
		fmtBody[0], fmtBody[1] = 0xFE, 0xFF // WAVE_FORMAT_EXTENSIBLE
	}
	fmtBody = le.AppendUint16(fmtBody, uint16(channels))
	fmtBody = le.AppendUint32(fmtBody, rate)
	fmtBody = le.AppendUint32(fmtBody, uint32(rate*channels*8))
	fmtBody = le.AppendUint16(fmtBody, uint16(channels*8))
	fmtBody = le.AppendUint16(fmtBody, 64)
	if mask != 0 {
		fmtBody = le.AppendUint16(fmtBody, 22)
		fmtBody = le.AppendUint16(fmtBody, 64)
		fmtBody = le.AppendUint32(fmtBody, mask)
		// KSDATAFORMAT_SUBTYPE_IEEE_FLOAT: 00000003-0000-0010-8000-00aa00389b71
		fmtBody = append(fmtBody, 3, 0, 0, 0, 0, 0, 0x10, 0, 0x80, 0, 0, 0xAA, 0, 0x38, 0x9B, 0x71)
	}
	out := []byte("RIFF")
	out = le.AppendUint32(out, uint32(4+8+len(fmtBody)+8+len(data)))
	out = append(out, "WAVEfmt "...)
	out = le.AppendUint32(out, uint32(len(fmtBody)))
	out = append(out, fmtBody...)
	out = append(out, "data"...)
	out = le.AppendUint32(out, uint32(len(data)))
	return append(out, data...)
}

// TestHugeSamplesAreAnError: a float64 WAV with finite samples so large that
// their energy would overflow (one at 1e155 already squares beyond float64
// once a block sums them) is refused with the sample, channel and value,
// never measured as +Inf dBTP or -Inf LUFS.
func TestHugeSamplesAreAnError(t *testing.T) {
	for _, tc := range []struct {
		name  string
		at    int // interleaved index
		value float64
		want  string
	}{
		{"1e155", 2 * 12000, 1e155, "sample 12000 of channel L (0.250 s) is 1e155: far beyond full scale"},
		{"1e300", 2*30000 + 1, 1e300, "sample 30000 of channel R (0.625 s) is 1e300: far beyond full scale"},
		{"1e308", 2*4800 + 1, 1e308, "sample 4800 of channel R (0.100 s) is 1e308: far beyond full scale"},
		{"max", 0, -math.MaxFloat64, "sample 0 of channel L (0.000 s) is -1.798e308: far beyond full scale"},
		{"just above", 2 * 100, math.Nextafter(1e100, 2e100), "sample 100 of channel L (0.002 s) is 1e100: far beyond full scale"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			frames := tone(2, 0.1, 0.1)
			frames[tc.at] = tc.value
			// Mixed signs: the next frame's other channel goes the other way.
			frames[tc.at+3] = -tc.value
			path := writeTemp(t, "huge.wav", float64WAV(2, 0, frames))
			m := measure.File(context.Background(), path, measure.Options{})
			if !strings.Contains(m.Error, "huge.wav") || !strings.Contains(m.Error, tc.want) || !strings.Contains(m.Error, "cannot be measured") {
				t.Errorf("error %q, want it to name the file and contain %q", m.Error, tc.want)
			}
			if m.IntegratedLUFS != nil || m.TruePeakDBTP != nil {
				t.Error("no figure may be given for a file with unmeasurable samples")
			}
		})
	}
}

// TestLargeSamplesUpToTheBound: samples up to 1e100 (far over full scale,
// but within the engine's bound) are measured with finite figures.
func TestLargeSamplesUpToTheBound(t *testing.T) {
	frames := tone(4, 0.1, 0.1)
	for i := 48000; i < 48000+2*480; i++ {
		frames[i] = 1e100
		if i%4 < 2 {
			frames[i] = -1e100
		}
	}
	m := measure.File(context.Background(), writeTemp(t, "big.wav", float64WAV(2, 0, frames)), measure.Options{})
	if m.Error != "" {
		t.Fatal(m.Error)
	}
	// 20·log10(1e100) = 2000 dB exactly; the interpolator may read a little
	// above it (BS.1770 Annex 2 overshoot), never +Inf.
	for name, v := range map[string]*float64{"true peak": m.TruePeakDBTP, "sample peak": m.SamplePeakDBFS,
		"integrated": m.IntegratedLUFS, "max momentary": m.MaxMomentaryLUFS} {
		if v == nil || math.IsInf(*v, 0) || math.IsNaN(*v) || *v < 1900 {
			t.Errorf("%s = %v, want a finite value near +2000", name, v)
		}
	}
	if math.Abs(*m.SamplePeakDBFS-2000) > 1e-9 {
		t.Errorf("sample peak %v dBFS, want 2000", *m.SamplePeakDBFS)
	}
}

// TestHugeFoldDown: each channel of a 5.1 frame is within the bound, but
// their Lo/Ro fold-down is not: the file is refused, naming the frame.
func TestHugeFoldDown(t *testing.T) {
	const ch = 6 // L R C LFE Ls Rs (mask 0x3F)
	frames := make([]float64, ch*rate)
	at := 24000
	for _, c := range []int{0, 2, 4} { // L, C, Ls
		frames[at*ch+c] = 0.9e100
	}
	m := measure.File(context.Background(), writeTemp(t, "fold.wav", float64WAV(ch, 0x3F, frames)), measure.Options{})
	if !strings.Contains(m.Error, "fold.wav") || !strings.Contains(m.Error, "frame 24000 (0.500 s) folds down") {
		t.Errorf("error %q, want the file and the frame", m.Error)
	}
}
