package htmlpage

import (
	"fmt"
	"html/template"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

// verdictView is how a verdict is shown: always a symbol and a word, the
// colour only repeats them.
type verdictView struct {
	Class, Symbol, Word string
	// Rank orders verdicts for sorting, best first.
	Rank int
}

// verdictOf maps a verdict to its symbol and word. An empty verdict is a
// `measure` run: measured, not judged.
func verdictOf(v rules.Verdict) verdictView {
	switch v {
	case rules.Pass:
		return verdictView{"pass", "✓", "Pass", 1}
	case rules.Warn:
		return verdictView{"warn", "⚠", "Warning", 2}
	case rules.Fail:
		return verdictView{"fail", "✕", "Fail", 3}
	case rules.Error:
		return verdictView{"error", "⊘", "Error", 4}
	case "":
		return verdictView{"measured", "○", "Measured", 0}
	}
	return verdictView{"other", "?", string(v), 5}
}

// figureView is one headline number of a file.
type figureView struct {
	Label, Value, Unit string
	Undefined          bool
}

// checkView is one row of a file's checks table.
type checkView struct {
	ID       string
	Verdict  verdictView
	Measured string
	Limit    string
	Reason   string
}

// fileView is everything the template shows for one file.
type fileView struct {
	Number     int
	Anchor     string
	Path       string
	Verdict    verdictView
	Spec       string
	Details    string
	Integrated string
	LRA        string
	TruePeak   string
	MainReason string
	Figures    []figureView
	Plot       template.HTML
	// PlotCaption explains the plot's marks in words.
	PlotCaption string
	Histogram   template.HTML
	Peaks       template.HTML
	Judged      bool
	Checks      []checkView
	Gain        string
	GainRaises  bool
	Limiter     string
	Advice      string
	Damaged     string
	Error       string
	Notes       []string
}

// countView is one verdict's tally in the page header.
type countView struct {
	Verdict verdictView
	Count   int
}

// pageView is the template's data.
type pageView struct {
	Title     string
	Generated string
	Specs     string
	Caution   string
	Counts    []countView
	Files     []fileView
	CSS       template.CSS
	Script    template.JS
	// NotAvailable is the word shown for undefined figures.
	NotAvailable string
}

func buildPage(p Page) (pageView, error) {
	v := pageView{
		Title:   p.Title,
		Specs:   strings.Join(p.Specs, ", "),
		Caution: p.Caution,
		CSS:     template.CSS(pageCSS),
		Script:  template.JS(sortScript),

		NotAvailable: reports.NotAvailable,
	}
	if v.Title == "" {
		v.Title = "Loudness report"
	}
	if !p.Generated.IsZero() {
		v.Generated = p.Generated.Format("2006-01-02 15:04:05 MST")
	}
	tally := map[string]int{}
	var order []verdictView
	for i, e := range p.Entries {
		if err := checkEntry(i, e); err != nil {
			return pageView{}, err
		}
		f := buildFile(i, e)
		if tally[f.Verdict.Class] == 0 {
			order = append(order, f.Verdict)
		}
		tally[f.Verdict.Class]++
		v.Files = append(v.Files, f)
	}
	for rank := 0; rank <= 5; rank++ {
		for _, vv := range order {
			if vv.Rank == rank {
				v.Counts = append(v.Counts, countView{vv, tally[vv.Class]})
			}
		}
	}
	return v, nil
}

func buildFile(i int, e Entry) fileView {
	r := e.Result
	id := "f" + strconv.Itoa(i+1) + "-"
	f := fileView{
		Number:     i + 1,
		Anchor:     "file-" + strconv.Itoa(i+1),
		Path:       r.Path,
		Verdict:    verdictOf(r.Verdict),
		Spec:       r.Spec,
		Details:    fileDetails(r),
		Integrated: reports.Loudness(r.IntegratedLUFS),
		LRA:        reports.Loudness(r.LoudnessRangeLU),
		TruePeak:   reports.Peak(r.TruePeakDBTP),
		MainReason: MainReason(r),
		Judged:     r.Verdict != "",
		Advice:     r.Advice,
		Damaged:    r.Damaged,
		Error:      r.Error,
		Notes:      r.Notes,
	}
	if r.Error != "" {
		return f
	}
	lead, trail := r.Signal.LeadingSilenceS, r.Signal.TrailingSilenceS
	f.Figures = []figureView{
		{Label: "Integrated", Value: f.Integrated, Unit: r.Unit()},
		{Label: "Loudness range", Value: f.LRA, Unit: "LU"},
		{Label: "True peak", Value: f.TruePeak, Unit: "dBTP"},
		{Label: "Sample peak", Value: reports.Peak(r.SamplePeakDBFS), Unit: "dBFS"},
		{Label: "Max momentary", Value: reports.Loudness(r.MaxMomentaryLUFS), Unit: r.Unit()},
		{Label: "Max short-term", Value: reports.Loudness(r.MaxShortTermLUFS), Unit: r.Unit()},
		{Label: "Leading silence", Value: reports.Fixed(lead, reports.UnitDecimals("s")), Unit: "s"},
		{Label: "Trailing silence", Value: reports.Fixed(trail, reports.UnitDecimals("s")), Unit: "s"},
	}
	for i := range f.Figures {
		f.Figures[i].Undefined = f.Figures[i].Value == reports.NotAvailable
	}
	f.Plot = template.HTML(loudnessPlot(e, id+"plot-", false))
	f.PlotCaption = plotCaption(e.Target)
	f.Histogram = template.HTML(shortTermHistogram(e, id+"hist-"))
	f.Peaks = template.HTML(channelPeakBars(e, id+"peaks-"))
	for _, c := range r.Checks {
		f.Checks = append(f.Checks, checkView{
			ID:       c.ID,
			Verdict:  verdictOf(c.Verdict),
			Measured: reports.Measured(c.Measured, c.Unit),
			Limit:    c.Limit,
			Reason:   c.Reason,
		})
	}
	if r.SuggestedGainDB != nil {
		f.Gain = reports.Gain(*r.SuggestedGainDB) + " dB"
		f.GainRaises = *r.SuggestedGainDB > 0
	}
	if r.LimiterReductionDB != nil {
		f.Limiter = reports.Adjustment(*r.LimiterReductionDB) + " dB"
	}
	return f
}

// MainReason is the one line the summary table gives for a file: the
// measurement error, else the reason of the first check with the file's
// worst verdict, else a plain statement that all checks passed (or that
// the file was only measured).
func MainReason(r *rules.Result) string {
	if r.Error != "" {
		return r.Error
	}
	best := -1
	for i, c := range r.Checks {
		if c.Verdict == rules.Pass {
			continue
		}
		if best < 0 || verdictOf(c.Verdict).Rank > verdictOf(r.Checks[best].Verdict).Rank {
			best = i
		}
	}
	switch {
	case best >= 0:
		return r.Checks[best].Reason
	case r.Verdict == "":
		return "measured only, not judged against a spec"
	case len(r.Checks) == 0:
		return "no checks"
	}
	return "all checks passed"
}

// fileDetails is the one-line technical description of a file.
func fileDetails(r *rules.Result) string {
	var parts []string
	if r.Format != "" {
		format := r.Format
		if r.Codec != "" && r.Codec != r.Format {
			format += " (" + r.Codec + ")"
		}
		parts = append(parts, format)
	}
	if r.SampleRateHz > 0 {
		parts = append(parts, strconv.Itoa(r.SampleRateHz)+" Hz")
	}
	if r.BitsPerSample > 0 {
		parts = append(parts, strings.TrimSpace(fmt.Sprintf("%d-bit %s", r.BitsPerSample, r.SampleFormat)))
	}
	if r.BitRateKbps > 0 {
		parts = append(parts, strconv.FormatFloat(r.BitRateKbps, 'f', -1, 64)+" kbit/s")
	}
	if r.Channels > 0 {
		ch := strconv.Itoa(r.Channels) + " ch"
		if len(r.ChannelLayout) > 0 {
			ch += " (" + strings.Join(r.ChannelLayout, " ")
			if r.LayoutSource != "" {
				ch += ", layout from " + r.LayoutSource
			}
			ch += ")"
		}
		parts = append(parts, ch)
	}
	if r.DurationS > 0 {
		parts = append(parts, reports.Duration(r.DurationS))
	}
	return strings.Join(parts, " · ")
}

// plotCaption explains, in words, the marks a file's loudness plot carries.
func plotCaption(t Target) string {
	c := "Loudness over time."
	if t.IntegratedLUFS != nil {
		c += " The shaded green band is the target with its tolerance."
	}
	if t.TruePeakCeilingDBTP != nil {
		c += " Red marks in the strip above the plot are 100 ms blocks whose true peak exceeds the ceiling."
	}
	return c + " Hatching marks leading and trailing silence. Gaps in a curve are windows not yet full or digital silence; values below the axis are drawn at its floor."
}
