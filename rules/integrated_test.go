package rules

import (
	"strings"
	"testing"
)

// TestIntegratedEdges puts integrated loudness exactly on each edge of every
// built-in tolerance (must not fail) and 0.05 LU beyond it (must fail). The
// edges follow from the SOURCES.md §4 rows tested in TestBuiltinValues;
// the comparison rule (round both sides to 0.01) is the package's own, and
// "exactly on the edge" is computed the way a user would type it (e.g.
// -23 + 0.2), so float noise is part of the test.
func TestIntegratedEdges(t *testing.T) {
	for _, id := range BuiltinIDs() {
		s := mustLookup(t, id)
		lo, hi, _, _ := s.integratedWindow(2)
		edges := []struct {
			name   string
			value  float64
			margin float64
			want   Verdict
		}{
			{"upper edge, no margin", *hi, 0, Pass},
			{"lower edge, no margin", *lo, 0, Pass},
			{"upper edge, 0.2 LU margin", *hi, 0.2, Warn},
			{"lower edge, 0.2 LU margin", *lo, 0.2, Warn},
			{"0.05 LU above", *hi + 0.05, 0, Fail},
			{"0.05 LU below", *lo - 0.05, 0, Fail},
			{"0.01 LU above", *hi + 0.01, 0, Fail},
		}
		for _, e := range edges {
			s := s.Clone()
			s.Loudness.WarnMarginLU = e.margin
			r := Evaluate(s, cleanStereo(e.value, -10))
			c := mustCheck(t, r, "integrated")
			if c.Verdict != e.want {
				t.Errorf("%s %s (%.4f LUFS): %s, want %s (%s)", id, e.name, e.value, c.Verdict, e.want, c.Reason)
			}
		}
	}
}

// TestIntegratedFloatEdges: edges whose float sum is not exact.
func TestIntegratedFloatEdges(t *testing.T) {
	s := mustLookup(t, "ebu-r128-qc")
	// -23 + 0.2 = -22.799999999999997 in float64; -22.8 parsed is -22.8.
	// EBU R 128 v4.0 (2020) QC tolerance ±0.2 LU [doc]: both are on the edge.
	for _, v := range []float64{-23 + 0.2, -22.8, -23 - 0.2, -23.2} {
		if c := mustCheck(t, Evaluate(s, cleanStereo(v, -10)), "integrated"); c.Verdict != Pass {
			t.Errorf("%v: %s (%s), want pass", v, c.Verdict, c.Reason)
		}
	}
	for _, v := range []float64{-22.75, -23.25} {
		if c := mustCheck(t, Evaluate(s, cleanStereo(v, -10)), "integrated"); c.Verdict != Fail {
			t.Errorf("%v: %s (%s), want fail", v, c.Verdict, c.Reason)
		}
	}
}

func TestIntegratedReasons(t *testing.T) {
	s := mustLookup(t, "ebu-r128")
	tests := []struct {
		integrated float64
		verdict    Verdict
		reason     string
	}{
		// EBU R 128 v4.0 (2020): -23.0 LUFS ±1.0 LU [doc]; kweigh margin 0.2 LU.
		{-18.7, Fail, "integrated -18.7 LUFS is 4.3 LU above the -23.0 LUFS target (tolerance ±1.0 LU)"},
		{-23.4, Pass, "integrated -23.4 LUFS is 0.4 LU below the -23.0 LUFS target, within ±1.0 LU"},
		{-23.0, Pass, "integrated -23.0 LUFS is on the -23.0 LUFS target"},
		{-22.1, Warn, "integrated -22.1 LUFS is 0.9 LU above the -23.0 LUFS target: inside ±1.0 LU but within 0.2 LU of the edge"},
		// -21.96 prints as -22.0 with one decimal, the edge itself, so two decimals.
		{-21.96, Fail, "integrated -21.96 LUFS is 1.04 LU above the -23.0 LUFS target (tolerance ±1.0 LU)"},
	}
	for _, tt := range tests {
		r := Evaluate(s, cleanStereo(tt.integrated, -10))
		c := mustCheck(t, r, "integrated")
		if c.Verdict != tt.verdict || c.Reason != tt.reason {
			t.Errorf("%v: %s %q\nwant %s %q", tt.integrated, c.Verdict, c.Reason, tt.verdict, tt.reason)
		}
		if c.Limit != "-23.0 LUFS ±1.0 LU" || c.Unit != "LUFS" || c.Measured != tt.integrated {
			t.Errorf("%v: limit %q unit %q measured %v", tt.integrated, c.Limit, c.Unit, c.Measured)
		}
	}
}

