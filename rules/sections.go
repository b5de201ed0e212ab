package rules

import (
	"fmt"
	"math"

	"github.com/kweigh/kweigh/measure"
)

// sectionAdvice says when a loudness failure comes from a section rather
// than the whole programme: a hot intro raises the integrated loudness, and
// a gain for the whole file would then leave the rest too quiet. It names
// the largest loud section when the advice lowers the level (gain < 0), or
// the largest quiet section when it raises it; "" when there is none.
func sectionAdvice(m *measure.Measurement, gain int64) string {
	kind, word := measure.EventLoudSection, "above"
	if gain > 0 {
		kind, word = measure.EventQuietSection, "below"
	}
	var best *measure.Event
	for i := range m.Events {
		e := &m.Events[i]
		if e.Kind == kind && e.Value != nil && (best == nil || e.EndS-e.StartS > best.EndS-best.StartS) {
			best = e
		}
	}
	if best == nil || gain == 0 {
		return ""
	}
	lu := reportFigure(math.Abs(*best.Value))
	if best.StartS == 0 && !m.Start.Known {
		return fmt.Sprintf("The first %s runs %s LU %s the rest of the programme: fix that section rather than the whole file.",
			minutesSeconds(best.EndS), lu, word)
	}
	return fmt.Sprintf("The section from %s to %s runs %s LU %s the rest of the programme: fix that section rather than the whole file.",
		m.TimeLabel(best.StartS), m.TimeLabel(best.EndS), lu, word)
}

// minutesSeconds writes a length as m:ss (or h:mm:ss), e.g. 0:25.
func minutesSeconds(s float64) string {
	t := int64(math.Round(s))
	if t >= 3600 {
		return fmt.Sprintf("%d:%02d:%02d", t/3600, t/60%60, t%60)
	}
	return fmt.Sprintf("%d:%02d", t/60, t%60)
}

// reportFigure writes a loudness difference with one decimal, as the
// reports print loudness.
func reportFigure(v float64) string { return fmt.Sprintf("%.1f", v) }
