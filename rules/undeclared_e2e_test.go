package rules_test

import (
	"bytes"
	"context"
	"encoding/binary"
	"os"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// TestHeaderDeclaringHalfFails: a 20 s WAV whose data and RIFF sizes
// declare only its first 10 s (on target), with a second half 18 dB too
// loud behind them, must not pass: the measurement notes the undeclared
// 10 s and the integrity check fails, with no level advice. A few hundred
// stray bytes only warn; the honest file passes.
func TestHeaderDeclaringHalfFails(t *testing.T) {
	l, r := programmeLR()
	l2, r2 := programmeLR()
	for i := range l2 {
		l2[i], r2[i] = 8*l2[i], 8*r2[i] // +18 dB
	}
	honest := stereoWAV(t, l, r)
	clean, err := os.ReadFile(honest)
	if err != nil {
		t.Fatal(err)
	}
	whole, err := os.ReadFile(stereoWAV(t, append(l, l2...), append(r, r2...)))
	if err != nil {
		t.Fatal(err)
	}
	declared := uint32(len(clean) - 44) // the first 10 s
	lying := bytes.Clone(whole)
	binary.LittleEndian.PutUint32(lying[40:], declared)
	binary.LittleEndian.PutUint32(lying[4:], 36+declared)
	padded := append(bytes.Clone(clean), bytes.Repeat([]byte{0x55}, 600)...)

	spec := mustParse(t, "r128.toml", `extends = "ebu-r128"`)
	for _, tc := range []struct {
		name    string
		data    []byte
		verdict rules.Verdict
		note    string
	}{
		{"lying header", lying, rules.Fail, "the header declares 10.0 s but 10.0 s more audio-like data follows"},
		{"600 stray bytes", padded, rules.Warn, "the header declares 10.0 s but 600 more bytes follow the audio from byte 2880044"},
		{"honest", clean, rules.Pass, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := t.TempDir() + "/delivery.wav"
			if err := os.WriteFile(path, tc.data, 0o644); err != nil {
				t.Fatal(err)
			}
			m := measure.File(context.Background(), path, measure.Options{})
			if m.Error != "" {
				t.Fatal(m.Error)
			}
			notes := strings.Join(m.Notes, "; ")
			if tc.note != "" && !strings.Contains(notes, tc.note) || tc.note == "" && m.Undeclared != nil {
				t.Errorf("notes %q, undeclared %+v; want %q", notes, m.Undeclared, tc.note)
			}
			res := rules.Evaluate(spec, m)
			var integrity rules.Check
			for _, c := range res.Checks {
				if c.ID == "integrity" {
					integrity = c
				}
			}
			if integrity.Verdict != tc.verdict {
				t.Errorf("integrity %s (%s), want %s", integrity.Verdict, integrity.Reason, tc.verdict)
			}
			if tc.verdict == rules.Fail && (res.Verdict != rules.Fail || res.SuggestedGainDB != nil || !strings.Contains(integrity.Reason, "10.0 s more audio-like data")) {
				t.Errorf("file verdict %s, gain %v, reason %q", res.Verdict, res.SuggestedGainDB, integrity.Reason)
			}
		})
	}
}

func mustParse(t *testing.T, name, doc string) *rules.Spec {
	t.Helper()
	s, err := rules.Parse(name, []byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	return s
}
