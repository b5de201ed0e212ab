package htmlpage

import "github.com/kweigh/kweigh/rules"

// Target is the part of a delivery spec the plots draw: the integrated
// loudness target with its tolerance band, and the true-peak ceiling. A nil
// field is not drawn. A spec given as a window (e.g. −20 to −16 LUFS) maps to
// its middle and half its width. TargetFor derives it from a spec.
type Target struct {
	IntegratedLUFS      *float64
	ToleranceLU         *float64
	TruePeakCeilingDBTP *float64
}

// TargetFor returns what the plots draw for a file of the given channel
// count judged against spec: the integrated target with its tolerance (the
// mono target for one-channel files where the spec has one; the middle and
// half-width of a min/max window), and the true-peak ceiling. A nil spec, or
// a spec without an integrated requirement or ceiling, leaves those fields
// nil. A window open on one side draws no band.
func TargetFor(spec *rules.Spec, channels int) Target {
	var t Target
	if spec == nil {
		return t
	}
	l := spec.Loudness
	switch {
	case channels == 1 && l.MonoTargetLUFS != nil:
		v, tol := *l.MonoTargetLUFS, l.ToleranceLU
		t.IntegratedLUFS, t.ToleranceLU = &v, &tol
	case l.TargetLUFS != nil:
		v, tol := *l.TargetLUFS, l.ToleranceLU
		t.IntegratedLUFS, t.ToleranceLU = &v, &tol
	case l.MinIntegratedLUFS != nil && l.MaxIntegratedLUFS != nil:
		mid := (*l.MinIntegratedLUFS + *l.MaxIntegratedLUFS) / 2
		half := (*l.MaxIntegratedLUFS - *l.MinIntegratedLUFS) / 2
		t.IntegratedLUFS, t.ToleranceLU = &mid, &half
	}
	if l.MaxTruePeakDBTP != nil {
		v := *l.MaxTruePeakDBTP
		t.TruePeakCeilingDBTP = &v
	}
	return t
}
