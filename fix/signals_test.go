package fix

import (
	"context"
	"encoding/binary"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/measure"
)

// programme returns secs seconds of ch channels at rate: a speech-like
// signal (band-limited noise in 80–300 ms bursts with pauses, a new level
// every second over a 12 dB spread), scaled to integrated loudness lufs,
// with a 2 ms Hann-windowed 3 kHz burst every 1.1 s on the first channel whose sample peak is peakDB dBFS. The burst is what a limiter
// must catch; it is short enough to move the integrated loudness by less
// than a few hundredths of an LU. The bed's own peaks are about 12 dB over
// its RMS (Gaussian noise). Seeded: the same signal every run.
func programme(t testing.TB, seed uint64, secs float64, ch, rate int, lufs, peakDB float64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 3))
	n := int(secs * float64(rate))
	x := make([]float64, n*ch)
	lp1, lp2 := make([]float64, ch), make([]float64, ch)
	burst, gap, amp := 0, 0, 0.0
	for i := range n {
		if burst == 0 && gap == 0 {
			burst = rate * (80 + rng.IntN(220)) / 1000
			gap = rate * (20 + rng.IntN(120)) / 1000
			lvl := float64((i / rate * 5) % 13) // dB below the loudest
			amp = math.Pow(10, -lvl/20)
		}
		on := 0.0
		if burst > 0 {
			on = amp
			burst--
		} else {
			gap--
		}
		for k := range ch {
			lp1[k] += 0.5 * (rng.NormFloat64() - lp1[k])
			lp2[k] += 0.5 * (lp1[k] - lp2[k])
			x[i*ch+k] = on * lp2[k]
		}
	}
	m, _ := loudness.NewMeter(rate, channelWeights(ch))
	m.Write(x)
	r := m.Result()
	if !r.Integrated.Defined {
		t.Fatal("test signal has no loudness")
	}
	g := math.Pow(10, (lufs-r.Integrated.Value)/20)
	for i := range x {
		x[i] *= g
	}
	pk := math.Pow(10, peakDB/20)
	w := rate * 2 / 1000
	for c := rate / 3; c+w < n; c += rate * 11 / 10 {
		for j := range w {
			v := pk * 0.5 * (1 - math.Cos(2*math.Pi*float64(j)/float64(w))) * math.Sin(2*math.Pi*3000*float64(j)/float64(rate))
			x[(c+j)*ch] += v
		}
	}
	return x
}

// channelWeights are BS.1770 weights for the default layouts used here.
func channelWeights(ch int) []float64 {
	switch ch {
	case 6: // L R C LFE Ls Rs
		return []float64{1, 1, 1, 0, 1.41, 1.41}
	}
	w := make([]float64, ch)
	for i := range w {
		w[i] = 1
	}
	return w
}

// wavSpec describes a test WAV to write.
type wavSpec struct {
	rate, ch, bits int
	float          bool
	extensible     bool // WAVE_FORMAT_EXTENSIBLE with a channel mask
	mask           uint32
	valid          int         // valid bits of an extensible file (0: all)
	before, after  [][2]string // extra chunks (id, body) before and after data
}

// writeWAV writes x as a WAV file per s (TPDF-free plain rounding, as a
// fixture needs no dither) and returns its path.
func writeWAV(t testing.TB, dir, name string, s wavSpec, x []float64) string {
	t.Helper()
	le := binary.LittleEndian
	bytesPer := s.bits / 8
	var fmtBody []byte
	tag := uint16(1)
	if s.float {
		tag = 3
	}
	fmtBody = le.AppendUint16(fmtBody, tag)
	if s.extensible {
		fmtBody = le.AppendUint16(fmtBody[:0], 0xFFFE)
	}
	fmtBody = le.AppendUint16(fmtBody, uint16(s.ch))
	fmtBody = le.AppendUint32(fmtBody, uint32(s.rate))
	fmtBody = le.AppendUint32(fmtBody, uint32(s.rate*s.ch*bytesPer))
	fmtBody = le.AppendUint16(fmtBody, uint16(s.ch*bytesPer))
	fmtBody = le.AppendUint16(fmtBody, uint16(s.bits))
	if s.extensible {
		fmtBody = le.AppendUint16(fmtBody, 22)
		valid := s.bits
		if s.valid > 0 {
			valid = s.valid
		}
		fmtBody = le.AppendUint16(fmtBody, uint16(valid))
		fmtBody = le.AppendUint32(fmtBody, s.mask)
		guid := []byte{0, 0, 0, 0, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71}
		le.PutUint16(guid, tag)
		fmtBody = append(fmtBody, guid...)
	}
	data := make([]byte, 0, len(x)*bytesPer)
	word := s.bits
	if s.valid > 0 {
		word = s.valid
	}
	full := math.Ldexp(1, word-1)
	for _, v := range x {
		switch {
		case s.float && s.bits == 32:
			data = le.AppendUint32(data, math.Float32bits(float32(v)))
		case s.float:
			data = le.AppendUint64(data, math.Float64bits(v))
		case s.bits == 8: // 8-bit WAV is unsigned
			c := int64(math.Round(v * full))
			data = append(data, byte(min(max(c, -128), 127)+128))
		default:
			c := int64(math.Round(v * full))
			c = min(max(c, -int64(full)), int64(full)-1) << (s.bits - word) // left-justified
			for b := range bytesPer {
				data = append(data, byte(c>>(8*b)))
			}
		}
	}
	chunk := func(out []byte, id string, body []byte) []byte {
		out = append(out, id...)
		out = le.AppendUint32(out, uint32(len(body)))
		out = append(out, body...)
		if len(body)%2 == 1 {
			out = append(out, 0)
		}
		return out
	}
	var body []byte
	body = append(body, "WAVE"...)
	body = chunk(body, "fmt ", fmtBody)
	for _, c := range s.before {
		body = chunk(body, c[0], []byte(c[1]))
	}
	body = chunk(body, "data", data)
	for _, c := range s.after {
		body = chunk(body, c[0], []byte(c[1]))
	}
	file := chunk(nil, "RIFF", body)
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, file, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// bextBody returns a 602-byte bext body (version 1, EBU Tech 3285) with a
// description and originator, and a coding history line.
func bextBody(description string) string {
	b := make([]byte, 602)
	copy(b, description)
	copy(b[256:], "Kestrel Lane Audio")
	copy(b[320:], "2026-03-14")
	copy(b[330:], "09:30:00")
	binary.LittleEndian.PutUint16(b[346:], 1)
	return string(b) + "A=PCM,F=48000,W=24,M=stereo,T=Kestrel desk\r\n"
}

// decodeAll decodes a whole file with kweigh's decoders.
func decodeAll(t testing.TB, path string) []float64 {
	t.Helper()
	f, err := decode.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out []float64
	buf := make([]float64, 4096*f.Info().Channels)
	for {
		n, err := f.ReadFrames(buf)
		out = append(out, buf[:n*f.Info().Channels]...)
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatal(err)
		}
	}
}

// measureFile measures a file with kweigh's own code.
func measureFile(t testing.TB, path string) *measure.Measurement {
	t.Helper()
	m := measure.File(context.Background(), path, measure.Options{})
	if m.Error != "" {
		t.Fatal(m.Error)
	}
	return m
}