func TestIntegratedWindow(t *testing.T) {
	s := mustLookup(t, "aes-td1004") // AES TD1004 (2015): -20 to -16 LUFS [desc]
	tests := []struct {
		integrated float64
		verdict    Verdict
		reason     string
	}{
		{-14.2, Fail, "integrated -14.2 LUFS is 1.8 LU above the -16.0 LUFS maximum"},
		{-21.0, Fail, "integrated -21.0 LUFS is 1.0 LU below the -20.0 LUFS minimum"},
		{-18.0, Pass, "integrated -18.0 LUFS is inside the window"},
		{-16.1, Warn, "integrated -16.1 LUFS is inside the window but within 0.2 LU of its -16.0 LUFS maximum"},
	}
	for _, tt := range tests {
		c := mustCheck(t, Evaluate(s, cleanStereo(tt.integrated, -10)), "integrated")
		if c.Verdict != tt.verdict || c.Reason != tt.reason || c.Limit != "-20.0 to -16.0 LUFS" {
			t.Errorf("%v: %s %q %q\nwant %s %q", tt.integrated, c.Verdict, c.Reason, c.Limit, tt.verdict, tt.reason)
		}
	}
}

// TestMonoTarget: podcast practice is -16 LUFS stereo, -19 LUFS mono ±1 LU
// (common practice, no published source).
func TestMonoTarget(t *testing.T) {
	s := mustLookup(t, "podcast")
	mono := Evaluate(s, cleanMono(-19, -6))
	if c := mustCheck(t, mono, "integrated"); c.Verdict != Pass || c.Limit != "-19.0 LUFS ±1.0 LU (mono)" ||
		!strings.Contains(c.Reason, "mono target") {
		t.Errorf("mono file at -19 LUFS: %+v", c)
	}
	stereo := Evaluate(s, cleanStereo(-19, -6))
	if c := mustCheck(t, stereo, "integrated"); c.Verdict != Fail || c.Limit != "-16.0 LUFS ±1.0 LU" {
		t.Errorf("stereo file at -19 LUFS: %+v", c)
	}
	// Gain to the stereo target: -16 - (-19) = +3.0 dB.
	if stereo.SuggestedGainDB == nil || *stereo.SuggestedGainDB != 3.0 {
		t.Errorf("stereo gain = %v, want +3.0", deref(stereo.SuggestedGainDB))
	}
	// A mono file under a spec without a mono target uses the main target:
	// EBU R 128 -23 LUFS [doc].
	if c := mustCheck(t, Evaluate(mustLookup(t, "ebu-r128"), cleanMono(-23, -6)), "integrated"); c.Verdict != Pass || c.Limit != "-23.0 LUFS ±1.0 LU" {
		t.Errorf("mono file under ebu-r128: %+v", c)
	}
}

func TestIntegratedUndefined(t *testing.T) {
	m := cleanStereo(-23, -10)
	m.IntegratedLUFS = nil
	r := Evaluate(mustLookup(t, "ebu-r128"), m)
	c := mustCheck(t, r, "integrated")
	if c.Verdict != Fail || c.Measured != nil || !strings.Contains(c.Reason, "undefined") {
		t.Errorf("undefined integrated: %+v", c)
	}
	if r.SuggestedGainDB != nil || !strings.Contains(r.Advice, "no measurable programme loudness") {
		t.Errorf("advice for undefined integrated: gain %v, %q", deref(r.SuggestedGainDB), r.Advice)
	}
}

