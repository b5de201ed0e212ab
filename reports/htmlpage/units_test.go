package htmlpage

import (
	"bytes"
	"strings"
	"testing"
	"time"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// TestPageLoudnessUnit: the page of a file judged against a spec that
// writes LKFS (ATSC A/85:2013 [desc]) prints LKFS in its figures, reasons
// and plot labels (issue 9).
func TestPageLoudnessUnit(t *testing.T) {
	spec, err := rules.Lookup("atsc-a85")
	if err != nil {
		t.Fatal(err)
	}
	v, tp, lra := -21.2, -4.0, 5.0
	m := &measure.Measurement{Path: "tv/promo.wav", Format: "wav", Channels: 2, SampleRateHz: 48000, BitsPerSample: 24, DurationS: 30,
		IntegratedLUFS: &v, TruePeakDBTP: &tp, LoudnessRangeLU: &lra, Notes: []string{},
		Signal: measure.Signal{SilentChannels: []string{}, DCOffset: []float64{0, 0}}}
	r := rules.Evaluate(spec, m)
	var b bytes.Buffer
	page := Page{Title: "units", Generated: time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC), Entries: []Entry{{Result: &r, Target: TargetFor(spec, m.Channels)}}}
	if err := Write(&b, page); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	// The footer says what is true about rounding: JSON is unrounded.
	if strings.Contains(out, "rounded as in kweigh's JSON") || !strings.Contains(out, "JSON output carries the unrounded measurements") {
		t.Errorf("footer misstates the rounding")
	}
	for _, want := range []string{"integrated -21.2 LKFS is 2.8 LU above the -24.0 LKFS target", `<span class="unit">LKFS</span>`} {
		if !strings.Contains(out, want) {
			t.Errorf("page lacks %q", want)
		}
	}
}
