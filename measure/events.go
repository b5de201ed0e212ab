package measure

import (
	"math"
	"sort"

	"github.com/kweigh/kweigh/loudness"
	"github.com/kweigh/kweigh/timecode"
)

// Event kinds: where in a file a limit is broken.
const (
	EventTruePeakOver  = "true_peak_over"  // true peak above the ceiling
	EventShortTermOver = "short_term_over" // 3 s loudness above the spec's maximum
	EventMomentaryOver = "momentary_over"  // 400 ms loudness above the spec's maximum
	EventClipping      = "clipping"        // clipping runs
	EventSilence       = "silence"         // a silent gap inside the programme
	EventPhase         = "phase"           // 3 s windows of L/R correlation below the limit
	EventLoudSection   = "loud_section"    // 10 s+ well above the rest of the programme
	EventQuietSection  = "quiet_section"   // 10 s+ well below the rest of the programme
)

// EventKinds lists the kinds in the order reports show them.
var EventKinds = []string{EventTruePeakOver, EventShortTermOver, EventMomentaryOver, EventClipping,
	EventSilence, EventPhase, EventLoudSection, EventQuietSection}

// Defaults of the event search (common practice, no published source).
const (
	// DefaultEventTruePeakDBTP is the ceiling for true_peak_over events
	// when no spec sets one (kweigh measure): −1 dBTP, the common
	// broadcast ceiling.
	DefaultEventTruePeakDBTP = -1.0
	// DefaultEventPhaseLimit is the 3 s window correlation below which a
	// phase event is reported when no spec sets one.
	DefaultEventPhaseLimit = -0.5
	// DefaultSilenceGapS is the shortest silent gap inside the programme
	// reported as an event.
	DefaultSilenceGapS = 2.0
	// DefaultSectionMarginLU is how far a stretch's loudness must sit
	// above or below the rest of the programme to be a loud or quiet
	// section.
	DefaultSectionMarginLU = 3.0
	// SectionMinS is the shortest loud or quiet section.
	SectionMinS = 10.0
	// DefaultMaxEventsPerKind caps the events kept per kind; the rest are
	// counted in Measurement.EventsOmitted.
	DefaultMaxEventsPerKind = 100
	// EventMergeS joins overs this close together into one event.
	EventMergeS = 0.5
)

// EventLimits say where events begin. Nil pointers mean "no such limit"
// except TruePeakDBTP and PhaseLimit, which fall back to the defaults
// above; zero numbers mean the defaults.
type EventLimits struct {
	TruePeakDBTP     *float64
	MaxMomentaryLUFS *float64
	MaxShortTermLUFS *float64
	PhaseLimit       *float64
	SilenceGapS      float64
	SectionMarginLU  float64
	MaxPerKind       int
}

// Event is one stretch where a limit is broken. Overs of one kind closer
// than EventMergeS are one event. Value is the worst reading in the
// stretch (highest over, lowest correlation, the section's distance from
// the rest in LU, the clipped samples, the gap's length); Channel names the
// channel when the finding belongs to one, null otherwise.
type Event struct {
	Kind          string   `json:"kind"`
	StartS        float64  `json:"start_s"`
	EndS          float64  `json:"end_s"`
	StartTimecode string   `json:"start_timecode"`
	EndTimecode   string   `json:"end_timecode"`
	Value         *float64 `json:"value"`
	Unit          string   `json:"unit"`
	Channel       *string  `json:"channel"`
}

// eventList collects the events of one kind in time order, merging
// neighbours and keeping at most max of them: its memory is bounded
// whatever the file's length. Later events are counted (merged the same
// way) in omitted.
type eventList struct {
	kind, unit string
	lowWorse   bool // the lowest value is the worst (correlation, quiet sections)
	sum        bool // merged values add up (clipped samples, gap seconds)
	max        int
	events     []Event
	omitted    int
	any        bool    // an event has been added
	lastEnd    float64 // end of the last event added, kept or not
	lastKept   bool    // the last event added is in events
}

