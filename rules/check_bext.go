package rules

import (
	"fmt"
	"math"
	"strings"
)

// checkBextLoudness compares the loudness a BWF file declares in its bext
// chunk (EBU Tech 3285 v2: LoudnessValue, LoudnessRange, MaxTruePeakLevel,
// MaxMomentaryLoudness, MaxShortTermLoudness) with the measurement; the two
// maxima are held to the integrated tolerance, as they are loudness values
// of the same meter. It applies when the file declares any of them or the
// spec requires them. Measured is the largest difference found, in LU or
// dB.
func checkBextLoudness(j *judge) (Check, bool) {
	b, m, lim := j.m.Bext, j.m, j.spec.Bext
	declared := b != nil && (b.LoudnessValue != nil || b.LoudnessRange != nil || b.MaxTruePeakLevel != nil ||
		b.MaxMomentaryLoudness != nil || b.MaxShortTermLoudness != nil)
	if !declared && !lim.Required || lim.Mismatch == PolicyAllow && !lim.Required {
		return Check{}, false
	}
	c := Check{ID: "bext_loudness", Unit: "LU", Limit: fmt.Sprintf("declared within ±%s LU (I, max M, max S), ±%s dB (true peak), ±%s LU (LRA) of measured",
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
	u := j.spec.Unit()
	fields := []field{
		{"integrated", u, b.LoudnessValue, m.IntegratedLUFS, lim.LoudnessToleranceLU},
		{"true peak", "dBTP", b.MaxTruePeakLevel, m.TruePeakDBTP, lim.TruePeakToleranceDB},
		{"loudness range", "LU", b.LoudnessRange, m.LoudnessRangeLU, lim.LRAToleranceLU},
		{"max momentary", u, b.MaxMomentaryLoudness, m.MaxMomentaryLUFS, lim.LoudnessToleranceLU},
		{"max short-term", u, b.MaxShortTermLoudness, m.MaxShortTermLUFS, lim.LoudnessToleranceLU},
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
		// The difference of the two figures as printed (two decimals), so
		// that it is their visible difference.
		d := math.Abs(float64(hundredths(*f.measured)-hundredths(*f.declared)) / 100)
		if d > worst {
			worst = d
		}
		if above(d, f.tol) {
			diff := "LU"
			if f.unit == "dBTP" {
				diff = "dB"
			}
			off = append(off, fmt.Sprintf("%s declared %s %s, measured %s %s (%s %s apart, tolerance ±%s %s)",
				f.what, signed(*f.declared, 2), f.unit, signed(*f.measured, 2), f.unit, exact(d), diff, magnitude(f.tol), diff))
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
