package rules

import (
	"fmt"
	"math"
	"strings"

	"github.com/kweigh/kweigh/measure"
)

// hearingCaution follows every advice that raises the level.
const hearingCaution = "Raising the level makes the file louder: check the result at a moderate listening level."

// advise works out the fix for loudness and peak failures. Every figure it
// states is derived from the figures the checks' reasons print (see
// integratedShown and maximumShown), in hundredths of a dB, so a reason, the
// gain and the limiter reduction shown together always agree:
//
//   - integrated loudness outside the tolerance (or window): the gain that
//     brings the printed value to the target (the mono target for mono
//     files; the middle of a window, or its only bound);
//   - a surround file whose stereo fold-down is judged too (ATSC A/85): a
//     gain that puts both inside the limit when one exists, or else a word
//     that the mix itself needs rebalancing;
//   - if the true peak (or the fold-down's) after that gain would exceed
//     the ceiling, the peak reduction a true-peak limiter must make, to
//     0.01 dB (the resolution kweigh judges at, so following it is enough);
//   - if only the true peak fails, the peak reduction alone (no gain);
//   - if the loudest short-term or momentary window would still exceed its
//     maximum after the gain, how much those passages must come down;
//   - a cut or a limiter does not undo clipping already in the file: when
//     the file has clipping runs, the advice says so.
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
	a := adviser{s: s, m: m, u: s.Unit()}
	a.loudness()
	a.downmix()
	a.say(a.gainSentence())
	if a.gain != 0 || a.gainSet {
		gain = ptr(float64(a.gain) / 100)
	}
	if r := a.peaks(); r > 0 {
		limiter = ptr(float64(r) / 100)
	}
	a.say(passageAdvice("short-term", "3 s", a.u, s.Loudness.MaxShortTermLUFS, m.MaxShortTermLUFS, a.gain)...)
	a.say(passageAdvice("momentary", "400 ms", a.u, s.Loudness.MaxMomentaryLUFS, m.MaxMomentaryLUFS, a.gain)...)
	if runs := m.Signal.ClipRuns; runs > 0 && (a.gain < 0 || limiter != nil) {
		how := "Lowering the level"
		if a.gain >= 0 {
			how = "Limiting the peaks"
		}
		a.say(fmt.Sprintf("%s does not remove the %s already in the file: the flattened peaks stay flattened, so repair them or go back to an unclipped source.",
			how, plural(int(runs), "clipping run")))
	}
	if a.gain > 0 {
		a.say(hearingCaution)
	}
	return gain, limiter, strings.Join(a.sentences, " ")
}

// adviser collects the advice for one file. Figures are in hundredths of a
// dB (or LU), the resolution of every comparison in this package.
type adviser struct {
	s         *Spec
	m         *measure.Measurement
	u         string // loudness unit
	sentences []string

	gain    int64 // the suggested gain
	gainSet bool  // a gain was suggested (even one that rounds to zero)
	// loudnessOK: the spec judges integrated loudness and the file (and
	// its fold-down, when judged) meets it with the suggested gain.
	loudnessOK bool
	fileShown  *int64 // the file's integrated loudness as printed
	aim        float64
	// bothAt holds the fold-down's and the file's loudness after a gain
	// chosen to put both inside the limit.
	bothAt *[2]int64
}

func (a *adviser) say(s ...string) {
	for _, x := range s {
		if x != "" {
			a.sentences = append(a.sentences, x)
		}
	}
}

// plural writes n and noun, with an s when n is not 1.
func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// loudness suggests the gain that brings the file's integrated loudness to
// its aim.
func (a *adviser) loudness() {
	s, m := a.s, a.m
	lo, hi, aim, ok := s.integratedWindow(m.Channels)
	if !ok {
		return
	}
	if m.IntegratedLUFS == nil {
		a.say("The file has no measurable programme loudness: check that the right audio was delivered.")
		return
	}
	v := *m.IntegratedLUFS
	vs, _ := s.integratedShown(v, m.Channels)
	q := hundredths(vs)
	a.fileShown = &q
	a.loudnessOK = true
	if (hi != nil && above(v, *hi)) || (lo != nil && below(v, *lo)) {
		a.gain, a.gainSet = hundredths(aim)-q, true
		a.aim = aim
	}
}

// gainSentence words the suggested gain, if any.
func (a *adviser) gainSentence() string {
	if !a.gainSet {
		return ""
	}
	verb := "Lower"
	if a.gain > 0 {
		verb = "Raise"
	}
	by := exact(abs(float64(a.gain) / 100))
	if a.bothAt != nil {
		return fmt.Sprintf("%s the level by %s dB: that puts the stereo fold-down at %s %s and the file at %s %s, both inside %s.",
			verb, by, exact(float64(a.bothAt[0])/100), a.u, exact(float64(a.bothAt[1])/100), a.u, a.s.integratedLimit(2))
	}
	return fmt.Sprintf("%s the level by %s dB to reach %s %s.", verb, by, limitNum(a.aim), a.u)
}

// inside reports whether x (hundredths) lies within lo … hi.
func inside(x int64, lo, hi *float64) bool {
	return (lo == nil || x >= hundredths(*lo)) && (hi == nil || x <= hundredths(*hi))
}