func (l *eventList) add(start, end, value float64, channel *string) {
	if l.any && start-l.lastEnd <= EventMergeS {
		l.lastEnd = math.Max(l.lastEnd, end)
		if l.lastKept {
			e := &l.events[len(l.events)-1]
			e.EndS = l.lastEnd
			switch v := *e.Value; {
			case l.sum:
				*e.Value = v + value
			case (l.lowWorse && value < v) || (!l.lowWorse && value > v):
				*e.Value = value
			}
		}
		return
	}
	l.any, l.lastEnd = true, end
	if len(l.events) >= l.max {
		l.omitted++
		l.lastKept = false
		return
	}
	v := value
	l.events = append(l.events, Event{Kind: l.kind, StartS: start, EndS: end, Value: &v, Unit: l.unit, Channel: channel})
	l.lastKept = true
}

// events gathers the findings of one pass. The clipping and phase lists
// are fed while decoding (see hygiene); the series-based kinds are read
// from the engine's 10 Hz series after it.
type events struct {
	lim   EventLimits
	lists map[string]*eventList
}

func newEvents(lim EventLimits) *events {
	if lim.TruePeakDBTP == nil {
		v := DefaultEventTruePeakDBTP
		lim.TruePeakDBTP = &v
	}
	if lim.PhaseLimit == nil {
		v := DefaultEventPhaseLimit
		lim.PhaseLimit = &v
	}
	if lim.SilenceGapS <= 0 {
		lim.SilenceGapS = DefaultSilenceGapS
	}
	if lim.SectionMarginLU <= 0 {
		lim.SectionMarginLU = DefaultSectionMarginLU
	}
	if lim.MaxPerKind <= 0 {
		lim.MaxPerKind = DefaultMaxEventsPerKind
	}
	e := &events{lim: lim, lists: map[string]*eventList{}}
	units := map[string]string{EventTruePeakOver: "dBTP", EventShortTermOver: "LUFS", EventMomentaryOver: "LUFS",
		EventClipping: "samples", EventSilence: "s", EventPhase: "correlation", EventLoudSection: "LU", EventQuietSection: "LU"}
	for _, k := range EventKinds {
		e.lists[k] = &eventList{kind: k, unit: units[k], max: lim.MaxPerKind, lowWorse: k == EventPhase || k == EventQuietSection, sum: k == EventClipping}
	}
	return e
}

// spanOf is the time range element i of a series stands for: the 100 ms
// block i while the series is undecimated, else the 2·step blocks of
// its min/max pair (see loudness.Series).
func spanOf(i, step int) (start, end float64) {
	if step <= 1 {
		return float64(i) / 10, float64(i+1) / 10
	}
	pair := i / 2
	return float64(pair*2*step) / 10, float64((pair+1)*2*step) / 10
}

// fromSeries finds the true-peak, momentary and short-term overs, the
// silent gaps and the loud and quiet sections in the engine's series.
// durationS clips the last span to the file's end.
func (e *events) fromSeries(s *loudness.Series, durationS float64, silenceDBFS float64) {
	step := max(s.Step, 1)
	clip := func(a, b float64) (float64, float64) { return a, math.Min(b, durationS) }
	over := func(kind string, v []float32, limit float64, windowS float64) {
		l := e.lists[kind]
		// Compared as the checks compare (rules/compare.go): both rounded to
		// 0.01, so an event marks exactly what fails.
		limit = math.Round(limit*100) / 100
		for i, x := range v {
			if math.Round(float64(x)*100)/100 > limit && !math.IsInf(float64(x), 0) {
				a, b := spanOf(i, step)
				if windowS > 0 {
					// A window value belongs to the window ending at the
					// block's end.
					a = math.Max(0, b-windowS)
				}
				a, b = clip(a, b)
				l.add(a, b, float64(x), nil)
			}
		}
	}
	over(EventTruePeakOver, s.TruePeak, *e.lim.TruePeakDBTP, 0)
	if p := e.lim.MaxShortTermLUFS; p != nil {
		over(EventShortTermOver, s.ShortTerm, *p, 3)
	}
	if p := e.lim.MaxMomentaryLUFS; p != nil {
		over(EventMomentaryOver, s.Momentary, *p, 0.4)
	}
	e.silences(s.SamplePeak, step, durationS, silenceDBFS)
	e.sections(s, step, durationS)
}

