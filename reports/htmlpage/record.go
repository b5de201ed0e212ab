package htmlpage

import (
	"html/template"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

// Record is the QC record's header: who ordered the check, who made it
// and what they noted. Empty fields are left out; the approval block at
// the end of the page always prints, with lines to fill in by hand.
type Record struct {
	Job, Client, Operator, Notes string
}

// RecordFrom copies a spec's or the command line's record fields.
func RecordFrom(f rules.RecordFields) Record {
	return Record{Job: f.Job, Client: f.Client, Operator: f.Operator, Notes: f.Notes}
}

// Paper sizes for print: the @page size of the printed report.
const (
	PaperA4     = "a4"
	PaperLetter = "letter"
)

// factView is one line of a file's facts table.
type factView struct {
	Label string
	Value template.HTML
	Mono  bool // a hash or reference, set in monospace
}

// eventView is one row of a file's events table.
type eventView struct {
	Kind, Start, End, What string
}

// groupView is one programme group of a file.
type groupView struct {
	Name, Channels, Layout string
	Verdict                verdictView
	Spec                   string
	Integrated, LRA, Peak  string
	Unit                   string
	Reason                 string
	MeasureOnly            bool
}

// wrapPath writes a path with a line-break opportunity after every
// separator, so a long path wraps between folders, never inside a name.
func wrapPath(p string) template.HTML {
	p = reports.Printable(p)
	parts := strings.SplitAfter(p, "/")
	for i, s := range parts {
		parts[i] = template.HTMLEscapeString(s)
	}
	return template.HTML(strings.Join(parts, "<wbr>"))
}

// fileFacts lists what identifies the delivered file and what it says
// about itself: size and SHA-256 (when digested), container facts, start
// timecode, and the bext origin fields and coding history.
func fileFacts(r *rules.Result) []factView {
	var out []factView
	add := func(label, value string, mono bool) {
		if value != "" {
			out = append(out, factView{label, template.HTML(template.HTMLEscapeString(reports.Printable(value))), mono})
		}
	}
	if f := r.File; f != nil {
		add("Size", strconv.FormatInt(f.SizeBytes, 10)+" bytes", false)
		out = append(out, factView{"SHA-256", template.HTML(hashBreaks(f.SHA256)), true})
	}
	add("Container", fileDetails(r), false)
	if r.StartTimecode != nil {
		add("Start timecode", *r.StartTimecode+" at "+r.FPS+" fps", true)
	}
	if b := r.Bext; b != nil {
		add("bext description", b.Description, false)
		add("bext originator", strings.TrimSpace(b.Originator+" "+b.OriginatorReference), false)
		add("bext origination", strings.TrimSpace(b.OriginationDate+" "+b.OriginationTime), false)
		add("bext coding history", b.CodingHistory, true)
	}
	return out
}

// hashBreaks lets a hex digest break into groups of 16 (a long hash must
// not force the facts table wider than the page).
func hashBreaks(h string) string {
	var b strings.Builder
	for i := 0; i < len(h); i += 16 {
		if i > 0 {
			b.WriteString("<wbr>")
		}
		b.WriteString(template.HTMLEscapeString(h[i:min(i+16, len(h))]))
	}
	return b.String()
}

// eventRows are the table rows of a file's events, times as the file
// shows them (timecode when a start is known).
func eventRows(m *measure.Measurement, evs []measure.Event) []eventView {
	out := make([]eventView, 0, len(evs))
	for _, e := range evs {
		out = append(out, eventView{Kind: reports.MarkerName(e), Start: e.StartTimecode, End: e.EndTimecode, What: reports.EventText(e)})
	}
	return out
}

// omittedEvents is how many events of a file are beyond the cap.
func omittedEvents(m *measure.Measurement) int {
	n := 0
	for _, k := range m.EventsOmitted {
		n += k
	}
	return n
}

// groupRows are a file's programme groups: judged when the result has
// them, measured only otherwise.
func groupRows(r *rules.Result) []groupView {
	var out []groupView
	if len(r.Groups) > 0 {
		for _, g := range r.Groups {
			gr := g.Result
			v := groupView{Name: g.Name, Channels: reports.ChannelList(g.Channels), Layout: strings.Join(gr.ChannelLayout, " "),
				Verdict: verdictOf(gr.Verdict), Spec: gr.Spec, Integrated: reports.Loudness(gr.IntegratedLUFS),
				LRA: reports.Loudness(gr.LoudnessRangeLU), Peak: reports.Peak(gr.TruePeakDBTP), Unit: gr.Unit(),
				Reason: MainReason(&gr), MeasureOnly: g.MeasureOnly}
			if g.MeasureOnly {
				v.Verdict, v.Reason = verdictOf(""), "measured only"
			}
			out = append(out, v)
		}
		return out
	}
	for _, g := range r.Measurement.Groups {
		out = append(out, groupView{Name: g.Name, Channels: reports.ChannelList(g.Channels), Layout: strings.Join(g.ChannelLayout, " "),
			Verdict: verdictOf(""), Integrated: reports.Loudness(g.IntegratedLUFS), LRA: reports.Loudness(g.LoudnessRangeLU),
			Peak: reports.Peak(g.TruePeakDBTP), Unit: "LUFS", Reason: "measured only, not judged against a spec"})
	}
	return out
}

// pageCSSFor is the page's style with the @page size for the paper.
func pageCSSFor(paper string) template.CSS {
	size := "A4"
	if paper == PaperLetter {
		size = "letter"
	}
	return template.CSS(strings.Replace(pageCSS, "/*PAPER*/A4", size, 1))
}
