package engine

import (
	"path/filepath"

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

// withSpecGroups returns the measurement options with the spec's
// programme groups, unless the options already name groups (--groups).
func withSpecGroups(o measure.Options, spec *rules.Spec) measure.Options {
	if spec == nil || len(o.Groups) > 0 || o.EachChannel {
		return o
	}
	o.Groups = spec.MeasureGroups()
	return o
}

// groupSpecs resolves a group's own spec name: a built-in ID, or a spec
// file path taken relative to the folder of the spec file that declares
// the group.
func groupSpecs(spec *rules.Spec) func(name string) (*rules.Spec, error) {
	return func(name string) (*rules.Spec, error) {
		if s, err := rules.Lookup(name); err == nil {
			return s, nil
		}
		if spec.File != "" && !filepath.IsAbs(name) {
			name = filepath.Join(filepath.Dir(spec.File), name)
		}
		return LoadSpec(name)
	}
}
