package rules

import (
	"fmt"
	"strings"

	"github.com/kweigh/kweigh/measure"
)

// hearingCaution follows every advice that raises the level.
const hearingCaution = "Raising the level makes the file louder: check the result at a moderate listening level."

// advise works out the fix for loudness and peak failures:
//
//   - integrated loudness outside the tolerance (or window): the gain that
//     brings it to the target (the mono target for mono files; the middle of
//     a window, or its only bound), rounded to 0.1 dB;
//   - if the true peak after that gain would exceed the ceiling, the peak
//     reduction a true-peak limiter must make, rounded up to the next 0.1 dB
//     so that following the advice is enough;
//   - if only the true peak fails, the peak reduction alone (no gain);
//   - if the loudest short-term or momentary window would still exceed its
//     maximum after the gain, how much those passages must come down.
//
// Damaged files get "deliver again" advice and no figures.
func advise(s *Spec, m *measure.Measurement) (gain, limiter *float64, advice string) {
	if m.Damaged != "" {
		return nil, nil, "Deliver the file again: its audio is damaged, so no level fix is offered."
	}
	if u := m.Undeclared; u != nil && u.Seconds >= undeclaredFailS {
		return nil, nil, "Deliver the file again with a header that declares all of its audio: the figures cover only the declared part, so no level fix is offered."
	}
	for _, v := range []*float64{m.IntegratedLUFS, m.TruePeakDBTP, m.MaxShortTermLUFS, m.MaxMomentaryLUFS} {
		if v != nil && !finite(*v) {
			return nil, nil, "Measure the file again: its figures are not numbers, so no level fix is offered."
		}
	}
	var sentences []string
	g := 0.0
	lo, hi, aim, hasIntegrated := s.integratedWindow(m.Channels)
	if hasIntegrated && m.IntegratedLUFS == nil {
		sentences = append(sentences, "The file has no measurable programme loudness: check that the right audio was delivered.")
	}
	if hasIntegrated && m.IntegratedLUFS != nil {
		v := *m.IntegratedLUFS
		if (hi != nil && above(v, *hi)) || (lo != nil && below(v, *lo)) {
			g = round1(aim - v)
			if g == 0 { // a zero tolerance and a miss smaller than 0.05 LU
				g = round2(aim - v)
			}
			gain = ptr(g)
			verb := "Lower"
			if g > 0 {
				verb = "Raise"
			}
			sentences = append(sentences, fmt.Sprintf("%s the level by %s dB to reach %s LUFS.", verb, amount(abs(g)), num(aim, 1)))
		}
	}
	if ceiling := s.Loudness.MaxTruePeakDBTP; ceiling != nil && m.TruePeakDBTP != nil {
		after := *m.TruePeakDBTP + g
		if above(after, *ceiling) {
			r := ceil1(after - *ceiling)
			limiter = ptr(r)
			if gain != nil {
				sentences = append(sentences, fmt.Sprintf("That would put the true peak at %s dBTP, so a true-peak limiter must take the peaks down by a further %s dB to stay at or below %s dBTP.",
					signed(after, 1), num(r, 1), num(*ceiling, 1)))
			} else {
				sentences = append(sentences, fmt.Sprintf("Reduce the peaks by %s dB with a true-peak limiter to stay at or below %s dBTP; no level change is needed.",
					num(r, 1), num(*ceiling, 1)))
			}
		}
	}
	sentences = append(sentences, passageAdvice("short-term", "3 s", s.Loudness.MaxShortTermLUFS, m.MaxShortTermLUFS, g)...)
	sentences = append(sentences, passageAdvice("momentary", "400 ms", s.Loudness.MaxMomentaryLUFS, m.MaxMomentaryLUFS, g)...)
	if gain != nil && g > 0 {
		sentences = append(sentences, hearingCaution)
	}
	return gain, limiter, strings.Join(sentences, " ")
}

// passageAdvice says how far the loudest passages must come down when a
// maximum short-term or momentary loudness would still be exceeded after
// the gain g.
func passageAdvice(kind, window string, limit, value *float64, g float64) []string {
	if limit == nil || value == nil {
		return nil
	}
	after := *value + g
	if !above(after, *limit) {
		return nil
	}
	still := ""
	if g != 0 {
		still = " even after that gain"
	}
	return []string{fmt.Sprintf("The loudest %s passages would reach %s LUFS%s: bring them down by %s dB (compression or level riding) to keep %s loudness at or below %s LUFS.",
		window, num(after, 1), still, num(ceil1(after-*limit), 1), kind, num(*limit, 1))}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
