package reports

import (
	"encoding/csv"
	"fmt"
	"io"
	"strings"

	"github.com/kweigh/kweigh/measure"
)

// MarkerHeader is the header row of a marker list (kweigh's own plain CSV,
// one row per event): a name, the start and end as h:mm:ss.sss from the
// file's start, the start and end timecodes, and a description in words.
var MarkerHeader = []string{"file", "name", "start", "end", "start_timecode", "end_timecode", "description"}

// MarkerWriter writes every event of every file as a marker list that
// editing and mixing software can import as CSV. Like csv.Writer it keeps
// the first error and returns it at Close.
type MarkerWriter struct {
	w      *csv.Writer
	header bool
	err    error
}

// NewMarkerWriter returns a marker writer on w.
func NewMarkerWriter(w io.Writer) *MarkerWriter { return &MarkerWriter{w: csv.NewWriter(w)} }

// Write adds the events of one file (and of its programme groups, named
// "group NAME: ..."). A file that could not be measured has none.
func (mw *MarkerWriter) Write(m *measure.Measurement) error {
	if mw.err != nil {
		return mw.err
	}
	if !mw.header {
		mw.header = true
		mw.row(MarkerHeader)
	}
	mw.events(m.Path, "", m, m.Events)
	for _, g := range m.Groups {
		mw.events(m.Path, "group "+g.Name+": ", m, g.Events)
	}
	return mw.err
}

func (mw *MarkerWriter) events(path, prefix string, m *measure.Measurement, evs []measure.Event) {
	for _, e := range evs {
		mw.row([]string{Printable(path), prefix + MarkerName(e), markerClock(e.StartS), markerClock(e.EndS),
			e.StartTimecode, e.EndTimecode, prefix + EventText(e)})
	}
}

func (mw *MarkerWriter) row(r []string) {
	if mw.err == nil {
		mw.err = mw.w.Write(r)
	}
}

// Close flushes the list (writing the header alone when no file had
// events) and returns the first error.
func (mw *MarkerWriter) Close() error {
	if !mw.header {
		mw.header = true
		mw.row(MarkerHeader)
	}
	mw.w.Flush()
	if mw.err == nil {
		mw.err = mw.w.Error()
	}
	return mw.err
}

// markerClock writes seconds from the start as h:mm:ss.sss.
func markerClock(s float64) string {
	ms := int64(s*1000 + 0.5)
	return fmt.Sprintf("%d:%02d:%02d.%03d", ms/3600000, ms/60000%60, ms/1000%60, ms%1000)
}

// eventNames are the short names of the kinds, for marker names and
// tables.
var eventNames = map[string]string{
	measure.EventTruePeakOver:  "true-peak over",
	measure.EventShortTermOver: "short-term over",
	measure.EventMomentaryOver: "momentary over",
	measure.EventClipping:      "clipping",
	measure.EventSilence:       "silence",
	measure.EventPhase:         "phase",
	measure.EventLoudSection:   "loud section",
	measure.EventQuietSection:  "quiet section",
}

// MarkerName is an event's short name, e.g. "true-peak over".
func MarkerName(e measure.Event) string {
	if n, ok := eventNames[e.Kind]; ok {
		return n
	}
	return strings.ReplaceAll(e.Kind, "_", " ")
}

// EventText says what an event is in words, with its figure as the
// reports print it, e.g. "true peak up to -0.4 dBTP".
func EventText(e measure.Event) string {
	v := 0.0
	if e.Value != nil {
		v = *e.Value
	}
	switch e.Kind {
	case measure.EventTruePeakOver:
		return "true peak up to " + Peak(&v) + " dBTP"
	case measure.EventShortTermOver:
		return "short-term loudness up to " + Loudness(&v) + " " + e.Unit
	case measure.EventMomentaryOver:
		return "momentary loudness up to " + Loudness(&v) + " " + e.Unit
	case measure.EventClipping:
		return fmt.Sprintf("%d clipped samples", int64(v))
	case measure.EventSilence:
		return fmt.Sprintf("%.1f s of silence inside the programme", v)
	case measure.EventPhase:
		return fmt.Sprintf("L/R correlation down to %.2f", v)
	case measure.EventLoudSection:
		return fmt.Sprintf("%.1f LU above the rest of the programme", v)
	case measure.EventQuietSection:
		return fmt.Sprintf("%.1f LU below the rest of the programme", -v)
	}
	return fmt.Sprintf("%s %g %s", e.Kind, v, e.Unit)
}
