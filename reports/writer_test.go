package reports

import (
	"bytes"
	"errors"
	"io"
	"regexp"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// failingWriter accepts limit bytes, then fails every write with errTest.
type failingWriter struct {
	limit, written int
}

func (w *failingWriter) Write(p []byte) (int, error) {
	if w.written+len(p) > w.limit {
		n := max(w.limit-w.written, 0)
		w.written += n
		return n, errTest
	}
	w.written += len(p)
	return len(p), nil
}

// TestWriterKeepsFirstError: for every writer and several failure points,
// the error of the underlying writer is returned at Close even when every
// Write returned nil (output still buffered), and further writes fail.
func TestWriterKeepsFirstError(t *testing.T) {
	for _, f := range MeasureFormats() {
		size := len(renderMeasure(t, f, testOptions()))
		for _, limit := range []int{0, size / 2, size - 1} {
			w, err := NewMeasureWriter(&failingWriter{limit: limit}, f, testOptions())
			if err != nil {
				t.Fatal(err)
			}
			var firstWriteErr error
			for _, m := range testMeasurements() {
				if err := w.Write(m); err != nil && firstWriteErr == nil {
					firstWriteErr = err
				}
			}
			checkClosed(t, "measure "+string(f), limit, firstWriteErr, w.Close(testMeasureSummary()), func() error { return w.Write(stereoPass()) })
		}
	}
	for _, f := range CheckFormats() {
		size := len(renderCheck(t, f, testOptions()))
		for _, limit := range []int{0, size / 2, size - 1} {
			w, err := NewCheckWriter(&failingWriter{limit: limit}, f, testOptions())
			if err != nil {
				t.Fatal(err)
			}
			var firstWriteErr error
			for _, r := range testResults() {
				if err := w.Write(r); err != nil && firstWriteErr == nil {
					firstWriteErr = err
				}
			}
			checkClosed(t, "check "+string(f), limit, firstWriteErr, w.Close(testCheckSummary()), func() error { return w.Write(testResults()[0]) })
		}
	}
}

func checkClosed(t *testing.T, name string, limit int, writeErr, closeErr error, writeAgain func() error) {
	t.Helper()
	if !errors.Is(closeErr, errTest) {
		t.Errorf("%s, failing after %d bytes: Close = %v, want the write error", name, limit, closeErr)
	}
	if writeErr != nil && !errors.Is(writeErr, errTest) {
		t.Errorf("%s: Write = %v, want the write error", name, writeErr)
	}
	if err := writeAgain(); !errors.Is(err, ErrClosed) {
		t.Errorf("%s: Write after Close = %v, want ErrClosed", name, err)
	}
}

// TestCloseTwice: a second Close reports ErrClosed and writes nothing more.
func TestCloseTwice(t *testing.T) {
	for _, f := range CheckFormats() {
		var b bytes.Buffer
		w, _ := NewCheckWriter(&b, f, testOptions())
		if err := w.Close(Summary{}); err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		n := b.Len()
		if err := w.Close(Summary{}); !errors.Is(err, ErrClosed) || b.Len() != n {
			t.Errorf("%s: second Close = %v and %d more bytes, want ErrClosed and none", f, err, b.Len()-n)
		}
	}
}

func TestNilRecordIsAnError(t *testing.T) {
	for _, f := range CheckFormats() {
		w, _ := NewCheckWriter(io.Discard, f, Options{})
		if err := w.Write(nil); err == nil {
			t.Errorf("check %s: Write(nil) = nil, want an error", f)
		}
		if err := w.Close(Summary{}); err == nil {
			t.Errorf("check %s: Close after Write(nil) = nil, want the kept error", f)
		}
	}
	for _, f := range MeasureFormats() {
		w, _ := NewMeasureWriter(io.Discard, f, Options{})
		if err := w.Write(nil); err == nil {
			t.Errorf("measure %s: Write(nil) = nil, want an error", f)
		}
	}
}

// TestResultWithoutMeasurement: a result the rules produced without a
// measurement is reported as an error file in every format, not a panic.
func TestResultWithoutMeasurement(t *testing.T) {
	for _, f := range CheckFormats() {
		var b bytes.Buffer
		w, _ := NewCheckWriter(&b, f, Options{})
		if err := w.Write(&rules.Result{Spec: "ebu-r128", Verdict: rules.Pass}); err != nil {
			t.Errorf("%s: %v", f, err)
		}
		if err := w.Close(Summary{Files: 1, Errors: 1}); err != nil {
			t.Errorf("%s: %v", f, err)
		}
		if f != JSON && f != JSONL && !strings.Contains(strings.ToLower(b.String()), "error") {
			t.Errorf("%s: no error shown for a result without measurement:\n%s", f, b.String())
		}
	}
}

// TestJSONLStreams: each line reaches the underlying writer when Write
// returns, before the next file and before Close.
func TestJSONLStreams(t *testing.T) {
	var b bytes.Buffer
	w, _ := NewMeasureWriter(&b, JSONL, Options{})
	for i, m := range testMeasurements() {
		if err := w.Write(m); err != nil {
			t.Fatal(err)
		}
		if got := strings.Count(b.String(), "\n"); got != i+1 {
			t.Fatalf("after %d writes the output holds %d lines", i+1, got)
		}
	}
	w.Close(Summary{})
}

// TestTextStreams: the text formats also show each file as it is written.
func TestTextStreams(t *testing.T) {
	var b bytes.Buffer
	w, _ := NewCheckWriter(&b, Text, Options{})
	for _, r := range testResults() {
		w.Write(r)
		if !strings.Contains(b.String(), r.Path) {
			t.Fatalf("%s not in the output after its Write", r.Path)
		}
	}
	w.Close(Summary{})
}

var ansi = regexp.MustCompile("\x1b\\[[0-9;]*m")

// TestColourIsNeverAlone: the coloured text is the plain text plus colour
// codes, so every verdict is still there in words without colour.
func TestColourIsNeverAlone(t *testing.T) {
	colour := testOptions()
	colour.Colour = true
	coloured := renderCheck(t, Text, colour)
	plain := renderCheck(t, Text, testOptions())
	if !ansi.Match(coloured) {
		t.Fatal("Colour set but no colour codes written")
	}
	if ansi.Match(plain) {
		t.Fatal("colour codes written without Colour")
	}
	if stripped := ansi.ReplaceAll(coloured, nil); !bytes.Equal(stripped, plain) {
		t.Errorf("coloured output without its codes differs from the plain output")
	}
	for _, word := range []string{"PASS", "WARN", "FAIL", "ERROR"} {
		if !bytes.Contains(plain, []byte(word)) {
			t.Errorf("verdict %s not spelled out", word)
		}
	}
}

func TestParseFormat(t *testing.T) {
	cases := []struct {
		in   string
		want Format
		ok   bool
	}{
		{"text", Text, true}, {"json", JSON, true}, {"jsonl", JSONL, true}, {"csv", CSV, true},
		{"junit", JUnit, true}, {" JSON ", JSON, true}, {"JUnit", JUnit, true},
		{"", "", false}, {"xml", "", false}, {"html", "", false}, {"json-lines", "", false},
	}
	for _, c := range cases {
		got, err := ParseFormat(c.in)
		if got != c.want || (err == nil) != c.ok {
			t.Errorf("ParseFormat(%q) = %q, %v; want %q, ok %v", c.in, got, err, c.want, c.ok)
		}
		var unknown *UnknownFormatError
		if !c.ok && (!errors.As(err, &unknown) || !strings.Contains(err.Error(), "junit")) {
			t.Errorf("ParseFormat(%q) error %v should be an *UnknownFormatError listing the formats", c.in, err)
		}
	}
	if _, err := NewMeasureWriter(io.Discard, JUnit, Options{}); err == nil {
		t.Error("NewMeasureWriter(junit) should fail: a measurement has no verdict")
	}
	if !JSONL.Streaming() || JSON.Streaming() || Text.Streaming() {
		t.Error("only jsonl streams")
	}
}

func TestSummaryCounts(t *testing.T) {
	s := testCheckSummary()
	// counted by hand from testResults: E01 pass; E02, E05, trailer fail;
	// E03, sting warn; E04 error.
	if s.Files != 7 || s.Passed != 1 || s.Warned != 2 || s.Failed != 3 || s.Errors != 1 {
		t.Errorf("check summary = %+v", s)
	}
	m := testMeasureSummary()
	if m.Files != 7 || m.Errors != 1 || m.Measured() != 6 {
		t.Errorf("measure summary = %+v", m)
	}
	// A result whose measurement failed counts as an error whatever verdict
	// it carries, and its (zero) duration adds nothing.
	var e Summary
	e.Add(&rules.Result{Measurement: &measure.Measurement{Error: "x", DurationS: 9}, Verdict: rules.Pass})
	if e.Errors != 1 || e.Passed != 0 || e.AudioSeconds != 0 {
		t.Errorf("failed measurement counted as %+v", e)
	}
}

func TestSortResults(t *testing.T) {
	rs := []*rules.Result{
		{Measurement: &measure.Measurement{Path: "b.wav"}, Spec: "x"},
		{Measurement: &measure.Measurement{Path: "a.wav"}, Spec: "y"},
		{Spec: "z"},
		{Measurement: &measure.Measurement{Path: "a.wav"}, Spec: "b"},
	}
	SortResults(rs)
	var got []string
	for _, r := range rs {
		got = append(got, measurementPath(r.Measurement)+"|"+r.Spec)
	}
	if want := "|z a.wav|b a.wav|y b.wav|x"; strings.Join(got, " ") != want {
		t.Errorf("sorted = %v, want %s", got, want)
	}
}
