package reports

import (
	"bytes"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// TestLoudnessUnitFollowsSpec: a spec whose document writes LKFS (ATSC
// A/85:2013 [desc]) gets LKFS in the text report, and the JSON keeps its
// _lufs keys with the spec's word beside them (issue 9).
func TestLoudnessUnitFollowsSpec(t *testing.T) {
	spec, err := rules.Lookup("atsc-a85")
	if err != nil {
		t.Fatal(err)
	}
	v, tp := -21.2, -4.0
	m := &measure.Measurement{Path: "tv/promo.wav", Format: "wav", Channels: 2, SampleRateHz: 48000, BitsPerSample: 24,
		IntegratedLUFS: &v, TruePeakDBTP: &tp, Notes: []string{}, Signal: measure.Signal{SilentChannels: []string{}, DCOffset: []float64{0, 0}}}
	r := rules.Evaluate(spec, m)
	for _, f := range []Format{Text, JSON} {
		var b bytes.Buffer
		w, err := NewCheckWriter(&b, f, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if err := w.Write(&r); err != nil {
			t.Fatal(err)
		}
		if err := w.Close(Summary{}); err != nil {
			t.Fatal(err)
		}
		out := b.String()
		switch f {
		case Text:
			for _, want := range []string{"integrated -21.2 LKFS", "limit -24.0 LKFS ±2.0 LU", "to reach -24.0 LKFS"} {
				if !strings.Contains(out, want) {
					t.Errorf("text lacks %q:\n%s", want, out)
				}
			}
			if strings.Contains(out, "LUFS") {
				t.Errorf("text still says LUFS for an LKFS spec:\n%s", out)
			}
		case JSON:
			if !strings.Contains(out, `"integrated_lufs": -21.2`) || !strings.Contains(out, `"loudness_unit": "LKFS"`) {
				t.Errorf("JSON keys or unit wrong:\n%s", out)
			}
		}
	}
}

// TestCheckTextShowsNotes: the check report shows the notes that measure
// and JSON show, such as a decoder's own findings (issue 9).
func TestCheckTextShowsNotes(t *testing.T) {
	spec, err := rules.Lookup("podcast")
	if err != nil {
		t.Fatal(err)
	}
	v, tp := -16.0, -1.5
	m := &measure.Measurement{Path: "pod/ep1.mp3", Format: "mp3", Channels: 2, SampleRateHz: 44100,
		IntegratedLUFS: &v, TruePeakDBTP: &tp, Signal: measure.Signal{SilentChannels: []string{}, DCOffset: []float64{0, 0}},
		Notes: []string{"decoder clipped 21 samples at full scale while decoding"}}
	r := rules.Evaluate(spec, m)
	var b bytes.Buffer
	w, err := NewCheckWriter(&b, Text, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Write(&r); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(Summary{}); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "note: decoder clipped 21 samples at full scale while decoding") {
		t.Errorf("check text drops the decoder note:\n%s", b.String())
	}
}

// TestLossyBitDepth: a lossy file has no bit depth: "—" in text, an empty
// cell in CSV, null in JSON (issue 9); its bit-rate mode and tags show in
// the stream line.
func TestLossyBitDepth(t *testing.T) {
	v := -16.0
	m := &measure.Measurement{Path: "pod/ep2.mp3", Format: "mp3", Codec: "mpeg-1 layer 3", SampleFormat: "int", Channels: 2, SampleRateHz: 44100,
		BitRateKbps: 128, BitRateMode: "cbr", Mode: "joint stereo", Tags: []string{"id3v2.4"},
		IntegratedLUFS: &v, Signal: measure.Signal{SilentChannels: []string{}, DCOffset: []float64{0, 0}}, Notes: []string{}}
	if got, want := streamText(m), "mp3, mpeg-1 layer 3, — bits, 128 kbps CBR, joint stereo, 44100 Hz, 2 channels, tags id3v2.4"; got != want {
		t.Errorf("stream text %q, want %q", got, want)
	}
	for f, want := range map[Format]string{CSV: ",2,L;R,,int,", JSON: `"bits_per_sample": null`} {
		m.ChannelLayout = []string{"L", "R"}
		var b bytes.Buffer
		w, err := NewMeasureWriter(&b, f, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if err := w.Write(m); err != nil {
			t.Fatal(err)
		}
		if err := w.Close(Summary{}); err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(b.String(), want) {
			t.Errorf("%s lacks %q:\n%s", f, want, b.String())
		}
	}
}

// TestLimiterWording: the limiter line says "after that gain" only when a
// gain was suggested (issue 9).
func TestLimiterWording(t *testing.T) {
	r128, err := rules.Lookup("ebu-r128")
	if err != nil {
		t.Fatal(err)
	}
	text := func(v, tp float64) string {
		m := &measure.Measurement{Path: "x.wav", Format: "wav", Channels: 2, SampleRateHz: 48000, BitsPerSample: 24,
			IntegratedLUFS: &v, TruePeakDBTP: &tp, Notes: []string{}, Signal: measure.Signal{SilentChannels: []string{}, DCOffset: []float64{0, 0}}}
		r := rules.Evaluate(r128, m)
		var b bytes.Buffer
		w, err := NewCheckWriter(&b, Text, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if err := w.Write(&r); err != nil {
			t.Fatal(err)
		}
		if err := w.Close(Summary{}); err != nil {
			t.Fatal(err)
		}
		return b.String()
	}
	// EBU R 128: -23 LUFS ±1 [doc], -1 dBTP [desc]. On target with TP
	// +0.23: a limiter alone, 1.23 dB.
	if out := text(-23, 0.23); !strings.Contains(out, "limiter needed: 1.23 dB of true-peak reduction, with no change of level") || strings.Contains(out, "after that gain") {
		t.Errorf("limiter without gain:\n%s", out)
	}
	// 4.0 dB quiet with TP -2.0: +4.0 dB, then TP +2.00, 3.0 dB over.
	if out := text(-27, -2); !strings.Contains(out, "gain +4.0 dB suggested") || !strings.Contains(out, "limiter needed: 3.0 dB of true-peak reduction after that gain") {
		t.Errorf("limiter after gain:\n%s", out)
	}
}
