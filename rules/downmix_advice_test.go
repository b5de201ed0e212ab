package rules

import (
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
)

// surround51 is cleanStereo as a 5.1 file with a stereo fold-down.
func surround51(integrated, truePeak, downmixI, downmixTP float64) *measure.Measurement {
	m := cleanStereo(integrated, truePeak)
	m.Channels, m.ChannelLayout = 6, []string{"L", "R", "C", "LFE", "Ls", "Rs"}
	m.Signal.DCOffset = make([]float64, 6)
	m.StereoDownmix = &measure.Downmix{Method: measure.DownmixMethod, IntegratedLUFS: ptr(downmixI), TruePeakDBTP: ptr(downmixTP)}
	return m
}

// TestDownmixAdvice: ATSC A/85:2013 (-24 LKFS ±2 dB [desc], -2 dBTP
// [memory], surround also judged on the stereo fold-down [desc]). The
// advice must follow every failing check, the fold-down's included (issue
// 9: it used to say "no level change is needed").
func TestDownmixAdvice(t *testing.T) {
	s := mustLookup(t, "atsc-a85")
	tests := []struct {
		name     string
		m        *measure.Measurement
		gain     *float64
		limiter  *float64
		failing  []string
		contains []string
	}{
		{
			// File on target, fold-down 3.5 LU low: gains from +1.5 to +2.0
			// put both inside ±2; 0.2 LU clear of each edge leaves +1.7 to
			// +1.8, and +1.8 is nearest the fold-down's +3.5.
			name: "one gain fixes both", m: surround51(-24, -8, -27.5, -9),
			gain: ptr(1.8), failing: []string{"downmix_integrated"},
			contains: []string{"Raise the level by 1.8 dB: that puts the stereo fold-down at -25.7 LKFS and the file at -22.2 LKFS, both inside -24.0 LKFS ±2.0 LU.", hearingCaution},
		},
		{
			// Fold-down 6 LU below the file: no gain puts both within ±2.
			name: "no single gain", m: surround51(-24, -8, -30, -9),
			failing:  []string{"downmix_integrated"},
			contains: []string{"The stereo fold-down reads 6.0 LU quieter than the file itself (-30.0 against -24.0 LKFS), so no single gain puts both inside -24.0 LKFS ±2.0 LU: rebalance the mix"},
		},
		{
			// The fold-down's true peak -1.5 dBTP is 0.5 dB over -2 dBTP
			// although every channel's is under it.
			name: "fold-down true peak", m: surround51(-24, -4, -24.5, -1.5),
			limiter: ptr(0.5), failing: []string{"downmix_true_peak"},
			contains: []string{"The stereo fold-down would peak at -1.50 dBTP, 0.5 dB above the -2.0 dBTP ceiling"},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := Evaluate(s, tt.m)
			for _, id := range tt.failing {
				if c := mustCheck(t, r, id); c.Verdict != Fail {
					t.Errorf("%s: %+v, want fail", id, c)
				}
			}
			eqPtr(t, "gain", r.SuggestedGainDB, tt.gain)
			eqPtr(t, "limiter", r.LimiterReductionDB, tt.limiter)
			for _, want := range tt.contains {
				if !strings.Contains(r.Advice, want) {
					t.Errorf("advice %q\nlacks %q", r.Advice, want)
				}
			}
			if strings.Contains(r.Advice, "no change") || strings.Contains(r.Advice, "no level change") {
				t.Errorf("advice says no change while a check fails: %q", r.Advice)
			}
		})
	}
	// The fold-down's true peak is its own check, after the fold-down's
	// loudness, with the fold-down named in the limit.
	c := mustCheck(t, Evaluate(s, surround51(-24, -4, -24.5, -1.5)), "downmix_true_peak")
	if c.Limit != "≤ -2.0 dBTP (stereo fold-down)" || c.Reason != "stereo fold-down true peak -1.50 dBTP is 0.5 dB above the -2.0 dBTP ceiling" {
		t.Errorf("downmix_true_peak: %+v", c)
	}
}

// TestClippingAdvice: a gain cut or a limiter leaves clipping in (issue 9).
func TestClippingAdvice(t *testing.T) {
	m := cleanStereo(-18.74, -0.5) // EBU R 128: -23 ±1 LUFS [doc]
	m.Signal.ClippedSamples, m.Signal.ClipRuns, m.Signal.LongestClipRun = 40, 3, 12
	r := Evaluate(mustLookup(t, "ebu-r128"), m)
	if !strings.Contains(r.Advice, "Lowering the level does not remove the 3 clipping runs already in the file") {
		t.Errorf("advice %q", r.Advice)
	}
	m.Signal.ClipRuns = 0
	if r := Evaluate(mustLookup(t, "ebu-r128"), m); strings.Contains(r.Advice, "clipping") {
		t.Errorf("advice mentions clipping without clipping runs: %q", r.Advice)
	}
}
