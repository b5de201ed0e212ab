package rules_test

import (
	"context"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	_ "github.com/kweigh/kweigh/decode/wav"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// qcSpec sets an explicit limit for every signal-hygiene check, so a
// tripped check fails rather than warns. The limits are this test's own
// choice (common practice, no published source); what is tested is that a
// real signal made to trip each check does, and the clean one does not.
const qcSpec = `
name = "qc-e2e"
extends = "ebu-r128"
[timing]
max_leading_silence_s = 1.0
max_trailing_silence_s = 1.0
[signal]
max_clip_runs = 0
max_dc_offset_dbfs = -40.0
min_correlation = -0.2
dual_mono = "fail"
silent_channels = "fail"
`

const qcRate = 48000

// stereoWAV writes a 24-bit stereo WAV of the planar channels l and r.
func stereoWAV(t *testing.T, l, r []float64) string {
	t.Helper()
	data := make([]byte, 0, 6*len(l))
	for i := range l {
		for _, v := range []float64{l[i], r[i]} {
			q := int32(math.Round(math.Max(-1, math.Min(v, 8388607.0/8388608)) * 8388608))
			data = append(data, byte(q), byte(q>>8), byte(q>>16))
		}
	}
	h := []byte("RIFF\x00\x00\x00\x00WAVEfmt \x10\x00\x00\x00\x01\x00\x02\x00")
	h = binary.LittleEndian.AppendUint32(h, qcRate)
	h = binary.LittleEndian.AppendUint32(h, qcRate*6)
	h = append(h, 6, 0, 24, 0)
	h = append(h, "data"...)
	h = binary.LittleEndian.AppendUint32(h, uint32(len(data)))
	out := append(h, data...)
	binary.LittleEndian.PutUint32(out[4:], uint32(len(out)-8))
	path := filepath.Join(t.TempDir(), "qc.wav")
	if err := os.WriteFile(path, out, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// programmeLR is 10 s of two independent, band-limited noise channels at
// about -23 LUFS: a clean delivery that trips no hygiene check.
func programmeLR() (l, r []float64) {
	rng := rand.New(rand.NewPCG(42, 1))
	n := 10 * qcRate
	l, r = make([]float64, n), make([]float64, n)
	var a, b float64
	for i := 0; i < n; i++ {
		a += 0.2 * (rng.NormFloat64() - a)
		b += 0.2 * (rng.NormFloat64() - b)
		l[i], r[i] = 0.12*a, 0.12*b
	}
	return l, r
}

func TestSignalChecksOnRealSignals(t *testing.T) {
	spec, err := rules.Parse("qc-e2e.toml", []byte(qcSpec))
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name  string
		check string
		spoil func(l, r []float64) ([]float64, []float64)
	}{
		{"clipping", "clipping", func(l, r []float64) ([]float64, []float64) {
			for i := 20000; i < 20010; i++ { // ten consecutive full-scale samples
				l[i] = 1
			}
			return l, r
		}},
		{"dc offset", "dc_offset", func(l, r []float64) ([]float64, []float64) {
			for i := range l { // 0.02 of full scale = -34 dBFS of DC
				l[i] += 0.02
			}
			return l, r
		}},
		{"phase", "phase", func(l, r []float64) ([]float64, []float64) {
			for i := range r {
				r[i] = -l[i]
			}
			return l, r
		}},
		{"dual mono", "dual_mono", func(l, r []float64) ([]float64, []float64) {
			copy(r, l)
			return l, r
		}},
		{"silent channel", "silent_channels", func(l, r []float64) ([]float64, []float64) {
			clear(r)
			return l, r
		}},
		{"leading silence", "leading_silence", func(l, r []float64) ([]float64, []float64) {
			clear(l[:2*qcRate])
			clear(r[:2*qcRate])
			return l, r
		}},
		{"trailing silence", "trailing_silence", func(l, r []float64) ([]float64, []float64) {
			clear(l[len(l)-2*qcRate:])
			clear(r[len(r)-2*qcRate:])
			return l, r
		}},
	}
	cl, cr := programmeLR()
	clean := rules.Evaluate(spec, measure.File(context.Background(), stereoWAV(t, cl, cr), measure.Options{}))
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if v := verdictOf(clean, tc.check); v != rules.Pass {
				t.Errorf("clean programme: %s = %q, want pass", tc.check, v)
			}
			l, r := tc.spoil(programmeLR())
			res := rules.Evaluate(spec, measure.File(context.Background(), stereoWAV(t, l, r), measure.Options{}))
			if v := verdictOf(res, tc.check); v != rules.Fail {
				t.Errorf("%s: %s = %q, want fail; checks: %+v", tc.name, tc.check, v, res.Checks)
			}
		})
	}
}

// verdictOf returns the verdict of one check, or "" when it is absent.
func verdictOf(r rules.Result, id string) rules.Verdict {
	for _, c := range r.Checks {
		if c.ID == id {
			return c.Verdict
		}
	}
	return ""
}