// downmix looks at the stereo fold-down of a surround file, for specs that
// judge it: the same gain moves file and fold-down alike, so when the gain
// for the file leaves the fold-down outside the limit, the gain that puts
// both inside is suggested instead, or, when there is none, a rebalanced
// mix.
func (a *adviser) downmix() {
	s, m := a.s, a.m
	if !s.Loudness.CheckDownmix || m.StereoDownmix == nil || m.StereoDownmix.IntegratedLUFS == nil {
		return
	}
	lo2, hi2, aim2, ok := s.integratedWindow(2)
	if !ok {
		return
	}
	ds, _ := s.integratedShown(*m.StereoDownmix.IntegratedLUFS, 2)
	d := hundredths(ds)
	if inside(d+a.gain, lo2, hi2) {
		return
	}
	a.loudnessOK = false
	// Gains that put the fold-down inside its limit…
	gLo, gHi := int64(math.MinInt64/2), int64(math.MaxInt64/2)
	if lo2 != nil {
		gLo = hundredths(*lo2) - d
	}
	if hi2 != nil {
		gHi = hundredths(*hi2) - d
	}
	// …and the file inside its own.
	lo, hi, _, _ := s.integratedWindow(m.Channels)
	if a.fileShown != nil {
		if lo != nil {
			gLo = max(gLo, hundredths(*lo)-*a.fileShown)
		}
		if hi != nil {
			gHi = min(gHi, hundredths(*hi)-*a.fileShown)
		}
	}
	limit := s.integratedLimit(2)
	if a.fileShown == nil || gLo > gHi {
		side := "louder"
		gap := d - 0
		if a.fileShown != nil {
			gap = d - *a.fileShown
		}
		if gap < 0 {
			side, gap = "quieter", -gap
		}
		a.say(fmt.Sprintf("The stereo fold-down reads %s LU %s than the file itself (%s against %s %s), so no single gain puts both inside %s: rebalance the mix (centre and surrounds against the front pair) or deliver a stereo mix made for it.",
			exact(float64(gap)/100), side, exact(float64(d)/100), exact(float64(*a.fileShownOr(d))/100), a.u, limit))
		return
	}
	// Keep both clear of the near-edge warning when the room allows.
	if m := hundredths(s.Loudness.WarnMarginLU); gLo+m <= gHi-m {
		gLo, gHi = gLo+m, gHi-m
	}
	// The gain nearest to the one that brings the fold-down to its aim.
	g := min(max(hundredths(aim2)-d, gLo), gHi)
	a.gain, a.gainSet = g, true
	a.loudnessOK = true
	a.bothAt = &[2]int64{d + g, *a.fileShown + g}
}

// fileShownOr returns the file's printed integrated loudness, or def.
func (a *adviser) fileShownOr(def int64) *int64 {
	if a.fileShown != nil {
		return a.fileShown
	}
	return &def
}

// peaks adds the limiter advice for the file's true peak and its
// fold-down's after the suggested gain, and returns the larger reduction
// (hundredths of a dB; 0 for none).
func (a *adviser) peaks() int64 {
	s, m := a.s, a.m
	ceiling := s.Loudness.MaxTruePeakDBTP
	if ceiling == nil {
		return 0
	}
	c := hundredths(*ceiling)
	var worst int64
	if m.TruePeakDBTP != nil {
		after := hundredths(*m.TruePeakDBTP) + a.gain
		if r := after - c; r > 0 {
			worst = r
			switch {
			case a.gainSet:
				a.say(fmt.Sprintf("That would put the true peak at %s dBTP, so a true-peak limiter must take the peaks down by a further %s dB to stay at or below %s dBTP.",
					signed(float64(after)/100, 2), exact(float64(r)/100), limitNum(*ceiling)))
			case a.loudnessOK:
				a.say(fmt.Sprintf("Reduce the peaks by %s dB with a true-peak limiter to stay at or below %s dBTP; the loudness needs no change.",
					exact(float64(r)/100), limitNum(*ceiling)))
			default:
				a.say(fmt.Sprintf("Reduce the peaks by %s dB with a true-peak limiter to stay at or below %s dBTP.",
					exact(float64(r)/100), limitNum(*ceiling)))
			}
		}
	}
	if s.Loudness.CheckDownmix && m.StereoDownmix != nil && m.StereoDownmix.TruePeakDBTP != nil {
		after := hundredths(*m.StereoDownmix.TruePeakDBTP) + a.gain
		if r := after - c; r > 0 {
			worst = max(worst, r)
			when := ""
			if a.gainSet {
				when = " after that gain"
			}
			a.say(fmt.Sprintf("The stereo fold-down would peak at %s dBTP%s, %s dB above the %s dBTP ceiling: limit the mix while watching the fold-down's true peak, which adds channels together and can peak higher than any of them.",
				signed(float64(after)/100, 2), when, exact(float64(r)/100), limitNum(*ceiling)))
		}
	}
	return worst
}

// passageAdvice says how far the loudest passages must come down when a
// maximum short-term or momentary loudness would still be exceeded after
// the gain g (hundredths of a dB), starting from the value as the check's
// reason prints it.
func passageAdvice(kind, window, unit string, limit, value *float64, g int64) []string {
	if limit == nil || value == nil {
		return nil
	}
	vs, _ := maximumShown(*value, *limit, false)
	after := hundredths(vs) + g
	over := after - hundredths(*limit)
	if over <= 0 {
		return nil
	}
	still := ""
	switch {
	case g < 0:
		still = " even after that cut"
	case g > 0:
		still = " after that gain"
	}
	return []string{fmt.Sprintf("The loudest %s passages would reach %s %s%s: bring them down by %s dB (compression or level riding) to keep %s loudness at or below %s %s.",
		window, exact(float64(after)/100), unit, still, exact(float64(over)/100), kind, limitNum(*limit), unit)}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
