package engine

import (
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// withSpecEvents returns the measurement options with the event limits
// taken from the spec the file is judged against: events begin where the
// spec's checks fail (its true-peak ceiling, momentary and short-term
// maxima, window correlation limit). Limits already set in the options
// win; without a spec the measure defaults apply.
func withSpecEvents(o measure.Options, spec *rules.Spec) measure.Options {
	if spec == nil {
		return o
	}
	ev := &o.Events
	l := spec.Loudness
	if ev.TruePeakDBTP == nil {
		ev.TruePeakDBTP = l.MaxTruePeakDBTP
	}
	if ev.MaxMomentaryLUFS == nil {
		ev.MaxMomentaryLUFS = l.MaxMomentaryLUFS
	}
	if ev.MaxShortTermLUFS == nil {
		ev.MaxShortTermLUFS = l.MaxShortTermLUFS
	}
	if ev.PhaseLimit == nil {
		ev.PhaseLimit = spec.Signal.MinWindowCorrelation
	}
	return o
}