// silences reports gaps of at least SilenceGapS whose every 100 ms block
// stays below the silence threshold, between the first and the last block
// above it (leading and trailing silence are reported as figures, not
// events).
func (e *events) silences(peak []float32, step int, durationS, thr float64) {
	first, last := -1, -1
	for i, p := range peak {
		if float64(p) >= thr {
			if first < 0 {
				first = i
			}
			last = i
		}
	}
	if first < 0 {
		return
	}
	l := e.lists[EventSilence]
	run := -1
	for i := first; i <= last; i++ {
		quiet := float64(peak[i]) < thr
		if quiet && run < 0 {
			run = i
		}
		if !quiet && run >= 0 {
			a, _ := spanOf(run, step)
			b, _ := spanOf(i, step)
			if b-a >= e.lim.SilenceGapS-1e-9 {
				l.add(a, math.Min(b, durationS), b-a, nil)
			}
			run = -1
		}
	}
}

// gatedLoudness is the BS.1770 integrated loudness of a set of 400 ms
// block loudness values (the momentary series at 10 Hz is exactly the
// standard's gating blocks, 400 ms with 75 % overlap): absolute gate
// −70 LUFS, relative gate 10 LU below the mean above it.
func gatedLoudness(blocks []float32, skip func(i int) bool) (float64, bool) {
	energy := func(l float64) float64 { return math.Pow(10, (l+0.691)/10) }
	var sum float64
	var n int
	for i, b := range blocks {
		x := float64(b)
		if skip(i) || math.IsNaN(x) || x <= -70 {
			continue
		}
		sum += energy(x)
		n++
	}
	if n == 0 {
		return 0, false
	}
	rel := -0.691 + 10*math.Log10(sum/float64(n)) - 10
	sum, n = 0, 0
	for i, b := range blocks {
		x := float64(b)
		if skip(i) || math.IsNaN(x) || x <= -70 || x <= rel {
			continue
		}
		sum += energy(x)
		n++
	}
	if n == 0 {
		return 0, false
	}
	return -0.691 + 10*math.Log10(sum/float64(n)), true
}

