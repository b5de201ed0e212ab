package reports

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// TextEvents is how many events the text report shows per file (and per
// group); JSON, the HTML page and --markers have them all.
const TextEvents = 5

// eventLines are the text lines for a file's events: the first
// TextEvents, each starting "event ", then a count of the rest.
func eventLines(m *measure.Measurement, evs []measure.Event, omitted map[string]int) []string {
	var out []string
	for i, e := range evs {
		if i == TextEvents {
			break
		}
		out = append(out, fmt.Sprintf("event %s–%s  %s: %s", e.StartTimecode, e.EndTimecode, MarkerName(e), EventText(e)))
	}
	rest := len(evs) - min(len(evs), TextEvents)
	for _, n := range omitted {
		rest += n
	}
	if rest > 0 {
		noun := "events"
		if rest == 1 {
			noun = "event"
		}
		out = append(out, fmt.Sprintf("%d more %s (all in JSON, the HTML report and --markers)", rest, noun))
	}
	return out
}

// timecodeText says where the file's timecode starts, e.g.
// "starts 10:00:00:00 at 25 fps"; "" when no start is known.
func timecodeText(m *measure.Measurement) string {
	if m.StartTimecode == nil {
		return ""
	}
	return fmt.Sprintf("starts %s at %s fps", *m.StartTimecode, m.FPS)
}

// ChannelList writes 1-based channel numbers with ranges, e.g. "1-6" or
// "7-8" or "1,3".
func ChannelList(chans []int) string {
	var parts []string
	for i := 0; i < len(chans); {
		j := i
		for j+1 < len(chans) && chans[j+1] == chans[j]+1 {
			j++
		}
		if j > i {
			parts = append(parts, strconv.Itoa(chans[i])+"-"+strconv.Itoa(chans[j]))
		} else {
			parts = append(parts, strconv.Itoa(chans[i]))
		}
		i = j + 1
	}
	return strings.Join(parts, ",")
}

// groupHead names a group: "group main (channels 1-6, L R C LFE Ls Rs)".
func groupHead(name string, chans []int, layout []string) string {
	return fmt.Sprintf("group %s (channels %s, %s)", Printable(name), ChannelList(chans), strings.Join(layout, " "))
}

// groupFigures is a group's figures in one line, as figuresText.
func groupFigures(m *measure.Measurement, unit string) string {
	return figuresText(&rules.Result{Measurement: m, LoudnessUnit: unit})
}
