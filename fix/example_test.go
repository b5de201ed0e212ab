package fix_test

import (
	"context"
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"path/filepath"

	_ "github.com/kweigh/kweigh/decode/formats"
	"github.com/kweigh/kweigh/fix"
	"github.com/kweigh/kweigh/rules"
)

// A 997 Hz tone at -6 dBFS in both channels of a 16-bit WAV (the right
// channel one sample later, so the file is not dual mono) reads -6.0
// LUFS (BS.1770: a full-scale sine in one channel reads -3.01 LKFS; -6 dB,
// and +3 dB for the second channel), far above the podcast target of -16
// LUFS: fix lowers it by 10 dB, writes tone.fixed.wav beside it and judges
// that file.
func ExampleFile() {
	dir, _ := os.MkdirTemp("", "kweigh-fix-example")
	defer os.RemoveAll(dir)
	in := filepath.Join(dir, "tone.wav")
	os.WriteFile(in, toneWAV(48000, 5, 0.5), 0o644)

	spec, _ := rules.Lookup("podcast")
	r := fix.File(context.Background(), in, fix.Options{Spec: spec, MaxLimitingDB: fix.DefaultMaxLimitingDB, MarginDB: fix.DefaultMarginDB})
	m := r.After.Measurement
	fmt.Printf("%s, %+.1f dB → %s: %.1f LUFS, %.1f dBTP, %s\n", r.Action, *r.GainDB, filepath.Base(*r.Output), *m.IntegratedLUFS, *m.TruePeakDBTP, r.After.Verdict)
	// Output: gain, -10.0 dB → tone.fixed.wav: -16.0 LUFS, -16.0 dBTP, pass
}

// toneWAV returns a 16-bit stereo WAV of a 997 Hz sine of amplitude amp,
// the right channel one sample behind the left.
func toneWAV(rate, secs int, amp float64) []byte {
	le := binary.LittleEndian
	n := rate * secs
	var b []byte
	b = append(b, "RIFF"...)
	b = le.AppendUint32(b, uint32(36+n*4))
	b = append(b, "WAVEfmt "...)
	b = le.AppendUint32(b, 16)
	b = le.AppendUint16(b, 1)
	b = le.AppendUint16(b, 2)
	b = le.AppendUint32(b, uint32(rate))
	b = le.AppendUint32(b, uint32(rate*4))
	b = le.AppendUint16(b, 4)
	b = le.AppendUint16(b, 16)
	b = append(b, "data"...)
	b = le.AppendUint32(b, uint32(n*4))
	for i := range n {
		w := 2 * math.Pi * 997 / float64(rate)
		l := int16(math.Round(amp * 32767 * math.Sin(w*float64(i))))
		r := int16(math.Round(amp * 32767 * math.Sin(w*float64(max(i-1, 0)))))
		b = le.AppendUint16(b, uint16(l))
		b = le.AppendUint16(b, uint16(r))
	}
	return b
}
