package rules

import (
	"fmt"
	"math"
	"strings"
)

// checkBextLoudness compares the loudness a BWF file declares in its bext
// chunk (EBU Tech 3285 v2: LoudnessValue, LoudnessRange, MaxTruePeakLevel)
// with the measurement. It applies when the file declares any of them or the
// spec requires them. Measured is the largest difference found, in LU or
// dB.
func checkBextLoudness(j *judge) (Check, bool) {
	b, m, lim := j.m.Bext, j.m, j.spec.Bext
	declared := b != nil && (b.LoudnessValue != nil || b.LoudnessRange != nil || b.MaxTruePeakLevel != nil)
	if !declared && !lim.Required || lim.Mismatch == PolicyAllow && !lim.Required {
		return Check{}, false
	}
	c := Check{ID: "bext_loudness", Unit: "LU", Limit: fmt.Sprintf("declared within ±%s LU (I), ±%s dB (true peak), ±%s LU (LRA) of measured",
		magnitude(lim.LoudnessToleranceLU), magnitude(lim.TruePeakToleranceDB), magnitude(lim.LRAToleranceLU))}
	if lim.Required {
		c.Limit = "present; " + c.Limit
	} else if lim.Mismatch == "" {
		c.Limit += qcSuffix
	}
	if !declared || (lim.Required && b.LoudnessValue == nil) {
		c.Verdict = Fail
		c.Reason = "the spec requires bext loudness metadata (EBU Tech 3285 v2 LoudnessValue) and the file declares none"
		return c, true
	}
	type field struct {
		what, unit         string
		declared, measured *float64
		tol                float64
	}
	fields := []field{
		{"integrated", "LUFS", b.LoudnessValue, m.IntegratedLUFS, lim.LoudnessToleranceLU},
		{"true peak", "dBTP", b.MaxTruePeakLevel, m.TruePeakDBTP, lim.TruePeakToleranceDB},
		{"loudness range", "LU", b.LoudnessRange, m.LoudnessRangeLU, lim.LRAToleranceLU},
	}
	var worst float64
	var off, ok []string
	for _, f := range fields {
		if f.declared == nil {
			continue
		}
		if f.measured == nil {
			off = append(off, fmt.Sprintf("%s declared %s %s but undefined in the audio", f.what, signed(*f.declared, 1), f.unit))
			continue
		}
		if notFinite(&c, *f.measured, "measured "+f.what) {
			return c, true
		}
		d := math.Abs(*f.measured - *f.declared)
		if d > worst {
			worst = d
		}
		if above(d, f.tol) {
			off = append(off, fmt.Sprintf("%s declared %s %s, measured %s %s (%s apart, tolerance ±%s)",
				f.what, signed(*f.declared, 2), f.unit, signed(*f.measured, 2), f.unit, near(d, f.tol), magnitude(f.tol)))
		} else {
			ok = append(ok, f.what)
		}
	}
	c.Measured = round2(worst)
	if len(off) > 0 {
		c.Verdict = policyVerdict(policyOrWarn(lim.Mismatch))
		c.Reason = "bext metadata disagrees with the audio: " + strings.Join(off, "; ")
		return c, true
	}
	c.Verdict = Pass
	c.Reason = "bext " + strings.Join(ok, ", ") + " agree with the measurement"
	return c, true
}
