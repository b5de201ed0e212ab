package reports

import (
	"bytes"
	"encoding/csv"
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

func readCSV(t *testing.T, data []byte) (header []string, rows []map[string]string) {
	t.Helper()
	records, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatalf("output is not CSV: %v", err)
	}
	header = records[0]
	for _, rec := range records[1:] {
		row := map[string]string{}
		for i, h := range header {
			row[h] = rec[i]
		}
		rows = append(rows, row)
	}
	return header, rows
}

// assertFigure checks a CSV cell against the figure written: empty when
// undefined, else equal within the rounding to two decimals.
func assertFigure(t *testing.T, where, col, cell string, want *float64) {
	t.Helper()
	if want == nil {
		if cell != "" {
			t.Errorf("%s %s = %q, want an empty cell", where, col, cell)
		}
		return
	}
	got, err := strconv.ParseFloat(cell, 64)
	if err != nil || math.Abs(got-*want) > 0.005 {
		t.Errorf("%s %s = %q, want %.2f", where, col, cell, *want)
	}
}

func assertMeasurementRow(t *testing.T, row map[string]string, m *measure.Measurement) {
	t.Helper()
	where := m.Path
	if row["path"] != m.Path || row["error"] != m.Error || row["damaged"] != m.Damaged {
		t.Errorf("%s: path/error/damaged = %q/%q/%q", where, row["path"], row["error"], row["damaged"])
	}
	if m.Error != "" {
		for _, col := range []string{"format", "sample_rate_hz", "duration_s", "integrated_lufs"} {
			if row[col] != "" {
				t.Errorf("%s: %s = %q for a file that could not be measured, want empty", where, col, row[col])
			}
		}
		return
	}
	ints := map[string]int{"sample_rate_hz": m.SampleRateHz, "channels": m.Channels}
	if m.BitsPerSample != 0 {
		ints["bits_per_sample"] = int(m.BitsPerSample)
	} else if row["bits_per_sample"] != "" {
		t.Errorf("%s: bits_per_sample = %q for a lossy file, want empty", where, row["bits_per_sample"])
	}
	for col, want := range ints {
		if got, err := strconv.Atoi(row[col]); err != nil || got != want {
			t.Errorf("%s: %s = %q, want %d", where, col, row[col], want)
		}
	}
	if d, err := strconv.ParseFloat(row["duration_s"], 64); err != nil || math.Abs(d-m.DurationS) > 0.0005 {
		t.Errorf("%s: duration_s = %q, want %.3f", where, row["duration_s"], m.DurationS)
	}
	if row["format"] != m.Format || row["sample_format"] != m.SampleFormat || row["channel_layout"] != strings.Join(m.ChannelLayout, ";") {
		t.Errorf("%s: format/sample_format/layout = %q/%q/%q", where, row["format"], row["sample_format"], row["channel_layout"])
	}
	figures := map[string]*float64{
		"integrated_lufs": m.IntegratedLUFS, "loudness_range_lu": m.LoudnessRangeLU,
		"true_peak_dbtp": m.TruePeakDBTP, "sample_peak_dbfs": m.SamplePeakDBFS,
		"max_momentary_lufs": m.MaxMomentaryLUFS, "max_short_term_lufs": m.MaxShortTermLUFS,
	}
	for col, want := range figures {
		assertFigure(t, where, col, row[col], want)
	}
	if got := row["notes"]; got != strings.Join(m.Notes, " | ") {
		t.Errorf("%s: notes = %q", where, got)
	}
}

func TestCSVMeasureRoundTrip(t *testing.T) {
	header, rows := readCSV(t, renderMeasure(t, CSV, testOptions()))
	if !slices.Equal(header, MeasureColumns()) {
		t.Errorf("header = %v, want %v", header, MeasureColumns())
	}
	ms := testMeasurements()
	if len(rows) != len(ms) {
		t.Fatalf("%d rows, want %d", len(rows), len(ms))
	}
	for i, m := range ms {
		assertMeasurementRow(t, rows[i], m)
	}
}

func TestCSVCheckRoundTrip(t *testing.T) {
	header, rows := readCSV(t, renderCheck(t, CSV, testOptions()))
	if !slices.Equal(header, CheckColumns()) {
		t.Errorf("header = %v, want %v", header, CheckColumns())
	}
	rs := testResults()
	if len(rows) != len(rs) {
		t.Fatalf("%d rows, want %d", len(rows), len(rs))
	}
	for i, r := range rs {
		row := rows[i]
		assertMeasurementRow(t, row, r.Measurement)
		if row["spec"] != r.Spec || row["verdict"] != string(r.Verdict) {
			t.Errorf("%s: spec/verdict = %q/%q, want %q/%q", r.Path, row["spec"], row["verdict"], r.Spec, r.Verdict)
		}
		assertFigure(t, r.Path, "suggested_gain_db", row["suggested_gain_db"], r.SuggestedGainDB)
		assertFigure(t, r.Path, "limiter_reduction_db", row["limiter_reduction_db"], r.LimiterReductionDB)
		var failed, warned []string
		for _, c := range r.Checks {
			switch c.Verdict {
			case rules.Fail, rules.Error:
				failed = append(failed, c.ID)
			case rules.Warn:
				warned = append(warned, c.ID)
			}
		}
		if row["failed_checks"] != strings.Join(failed, ";") || row["warned_checks"] != strings.Join(warned, ";") {
			t.Errorf("%s: failed/warned = %q/%q, want %v/%v", r.Path, row["failed_checks"], row["warned_checks"], failed, warned)
		}
	}
}

func TestCSVEmptyRunHasHeader(t *testing.T) {
	var b bytes.Buffer
	w, _ := NewCheckWriter(&b, CSV, Options{})
	if err := w.Close(Summary{}); err != nil {
		t.Fatal(err)
	}
	if got, want := b.String(), strings.Join(CheckColumns(), ",")+"\n"; got != want {
		t.Errorf("empty run = %q, want just the header %q", got, want)
	}
}