func TestMaximaChecks(t *testing.T) {
	s := mustLookup(t, "ebu-r128-s1") // EBU R 128 s1 (2016): max S ≤ -18 LUFS [desc], TP -1 dBTP [desc]
	m := cleanStereo(-23, 0.4)
	m.MaxShortTermLUFS = ptr(-16.2)
	r := Evaluate(s, m)
	tp := mustCheck(t, r, "true_peak")
	if tp.Verdict != Fail || tp.Reason != "true peak +0.40 dBTP is 1.4 dB above the -1.0 dBTP ceiling" || tp.Limit != "≤ -1.0 dBTP" {
		t.Errorf("true peak: %+v", tp)
	}
	st := mustCheck(t, r, "max_short_term")
	if st.Verdict != Fail || st.Reason != "loudest 3 s window (short-term) -16.2 LUFS is 1.8 LU above the -18.0 LUFS maximum" {
		t.Errorf("short-term: %+v", st)
	}
	m = cleanStereo(-23, -1.0)
	m.MaxShortTermLUFS = ptr(-18.0)
	r = Evaluate(s, m)
	if c := mustCheck(t, r, "true_peak"); c.Verdict != Pass || c.Reason != "true peak -1.00 dBTP is at the -1.0 dBTP ceiling" {
		t.Errorf("true peak at ceiling: %+v", c)
	}
	if c := mustCheck(t, r, "max_short_term"); c.Verdict != Pass {
		t.Errorf("short-term at limit: %+v", c)
	}
	// -0.95 dBTP is 0.05 dB over the -1 dBTP ceiling.
	if c := mustCheck(t, Evaluate(s, cleanStereo(-23, -0.95)), "true_peak"); c.Verdict != Fail || c.Reason != "true peak -0.95 dBTP is 0.05 dB above the -1.0 dBTP ceiling" {
		t.Errorf("true peak 0.05 over: %+v", c)
	}
	// Digital silence has no true peak: nothing to exceed.
	m = cleanStereo(-23, -10)
	m.TruePeakDBTP = nil
	if c := mustCheck(t, Evaluate(s, m), "true_peak"); c.Verdict != Pass || c.Measured != nil {
		t.Errorf("undefined true peak: %+v", c)
	}
	// Momentary: a user limit, 0.05 LU beyond fails.
	u := s.Clone()
	u.Loudness.MaxMomentaryLUFS = ptr(-14.0)
	m = cleanStereo(-23, -3)
	m.MaxMomentaryLUFS = ptr(-13.95)
	if c := mustCheck(t, Evaluate(u, m), "max_momentary"); c.Verdict != Fail {
		t.Errorf("momentary 0.05 over: %+v", c)
	}
	if _, ok := findCheck(Evaluate(s, m), "max_momentary"); ok {
		t.Error("max_momentary checked although the spec sets no limit")
	}
}

func TestLoudnessRange(t *testing.T) {
	s := mustLookup(t, "ebu-r128")
	if _, ok := findCheck(Evaluate(s, cleanStereo(-23, -3)), "loudness_range"); ok {
		t.Error("EBU R 128 treats LRA as a descriptor [desc]: no LRA check expected")
	}
	s.Loudness.MinLRALU, s.Loudness.MaxLRALU = ptr(4.0), ptr(15.0)
	m := cleanStereo(-23, -3)
	for _, tt := range []struct {
		lra      float64
		advisory bool
		want     Verdict
	}{
		{15.0, false, Pass}, {15.05, false, Fail}, {15.05, true, Warn}, {3.95, false, Fail}, {3.95, true, Warn}, {4.0, false, Pass}, {8, true, Pass},
	} {
		s.Loudness.LRAAdvisory = tt.advisory
		m.LoudnessRangeLU = ptr(tt.lra)
		if c := mustCheck(t, Evaluate(s, m), "loudness_range"); c.Verdict != tt.want {
			t.Errorf("LRA %v advisory %v: %s (%s), want %s", tt.lra, tt.advisory, c.Verdict, c.Reason, tt.want)
		}
	}
}
