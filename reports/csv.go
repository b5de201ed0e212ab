package reports

import (
	"encoding/csv"
	"io"
	"slices"
	"strconv"
	"strings"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// column is one CSV column: its header and how a record fills it.
type column[T any] struct {
	header string
	cell   func(T) string
}

// measurementColumns are the columns a measurement fills, in order, after
// the path. Cells are empty for a file that could not be measured.
var measurementColumns = []column[*measure.Measurement]{
	{"format", func(m *measure.Measurement) string { return m.Format }},
	{"codec", func(m *measure.Measurement) string { return m.Codec }},
	{"sample_rate_hz", func(m *measure.Measurement) string { return strconv.Itoa(m.SampleRateHz) }},
	{"channels", func(m *measure.Measurement) string { return strconv.Itoa(m.Channels) }},
	{"channel_layout", func(m *measure.Measurement) string { return strings.Join(m.ChannelLayout, ";") }},
	{"bits_per_sample", func(m *measure.Measurement) string { return bitDepthCell(m.BitsPerSample) }},
	{"sample_format", func(m *measure.Measurement) string { return m.SampleFormat }},
	{"duration_s", func(m *measure.Measurement) string { return Fixed(m.DurationS, 3) }},
	{"integrated_lufs", func(m *measure.Measurement) string { return csvFigure(m.IntegratedLUFS) }},
	{"loudness_range_lu", func(m *measure.Measurement) string { return csvFigure(m.LoudnessRangeLU) }},
	{"true_peak_dbtp", func(m *measure.Measurement) string { return csvFigure(m.TruePeakDBTP) }},
	{"sample_peak_dbfs", func(m *measure.Measurement) string { return csvFigure(m.SamplePeakDBFS) }},
	{"max_momentary_lufs", func(m *measure.Measurement) string { return csvFigure(m.MaxMomentaryLUFS) }},
	{"max_short_term_lufs", func(m *measure.Measurement) string { return csvFigure(m.MaxShortTermLUFS) }},
}

// resultColumns are the check columns after the measurement's.
var resultColumns = []column[*rules.Result]{
	{"suggested_gain_db", func(r *rules.Result) string { return csvFigure(r.SuggestedGainDB) }},
	{"limiter_reduction_db", func(r *rules.Result) string { return csvFigure(r.LimiterReductionDB) }},
	{"failed_checks", func(r *rules.Result) string { return checkIDs(r, rules.Fail, rules.Error) }},
	{"warned_checks", func(r *rules.Result) string { return checkIDs(r, rules.Warn) }},
}

// csvFigure writes a dB figure with two decimals; empty when undefined.
func csvFigure(p *float64) string {
	if !Defined(p) {
		return ""
	}
	return Fixed(*p, 2)
}

// checkIDs lists the IDs of r's checks with one of the verdicts, the
// file's first, then each programme group's as GROUP/ID (with groups, the
// loudness checks are judged per group and live there).
func checkIDs(r *rules.Result, verdicts ...rules.Verdict) string {
	var ids []string
	for _, nc := range namedChecks(r) {
		if slices.Contains(verdicts, nc.Verdict) {
			ids = append(ids, nc.name)
		}
	}
	return strings.Join(ids, ";")
}

// namedCheck is a check with the name the flat formats give it: its ID,
// or GROUP/ID for a programme group's check.
type namedCheck struct {
	rules.Check
	name string
	// of is the result the check belongs to (the file's or its group's),
	// whose suggested gain and advice go with it.
	of *rules.Result
}

// namedChecks returns the file's checks, then each judged group's.
func namedChecks(r *rules.Result) []namedCheck {
	var out []namedCheck
	for _, c := range r.Checks {
		out = append(out, namedCheck{Check: c, name: c.ID, of: r})
	}
	for i := range r.Groups {
		g := &r.Groups[i]
		if g.MeasureOnly {
			continue
		}
		for _, c := range g.Checks {
			out = append(out, namedCheck{Check: c, name: g.Name + "/" + c.ID, of: &g.Result})
		}
	}
	return out
}

// MeasureColumns returns the header of the measure CSV format: path, the
// stream facts, duration_s, the six loudness and peak figures, then damaged,
// error and notes.
func MeasureColumns() []string {
	h := []string{"path"}
	for _, c := range measurementColumns {
		h = append(h, c.header)
	}
	return append(h, "damaged", "error", "notes")
}

// CheckColumns returns the header of the check CSV format: path, spec,
// verdict, the measure columns' stream facts and figures,
// suggested_gain_db, limiter_reduction_db, failed_checks (ids of failed
// checks and checks in error), warned_checks, then damaged, error and notes.
func CheckColumns() []string {
	h := []string{"path", "spec", "verdict"}
	for _, c := range measurementColumns {
		h = append(h, c.header)
	}
	for _, c := range resultColumns {
		h = append(h, c.header)
	}
	return append(h, "damaged", "error", "notes")
}

// csvTable writes rows through encoding/csv, the header before the first
// row (or at Close when there are none).
type csvTable struct {
	sink
	csv    *csv.Writer
	header []string
	headed bool
}

func newCSVTable(w io.Writer, header []string) *csvTable {
	t := &csvTable{sink: newSink(w, CSV), header: header}
	t.csv = csv.NewWriter(t.buf)
	return t
}

func (t *csvTable) row(cells []string) error {
	if err := t.ready(); err != nil {
		return err
	}
	if !t.headed {
		t.headed = true
		t.fail(t.csv.Write(t.header))
	}
	t.fail(t.csv.Write(cells))
	return t.err
}

func (t *csvTable) finish() error {
	if t.closed {
		return ErrClosed
	}
	if t.err == nil && !t.headed {
		t.headed = true
		t.fail(t.csv.Write(t.header))
	}
	t.csv.Flush()
	t.fail(t.csv.Error())
	return t.close()
}

// measurementCells fills the measurement columns, empty when m is nil or
// could not be measured.
func measurementCells(m *measure.Measurement) []string {
	cells := make([]string, len(measurementColumns))
	if m == nil || m.Error != "" {
		return cells
	}
	for i, c := range measurementColumns {
		cells[i] = c.cell(m)
	}
	return cells
}

// trailingCells fills damaged, error and notes.
func trailingCells(m *measure.Measurement) []string {
	if m == nil {
		return []string{"", "no measurement", ""}
	}
	return []string{m.Damaged, m.Error, strings.Join(m.Notes, " | ")}
}

// measureCSV writes one row per measurement.
type measureCSV struct{ table *csvTable }

func newMeasureCSV(w io.Writer) *measureCSV {
	return &measureCSV{table: newCSVTable(w, MeasureColumns())}
}

func (w *measureCSV) Write(m *measure.Measurement) error {
	if m == nil {
		return w.table.fail(errNilRecord)
	}
	row := append([]string{m.Path}, measurementCells(m)...)
	return w.table.row(append(row, trailingCells(m)...))
}

// Close flushes; the CSV format has no summary row.
func (w *measureCSV) Close(Summary) error { return w.table.finish() }

// checkCSV writes one row per result.
type checkCSV struct{ table *csvTable }

func newCheckCSV(w io.Writer) *checkCSV {
	return &checkCSV{table: newCSVTable(w, CheckColumns())}
}

func (w *checkCSV) Write(r *rules.Result) error {
	if r == nil {
		return w.table.fail(errNilRecord)
	}
	row := []string{measurementPath(r.Measurement), r.Spec, string(fileVerdict(r))}
	row = append(row, measurementCells(r.Measurement)...)
	for _, c := range resultColumns {
		row = append(row, c.cell(r))
	}
	return w.table.row(append(row, trailingCells(r.Measurement)...))
}

// Close flushes; the CSV format has no summary row.
func (w *checkCSV) Close(Summary) error { return w.table.finish() }

// bitDepthCell is the bit depth, or an empty cell for a lossy file, which
// has none (null in JSON).
func bitDepthCell(b measure.BitDepth) string {
	if b == 0 {
		return ""
	}
	return strconv.Itoa(int(b))
}