// sections finds loud and quiet sections: stretches of SectionMinS or
// more whose short-term loudness sits beyond half the margin from the
// whole programme's loudness, confirmed when the stretch's own gated
// loudness is more than the margin from that of the rest of the
// programme (the rest is what a fix of the section leaves untouched).
func (e *events) sections(s *loudness.Series, step int, durationS float64) {
	whole, ok := gatedLoudness(s.Momentary, func(int) bool { return false })
	if !ok {
		return
	}
	margin := e.lim.SectionMarginLU
	minLen := int(math.Ceil(SectionMinS * 10 / float64(step)))
	type run struct{ a, b int } // elements [a, b)
	find := func(loud bool) []run {
		var out []run
		start := -1
		for i := 0; i <= len(s.ShortTerm); i++ {
			in := false
			if i < len(s.ShortTerm) {
				x := float64(s.ShortTerm[i])
				if loud {
					in = x > whole+margin/2
				} else {
					in = x < whole-margin/2 && x > -70 // silence is the silence event's
				}
			}
			if in && start < 0 {
				start = i
			}
			if !in && start >= 0 {
				if i-start >= minLen {
					out = append(out, run{start, i})
				}
				start = -1
			}
		}
		return out
	}
	for _, loud := range []bool{true, false} {
		kind := EventQuietSection
		if loud {
			kind = EventLoudSection
		}
		for _, r := range find(loud) {
			// The short-term windows ending in the run reach 3 s back; the
			// momentary blocks (400 ms) place the section's edges: the first
			// and last block beyond the half margin between 3 s before the
			// run and its end.
			beyond := func(i int) bool {
				x := float64(s.Momentary[i])
				if loud {
					return x > whole+margin/2
				}
				return x < whole-margin/2 && x > -70
			}
			a, b := max(0, r.a-30/step), r.b
			for a < b && !beyond(a) {
				a++
			}
			for b > a && !beyond(b-1) {
				b--
			}
			if b <= a {
				continue
			}
			inside := func(i int) bool { return i >= a && i < b }
			sec, ok1 := gatedLoudness(s.Momentary, func(i int) bool { return !inside(i) })
			rest, ok2 := gatedLoudness(s.Momentary, inside)
			if !ok1 || !ok2 {
				continue
			}
			d := sec - rest
			if (loud && d > margin) || (!loud && -d > margin) {
				// A 400 ms window turns beyond the half margin when about
				// half of it holds the section: its end less 0.2 s is
				// where the section begins or ends.
				_, ea := spanOf(a, step)
				_, eb := spanOf(b-1, step)
				start := math.Max(0, ea-0.2)
				if leadingUndefined(s.Momentary, a) {
					start = 0 // the section starts with the file
				}
				e.lists[kind].add(start, math.Min(eb-0.2, durationS), math.Round(d*100)/100, nil)
			}
		}
	}
}

// finish returns every event in time order with timecodes, and the counts
// of those beyond the cap per kind.
func (e *events) finish(start timecode.Start) ([]Event, map[string]int) {
	out := []Event{}
	omitted := map[string]int{}
	for _, k := range EventKinds {
		l := e.lists[k]
		out = append(out, l.events...)
		if l.omitted > 0 {
			omitted[k] = l.omitted
		}
	}
	for i := range out {
		out[i].StartS = math.Round(out[i].StartS*1000) / 1000
		out[i].EndS = math.Round(out[i].EndS*1000) / 1000
		out[i].StartTimecode = start.Label(out[i].StartS)
		out[i].EndTimecode = start.Label(out[i].EndS)
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].StartS < out[j].StartS })
	return out, omitted
}

// clipMark is the hygiene's clipping state before a block.
type clipMark struct{ runs, clipped int64 }

func (e *events) markClips(h *hygiene) clipMark { return clipMark{h.clipRuns, h.clipped} }

// afterBlock adds a clipping event over the block of n frames from frame
// at when the block completed a clipping run of at least the minimum
// length, or ends inside one (the run's exact sample position is not
// kept: the event is as precise as a decoding block, under 0.1 s at
// 44.1 kHz and above).
func (e *events) afterBlock(h *hygiene, before clipMark, at int64, n int, rate int) {
	if h.clipped == before.clipped {
		return
	}
	hit := h.clipRuns > before.runs
	for _, r := range h.run {
		if r >= h.clipRunMin {
			hit = true
		}
	}
	if !hit {
		return
	}
	a := float64(at) / float64(rate)
	b := float64(at+int64(n)) / float64(rate)
	e.lists[EventClipping].add(a, b, float64(h.clipped-before.clipped), nil)
}

// phaseWindow adds a phase event for 3 s window k whose correlation c is
// below the limit.
func (e *events) phaseWindow(k int64, c float64, pair *string) {
	if c < *e.lim.PhaseLimit {
		a := float64(k * correlationWindowS)
		e.lists[EventPhase].add(a, a+correlationWindowS, c, pair)
	}
}

// leadingUndefined reports whether every element before i is NaN (the
// windows not yet full at the start of the file).
func leadingUndefined(v []float32, i int) bool {
	for _, x := range v[:i] {
		if !math.IsNaN(float64(x)) {
			return false
		}
	}
	return true
}
